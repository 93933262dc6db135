/**
 * The office server's checks of what a tablet sends (protocol in
 * sync-protocol.ts). Records go through the bundle schema and rules
 * (bundle.ts), so a push and a bundle accept exactly the same records.
 */
import { checkRecord } from './bundle';
import { InputError, describeValue } from '../shared/errors';
import { DEFAULT_PULL_LIMIT, MAX_PULL_LIMIT, MAX_PUSH_RECORDS, type PushRequest } from './sync-protocol';

const BATCH_ID = /^[A-Za-z0-9][A-Za-z0-9._:-]{0,99}$/;

/** Checks a parsed push body; throws InputError naming the field. */
export function checkPushBody(data: unknown): PushRequest {
  if (data === null || typeof data !== 'object' || Array.isArray(data)) {
    throw new InputError('body', `The push body must be a JSON object {batchId, records}, but it is ${describeValue(data)}.`);
  }
  const body = data as Record<string, unknown>;
  if (typeof body.batchId !== 'string' || !BATCH_ID.test(body.batchId)) {
    throw new InputError('batchId', `batchId must be 1–100 letters, digits or . _ : - (starting with a letter or digit), but it is ${describeValue(body.batchId)}.`);
  }
  if (!Array.isArray(body.records)) {
    throw new InputError('records', `records must be a list of records, but it is ${describeValue(body.records)}.`);
  }
  if (body.records.length > MAX_PUSH_RECORDS) {
    throw new InputError('records', `A push may carry at most ${MAX_PUSH_RECORDS} records, but this one has ${body.records.length}; send smaller batches.`);
  }
  const records = body.records.map((r, i) => checkRecord(r, `records[${i}]`));
  return { batchId: body.batchId, records };
}

/** Checks the pull query (since, limit). */
export function checkPullQuery(params: { get(name: string): string | null }): { since: number; limit: number } {
  const sinceText = params.get('since') ?? '0';
  if (!/^\d{1,15}$/.test(sinceText)) {
    throw new InputError('since', `since must be a cursor returned by the server (a whole number), but it is ${describeValue(sinceText)}.`);
  }
  const limitText = params.get('limit') ?? String(DEFAULT_PULL_LIMIT);
  const limit = Number(limitText);
  if (!/^\d{1,6}$/.test(limitText) || limit < 1 || limit > MAX_PULL_LIMIT) {
    throw new InputError('limit', `limit must be a whole number from 1 to ${MAX_PULL_LIMIT}, but it is ${describeValue(limitText)}.`);
  }
  return { since: Number(sinceText), limit };
}

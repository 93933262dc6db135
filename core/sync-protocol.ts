/**
 * The sync protocol between a field tablet and the office server, version 1.
 * Types for both sides, and the server's checks of what a tablet sends.
 *
 * All calls carry `Authorization: Bearer TOKEN`. Bodies are JSON (UTF-8).
 *
 * GET  /api/v1/status
 *   → 200 {server:"shearfield-office", protocol:1, device, records, conflicts, cursor}
 * POST /api/v1/push   {batchId, records: AnyRecord[]}
 *   Merges the records with the core rules (core/sync.ts) in ONE
 *   transaction and answers only after it is committed:
 *   → 200 {batchId, replay, accepted, ignored, conflicts,
 *          outcomes: [{id, type, key, action, reason}], conflicted: AnyRecord[], cursor}
 *   `conflicted` holds the stored record (with its kept versions) of every
 *   record that ended in conflict, so the tablet can show it at once.
 *   The same batch again changes nothing (all outcomes "ignore").
 * GET  /api/v1/pull?since=CURSOR&limit=N
 *   → 200 {records: AnyRecord[], cursor, more}
 *   Every record changed after CURSOR ("0" or absent = from the start),
 *   oldest change first, at most N (default 2000, at most 10,000). Pass the
 *   returned cursor back; `more` says another page waits. The tablet merges
 *   what it pulls with the same rules, so its own echoed changes are no-ops.
 *
 * Errors: {error: "a sentence"} with 400 (malformed JSON or records, the
 * field named), 401 (no or bad token), 404, 405, 413 (body over
 * MAX_PUSH_BYTES), 500 (nothing saved). A failed push writes nothing.
 */
import { checkRecord } from './bundle';
import { InputError, describeValue } from './errors';
import type { AnyRecord } from './records';
import type { MergeOutcome } from './sync';

export const PROTOCOL_VERSION = 1;
export const API_PREFIX = '/api/v1';
/** Largest push body, bytes (16 MiB: about 40,000 picks). */
export const MAX_PUSH_BYTES = 16 * 1024 * 1024;
/** Most records in one push. */
export const MAX_PUSH_RECORDS = 50_000;
/** Pull page size: default and largest. */
export const DEFAULT_PULL_LIMIT = 2000;
export const MAX_PULL_LIMIT = 10_000;

export interface PushRequest {
  /** Chosen by the tablet for this batch (1–100 letters, digits, . _ : -); a replay with the same id changes nothing. */
  batchId: string;
  records: AnyRecord[];
}

export interface PushResponse {
  batchId: string;
  /** True when the server had received this batch id before. */
  replay: boolean;
  accepted: number;
  ignored: number;
  conflicts: number;
  outcomes: MergeOutcome[];
  conflicted: AnyRecord[];
  cursor: string;
}

export interface PullResponse {
  records: AnyRecord[];
  cursor: string;
  more: boolean;
}

export interface StatusResponse {
  server: 'shearfield-office';
  protocol: number;
  device: string;
  records: number;
  conflicts: number;
  cursor: string;
}

export interface ErrorResponse {
  error: string;
  field?: string;
}

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
export function checkPullQuery(params: URLSearchParams): { since: number; limit: number } {
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

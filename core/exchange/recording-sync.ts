/**
 * Seismograph recordings between a tablet and the office: a protocol of
 * their own beside the record sync (sync-protocol.ts), so that the small
 * records stay quick and the raw files never swell a records page.
 *
 * POST /api/v1/recordings  {recordings: RecordingRecord[], files?: RecordingFile[]}
 *   Merges the records with the core rules in one transaction (each
 *   recording's site must be in the office store) and keeps each file whose
 *   recording states its SHA-256. → 200 {accepted, ignored, conflicts, cursor}
 * GET  /api/v1/recordings?since=CURSOR
 *   → 200 {recordings, files, cursor, more}: recordings changed after
 *   CURSOR, oldest first, with the raw file of each whose site chose to send
 *   it, as many as fit in MAX_RECORDINGS_PAGE_BYTES of files.
 *
 * Size: a raw file travels only when it is at most MAX_ATTACHED_FILE_BYTES
 * (its base64 then fits well inside the push limit, MAX_PUSH_BYTES); a larger
 * file stays on the device that has it and only its record travels.
 */
import { InputError, describeValue } from '../shared/errors';
import { fromBase64 } from './base64';
import { checkRecordingRecord, type RecordingFile } from './bundle';
import type { RecordingRecord } from './records';
import { MAX_ATTACHED_FILE_BYTES, MAX_RECORDINGS_PAGE_BYTES, MAX_RECORDINGS_PER_PUSH } from './sync-protocol';

// The protocol's constants and message shapes live with the other protocol
// types (sync-protocol.ts), which the field app imports without ajv.
export {
  MAX_ATTACHED_FILE_BYTES,
  MAX_RECORDINGS_PAGE_BYTES,
  MAX_RECORDINGS_PER_PUSH,
  type RecordingsPullResponse,
  type RecordingsPushRequest,
  type RecordingsPushResponse,
} from './sync-protocol';

/** A checked push: the records, and each file's bytes (its SHA-256 still to be checked by the receiver). */
export interface CheckedRecordingsPush {
  recordings: RecordingRecord[];
  files: { id: string; sha256: string; bytes: Uint8Array }[];
}

/** Checks a parsed recordings push; throws InputError naming the field. */
export function checkRecordingsPushBody(data: unknown): CheckedRecordingsPush {
  if (data === null || typeof data !== 'object' || Array.isArray(data)) {
    throw new InputError('body', `The recordings push must be a JSON object {recordings, files}, but it is ${describeValue(data)}.`);
  }
  const body = data as Record<string, unknown>;
  if (!Array.isArray(body.recordings)) {
    throw new InputError('recordings', `recordings must be a list of recording records, but it is ${describeValue(body.recordings)}.`);
  }
  if (body.recordings.length > MAX_RECORDINGS_PER_PUSH) {
    throw new InputError('recordings', `A push may carry at most ${MAX_RECORDINGS_PER_PUSH} recordings, but this one has ${body.recordings.length}; send smaller batches.`);
  }
  const recordings = body.recordings.map((r, i) => checkRecordingRecord(r, `recordings[${i}]`));
  const byId = new Map(recordings.map((r) => [r.id, r]));
  if (body.files !== undefined && !Array.isArray(body.files)) {
    throw new InputError('files', `files must be a list of raw files, but it is ${describeValue(body.files)}.`);
  }
  const files = ((body.files as unknown[] | undefined) ?? []).map((f, i) => {
    const where = `files[${i}]`;
    const file = f as Partial<RecordingFile> | null;
    if (file === null || typeof file !== 'object' || typeof file.id !== 'string' || typeof file.sha256 !== 'string' || typeof file.bytes_base64 !== 'string') {
      throw new InputError(where, `${where} must be an object {id, sha256, bytes_base64}, but it is ${describeValue(f)}.`);
    }
    const rec = byId.get(file.id);
    if (!rec) throw new InputError(`${where}.id`, `${where}.id names recording ${describeValue(file.id)}, which is not in this push; send the record with its file.`);
    if (file.sha256 !== rec.sha256) throw new InputError(`${where}.sha256`, `${where}.sha256 differs from the SHA-256 its recording states; the file is not the one recorded.`);
    if (rec.byteLength > MAX_ATTACHED_FILE_BYTES) {
      throw new InputError(`${where}`, `${where} is ${rec.byteLength} bytes; files over ${MAX_ATTACHED_FILE_BYTES} bytes do not travel by sync (their records do).`);
    }
    const bytes = fromBase64(file.bytes_base64, `${where}.bytes_base64`);
    if (bytes.length !== rec.byteLength) {
      throw new InputError(`${where}.bytes_base64`, `${where} holds ${bytes.length} bytes, but its recording states ${rec.byteLength}; the file is cut short or not the one recorded.`);
    }
    return { id: file.id, sha256: file.sha256, bytes };
  });
  return { recordings, files };
}

/** Checks the recordings pull query (since). */
export function checkRecordingsPullQuery(params: { get(name: string): string | null }): { since: number } {
  const sinceText = params.get('since') ?? '0';
  if (!/^\d{1,15}$/.test(sinceText)) {
    throw new InputError('since', `since must be a cursor returned by the server (a whole number), but it is ${describeValue(sinceText)}.`);
  }
  return { since: Number(sinceText) };
}

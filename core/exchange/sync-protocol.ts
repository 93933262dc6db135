/**
 * The sync protocol between a field tablet and the office server, version 1.
 * Types for both sides, and the server's checks of what a tablet sends.
 *
 * All calls carry `Authorization: Bearer TOKEN`. Bodies are JSON (UTF-8).
 *
 * GET  /api/v1/status
 *   → 200 {server:"shearfield-office", protocol:1, device, records, conflicts, cursor}
 * POST /api/v1/push   {batchId, records: AnyRecord[]}
 *   Merges the records with the core rules (core/exchange/sync.ts) in ONE
 *   transaction and answers only after it is committed:
 *   → 200 {batchId, replay, accepted, ignored, conflicts,
 *          outcomes: [{id, type, key, action, reason}], conflicted: AnyRecord[], cursor}
 *   `conflicted` holds the stored record (with its kept versions) of every
 *   record that ended in conflict, so the tablet can show it at once.
 *   The same batch again changes nothing (all outcomes "ignore").
 * GET  /api/v1/pull?since=CURSOR&limit=N
 *   → 200 {records: AnyRecord[], cursor, more, seqs}
 *   Every record changed after CURSOR ("0" or absent = from the start),
 *   oldest change first, at most N (default 2000, at most 10,000). Pass the
 *   returned cursor back; `more` says another page waits. The tablet merges
 *   what it pulls with the same rules, so its own echoed changes are no-ops.
 *
 * Errors: {error: "a sentence"} with 400 (malformed JSON or records, the
 * field named), 401 (no or bad token), 404, 405, 413 (body over
 * MAX_PUSH_BYTES), 500 (nothing saved). A failed push writes nothing.
 *
 * Types and constants only (the field app imports them); the server's
 * checks of incoming bodies are in sync-protocol-check.ts.
 */
import type { RecordingFile } from './bundle';
import type { AnyRecord, RecordingRecord } from './records';
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
  /**
   * The cursor just after each record (same order as `records`), so a
   * tablet that cannot store records[i] keeps its cursor at seqs[i - 1] and
   * skips nothing. Absent from servers before this field was added.
   */
  seqs?: string[];
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

// Seismograph recordings travel by a protocol of their own
// (recording-sync.ts holds its description and the server's checks).

/** Largest raw file that travels by sync, bytes (8 MiB; its base64 is under 11 MiB). */
export const MAX_ATTACHED_FILE_BYTES = 8 * 1024 * 1024;
/** Most recordings in one push or pull page. */
export const MAX_RECORDINGS_PER_PUSH = 1000;
/** Raw bytes of files in one pull page (the first file of a page always goes). */
export const MAX_RECORDINGS_PAGE_BYTES = 8 * 1024 * 1024;

export interface RecordingsPushRequest {
  recordings: RecordingRecord[];
  files?: RecordingFile[];
}

export interface RecordingsPushResponse {
  accepted: number;
  ignored: number;
  conflicts: number;
  cursor: string;
}

export interface RecordingsPullResponse {
  recordings: RecordingRecord[];
  files: RecordingFile[];
  cursor: string;
  more: boolean;
}

/**
 * The tablet's side of syncing seismograph recordings
 * (core/exchange/recording-sync.ts): after the records, queued recording
 * changes go to the office with the raw files of sites that chose to send
 * them (files over MAX_ATTACHED_FILE_BYTES stay on the tablet; their records
 * travel), then recordings changed at the office come back, each file
 * checked against its SHA-256 before anything is stored.
 */
import { fromBase64, toBase64 } from '../../core/exchange/base64';
import type { RecordingFile } from '../../core/exchange/bundle';
import type { AnyRecord, RecordingRecord } from '../../core/exchange/records';
import {
  MAX_ATTACHED_FILE_BYTES,
  MAX_RECORDINGS_PAGE_BYTES,
  MAX_RECORDINGS_PER_PUSH,
  type RecordingsPullResponse,
  type RecordingsPushResponse,
} from '../../core/exchange/sync-protocol';
import { planMerge } from '../../core/exchange/sync';
import type { FieldStore } from '../store';
import { sha256Hex } from '../store/recordings';

/**
 * One call to the office: the sync client's own request (auth, timeouts,
 * plain-word errors); undefined when the office does not have the call (an
 * office from before recordings travelled: they then stay queued).
 */
export type OfficeCall = <T>(method: 'GET' | 'POST', path: string, body?: unknown) => Promise<T | undefined>;

/** The setting that holds the recordings pull cursor (reset with the records cursor). */
export const RECORDINGS_CURSOR_KEY = 'sync.recordingsCursor';

/**
 * Sends the queued recording changes (not those of `heldSites`), in batches
 * of at most MAX_RECORDINGS_PER_PUSH records and about
 * MAX_RECORDINGS_PAGE_BYTES of files, and acknowledges each batch's outbox
 * entries once the office has committed it. Returns how many were sent.
 */
export async function pushRecordings(store: FieldStore, call: OfficeCall, heldSites: ReadonlySet<string>): Promise<{ pushed: number; conflicts: number }> {
  const entries = (await store.outbox()).filter((e) => e.type === 'recording');
  if (entries.length === 0) return { pushed: 0, conflicts: 0 };
  const byId = new Map((await store.allRecordings()).map((r) => [r.id, r]));
  const seqsOf = new Map<string, number[]>();
  const orphans: number[] = [];
  for (const e of entries) {
    const rec = byId.get(e.recordId);
    if (!rec) {
      orphans.push(e.seq);
      continue;
    }
    if (heldSites.has(rec.siteId)) continue;
    seqsOf.set(rec.id, [...(seqsOf.get(rec.id) ?? []), e.seq]);
  }
  let pushed = 0;
  let conflicts = 0;
  let batch: RecordingRecord[] = [];
  let files: RecordingFile[] = [];
  let bytes = 0;
  const flush = async () => {
    if (batch.length === 0) return;
    const reply = await call<RecordingsPushResponse>('POST', '/api/v1/recordings', { recordings: batch, files });
    if (!reply) {
      // The office does not take recordings yet: they stay queued for a later sync.
      batch = [];
      files = [];
      bytes = 0;
      return false;
    }
    await store.ackOutbox(batch.flatMap((r) => seqsOf.get(r.id) ?? []));
    pushed += batch.length;
    conflicts += reply.conflicts;
    batch = [];
    files = [];
    bytes = 0;
    return true;
  };
  for (const id of seqsOf.keys()) {
    const rec = byId.get(id)!;
    const raw = rec.attach && !rec.deleted && rec.byteLength <= MAX_ATTACHED_FILE_BYTES ? await store.recordingBytes(id) : undefined;
    if (batch.length >= MAX_RECORDINGS_PER_PUSH || (batch.length > 0 && raw && bytes + raw.byteLength > MAX_RECORDINGS_PAGE_BYTES)) {
      if (!(await flush())) return { pushed, conflicts };
    }
    batch.push(rec);
    if (raw) {
      files.push({ id, sha256: rec.sha256, bytes_base64: toBase64(raw) });
      bytes += raw.byteLength;
    }
  }
  if (!(await flush())) return { pushed, conflicts };
  if (orphans.length > 0) await store.ackOutbox(orphans);
  return { pushed, conflicts };
}

/**
 * Pulls the recordings changed at the office since the last pull, merges
 * them with the core rules and keeps the files that come with them. A file
 * whose bytes do not have its recording's SHA-256 stops the pull before
 * anything of that page is stored (the cursor stays). Returns how many
 * recordings arrived.
 */
export async function pullRecordings(store: FieldStore, call: OfficeCall): Promise<{ pulled: number; conflicts: number }> {
  let cursor = (await store.getSetting<string>(RECORDINGS_CURSOR_KEY)) || '0';
  let pulled = 0;
  let conflicts = 0;
  for (;;) {
    const page = await call<RecordingsPullResponse>('GET', `/api/v1/recordings?since=${encodeURIComponent(cursor)}`);
    // An office without recordings (404, or an answer without a recordings list) has nothing to send.
    if (!page || !Array.isArray(page.recordings)) return { pulled, conflicts };
    const files = new Map<string, { sha256: string; bytes: Uint8Array }>();
    for (const [i, f] of (Array.isArray(page.files) ? page.files : []).entries()) {
      const bytes = fromBase64(f.bytes_base64, `files[${i}].bytes_base64`).slice();
      if ((await sha256Hex(bytes)) !== f.sha256) {
        throw new Error(`the office sent a raw file (recording ${JSON.stringify(f.id)}) whose bytes do not have the SHA-256 its recording states; nothing of it was stored`);
      }
      files.set(f.id, { sha256: f.sha256, bytes });
    }
    const stored = new Map((await store.allRecordings()).map((r) => [r.id, r]));
    const plan = planMerge(page.recordings as unknown as AnyRecord[], (id) => stored.get(id) as unknown as AnyRecord | undefined, { from: 'office' });
    const writes = plan.writes as unknown as RecordingRecord[];
    const expectedRevs = new Map(writes.map((w) => [w.id, stored.get(w.id)?.rev ?? 0]));
    await store.putIncoming(writes, { expectedRevs, files });
    pulled += page.recordings.length;
    conflicts += plan.conflicts;
    cursor = page.cursor;
    await store.putSetting(RECORDINGS_CURSOR_KEY, cursor);
    if (!page.more) return { pulled, conflicts };
  }
}

/**
 * The pieces of keeping a seismograph file that are not IndexedDB: checking
 * what the app hands over, the SHA-256 of the raw bytes (Web Crypto), and
 * whether the device has room for the file. They run before the write's
 * transaction (inside one, only IndexedDB may be awaited).
 */
import { InputError, describeValue } from '../../core/shared/errors';
import type { RecordingRecord } from '../../core/exchange/records';
import {
  checkRecordingGeometry,
  checkRecordingName,
  checkRecordingOverrides,
  MAX_RECORDING_BYTES,
} from '../../core/exchange/recording-record';
import type { SaveRecordingInput } from './field-store';

/** What StorageManager.estimate() answers (WHATWG Storage Standard); either may be missing. */
export interface StorageEstimate {
  usage?: number;
  quota?: number;
}

/** Room kept free after a file is saved, bytes, so that picks and estimates can still be written (common practice for this tool). */
export const STORAGE_RESERVE_BYTES = 8 * 1024 * 1024;
/** Room the record, the outbox entry and IndexedDB's own bookkeeping take besides the bytes (a generous bound). */
const RECORD_OVERHEAD_BYTES = 64 * 1024;

/** A size in words: MB (MiB) from 1 MB up, else kB (KiB) from 1 kB up, else bytes. */
export function sizeText(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(1)} kB`;
  return `${bytes} bytes`;
}
const mb = sizeText;

/**
 * Checks the input of saveRecording and builds the record without its hash
 * and attach choice (set once known). Throws an InputError naming the field.
 */
export function recordingOfInput(input: SaveRecordingInput, now: Date): Omit<RecordingRecord, 'sha256' | 'attach'> {
  if (!input || typeof input !== 'object') throw new InputError('recording', 'The recording to save must be an object.');
  if (typeof input.siteId !== 'string' || input.siteId.trim() === '' || input.siteId.length > 100) {
    throw new InputError('siteId', `siteId must name the site (1–100 characters), but it is ${describeValue(input.siteId)}.`);
  }
  const name = checkRecordingName(input.name);
  if (!(input.bytes instanceof Uint8Array)) {
    throw new InputError('bytes', `bytes must be the file's raw bytes (a Uint8Array), but it is ${describeValue(input.bytes)}.`);
  }
  if (input.bytes.byteLength === 0) throw new InputError('bytes', `The file "${name}" is empty; there is nothing to keep.`);
  if (input.bytes.byteLength > MAX_RECORDING_BYTES) {
    throw new InputError('bytes', `The file "${name}" is ${mb(input.bytes.byteLength)}; files of at most ${mb(MAX_RECORDING_BYTES)} are kept.`);
  }
  const geometry = checkRecordingGeometry(input.geometry);
  const overrides = checkRecordingOverrides(input.overrides, geometry.traces);
  if (input.attach !== undefined && typeof input.attach !== 'boolean') {
    throw new InputError('attach', `attach must be true or false, but it is ${describeValue(input.attach)}.`);
  }
  const iso = now.toISOString();
  return {
    type: 'recording',
    id: crypto.randomUUID(),
    rev: 1,
    updatedAt: iso,
    siteId: input.siteId,
    name,
    format: geometry.format,
    byteLength: input.bytes.byteLength,
    geometry,
    overrides,
    addedAt: iso,
  };
}

/** SHA-256 (FIPS 180-4) of some bytes, as 64 lower-case hex digits, through Web Crypto. */
export async function sha256Hex(bytes: Uint8Array<ArrayBuffer>): Promise<string> {
  const digest = new Uint8Array(await crypto.subtle.digest('SHA-256', bytes));
  let hex = '';
  for (const b of digest) hex += b.toString(16).padStart(2, '0');
  return hex;
}

/**
 * Whether the device has room for a file of `byteLength` bytes (plus the
 * reserve): undefined when it has (or when the browser does not say), else
 * the sentence that tells the crew how much is missing.
 */
export async function roomFor(byteLength: number, estimate: () => Promise<StorageEstimate>): Promise<string | undefined> {
  let e: StorageEstimate;
  try {
    e = await estimate();
  } catch {
    return undefined; // No answer: the write itself still fails cleanly when the disk is full.
  }
  if (typeof e.quota !== 'number' || typeof e.usage !== 'number' || !Number.isFinite(e.quota) || !Number.isFinite(e.usage)) return undefined;
  const free = Math.max(0, e.quota - e.usage);
  const need = byteLength + RECORD_OVERHEAD_BYTES + STORAGE_RESERVE_BYTES;
  if (free >= need) return undefined;
  return (
    `The device has ${mb(free)} of storage left for this app, too little for this ${mb(byteLength)} file ` +
    `and the ${mb(STORAGE_RESERVE_BYTES)} kept free for picks and estimates; free some space (for example delete recordings or old sites after exporting them).`
  );
}

/**
 * The `records` slice of the app state, shared by the two controllers of
 * the Records view: records-controller.ts (the seismograph files: reading,
 * keeping, geometry) and ridge-controller.ts (the dispersion image, the
 * ridge and the picks taken from it). Both send their worker calls through
 * one LatestOnly, so a new reading aborts a stale image and back.
 */
import type { Recording } from '../../../core/recordings/recording';
import type { DispersionImage, ImageMethod } from '../../../core/signal/image';
import type { Ridge } from '../../../core/signal/ridge';
import { computeImage, computeReadRecord, computeRidge } from '../../worker/bridge';

/** One record kept for the session. */
export interface SessionRecord {
  id: string;
  siteId: string;
  name: string;
  /** The file's bytes: null for the invented demo record; undefined for a stored record not read from the store yet. */
  bytes: Uint8Array | null | undefined;
  /** Kept in the on-device store (false: this session only). */
  stored: boolean;
  /** The record as read with the current overrides; undefined while geometry is missing. */
  recording?: Recording;
  /** Why the record cannot be imaged yet (missing geometry), in the reader's words. */
  askFor: string[];
  warnings: string[];
  invented: boolean;
}

export interface RecordsState {
  /** The open site's records this session. */
  list: readonly SessionRecord[];
  openId?: string;
  method: ImageMethod;
  /** Multiple-filter: the trace (0-based); undefined = the farthest. */
  trace?: number;
  /** Geometry overrides as typed (m, m, s). */
  overrides: { first: string; spacing: string; delay: string };
  status: 'idle' | 'reading' | 'imaging' | 'ready' | 'following' | 'error';
  error?: string;
  image?: DispersionImage;
  ridge?: Ridge;
  /** Kept range of the ridge's points [from, to] (inclusive), trimmed by dragging the ends. */
  range?: [number, number];
  /** Indices of deleted ridge points. */
  removed: readonly number[];
  /** The ridge's mode as typed. */
  mode: string;
  /** Where the ridge stopped and why, in words. */
  ridgeNote?: string;
  /** The site whose stored records are listed. */
  loadedSiteId?: string;
}

/** The slice with no record open (a fresh app, or another site opened). */
export function emptyRecordsState(): RecordsState {
  return { list: [], method: 'phase-shift', overrides: { first: '', spacing: '', delay: '' }, status: 'idle', mode: '0', removed: [] };
}

/** The open record of the slice, if any. */
export function openRecord(s: RecordsState): SessionRecord | undefined {
  return s.list.find((r) => r.id === s.openId);
}

/** The worker calls the Records controllers make (the bridge's by default; tests run them in-process). */
export interface RecordsCompute {
  read: typeof computeReadRecord;
  image: typeof computeImage;
  ridge: typeof computeRidge;
}

export const RECORDS_BRIDGE: RecordsCompute = { read: computeReadRecord, image: computeImage, ridge: computeRidge };

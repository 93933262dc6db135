/**
 * The stored records: what the field app keeps in IndexedDB, what a site
 * bundle carries and what the office store holds. One shape everywhere, so
 * that merge rules (sync) live in core and every side agrees on them.
 *
 * Every record has a stable id (a random UUID made where it was created)
 * and a revision counter `rev` that goes up by one on every saved change.
 */
import type { Pick } from '../picks/picks';
import type { SiteLayeredModel } from '../site/site-model';

export type { SiteLayeredModel } from '../site/site-model';
import type { GeometryOverrides, GeometrySummary, RecordingFormat } from '../recordings/recording';
import { historyAfter } from './revision';

export interface RecordMeta {
  /** Stable id, a UUID; never reused. */
  id: string;
  /** Revision counter: 1 when created, +1 on every saved change. */
  rev: number;
  /** When this revision was saved, ISO 8601 (UTC). */
  updatedAt: string;
  /** A deletion is a revision too (a tombstone), so that it syncs. */
  deleted?: boolean;
  /**
   * Lineage for sync (core/exchange/revision.ts, core/exchange/sync.ts): the revision keys
   * (`"<rev>-<hash>"`) this revision was made from, oldest first, at most
   * 64. Set by `nextRevision`; absent on a first revision.
   */
  history?: string[];
  /**
   * Other versions of this record made concurrently elsewhere (the same
   * record edited on two devices from the same revision). Both are kept:
   * this record is the one shown, these wait for review. Set only by the
   * merge rules (core/exchange/sync.ts); cleared by `resolveConflict`.
   */
  conflicts?: ConflictVersion[];
}

/** A concurrent version kept beside the shown one, for review (core/exchange/sync.ts). */
export interface ConflictVersion {
  /** Its revision key, `"<rev>-<hash>"`. */
  key: string;
  /** Where it came from, when known (a device name or a bundle), for the reviewer. */
  from?: string;
  /** The version itself, without its own `conflicts`. */
  record: Omit<AnyRecord, 'conflicts'>;
}

/** A site location in WGS 84 degrees (as GeoJSON, RFC 7946, expects). */
export interface SiteLocation {
  lat: number;
  lon: number;
  /** Horizontal accuracy, m, when the device reported one. */
  accuracy_m?: number;
  /** Where the position came from. */
  source: 'device' | 'typed';
}

/** What the crew states as known before estimating; omitted speeds are free. */
export interface EstimateSettings {
  /** Known layer shear speed, m/s; undefined = free. */
  vs1?: number;
  /** Known half-space shear speed, m/s; undefined = free. */
  vs2?: number;
  /** Layer density, kg/m³; undefined = documented default. */
  density1?: number;
  /** Half-space density, kg/m³; undefined = documented default. */
  density2?: number;
  /** Search bounds, m and m/s. */
  thicknessRange?: [number, number];
  vs1Range?: [number, number];
  vs2Range?: [number, number];
}

export interface SiteRecord extends RecordMeta {
  type: 'site';
  name: string;
  /** Survey date, YYYY-MM-DD. */
  date: string;
  crew: string;
  notes: string;
  location?: SiteLocation;
  /** How picks are entered and shown for this site. */
  axisUnit: 'hz' | 's';
  settings: EstimateSettings;
  /** The layer builder's model, kept with the site so that it syncs and travels (core/site/site-model.ts). */
  layeredModel?: SiteLayeredModel;
}



export interface PickRecord extends RecordMeta, Omit<Pick, 'id'> {
  type: 'pick';
  siteId: string;
  /** Position in the site's table (rows keep the crew's order). */
  order: number;
}

/** A saved estimate summary (the full result is recomputed on demand). */
export interface EstimateRecord extends RecordMeta {
  type: 'estimate';
  siteId: string;
  settings: EstimateSettings;
  /** Compact JSON-safe summary of the result, as the CLI prints it. */
  summary: Record<string, unknown>;
  computedAt: string;
}

export type AnyRecord = SiteRecord | PickRecord | EstimateRecord;
export type RecordType = AnyRecord['type'];

/**
 * The parsed geometry of a seismograph file as plain JSON, the shape
 * `shearfield record` prints (core/recordings/recording.ts geometrySummary);
 * an offset the file does not give is null.
 */
export type RecordingGeometryJson = GeometrySummary;

/**
 * A seismograph file kept with its site (SEG-Y, SEG-2 or CSV traces). The
 * record holds what the file is and the geometry read from it; the raw
 * bytes are kept apart (the field store's `recordingBytes`), named by the
 * record's id and checked by `sha256`. Checked by
 * core/exchange/recording-record.ts.
 */
export interface RecordingRecord extends RecordMeta {
  type: 'recording';
  siteId: string;
  /** The file name as the crew chose it (shown, never parsed). */
  name: string;
  format: RecordingFormat;
  /** Size of the raw file, bytes. */
  byteLength: number;
  /** SHA-256 of the raw file (FIPS 180-4), 64 lower-case hex digits. */
  sha256: string;
  /** What the reader found in the file. */
  geometry: RecordingGeometryJson;
  /** What the crew set over the file's geometry (first offset and spacing, delay, component). */
  overrides: GeometryOverrides;
  /** Whether the raw bytes travel with the record to the office and in bundles (the site's choice). */
  attach: boolean;
  /** When the file was added to the site, ISO 8601 (UTC). */
  addedAt: string;
}

/** Every kind of record the field store keeps. */
export type StoredRecord = AnyRecord | RecordingRecord;

/**
 * A new revision of a record: same id, rev + 1, fresh time, and `history`
 * extended by the key of the revision it was made from (so sync can tell an
 * edit of what the office has from a concurrent one). Records are immutable.
 */
export function nextRevision<T extends StoredRecord>(record: T, changes: Partial<Omit<T, 'id' | 'rev' | 'type' | 'history'>>, now = new Date()): T {
  return {
    ...record,
    ...changes,
    id: record.id,
    type: record.type,
    rev: record.rev + 1,
    updatedAt: now.toISOString(),
    history: historyAfter(record),
  };
}

// The invented demo site (its picks come from demo.ts).

/** The invented site's descriptive fields. */
export const DEMO_SITE = Object.freeze({
  name: 'Invented demo: Kestrel Bend terrace fill',
  date: '2026-04-14',
  crew: 'Demo crew (invented)',
  notes:
    'INVENTED SCENARIO for trying the app; not a real site. Made-up river-terrace fill: ' +
    '7.5 m of loose sandy gravel (190 m/s) over weathered mudstone (560 m/s). ' +
    'Picks are the model\'s Love-wave group velocities plus seeded 3 % noise.',
  location: Object.freeze({ lat: 51.4321, lon: -2.1234, source: 'typed' as const }),
  axisUnit: 'hz' as const,
});

/**
 * True for the invented demo site as the app installs it (its invented name
 * and crew). The app keeps such a site out of sync and out of "export all"
 * unless the crew asks for it, so that invented data never reaches the
 * office by accident. A site renamed by the crew is theirs and travels.
 */
export function isDemoSite(site: { type: string; name?: string; crew?: string }): boolean {
  return site.type === 'site' && site.name === DEMO_SITE.name && site.crew === DEMO_SITE.crew;
}

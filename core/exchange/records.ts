/**
 * The stored records: what the field app keeps in IndexedDB, what a site
 * bundle carries and what the office store holds. One shape everywhere, so
 * that merge rules (sync) live in core and every side agrees on them.
 *
 * Every record has a stable id (a random UUID made where it was created)
 * and a revision counter `rev` that goes up by one on every saved change.
 */
import { checkRayleighModel, modelFromJson, type ModelJson } from '../dispersion/model';
import type { Pick } from '../picks/picks';
import { InputError, describeValue } from '../shared/errors';
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
  /** The layer builder's model, kept with the site so that it syncs and travels (checked by `checkSiteModel`). */
  layeredModel?: SiteLayeredModel;
}

/** Most layers over the half-space a site's model holds (the layer builder's limit). */
export const MAX_SITE_MODEL_LAYERS = 8;
/** Modes drawn per wave: the fundamental and up to four more. */
export const MAX_SITE_MODEL_MODES = 5;

/**
 * The layer builder's N-layer model kept with a site: the model in the
 * model file's JSON form (units in the field names, as `shearfield curve`
 * reads it), and how the crew typed and drew it. Only a model that passes
 * every check is kept; a site's other fields and this one change together,
 * by the site's merge rules (core/exchange/sync.ts).
 */
export interface SiteLayeredModel {
  /** The layers and half-space (core/dispersion/model.ts ModelJson); P speeds for all or for none. */
  model: ModelJson;
  /** What the crew types for the P waves: the P speed, or Poisson's ratio (`vp_m_s` then holds the P speed it gives). */
  pInput: 'vp' | 'poisson';
  /** The waves the builder draws. */
  waves: { love: boolean; rayleigh: boolean };
  /** Modes drawn per wave, 1 to MAX_SITE_MODEL_MODES. */
  modes: number;
}

/** InputError `e` from the model file's checks, its field and message moved under `prefix` (e.g. "sites[0].layeredModel.model"). */
function underField(e: InputError, prefix: string): InputError {
  const text = e.message.startsWith(e.field) ? `${prefix}.${e.message}` : `In ${prefix}, ${e.message.charAt(0).toLowerCase()}${e.message.slice(1)}`;
  return new InputError(`${prefix}.${e.field}`, text);
}

/**
 * Checks a site's layered model (`field` names it, e.g.
 * "sites[0].layeredModel"): the model by the model file's rules
 * (core/dispersion/model.ts: every thickness, speed and density in bounds,
 * a half-space faster than the slowest layer), at most
 * MAX_SITE_MODEL_LAYERS layers, P speeds for every layer and the
 * half-space or for none, and, when Rayleigh waves are drawn, P speeds
 * above √(4/3) times the shear speed. Throws one InputError whose sentence
 * names the layer and field of the first bad value.
 */
export function checkSiteModel(value: unknown, field: string): SiteLayeredModel {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new InputError(field, `${field} must be an object {model, pInput, waves, modes}, but it is ${describeValue(value)}.`);
  }
  const m = value as Record<string, unknown>;
  if (m.pInput !== 'vp' && m.pInput !== 'poisson') {
    throw new InputError(`${field}.pInput`, `${field}.pInput must be "vp" or "poisson", but it is ${describeValue(m.pInput)}.`);
  }
  const waves = m.waves as Record<string, unknown> | null;
  if (waves === null || typeof waves !== 'object' || Array.isArray(waves)) {
    throw new InputError(`${field}.waves`, `${field}.waves must be an object {love, rayleigh}, but it is ${describeValue(m.waves)}.`);
  }
  for (const w of ['love', 'rayleigh']) {
    if (typeof waves[w] !== 'boolean') throw new InputError(`${field}.waves.${w}`, `${field}.waves.${w} must be true or false, but it is ${describeValue(waves[w])}.`);
  }
  if (typeof m.modes !== 'number' || !Number.isInteger(m.modes) || m.modes < 1 || m.modes > MAX_SITE_MODEL_MODES) {
    throw new InputError(`${field}.modes`, `${field}.modes must be a whole number from 1 to ${MAX_SITE_MODEL_MODES}, but it is ${describeValue(m.modes)}.`);
  }
  const at = `${field}.model`;
  const json = m.model as { layers?: unknown } | null;
  if (json === null || typeof json !== 'object' || Array.isArray(json)) {
    throw new InputError(at, `${at} must be an object {layers, halfspace}, but it is ${describeValue(m.model)}.`);
  }
  if (Array.isArray(json.layers) && json.layers.length > MAX_SITE_MODEL_LAYERS) {
    throw new InputError(`${at}.layers`, `${at}.layers lists ${json.layers.length} layers; a site's model holds at most ${MAX_SITE_MODEL_LAYERS} over the half-space.`);
  }
  let model;
  try {
    model = modelFromJson(json);
  } catch (e) {
    throw e instanceof InputError ? underField(e, at) : e;
  }
  const rows = [...model.layers.map((l, i) => ({ vp: l.vp, name: `layers[${i}]` })), { vp: model.halfspace.vp, name: 'halfspace' }];
  const given = rows.filter((r) => r.vp !== undefined).length;
  if (given > 0 && given < rows.length) {
    const missing = rows.find((r) => r.vp === undefined)!;
    throw new InputError(
      `${at}.${missing.name}.vp_m_s`,
      `${at}.${missing.name}.vp_m_s is missing; give the P speed of every layer and of the half-space, or of none (Love waves need none).`,
    );
  }
  if (waves.rayleigh === true) {
    try {
      checkRayleighModel(model, 'file');
    } catch (e) {
      throw e instanceof InputError ? underField(e, at) : e;
    }
  }
  return value as SiteLayeredModel;
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

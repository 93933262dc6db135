/**
 * The site bundle: one JSON file carrying one or more sites with their
 * picks and saved estimates (notes travel inside the site and pick
 * records), for moving survey records between tablets and the office
 * without a network.
 *
 * Format (schema/site-bundle.schema.json, JSON Schema draft-07):
 *
 *   { "format": "shearfield-site-bundle", "version": 1,
 *     "exportedAt": ISO 8601 UTC, "exportedBy"?: text,
 *     "caution": the screening caution (core/shared/caution.ts),
 *     "sites": SiteRecord[], "picks": PickRecord[], "estimates": EstimateRecord[],
 *     "recordings"?: RecordingRecord[], "recordingFiles"?: [{id, sha256, bytes_base64}] }
 *
 * Seismograph files (optional, added within format version 1): the
 * recording records always travel with their site; a raw file travels in
 * `recordingFiles` (base64, RFC 4648) only when its recording's `attach` is
 * set (the site's choice). A reader that predates them refuses such a file
 * with "unknown field", and changes nothing.
 *
 * Records are exactly the stored records (core/exchange/records.ts), deletions
 * (tombstones), lineage (`history`) and kept conflicts included, so an
 * import merges by id and revision with the sync rules (core/exchange/sync.ts): it
 * never duplicates a record and never replaces a newer revision with an
 * older one.
 *
 * Reading is all or nothing: `parseBundle` checks the whole file (JSON
 * syntax, format name and version, the schema, pick rules, references and
 * revision keys) and throws one InputError with a full sentence saying what
 * is wrong before anything can be written. Text fields are data, never
 * markup: a note holding `<script>` is kept and shown as those characters.
 *
 * The schema check uses ajv (a general-purpose JSON Schema validator); the
 * app loads this module lazily so ajv stays out of its first download.
 */
import Ajv, { type ErrorObject, type ValidateFunction } from 'ajv';
import schema from '../../schema/site-bundle.schema.json';
import { CAUTION } from '../shared/caution';
import { InputError, describeValue } from '../shared/errors';
import { checkDensity, checkShearSpeed, checkThickness } from '../dispersion/model';
import { checkSiteModel } from '../site/site-model';
import { validatePick } from '../picks/picks';
import type { AnyRecord, EstimateRecord, EstimateSettings, PickRecord, RecordingRecord, RecordType, SiteRecord } from './records';
import { fromBase64 } from './base64';
import { checkRecordingFields } from './recording-record';
import { checkDocumentDepth, checkRecordLimits } from './record-limits';
import { revisionKey } from './revision';
import { planMerge, type MergePlan } from './sync';

/** The `format` field every bundle carries. */
export const BUNDLE_FORMAT = 'shearfield-site-bundle';
/** The format version this code writes and the newest it reads. */
export const BUNDLE_VERSION = 1;
/** Largest bundle read, in characters (64 Mi; about 150,000 picks with notes). Common practice, chosen for this tool. */
export const MAX_BUNDLE_CHARS = 64 * 1024 * 1024;

export interface SiteBundle {
  format: typeof BUNDLE_FORMAT;
  version: typeof BUNDLE_VERSION;
  exportedAt: string;
  exportedBy?: string;
  caution: string;
  sites: SiteRecord[];
  picks: PickRecord[];
  estimates: EstimateRecord[];
  /** Seismograph files kept with the sites (the records; absent when there are none). */
  recordings?: RecordingRecord[];
  /** The raw files of recordings whose site chose to send them. */
  recordingFiles?: RecordingFile[];
}

/** A raw seismograph file inside a bundle or a sync body. */
export interface RecordingFile {
  /** The recording record's id. */
  id: string;
  /** SHA-256 of the bytes, as the record states it (the receiver checks it). */
  sha256: string;
  /** The bytes, base64 (RFC 4648 §4). */
  bytes_base64: string;
}

/** How `makeBundle` writes a bundle. */
export interface BundleOptions {
  /** A device or office name recorded in the file. @default none */
  exportedBy?: string;
  /** The export time. @default the current time */
  now?: Date;
  /** Only these sites (and their picks and estimates). @default every site in `records` */
  siteIds?: readonly string[];
  /** Recording records to carry (those of the kept sites go in). @default none */
  recordings?: readonly RecordingRecord[];
  /** Raw files to carry: only those of carried, live recordings whose `attach` is set go in. @default none */
  recordingFiles?: readonly RecordingFile[];
}

// --- Schema check (compiled once, on first use) ---------------------------------

let validators: Record<'bundle' | RecordType | 'recording', ValidateFunction> | undefined;

function compiled(): Record<'bundle' | RecordType | 'recording', ValidateFunction> {
  if (!validators) {
    const ajv = new Ajv({ allErrors: false, strict: true, allowUnionTypes: true });
    ajv.addSchema(schema);
    const id = schema.$id;
    validators = {
      bundle: ajv.getSchema(id)!,
      site: ajv.getSchema(`${id}#/definitions/site`)!,
      pick: ajv.getSchema(`${id}#/definitions/pick`)!,
      estimate: ajv.getSchema(`${id}#/definitions/estimate`)!,
      recording: ajv.getSchema(`${id}#/definitions/recording`)!,
    };
  }
  return validators;
}

/** "/sites/0/name" → "sites[0].name" (prefixed with `root` when given). */
function fieldPath(root: string, pointer: string): string {
  let out = root;
  for (const raw of pointer.split('/').slice(1)) {
    const part = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    out += /^\d+$/.test(part) ? `[${part}]` : out === '' ? part : `.${part}`;
  }
  return out === '' ? 'the bundle' : out;
}

/** One plain sentence from ajv's first error. */
function schemaMessage(error: ErrorObject, root: string, lead: string): InputError {
  const field = fieldPath(root, error.instancePath);
  const p = error.params as Record<string, unknown>;
  let reason: string;
  switch (error.keyword) {
    case 'required':
      return new InputError(
        error.instancePath === '' && root === '' ? String(p.missingProperty) : `${field}.${String(p.missingProperty)}`,
        `${lead}: ${field} is missing the required field ${String(p.missingProperty)}.`,
      );
    case 'additionalProperties':
      return new InputError(field, `${lead}: ${field} has an unknown field ${describeValue(String(p.additionalProperty))}.`);
    case 'type':
      reason = `must be ${p.type === 'integer' ? 'a whole number' : p.type === 'object' ? 'an object' : p.type === 'array' ? 'a list' : p.type === 'string' ? 'text' : `a ${String(p.type)}`}`;
      break;
    case 'const':
      reason = `must be ${JSON.stringify(p.allowedValue)}`;
      break;
    case 'enum':
      reason = `must be one of ${(p.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(', ')}`;
      break;
    case 'pattern':
      reason = /\.(name|crew|notes)$/.test(field)
        ? 'contains a control character; only printable text, tabs and line breaks are allowed'
        : field.endsWith('id') || field.endsWith('Id')
        ? 'must be an id of 1–100 letters, digits and . _ : - (starting with a letter or digit)'
        : field.endsWith('date')
          ? 'must be a date written YYYY-MM-DD'
          : /history|key/.test(field)
            ? 'must be a revision key such as 3-0123456789abcdef'
            : 'must be an ISO 8601 UTC time such as 2026-05-04T10:30:00Z';
      break;
    case 'maxItems':
      reason = `must list at most ${String(p.limit)} items`;
      break;
    case 'minItems':
      reason = `must list at least ${String(p.limit)} item${p.limit === 1 ? '' : 's'}`;
      break;
    case 'minimum':
    case 'maximum':
      reason = `must be ${error.keyword === 'minimum' ? 'at least' : 'at most'} ${String(p.limit)}`;
      break;
    case 'false schema':
      reason = 'must not carry conflicts of its own';
      break;
    default:
      reason = error.message ?? 'is not valid';
  }
  return new InputError(field, `${lead}: ${field} ${reason}.`);
}

// --- Reading ---------------------------------------------------------------

function whereRecord(list: string, i: number): string {
  return `${list}[${i}]`;
}

function checkPickFields(p: PickRecord, where: string): void {
  validatePick(
    { frequency: p.frequency, period: p.period, velocity: p.velocity, sd: p.sd, kind: p.kind, mode: p.mode, note: p.note, time: p.time },
    where,
  );
}

function checkConflictKeys(rec: AnyRecord, where: string): void {
  rec.conflicts?.forEach((c, k) => {
    if (c.record.id !== rec.id) {
      throw new InputError(`${where}.conflicts[${k}].record.id`, `The record is not valid: ${where}.conflicts[${k}] is a version of another record (${describeValue(c.record.id)}).`);
    }
    if (revisionKey(c.record) !== c.key) {
      throw new InputError(`${where}.conflicts[${k}].key`, `The record is not valid: ${where}.conflicts[${k}].key does not match the version it names; it was changed after it was written.`);
    }
  });
}

/** Speeds, densities and ranges by the model's own checks (core/dispersion/model.ts); the layer must be slower than the half-space. */
function checkSettings(s: EstimateSettings, where: string): void {
  const f = `${where}.settings`;
  if (s.vs1 !== undefined) checkShearSpeed(s.vs1, `${f}.vs1`);
  if (s.vs2 !== undefined) checkShearSpeed(s.vs2, `${f}.vs2`);
  if (s.density1 !== undefined) checkDensity(s.density1, `${f}.density1`);
  if (s.density2 !== undefined) checkDensity(s.density2, `${f}.density2`);
  const ranges: [keyof EstimateSettings, (v: unknown, name: string) => number][] = [
    ['thicknessRange', checkThickness],
    ['vs1Range', checkShearSpeed],
    ['vs2Range', checkShearSpeed],
  ];
  for (const [key, check] of ranges) {
    const r = s[key] as [number, number] | undefined;
    if (r === undefined) continue;
    check(r[0], `${f}.${key}[0]`);
    check(r[1], `${f}.${key}[1]`);
    if (!(r[0] < r[1])) throw new InputError(`${f}.${key}`, `${f}.${key} runs from ${r[0]} to ${r[1]}; the first value must be the smaller.`);
  }
  if (s.vs1 !== undefined && s.vs2 !== undefined && !(s.vs2 > s.vs1)) {
    throw new InputError(`${f}.vs2`, `${f}.vs2 is ${s.vs2} m/s, but it must be faster than vs1 (${s.vs1} m/s) for Love waves to be trapped.`);
  }
}

/** The rules beyond the schema that every stored record meets (the field store checks the same). */
function checkRules(rec: AnyRecord, where: string, lead: string): void {
  try {
    if (rec.type === 'pick') {
      checkPickFields(rec, where);
      return;
    }
    if (rec.type === 'site') {
      if (rec.name.trim() === '') throw new InputError(`${where}.name`, `${where}.name is empty; a site needs a name.`);
      const [y, m, d] = rec.date.split('-').map(Number);
      const day = new Date(Date.UTC(y, m - 1, d));
      if (day.getUTCFullYear() !== y || day.getUTCMonth() !== m - 1 || day.getUTCDate() !== d) {
        throw new InputError(`${where}.date`, `${where}.date is ${describeValue(rec.date)}, which is not a calendar date.`);
      }
      if (rec.layeredModel !== undefined) checkSiteModel(rec.layeredModel, `${where}.layeredModel`);
    }
    checkSettings(rec.settings, where);
  } catch (e) {
    if (e instanceof InputError && rec.type !== 'pick') throw new InputError(e.field, `${lead}: ${e.message.charAt(0).toLowerCase()}${e.message.slice(1)}`);
    throw e;
  }
}

/**
 * Checks one record from an outside source (a sync push) against the
 * bundle schema and the pick rules. `where` names it in messages, e.g.
 * "records[4]". Returns it typed; throws InputError.
 */
export function checkRecord(value: unknown, where: string): AnyRecord {
  const lead = 'The record is not valid';
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new InputError(where, `${lead}: ${where} must be an object, but it is ${describeValue(value)}.`);
  }
  checkRecordLimits(value, where);
  const type = (value as { type?: unknown }).type;
  if (type !== 'site' && type !== 'pick' && type !== 'estimate') {
    throw new InputError(`${where}.type`, `${lead}: ${where}.type must be "site", "pick" or "estimate", but it is ${describeValue(type)}.`);
  }
  const validate = compiled()[type];
  if (!validate(value)) throw schemaMessage(validate.errors![0], where, lead);
  const rec = value as AnyRecord;
  checkRules(rec, where, lead);
  rec.conflicts?.forEach((c, k) => checkRules(c.record as AnyRecord, `${where}.conflicts[${k}].record`, lead));
  checkConflictKeys(rec, where);
  return rec;
}

/**
 * Checks one recording record from an outside source (a sync push) against
 * the bundle schema and the recording rules; `where` names it. Throws
 * InputError.
 */
export function checkRecordingRecord(value: unknown, where: string): RecordingRecord {
  const lead = 'The record is not valid';
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new InputError(where, `${lead}: ${where} must be an object, but it is ${describeValue(value)}.`);
  }
  checkRecordLimits(value, where);
  const validate = compiled().recording;
  if (!validate(value)) throw schemaMessage(validate.errors![0], where, lead);
  const rec = value as RecordingRecord;
  for (const [version, at] of [[rec, where], ...(rec.conflicts ?? []).map((c, k) => [c.record, `${where}.conflicts[${k}].record`])] as [RecordingRecord, string][]) {
    try {
      checkRecordingFields(version as unknown as Record<string, unknown>);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(`${at}.${e.field}`, `${lead}: in ${at}, ${e.message.charAt(0).toLowerCase()}${e.message.slice(1)}`);
      throw e;
    }
  }
  checkConflictKeys(rec as unknown as AnyRecord, where);
  return rec;
}

/**
 * The reference rule every batch from outside meets, a sync push and a
 * bundle alike: a pick or an estimate (and each version its conflicts list
 * carries) belongs to a site that is in the same batch or already stored
 * (`siteStored`). Throws an InputError naming the first record that breaks
 * it (`records[i]`, its type and id) and the missing site.
 */
export function checkSiteReferences(records: readonly AnyRecord[], siteStored: (id: string) => boolean): void {
  const inBatch = new Set(records.filter((r) => r.type === 'site').map((r) => r.id));
  records.forEach((rec, i) => {
    const versions = [rec, ...(rec.conflicts ?? []).map((c) => c.record as AnyRecord)];
    for (const v of versions) {
      if (v.type === 'site' || inBatch.has(v.siteId) || siteStored(v.siteId)) continue;
      throw new InputError(
        `records[${i}].siteId`,
        `The record records[${i}] (${rec.type} ${JSON.stringify(rec.id)}) belongs to site ${describeValue(v.siteId)}, which is neither in this batch nor in the office store; send the site with it.`,
      );
    }
  });
}

/**
 * Reads a bundle file. Throws one InputError saying what is wrong (and
 * where) if anything is: not text, too large, not JSON or cut short, not a
 * bundle, a newer format version, a field of the wrong type or out of
 * range, a pick breaking the pick rules, a record id given twice, or a pick
 * or estimate whose site is not in the file.
 */
export function parseBundle(text: unknown): SiteBundle {
  if (typeof text !== 'string') throw new InputError('file', 'The bundle file must be text (JSON).');
  if (text.length > MAX_BUNDLE_CHARS) {
    throw new InputError('file', `The bundle file has ${text.length} characters, more than the ${MAX_BUNDLE_CHARS} limit; export fewer sites per file.`);
  }
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === '') throw new InputError('file', 'The bundle file is empty.');
  let data: unknown;
  try {
    data = JSON.parse(body);
  } catch (e) {
    const detail = (e as Error).message;
    const at = /at position (\d+)/.exec(detail);
    const truncated = /end of (JSON )?input|Unterminated|Unexpected end/i.test(detail) || (at !== null && Number(at[1]) >= body.trimEnd().length - 1);
    throw new InputError(
      'file',
      truncated
        ? 'The bundle file ends too early: it looks cut short (truncated). Export it again and copy the whole file.'
        : `The bundle file is not valid JSON: ${detail.split('\n')[0]}.`,
    );
  }
  if (data === null || typeof data !== 'object' || Array.isArray(data)) {
    throw new InputError('file', `The bundle file must hold a JSON object, but it holds ${describeValue(data)}.`);
  }
  const obj = data as Record<string, unknown>;
  // The depth and size bound first, record by record (so the message names the record), then the whole file.
  for (const list of ['sites', 'picks', 'estimates', 'recordings']) {
    const items = obj[list];
    if (Array.isArray(items)) items.forEach((rec, i) => checkRecordLimits(rec, whereRecord(list, i)));
  }
  checkDocumentDepth(data, 2, 'file', 'The bundle file');
  if (obj.format !== BUNDLE_FORMAT) {
    throw new InputError('format', `This is not a Shearfield site bundle: its format field is ${describeValue(obj.format)}, expected "${BUNDLE_FORMAT}".`);
  }
  if (typeof obj.version !== 'number' || !Number.isInteger(obj.version) || obj.version < 1) {
    throw new InputError('version', `The bundle's version must be a whole number 1 or more, but it is ${describeValue(obj.version)}.`);
  }
  if (obj.version > BUNDLE_VERSION) {
    throw new InputError(
      'version',
      `The bundle uses format version ${obj.version}, newer than version ${BUNDLE_VERSION} that this copy of Shearfield reads; update Shearfield to import it.`,
    );
  }
  const validate = compiled().bundle;
  if (!validate(data)) throw schemaMessage(validate.errors![0], '', 'The bundle is not valid');
  const bundle = data as SiteBundle;

  const ids = new Map<string, string>();
  const siteIds = new Set(bundle.sites.map((s) => s.id));
  const lists: [string, AnyRecord[]][] = [
    ['sites', bundle.sites],
    ['picks', bundle.picks],
    ['estimates', bundle.estimates],
  ];
  for (const [list, records] of lists) {
    records.forEach((rec, i) => {
      const where = whereRecord(list, i);
      const prior = ids.get(rec.id);
      if (prior !== undefined) {
        throw new InputError(`${where}.id`, `The bundle is not valid: ${where}.id repeats the id ${describeValue(rec.id)} of ${prior}; each record appears once.`);
      }
      ids.set(rec.id, where);
      if (rec.type !== 'site' && !siteIds.has(rec.siteId)) {
        throw new InputError(`${where}.siteId`, `The bundle is not valid: ${where}.siteId names site ${describeValue(rec.siteId)}, which is not in the file.`);
      }
      const lead = 'The bundle is not valid';
      checkRules(rec, rec.type === 'pick' ? `the bundle's ${where}` : where, lead);
      rec.conflicts?.forEach((c, k) => checkRules(c.record as AnyRecord, rec.type === 'pick' ? `the bundle's ${where}.conflicts[${k}].record` : `${where}.conflicts[${k}].record`, lead));
      checkConflictKeys(rec, where);
    });
  }
  checkRecordings(bundle, ids, siteIds);
  return bundle;
}

/** The recordings of a bundle and their raw files: ids, sites, the recording rules, and each file against its record. */
function checkRecordings(bundle: SiteBundle, ids: Map<string, string>, siteIds: ReadonlySet<string>): void {
  const lead = 'The bundle is not valid';
  const byId = new Map<string, RecordingRecord>();
  (bundle.recordings ?? []).forEach((rec, i) => {
    const where = whereRecord('recordings', i);
    const prior = ids.get(rec.id);
    if (prior !== undefined) {
      throw new InputError(`${where}.id`, `${lead}: ${where}.id repeats the id ${describeValue(rec.id)} of ${prior}; each record appears once.`);
    }
    ids.set(rec.id, where);
    if (!siteIds.has(rec.siteId)) {
      throw new InputError(`${where}.siteId`, `${lead}: ${where}.siteId names site ${describeValue(rec.siteId)}, which is not in the file.`);
    }
    for (const [version, at] of [[rec, where], ...(rec.conflicts ?? []).map((c, k) => [c.record, `${where}.conflicts[${k}].record`])] as [RecordingRecord, string][]) {
      try {
        checkRecordingFields(version as unknown as Record<string, unknown>);
      } catch (e) {
        if (e instanceof InputError) throw new InputError(`${at}.${e.field}`, `${lead}: in ${at}, ${e.message.charAt(0).toLowerCase()}${e.message.slice(1)}`);
        throw e;
      }
    }
    checkConflictKeys(rec as unknown as AnyRecord, where);
    byId.set(rec.id, rec);
  });
  const seen = new Set<string>();
  (bundle.recordingFiles ?? []).forEach((f, i) => {
    const where = `recordingFiles[${i}]`;
    const rec = byId.get(f.id);
    if (!rec) throw new InputError(`${where}.id`, `${lead}: ${where}.id names recording ${describeValue(f.id)}, which is not in the file.`);
    if (seen.has(f.id)) throw new InputError(`${where}.id`, `${lead}: ${where} repeats the file of recording ${describeValue(f.id)}; each file appears once.`);
    seen.add(f.id);
    if (f.sha256 !== rec.sha256) {
      throw new InputError(`${where}.sha256`, `${lead}: ${where}.sha256 differs from the SHA-256 its recording states; the file is not the one recorded.`);
    }
    const bytes = fromBase64(f.bytes_base64, `${where}.bytes_base64`);
    if (bytes.length !== rec.byteLength) {
      throw new InputError(`${where}.bytes_base64`, `${lead}: ${where} holds ${bytes.length} bytes, but its recording states ${rec.byteLength}; the file is cut short or not the one recorded.`);
    }
  });
}

// --- Writing ---------------------------------------------------------------

/**
 * Builds a bundle from stored records (any order; deletions included so
 * that they travel). With `siteIds`, only those sites and their picks and
 * estimates. Picks are ordered by site then table order.
 */
export function makeBundle(records: readonly AnyRecord[], options: BundleOptions = {}): SiteBundle {
  const only = options.siteIds ? new Set(options.siteIds) : undefined;
  const sites = records.filter((r): r is SiteRecord => r.type === 'site' && (!only || only.has(r.id)));
  const keep = new Set(sites.map((s) => s.id));
  const picks = records.filter((r): r is PickRecord => r.type === 'pick' && keep.has(r.siteId));
  const estimates = records.filter((r): r is EstimateRecord => r.type === 'estimate' && keep.has(r.siteId));
  sites.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  picks.sort((a, b) => (a.siteId !== b.siteId ? (a.siteId < b.siteId ? -1 : 1) : a.order - b.order || (a.id < b.id ? -1 : 1)));
  estimates.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  const bundle: SiteBundle = {
    format: BUNDLE_FORMAT,
    version: BUNDLE_VERSION,
    exportedAt: (options.now ?? new Date()).toISOString(),
    caution: CAUTION,
    sites,
    picks,
    estimates,
  };
  if (options.exportedBy !== undefined) bundle.exportedBy = options.exportedBy;
  const recordings = (options.recordings ?? []).filter((r) => keep.has(r.siteId));
  if (recordings.length > 0) {
    recordings.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
    bundle.recordings = recordings;
    const sending = new Set(recordings.filter((r) => r.attach && !r.deleted).map((r) => r.id));
    const files = (options.recordingFiles ?? []).filter((f) => sending.has(f.id));
    if (files.length > 0) bundle.recordingFiles = files.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  }
  return bundle;
}

/**
 * The bundle as JSON text: compact JSON with each top-level field and each
 * record on a line of its own (and a final newline), so that the size grows
 * with the data only, never with indentation, and a file the bundle check
 * accepts is as small as it can be while still readable line by line.
 */
export function bundleToJson(bundle: SiteBundle): string {
  const lines: string[] = [];
  const entries = Object.entries(bundle);
  entries.forEach(([key, value], i) => {
    const end = i === entries.length - 1 ? '' : ',';
    if (Array.isArray(value) && value.length > 0) {
      lines.push(`${JSON.stringify(key)}:[`, value.map((r) => JSON.stringify(r)).join(',\n'), `]${end}`);
    } else {
      lines.push(`${JSON.stringify(key)}:${JSON.stringify(value)}${end}`);
    }
  });
  return `{\n${lines.join('\n')}\n}\n`;
}

/** A file name for a bundle: `shearfield-sites-YYYY-MM-DD.json`, or with the site's name (whole words, up to 40 characters) when it holds one site. */
export function bundleFileName(bundle: SiteBundle): string {
  const day = bundle.exportedAt.slice(0, 10);
  if (bundle.sites.length === 1) {
    let slug = bundle.sites[0].name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '');
    // At most 40 characters, cut between words (a single word longer than that is cut).
    if (slug.length > 40) {
      const head = slug.slice(0, 41);
      slug = head.includes('-') ? head.replace(/-[^-]*$/, '') : slug.slice(0, 40);
    }
    if (slug) return `shearfield-${slug}-${day}.json`;
  }
  return `shearfield-sites-${day}.json`;
}

/** The bundle's records in merge order: sites, then picks, then estimates. */
export function bundleRecords(bundle: SiteBundle): AnyRecord[] {
  return [...bundle.sites, ...bundle.picks, ...bundle.estimates];
}

/**
 * Plans importing a bundle into a store by the sync merge rules, without
 * writing: the caller writes `plan.writes` in one transaction. `lookup`
 * reads a stored record by id.
 */
export function planBundleImport(bundle: SiteBundle, lookup: (id: string) => AnyRecord | undefined): MergePlan {
  const from = bundle.exportedBy ? `bundle from ${bundle.exportedBy}` : `bundle of ${bundle.exportedAt}`;
  return planMerge(bundleRecords(bundle), lookup, { from: from.slice(0, 200) });
}

function count(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** One plain sentence describing what an import did, for the crew or the office. */
export function importSummary(bundle: SiteBundle, plan: MergePlan): string {
  const what = `${count(bundle.sites.length, 'site', 'sites')}, ${count(bundle.picks.length, 'pick', 'picks')} and ${count(bundle.estimates.length, 'estimate', 'estimates')}`;
  const parts = [`${plan.accepted} new or newer`, `${plan.ignored} already here or older`];
  if (plan.conflicts > 0) parts.push(`${count(plan.conflicts, 'conflict', 'conflicts')} kept for review`);
  return `Read ${what}: ${parts.join(', ')}.`;
}

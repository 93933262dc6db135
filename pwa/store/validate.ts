/**
 * Checks a record before the store writes it. Every failure is an
 * InputError whose message is a full sentence naming the field; the store
 * turns it into a StoreError with the same field and words. Pick values go
 * through the core's own pick rules (core/picks/picks.ts validatePick), speeds
 * and densities through the model checks (core/dispersion/model.ts), so a typed row,
 * a CSV row and a stored record all meet one rule set.
 *
 * Text limits are common practice for this tool (no published source).
 */
import { checkRecordLimits } from '../../core/exchange/record-limits';
import { InputError, describeValue } from '../../core/shared/errors';
import { checkDensity, checkShearSpeed, checkThickness } from '../../core/dispersion/model';
import { validatePick, type Pick } from '../../core/picks/picks';
import type { AnyRecord, EstimateRecord, EstimateSettings, PickRecord, RecordingRecord, SiteRecord, StoredRecord } from '../../core/exchange/records';
import { checkRecordingFields } from '../../core/exchange/recording-record';

/** Text limits for site fields (common practice). */
export const SITE_TEXT_LIMITS = { name: 200, crew: 200, notes: 10_000, id: 100 } as const;

// C0 control characters other than tab, line feed and carriage return.
// eslint-disable-next-line no-control-regex
const CONTROL_CHARS = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;
const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const ISO_DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/;

function text(value: unknown, field: string, max: number, required: boolean): string {
  if (value === undefined || value === null) {
    if (required) throw new InputError(field, `${field} is missing; give it as text.`);
    return '';
  }
  if (typeof value !== 'string') throw new InputError(field, `${field} must be text, but it is ${describeValue(value)}.`);
  if (required && value.trim() === '') throw new InputError(field, `${field} is empty; it must not be blank.`);
  if (value.length > max) {
    throw new InputError(field, `${field} is ${value.length} characters long; the limit is ${max}.`);
  }
  if (CONTROL_CHARS.test(value)) {
    throw new InputError(field, `${field} contains a control character; only printable text, tabs and line breaks are allowed.`);
  }
  return value;
}

function isoDateTime(value: unknown, field: string): void {
  if (typeof value !== 'string' || !ISO_DATE_TIME.test(value) || Number.isNaN(Date.parse(value))) {
    throw new InputError(
      field,
      `${field} must be an ISO 8601 date-time such as 2026-05-04T10:30:00.000Z, but it is ${describeValue(value)}.`,
    );
  }
}

function finiteIn(value: unknown, field: string, lo: number, hi: number, unit: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new InputError(field, `${field} must be a finite number, but it is ${describeValue(value)}.`);
  }
  if (value < lo || value > hi) {
    throw new InputError(field, `${field} is ${value} ${unit}, outside the range ${lo} to ${hi} ${unit}.`);
  }
}

function checkMeta(r: StoredRecord, expectedType: StoredRecord['type']): void {
  if (!r || typeof r !== 'object') throw new InputError('record', `The ${expectedType} record must be an object.`);
  if (r.type !== expectedType) {
    throw new InputError('type', `type must be "${expectedType}", but it is ${describeValue(r.type)}.`);
  }
  text(r.id, 'id', SITE_TEXT_LIMITS.id, true);
  if (typeof r.rev !== 'number' || !Number.isInteger(r.rev) || r.rev < 1) {
    throw new InputError('rev', `rev must be a whole number 1 or more, but it is ${describeValue(r.rev)}.`);
  }
  isoDateTime(r.updatedAt, 'updatedAt');
  if (r.deleted !== undefined && typeof r.deleted !== 'boolean') {
    throw new InputError('deleted', `deleted must be true or false, but it is ${describeValue(r.deleted)}.`);
  }
  if (r.history !== undefined && (!Array.isArray(r.history) || r.history.some((k) => typeof k !== 'string'))) {
    throw new InputError('history', `history must be a list of revision keys (text), but it is ${describeValue(r.history)}.`);
  }
  if (r.conflicts !== undefined && !Array.isArray(r.conflicts)) {
    throw new InputError('conflicts', `conflicts must be a list, but it is ${describeValue(r.conflicts)}.`);
  }
}

function checkRange(value: unknown, field: string, check: (v: unknown, f: string) => number): void {
  if (value === undefined) return;
  if (!Array.isArray(value) || value.length !== 2) {
    throw new InputError(field, `${field} must be a pair [from, to], but it is ${describeValue(value)}.`);
  }
  const lo = check(value[0], `${field}[0]`);
  const hi = check(value[1], `${field}[1]`);
  if (!(lo < hi)) throw new InputError(field, `${field} runs from ${lo} to ${hi}; the first value must be the smaller.`);
}

/** Checks the estimate settings a site or an estimate carries. */
export function checkEstimateSettings(s: EstimateSettings | undefined, field = 'settings'): void {
  if (!s || typeof s !== 'object' || Array.isArray(s)) {
    throw new InputError(field, `${field} must be an object (it may be empty), but it is ${describeValue(s)}.`);
  }
  if (s.vs1 !== undefined) checkShearSpeed(s.vs1, `${field}.vs1`);
  if (s.vs2 !== undefined) checkShearSpeed(s.vs2, `${field}.vs2`);
  if (s.density1 !== undefined) checkDensity(s.density1, `${field}.density1`);
  if (s.density2 !== undefined) checkDensity(s.density2, `${field}.density2`);
  checkRange(s.thicknessRange, `${field}.thicknessRange`, checkThickness);
  checkRange(s.vs1Range, `${field}.vs1Range`, checkShearSpeed);
  checkRange(s.vs2Range, `${field}.vs2Range`, checkShearSpeed);
  if (s.vs1 !== undefined && s.vs2 !== undefined && !(s.vs2 > s.vs1)) {
    throw new InputError(
      `${field}.vs2`,
      `${field}.vs2 is ${s.vs2} m/s, but it must be faster than ${field}.vs1 (${s.vs1} m/s) for Love waves to be trapped.`,
    );
  }
}

/** The check of a site's layer-builder model (core/site/site-model.ts), loaded on first need: it is not part of the first download. */
let siteModelCheck: ((value: unknown, field: string) => unknown) | undefined;

/** Loads the site model's check; the store awaits it before checking records that may carry a model. */
export async function loadSiteModelCheck(): Promise<void> {
  siteModelCheck ??= (await import('../../core/site/site-model')).checkSiteModel;
}

/** True when a record is a site carrying a layer-builder model (its own or a kept version's), so its check must be loaded first. */
export function needsSiteModelCheck(r: unknown): boolean {
  const site = r as Partial<SiteRecord> | null;
  return !!site && site.type === 'site' && (site.layeredModel !== undefined || (site.conflicts ?? []).some((c) => (c.record as Partial<SiteRecord>).layeredModel !== undefined));
}

/** Checks a site record; throws InputError naming the first bad field (a site with a model: after loadSiteModelCheck). */
export function checkSite(site: SiteRecord): void {
  checkMeta(site, 'site');
  text(site.name, 'name', SITE_TEXT_LIMITS.name, true);
  const m = typeof site.date === 'string' ? ISO_DATE.exec(site.date) : null;
  const day = m ? new Date(Date.UTC(+m[1], +m[2] - 1, +m[3])) : null;
  if (!m || !day || day.getUTCFullYear() !== +m[1] || day.getUTCMonth() !== +m[2] - 1 || day.getUTCDate() !== +m[3]) {
    throw new InputError('date', `date must be a calendar date written YYYY-MM-DD, but it is ${describeValue(site.date)}.`);
  }
  text(site.crew, 'crew', SITE_TEXT_LIMITS.crew, false);
  text(site.notes, 'notes', SITE_TEXT_LIMITS.notes, false);
  if (site.axisUnit !== 'hz' && site.axisUnit !== 's') {
    throw new InputError('axisUnit', `axisUnit must be "hz" or "s", but it is ${describeValue(site.axisUnit)}.`);
  }
  if (site.location !== undefined) {
    const loc = site.location;
    if (!loc || typeof loc !== 'object') {
      throw new InputError('location', `location must be an object with lat and lon, but it is ${describeValue(loc)}.`);
    }
    finiteIn(loc.lat, 'location.lat', -90, 90, '°');
    finiteIn(loc.lon, 'location.lon', -180, 180, '°');
    if (loc.accuracy_m !== undefined) finiteIn(loc.accuracy_m, 'location.accuracy_m', 0, 1e7, 'm');
    if (loc.source !== 'device' && loc.source !== 'typed') {
      throw new InputError('location.source', `location.source must be "device" or "typed", but it is ${describeValue(loc.source)}.`);
    }
  }
  checkEstimateSettings(site.settings);
  if (site.layeredModel !== undefined) {
    if (!siteModelCheck) {
      throw new InputError('layeredModel', 'The layer builder model could not be checked: its checks are not loaded (loadSiteModelCheck); nothing was saved.');
    }
    siteModelCheck(site.layeredModel, 'layeredModel');
  }
}

/** The Pick part of a pick record (what core/picks/picks.ts validates). */
export function pickOf(r: PickRecord): Pick {
  const p: Pick = { frequency: r.frequency, velocity: r.velocity, kind: r.kind, mode: r.mode };
  if (r.period !== undefined) p.period = r.period;
  if (r.sd !== undefined) p.sd = r.sd;
  if (r.wave !== undefined) p.wave = r.wave;
  if (r.note !== undefined) p.note = r.note;
  if (r.time !== undefined) p.time = r.time;
  return p;
}

/**
 * Checks a pick record and returns it with its pick values as the core
 * normalises them (a pick entered as a period gets frequency = 1/period).
 * `where` names the pick in messages, e.g. "row 3".
 */
export function checkPick(pick: PickRecord, where = 'pick'): PickRecord {
  checkMeta(pick, 'pick');
  text(pick.siteId, 'siteId', SITE_TEXT_LIMITS.id, true);
  if (typeof pick.order !== 'number' || !Number.isFinite(pick.order)) {
    throw new InputError('order', `order must be a finite number, but it is ${describeValue(pick.order)}.`);
  }
  // Let a period-only record pass without a frequency: the core fills it in.
  const candidate = pickOf(pick);
  if (candidate.period !== undefined && candidate.frequency === undefined) delete (candidate as Partial<Pick>).frequency;
  const clean = validatePick(candidate, where);
  // Keep every other field (history, conflicts, …); replace the pick values by their clean form.
  const out: PickRecord = { ...pick, frequency: clean.frequency, velocity: clean.velocity, kind: clean.kind, mode: clean.mode };
  for (const key of ['period', 'sd', 'wave', 'note', 'time'] as const) {
    if (clean[key] === undefined) delete out[key];
    else (out as unknown as Record<string, unknown>)[key] = clean[key];
  }
  return out;
}

/** Checks an estimate record. */
export function checkEstimate(e: EstimateRecord): void {
  checkMeta(e, 'estimate');
  text(e.siteId, 'siteId', SITE_TEXT_LIMITS.id, true);
  checkEstimateSettings(e.settings);
  if (!e.summary || typeof e.summary !== 'object' || Array.isArray(e.summary)) {
    throw new InputError('summary', `summary must be an object, but it is ${describeValue(e.summary)}.`);
  }
  isoDateTime(e.computedAt, 'computedAt');
}

/** Checks a recording record (core/exchange/recording-record.ts holds its own rules). */
export function checkRecording(r: RecordingRecord): void {
  checkMeta(r, 'recording');
  text(r.siteId, 'siteId', SITE_TEXT_LIMITS.id, true);
  checkRecordingFields(r as unknown as Record<string, unknown>);
  isoDateTime(r.addedAt, 'addedAt');
  checkRecordLimits(r, '');
}

/** Checks any record by its type; returns the record as it will be stored. */
export function checkRecord<T extends StoredRecord>(r: T): T;
export function checkRecord(r: StoredRecord): StoredRecord {
  if (!r || typeof r !== 'object') throw new InputError('record', 'A record must be an object.');
  // The bound the office keeps too (core/exchange/record-limits.ts): what one end cannot keep, neither takes.
  checkRecordLimits(r, '');
  switch (r.type) {
    case 'site':
      checkSite(r);
      return r;
    case 'pick':
      return checkPick(r);
    case 'estimate':
      checkEstimate(r);
      return r;
    case 'recording':
      checkRecording(r);
      return r;
    default:
      throw new InputError(
        'type',
        `type must be "site", "pick" or "estimate", but it is ${describeValue((r as { type?: unknown }).type)}.`,
      );
  }
}

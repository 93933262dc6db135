/**
 * The layer builder's form, pure: rows of typed text (N layers over a
 * half-space: thickness, shear speed, P speed or Poisson's ratio, density)
 * read into a layered model with the core's rules (core/dispersion/model.ts
 * checks of each value, validateModel, checkRayleighModel; the Poisson
 * range of core/profile/p-speed.ts), every bad value named in one sentence
 * in the crew's words ("Layer 2 P speed …"); the starting rows from the
 * layered estimate, the one-layer estimate or blank; and the shape kept on
 * the device.
 */
import {
  checkDensity,
  checkOptionalPSpeed,
  checkRayleighModel,
  checkShearSpeed,
  checkThickness,
  modelToJson,
  pSpeedFromPoisson,
  poissonRatio,
  validateModel,
  type Layer,
  type LayeredModel,
} from '../../../core/dispersion/model';
import type { SiteLayeredModel } from '../../../core/exchange/records';
import type { EstimateResult } from '../../../core/estimate/estimate';
import type { ProfileResult } from '../../../core/profile/profile-types';
import { checkPoisson, DEFAULT_POISSON } from '../../../core/profile/p-speed';
import { messageOf } from './state-hub';

/** One row as typed; the last row is the half-space, whose thickness is not used. */
export interface LayerRowText {
  thickness: string;
  vs: string;
  /** The P speed (m/s) or Poisson's ratio, as `pInput` says. */
  p: string;
  density: string;
}

/** Which the crew types for the P waves: the P speed, or Poisson's ratio (the other is shown derived). */
export type PInput = 'vp' | 'poisson';

export type TextField = keyof LayerRowText;

/** Which waves the builder draws. */
export interface WaveChoice {
  love: boolean;
  rayleigh: boolean;
}

/** Most layers above the half-space the builder takes (common practice: more cannot be told apart by picks). */
export const MAX_BUILDER_LAYERS = 8;
/** Modes drawn per wave: the fundamental and a few more. */
export const MODE_CHOICES = [1, 2, 3, 4, 5] as const;

/** What the builder keeps per site on this device (settings store), only ever a model that passed every check. */
export interface StoredBuilderModel {
  v: 1;
  pInput: PInput;
  rows: LayerRowText[];
  waves: WaveChoice;
  modes: number;
}

/**
 * Settings key of a site's builder model as earlier versions kept it on the
 * device only; a site that has no model of its own takes it from there
 * (layered-work.ts), and from then on the model is kept with the site.
 */
export function builderKey(siteId: string): string {
  return `layered.model.${siteId}`;
}

/** The row's name in messages. */
export function rowName(i: number, rows: number): string {
  return i === rows - 1 ? 'Half-space' : `Layer ${i + 1}`;
}

/** The field's words in messages and labels. */
export function fieldWords(field: TextField, pInput: PInput): string {
  if (field === 'p') return pInput === 'vp' ? 'P speed' : "Poisson's ratio";
  return { thickness: 'thickness', vs: 'shear speed', density: 'density' }[field];
}

/** The core's field names (layers[1].vp, halfspace.vs) in the crew's words (Layer 2 P speed, Half-space shear speed). */
export function crewWords(message: string): string {
  const words: Record<string, string> = { vp: 'P speed', vs: 'shear speed', density: 'density', thickness: 'thickness' };
  return message
    .replace(/\blayers\[(\d+)\]\.(vp|vs|density|thickness)\b/g, (_m, i: string, f: string) => `Layer ${Number(i) + 1} ${words[f]}`)
    .replace(/\bhalfspace\.(vp|vs|density)\b/g, (_m, f: string) => `Half-space ${words[f]}`)
    .replace(/\blayers\[(\d+)\]:/g, (_m, i: string) => `Layer ${Number(i) + 1}:`)
    .replace(/\bhalfspace:/g, 'Half-space:')
    .replace(/\bvp \/ vs\b/g, 'the P/S speed ratio');
}

/** What the rows make: the model when every value passes, else the sentences. */
export interface BuilderReading {
  model?: LayeredModel;
  /** One sentence per bad value, naming the layer and field. */
  errors: string[];
  /** Fields still empty (not an error until they are filled). */
  empty: number;
  /** Warnings that do not stop the model (a Poisson's ratio below 0). */
  warnings: string[];
}

/** A typed number: the value, 'empty', or a sentence. */
function typed(text: string, label: string, unit: string): number | 'empty' | { error: string } {
  const t = text.trim();
  if (t === '') return 'empty';
  const v = Number(t.replace(',', '.'));
  if (!Number.isFinite(v)) return { error: `${label} must be a number${unit ? ` in ${unit}` : ''}, but it is "${t}".` };
  return v;
}

/**
 * Reads the rows into a model. P speeds (or Poisson's ratios) are needed
 * when `needP` (Rayleigh waves drawn); otherwise they may all be left
 * empty, but not some of them. Every bad value gets its own sentence;
 * the model-wide checks (a half-space faster than the slowest layer, P/S
 * speed ratios) run once every value passes.
 */
export function readRows(rows: readonly LayerRowText[], pInput: PInput, needP: boolean): BuilderReading {
  const errors: string[] = [];
  const warnings: string[] = [];
  let empty = 0;
  const n = rows.length;
  const values: { thickness?: number; vs?: number; p?: number; density?: number }[] = rows.map(() => ({}));
  const check = (i: number, field: TextField, unit: string, rule: (v: number, label: string) => number) => {
    const label = `${rowName(i, n)} ${fieldWords(field, pInput)}`;
    const t = typed(rows[i][field], label, unit);
    if (t === 'empty') {
      empty++;
      return;
    }
    if (typeof t === 'object') {
      errors.push(t.error);
      return;
    }
    try {
      values[i][field] = rule(t, label);
    } catch (e) {
      errors.push(crewWords(messageOf(e)));
    }
  };
  if (n < 2) errors.push('The model needs at least one layer over the half-space.');
  for (let i = 0; i < n; i++) {
    if (i < n - 1) check(i, 'thickness', 'm', (v, l) => checkThickness(v, l));
    check(i, 'vs', 'm/s', (v, l) => checkShearSpeed(v, l));
    check(i, 'p', pInput === 'vp' ? 'm/s' : '', (v, l) => (pInput === 'vp' ? checkOptionalPSpeed(v, l)! : checkPoisson(v, l)));
    check(i, 'density', 'kg/m³', (v, l) => checkDensity(v, l));
  }
  const pGiven = values.filter((v) => v.p !== undefined).length;
  const pEmpty = rows.filter((r) => r.p.trim() === '').length;
  if (!needP && pEmpty > 0 && pEmpty < n) {
    // Love waves alone need no P speeds, but a half-given set would be drawn for Rayleigh waves later: ask for all or none.
    empty -= pEmpty;
    rows.forEach((r, i) => {
      if (r.p.trim() === '') errors.push(`${rowName(i, n)} ${fieldWords('p', pInput)} is empty; give it for every layer and the half-space, or leave them all empty (Love waves need none).`);
    });
  } else if (!needP && pEmpty === n) {
    empty -= pEmpty;
  }
  if (errors.length > 0 || empty > 0) return { errors, empty, warnings };
  const withP = pGiven === n;
  const vpOf = (i: number) => {
    const v = values[i];
    if (!withP) return undefined;
    return pInput === 'vp' ? v.p! : pSpeedFromPoisson(v.vs!, v.p!);
  };
  const layer = (i: number): Layer => {
    const vp = vpOf(i);
    return { thickness: values[i].thickness!, vs: values[i].vs!, density: values[i].density!, ...(vp === undefined ? {} : { vp }) };
  };
  const h = values[n - 1];
  const vpH = vpOf(n - 1);
  const draft: LayeredModel = {
    layers: rows.slice(0, -1).map((_r, i) => layer(i)),
    halfspace: { vs: h.vs!, density: h.density!, ...(vpH === undefined ? {} : { vp: vpH }) },
  };
  try {
    const model = validateModel(draft);
    if (withP) warnings.push(...checkRayleighModel(model).map(crewWords));
    return { model, errors, empty: 0, warnings };
  } catch (e) {
    return { errors: [crewWords(messageOf(e))], empty: 0, warnings };
  }
}

/** The other P quantity derived from a row's typed one: "ν = 0.3" or "P speed 374 m/s"; '' when it cannot be told. */
export function derivedP(row: LayerRowText, pInput: PInput): string {
  const vs = Number(row.vs.trim().replace(',', '.'));
  const p = Number(row.p.trim().replace(',', '.'));
  if (row.vs.trim() === '' || row.p.trim() === '' || !(vs > 0) || !Number.isFinite(p)) return '';
  if (pInput === 'vp') {
    if (!(p > vs)) return '';
    const nu = poissonRatio(p, vs);
    return Number.isFinite(nu) ? `ν = ${short(nu, 3)}` : '';
  }
  if (!(p > -1 && p < 0.5)) return '';
  return `P speed ${short(pSpeedFromPoisson(vs, p), 4)} m/s`;
}

function short(x: number, digits: number): string {
  if (Math.abs(x) >= 10 ** digits) return String(Math.round(x));
  return String(Number(x.toPrecision(digits)));
}

/**
 * Rows switched between P speed and Poisson's ratio: each value that can be
 * converted is (ν to 4 decimals' worth of figures, P speeds to 4 figures);
 * one that cannot (no shear speed yet, or not a number) is cleared, so that
 * no number is read under the other meaning.
 */
export function switchPInput(rows: readonly LayerRowText[], from: PInput, to: PInput): LayerRowText[] {
  if (from === to) return rows.map((r) => ({ ...r }));
  return rows.map((r) => {
    const vs = Number(r.vs.trim().replace(',', '.'));
    const p = Number(r.p.trim().replace(',', '.'));
    if (r.vs.trim() === '' || r.p.trim() === '' || !(vs > 0) || !Number.isFinite(p)) return { ...r, p: '' };
    if (from === 'vp') return { ...r, p: p > vs ? short(poissonRatio(p, vs), 4) : '' };
    return { ...r, p: p > -1 && p < 0.5 ? short(pSpeedFromPoisson(vs, p), 4) : '' };
  });
}

/** The text of a number as the builder fills it (4 significant figures). */
function text(x: number): string {
  return Number.isFinite(x) ? short(x, 4) : '';
}

function pText(vs: number, vp: number, pInput: PInput): string {
  return pInput === 'vp' ? text(vp) : short(poissonRatio(vp, vs), 3);
}

/** Rows of a layered estimate's best fit. */
export function rowsOfProfile(r: ProfileResult, pInput: PInput): LayerRowText[] {
  const rows = r.profile.layers.map((l) => ({
    thickness: text(l.thickness.best),
    vs: text(l.vs.best),
    p: pText(l.vs.best, l.vp, pInput),
    density: text(l.density),
  }));
  const h = r.profile.halfspace;
  rows.push({ thickness: '', vs: text(h.vs.best), p: pText(h.vs.best, h.vp, pInput), density: text(h.density) });
  return rows;
}

/**
 * Rows of the one-layer estimate's best fit. It has no P speeds: they come
 * from Poisson's ratio DEFAULT_POISSON (0.3, common practice), as the
 * layered estimate's default does.
 */
export function rowsOfEstimate(r: EstimateResult, pInput: PInput): LayerRowText[] {
  const p = (vs: number) => (pInput === 'vp' ? text(pSpeedFromPoisson(vs, DEFAULT_POISSON)) : String(DEFAULT_POISSON));
  return [
    { thickness: text(r.thickness.best), vs: text(r.vs1.best), p: p(r.vs1.best), density: text(r.density1) },
    { thickness: '', vs: text(r.vs2.best), p: p(r.vs2.best), density: text(r.density2) },
  ];
}

/** Blank rows: one layer over the half-space. */
export function blankRows(): LayerRowText[] {
  return [
    { thickness: '', vs: '', p: '', density: '' },
    { thickness: '', vs: '', p: '', density: '' },
  ];
}

/** A stored builder model read back; undefined when it is not one (or no longer passes the checks). */
export function readStored(value: unknown): StoredBuilderModel | undefined {
  const o = value as Partial<StoredBuilderModel> | undefined;
  if (!o || o.v !== 1 || (o.pInput !== 'vp' && o.pInput !== 'poisson') || !Array.isArray(o.rows) || !o.waves) return undefined;
  const rows = o.rows.map((r) => ({
    thickness: String(r?.thickness ?? ''),
    vs: String(r?.vs ?? ''),
    p: String(r?.p ?? ''),
    density: String(r?.density ?? ''),
  }));
  const waves = { love: o.waves.love === true, rayleigh: o.waves.rayleigh === true };
  const modes = MODE_CHOICES.includes(o.modes as 1) ? (o.modes as number) : 3;
  if (!readRows(rows, o.pInput, waves.rayleigh).model) return undefined;
  return { v: 1, pInput: o.pInput, rows, waves, modes };
}

/** The site's layered model (core/exchange/records.ts) of a model that passed every check, with how it was typed and drawn. */
export function siteModelOf(model: LayeredModel, kept: Omit<StoredBuilderModel, 'v' | 'rows'>): SiteLayeredModel {
  return { model: modelToJson(model), pInput: kept.pInput, waves: { love: kept.waves.love, rayleigh: kept.waves.rayleigh }, modes: kept.modes };
}

/** A number as the crew's text: as stored, up to 10 significant figures (so that a derived value does not print its float noise). */
function storedText(x: number): string {
  return String(Number(x.toPrecision(10)));
}

/**
 * The builder's rows of a site's layered model: its numbers as text, the P
 * column as P speeds or as the Poisson's ratios they give (to 6 figures, so
 * that a typed 0.3 comes back as 0.3).
 */
export function rowsOfSiteModel(m: SiteLayeredModel): StoredBuilderModel {
  const p = (vs: number, vp: number | undefined) => (vp === undefined ? '' : m.pInput === 'vp' ? storedText(vp) : String(Number(poissonRatio(vp, vs).toPrecision(6))));
  const rows: LayerRowText[] = m.model.layers.map((l) => ({
    thickness: storedText(l.thickness_m),
    vs: storedText(l.vs_m_s),
    p: p(l.vs_m_s, l.vp_m_s),
    density: storedText(l.density_kg_m3),
  }));
  const h = m.model.halfspace;
  rows.push({ thickness: '', vs: storedText(h.vs_m_s), p: p(h.vs_m_s, h.vp_m_s), density: storedText(h.density_kg_m3) });
  return { v: 1, pInput: m.pInput, rows, waves: { ...m.waves }, modes: m.modes };
}

/**
 * A site's layer-builder model, as the site record keeps it
 * (core/exchange/records.ts `layeredModel`), and its check, shared by the
 * field store, sync pushes and bundles. In a module of its own so that the
 * app loads the check only when a site with a model is saved or arrives,
 * not with its first screen.
 */
import { checkRayleighModel, modelFromJson, type ModelJson } from '../dispersion/model';
import { InputError, describeValue } from '../shared/errors';

/**
 * The layer builder's N-layer model kept with a site: the model in the
 * model file's JSON form (units in the field names, as `shearfield curve`
 * reads it), and how the crew typed and drew it. Only a model that passes
 * every check is kept; a site's other fields and this one change together,
 * by the site's merge rules (core/exchange/sync.ts; the site record is
 * core/exchange/records.ts SiteRecord).
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

/** Most layers over the half-space a site's model holds (the layer builder's limit). */
export const MAX_SITE_MODEL_LAYERS = 8;
/** Modes drawn per wave: the fundamental and up to four more. */
export const MAX_SITE_MODEL_MODES = 5;

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

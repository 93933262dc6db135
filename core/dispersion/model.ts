/**
 * Layered earth models and their validation.
 *
 * A model is N ≥ 1 homogeneous isotropic layers over a half-space, in SI
 * units (m, m/s, kg/m³). Love waves are trapped only when the half-space is
 * faster than the slowest layer (Aki & Richards, *Quantitative Seismology*,
 * 2nd ed. 2002, §7.2).
 *
 * Bounds (common practice, shared/PHYSICS.md §9): shear speed 30–5000 m/s,
 * density 1000–3500 kg/m³, thickness finite and > 0.
 */
import { InputError, describeValue } from '../shared/errors';

export interface Layer {
  /** Thickness, m. */
  thickness: number;
  /** Shear-wave speed β, m/s. */
  vs: number;
  /** Density ρ, kg/m³. */
  density: number;
}

export interface HalfSpace {
  /** Shear-wave speed β_H, m/s. */
  vs: number;
  /** Density ρ_H, kg/m³. */
  density: number;
}

export interface LayeredModel {
  layers: readonly Layer[];
  halfspace: HalfSpace;
}

/** Validation bounds: common practice (shared/PHYSICS.md §9), not a published standard. */
export const MODEL_BOUNDS = {
  vsMin: 30,
  vsMax: 5000,
  densityMin: 1000,
  densityMax: 3500,
} as const;

/** The model file's field names: units travel in the names. */
export interface LayerJson {
  thickness_m: number;
  vs_m_s: number;
  density_kg_m3: number;
}
export interface ModelJson {
  layers: LayerJson[];
  halfspace: { vs_m_s: number; density_kg_m3: number };
}

function requireFiniteNumber(value: unknown, field: string): number {
  if (value === undefined || value === null || value === '') {
    throw new InputError(field, `${field} is missing; give a number.`);
  }
  if (typeof value !== 'number') {
    throw new InputError(field, `${field} must be a number, but it is ${describeValue(value)}.`);
  }
  if (!Number.isFinite(value)) {
    throw new InputError(field, `${field} must be a finite number, but it is ${describeValue(value)}.`);
  }
  return value;
}

/** Checks a shear speed in m/s, catching values that look like km/s. */
export function checkShearSpeed(value: unknown, field: string): number {
  const v = requireFiniteNumber(value, field);
  if (v <= 0) throw new InputError(field, `${field} must be greater than 0 m/s, but it is ${v}.`);
  if (v < MODEL_BOUNDS.vsMin) {
    const hint = v <= MODEL_BOUNDS.vsMax / 1000 ? ' It looks like km/s; enter the speed in m/s.' : '';
    throw new InputError(
      field,
      `${field} is ${v} m/s, below the ${MODEL_BOUNDS.vsMin} m/s lower bound for shear speed.${hint}`,
    );
  }
  if (v > MODEL_BOUNDS.vsMax) {
    throw new InputError(field, `${field} is ${v} m/s, above the ${MODEL_BOUNDS.vsMax} m/s upper bound for shear speed.`);
  }
  return v;
}

/** Checks a density in kg/m³, catching values that look like g/cm³. */
export function checkDensity(value: unknown, field: string): number {
  const v = requireFiniteNumber(value, field);
  if (v <= 0) throw new InputError(field, `${field} must be greater than 0 kg/m³, but it is ${v}.`);
  if (v < MODEL_BOUNDS.densityMin) {
    const hint = v <= MODEL_BOUNDS.densityMax / 1000 ? ' It looks like g/cm³; enter the density in kg/m³.' : '';
    throw new InputError(
      field,
      `${field} is ${v} kg/m³, below the ${MODEL_BOUNDS.densityMin} kg/m³ lower bound for density.${hint}`,
    );
  }
  if (v > MODEL_BOUNDS.densityMax) {
    throw new InputError(
      field,
      `${field} is ${v} kg/m³, above the ${MODEL_BOUNDS.densityMax} kg/m³ upper bound for density.`,
    );
  }
  return v;
}

/** Checks a layer thickness in m. */
export function checkThickness(value: unknown, field: string): number {
  const v = requireFiniteNumber(value, field);
  if (v <= 0) throw new InputError(field, `${field} must be greater than 0 m, but it is ${v}.`);
  return v;
}

/**
 * Validates a model: every value finite and within bounds, at least one
 * layer, and a half-space faster than the slowest layer. Returns a fresh,
 * frozen copy; throws InputError naming the first bad field.
 */
export function validateModel(model: LayeredModel): LayeredModel {
  if (!model || typeof model !== 'object') throw new InputError('model', 'The model must be an object.');
  if (!Array.isArray(model.layers) || model.layers.length === 0) {
    throw new InputError('layers', 'layers must list at least one layer over the half-space.');
  }
  const layers = model.layers.map((layer, i) => {
    if (!layer || typeof layer !== 'object') throw new InputError(`layers[${i}]`, `layers[${i}] must be an object.`);
    return Object.freeze({
      thickness: checkThickness(layer.thickness, `layers[${i}].thickness`),
      vs: checkShearSpeed(layer.vs, `layers[${i}].vs`),
      density: checkDensity(layer.density, `layers[${i}].density`),
    });
  });
  if (!model.halfspace || typeof model.halfspace !== 'object') {
    throw new InputError('halfspace', 'halfspace is missing; give its vs and density.');
  }
  const halfspace = Object.freeze({
    vs: checkShearSpeed(model.halfspace.vs, 'halfspace.vs'),
    density: checkDensity(model.halfspace.density, 'halfspace.density'),
  });
  checkTrapping(layers, halfspace, 'halfspace.vs');
  return Object.freeze({ layers: Object.freeze(layers), halfspace });
}

function checkTrapping(layers: readonly Layer[], halfspace: HalfSpace, field: string): void {
  const slowest = Math.min(...layers.map((l) => l.vs));
  if (!(halfspace.vs > slowest)) {
    throw new InputError(
      field,
      `${field} is ${halfspace.vs} m/s, but it must be faster than the slowest layer (${slowest} m/s) for Love waves to be trapped.`,
    );
  }
}

/**
 * Reads a model from the model file's JSON form (units in the field names)
 * and validates it. Field names in errors are the file's own, e.g.
 * `layers[0].vs_m_s`.
 */
export function modelFromJson(json: unknown): LayeredModel {
  if (!json || typeof json !== 'object' || Array.isArray(json)) {
    throw new InputError('model', 'The model file must hold a JSON object with "layers" and "halfspace".');
  }
  const o = json as Record<string, unknown>;
  if (!Array.isArray(o.layers) || o.layers.length === 0) {
    throw new InputError('layers', 'layers must be a list of at least one layer over the half-space.');
  }
  const layers = o.layers.map((raw, i): Layer => {
    if (!raw || typeof raw !== 'object' || Array.isArray(raw)) {
      throw new InputError(`layers[${i}]`, `layers[${i}] must be an object with thickness_m, vs_m_s and density_kg_m3.`);
    }
    const l = raw as Record<string, unknown>;
    return {
      thickness: checkThickness(l.thickness_m, `layers[${i}].thickness_m`),
      vs: checkShearSpeed(l.vs_m_s, `layers[${i}].vs_m_s`),
      density: checkDensity(l.density_kg_m3, `layers[${i}].density_kg_m3`),
    };
  });
  const hs = o.halfspace;
  if (!hs || typeof hs !== 'object' || Array.isArray(hs)) {
    throw new InputError('halfspace', 'halfspace is missing; give an object with vs_m_s and density_kg_m3.');
  }
  const h = hs as Record<string, unknown>;
  const halfspace = {
    vs: checkShearSpeed(h.vs_m_s, 'halfspace.vs_m_s'),
    density: checkDensity(h.density_kg_m3, 'halfspace.density_kg_m3'),
  };
  checkTrapping(layers, halfspace, 'halfspace.vs_m_s');
  return validateModel({ layers, halfspace });
}

/** The model file's JSON form of a model. */
export function modelToJson(model: LayeredModel): ModelJson {
  return {
    layers: model.layers.map((l) => ({ thickness_m: l.thickness, vs_m_s: l.vs, density_kg_m3: l.density })),
    halfspace: { vs_m_s: model.halfspace.vs, density_kg_m3: model.halfspace.density },
  };
}

/**
 * Layered earth models and their validation.
 *
 * A model is N ≥ 1 homogeneous isotropic layers over a half-space, in SI
 * units (m, m/s, kg/m³). Love waves are trapped only when the half-space is
 * faster than the slowest layer (Aki & Richards, *Quantitative Seismology*,
 * 2nd ed. 2002, §7.2).
 *
 * Bounds (common practice, shared/PHYSICS.md §9): shear speed 30–5000 m/s,
 * density 1000–3500 kg/m³, thickness finite and > 0, P speed (optional)
 * up to 10 000 m/s.
 *
 * P speeds matter only for Rayleigh waves: each layer and the half-space
 * then needs one, with vp/vs > √(4/3) (checkRayleighModel); Love waves
 * ignore them.
 */
import { InputError, describeValue } from '../shared/errors';

export interface Layer {
  /** Thickness, m. */
  thickness: number;
  /** Shear-wave speed β, m/s. */
  vs: number;
  /** Density ρ, kg/m³. */
  density: number;
  /** P-wave speed α, m/s: needed for Rayleigh waves, ignored for Love waves. */
  vp?: number;
}

export interface HalfSpace {
  /** Shear-wave speed β_H, m/s. */
  vs: number;
  /** Density ρ_H, kg/m³. */
  density: number;
  /** P-wave speed α_H, m/s: needed for Rayleigh waves, ignored for Love waves. */
  vp?: number;
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
  vpMax: 10000,
} as const;

/**
 * The smallest P/S speed ratio of a stable isotropic elastic solid:
 * vp/vs > √(4/3), i.e. a positive bulk modulus K = ρ(vp² − 4/3·vs²)
 * (Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §2.2).
 */
export const VP_VS_MIN = Math.sqrt(4 / 3);

/** The model file's field names: units travel in the names. */
export interface LayerJson {
  thickness_m: number;
  vs_m_s: number;
  density_kg_m3: number;
  /** P-wave speed: required for Rayleigh waves, ignored for Love waves. */
  vp_m_s?: number;
}
export interface ModelJson {
  layers: LayerJson[];
  halfspace: { vs_m_s: number; density_kg_m3: number; vp_m_s?: number };
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

/**
 * Checks a P-wave speed in m/s when one is given (undefined passes: P
 * speeds are optional until Rayleigh waves are asked for), catching values
 * that look like km/s.
 */
export function checkOptionalPSpeed(value: unknown, field: string): number | undefined {
  if (value === undefined) return undefined;
  const v = requireFiniteNumber(value, field);
  if (v <= 0) throw new InputError(field, `${field} must be greater than 0 m/s, but it is ${v}.`);
  if (v <= MODEL_BOUNDS.vpMax / 1000) {
    throw new InputError(field, `${field} is ${v} m/s, far too slow for a P wave. It looks like km/s; enter the speed in m/s.`);
  }
  if (v > MODEL_BOUNDS.vpMax) {
    throw new InputError(field, `${field} is ${v} m/s, above the ${MODEL_BOUNDS.vpMax} m/s upper bound for P speed.`);
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
    const vp = checkOptionalPSpeed(layer.vp, `layers[${i}].vp`);
    return Object.freeze({
      thickness: checkThickness(layer.thickness, `layers[${i}].thickness`),
      vs: checkShearSpeed(layer.vs, `layers[${i}].vs`),
      density: checkDensity(layer.density, `layers[${i}].density`),
      ...(vp === undefined ? {} : { vp }),
    });
  });
  if (!model.halfspace || typeof model.halfspace !== 'object') {
    throw new InputError('halfspace', 'halfspace is missing; give its vs and density.');
  }
  const vpH = checkOptionalPSpeed(model.halfspace.vp, 'halfspace.vp');
  const halfspace = Object.freeze({
    vs: checkShearSpeed(model.halfspace.vs, 'halfspace.vs'),
    density: checkDensity(model.halfspace.density, 'halfspace.density'),
    ...(vpH === undefined ? {} : { vp: vpH }),
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
    const vp = checkOptionalPSpeed(l.vp_m_s, `layers[${i}].vp_m_s`);
    return {
      thickness: checkThickness(l.thickness_m, `layers[${i}].thickness_m`),
      vs: checkShearSpeed(l.vs_m_s, `layers[${i}].vs_m_s`),
      density: checkDensity(l.density_kg_m3, `layers[${i}].density_kg_m3`),
      ...(vp === undefined ? {} : { vp }),
    };
  });
  const hs = o.halfspace;
  if (!hs || typeof hs !== 'object' || Array.isArray(hs)) {
    throw new InputError('halfspace', 'halfspace is missing; give an object with vs_m_s and density_kg_m3.');
  }
  const h = hs as Record<string, unknown>;
  const vpH = checkOptionalPSpeed(h.vp_m_s, 'halfspace.vp_m_s');
  const halfspace = {
    vs: checkShearSpeed(h.vs_m_s, 'halfspace.vs_m_s'),
    density: checkDensity(h.density_kg_m3, 'halfspace.density_kg_m3'),
    ...(vpH === undefined ? {} : { vp: vpH }),
  };
  checkTrapping(layers, halfspace, 'halfspace.vs_m_s');
  return validateModel({ layers, halfspace });
}

/** The model file's JSON form of a model. */
export function modelToJson(model: LayeredModel): ModelJson {
  const h = model.halfspace;
  return {
    layers: model.layers.map((l) => ({
      thickness_m: l.thickness,
      vs_m_s: l.vs,
      density_kg_m3: l.density,
      ...(l.vp === undefined ? {} : { vp_m_s: l.vp }),
    })),
    halfspace: { vs_m_s: h.vs, density_kg_m3: h.density, ...(h.vp === undefined ? {} : { vp_m_s: h.vp }) },
  };
}

/** Poisson's ratio ν = (r² − 2) / (2(r² − 1)) of a P/S speed ratio r = vp/vs (Aki & Richards 2002, §2.2). */
export function poissonRatio(vp: number, vs: number): number {
  const r2 = (vp * vp) / (vs * vs);
  return (r2 - 2) / (2 * (r2 - 1));
}

/** P speed (m/s) for a shear speed and a Poisson's ratio ν < 0.5: vp = vs·√((2 − 2ν)/(1 − 2ν)). */
export function pSpeedFromPoisson(vs: number, nu: number): number {
  return vs * Math.sqrt((2 - 2 * nu) / (1 - 2 * nu));
}

/**
 * Checks that a validated model can carry Rayleigh waves: every layer and
 * the half-space has a P speed, and vp/vs > √(4/3) everywhere (no stable
 * elastic solid has less). Throws InputError naming the first bad layer and
 * field; returns warnings (one sentence each) for a Poisson's ratio below
 * 0, which is possible but rare in soils and rocks. Field names follow the
 * model file (`layers[1].vp_m_s`) when `names` is 'file', else the model's
 * own (`layers[1].vp`).
 */
export function checkRayleighModel(model: LayeredModel, names: 'file' | 'model' = 'model'): string[] {
  const vpName = names === 'file' ? 'vp_m_s' : 'vp';
  const vsName = names === 'file' ? 'vs_m_s' : 'vs';
  const warnings: string[] = [];
  const check = (vp: number | undefined, vs: number, where: string): void => {
    const field = `${where}.${vpName}`;
    if (vp === undefined) {
      throw new InputError(
        field,
        `${field} is missing; Rayleigh waves need the P-wave speed of every layer and of the half-space.`,
      );
    }
    if (!(vp > VP_VS_MIN * vs)) {
      throw new InputError(
        field,
        `${field} is ${vp} m/s, but it must be more than √(4/3) ≈ 1.155 times ${where}.${vsName} (${vs} m/s), since no stable elastic solid has a lower P/S speed ratio.`,
      );
    }
    const nu = poissonRatio(vp, vs);
    if (nu < 0) {
      warnings.push(
        `${where}: ${vpName} / ${vsName} = ${(vp / vs).toFixed(3)} gives a Poisson's ratio of ${nu.toFixed(3)}, below 0, which is rare in soils and rocks; check the P speed.`,
      );
    }
  };
  model.layers.forEach((l, i) => check(l.vp, l.vs, `layers[${i}]`));
  check(model.halfspace.vp, model.halfspace.vs, 'halfspace');
  return warnings;
}

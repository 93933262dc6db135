/**
 * P speeds for the layered estimate: Rayleigh waves depend on the P speed α
 * of every layer as well as on its shear speed β (Love waves do not), but
 * dispersion picks constrain α only weakly, so the estimate does not search
 * over it. It comes from one of three rules:
 *
 *  - a Poisson's ratio ν for every layer and the half-space:
 *      α = β·√((2 − 2ν)/(1 − 2ν))
 *    (the isotropic elastic relation ν = (α² − 2β²)/(2(α² − β²)) solved
 *    for α; standard, e.g. Shearer, *Introduction to Seismology*, 2nd ed.
 *    2009, ch. 3 — from memory, verify; ν = 1/4 gives α = √3·β, the
 *    Poisson solid);
 *  - a water-table depth D: above it α from ν as above; below it
 *    α = max(α(ν), 1500 m/s), since saturated ground carries P waves at
 *    least as fast as water (common practice; sound in water is about
 *    1480–1500 m/s, from memory). A layer that straddles D is split there
 *    (same β and density, two P speeds), so the interface stays where the
 *    search puts it;
 *  - fixed P speeds per layer and for the half-space (from a model file).
 *
 * Domain: −1 < ν < 0.5 (the range of a stable isotropic solid, where
 * α/β > √(4/3)); ν below 0 is allowed but warned about (no common soil has
 * it). Units SI.
 */
import { InputError, describeValue } from '../shared/errors';

/**
 * Default Poisson's ratio when none is given: 0.30. Common practice for
 * unsaturated soils (typical values 0.25–0.40, from memory — verify); the
 * output always says the default was used and what it changes.
 */
export const DEFAULT_POISSON = 0.3;

/** Least P speed below the water table, m/s: about the speed of sound in water (common practice; from memory). */
export const WATER_P_SPEED = 1500;

/** √(4/3): α/β at or below this has no stable isotropic elastic solid (bulk modulus ≤ 0). */
export const MIN_VP_VS_RATIO = Math.sqrt(4 / 3);

/** How the P speeds are set. */
export type PSpeedRule =
  | { kind: 'poisson'; poisson: number; defaulted: boolean }
  | { kind: 'water-table'; poisson: number; defaulted: boolean; depth: number }
  | { kind: 'fixed'; layers: readonly number[]; halfspace: number };

/** α from β and ν (the isotropic elastic relation). */
export function vpFromPoisson(vs: number, poisson: number): number {
  return vs * Math.sqrt((2 - 2 * poisson) / (1 - 2 * poisson));
}

/** Checks a Poisson's ratio named `field`: a number with −1 < ν < 0.5. Throws InputError. */
export function checkPoisson(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new InputError(field, `${field} must be a finite number, but it is ${describeValue(value)}.`);
  }
  if (!(value > -1 && value < 0.5)) {
    throw new InputError(
      field,
      `${field} is ${value}, outside the range −1 to 0.5 (exclusive) of a stable elastic solid; soils are about 0.25–0.49.`,
    );
  }
  return value;
}

/** Checks a water-table depth in m (finite, ≥ 0). Throws InputError. */
export function checkWaterTable(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
    throw new InputError(field, `${field} must be a depth of 0 m or more, but it is ${describeValue(value)}.`);
  }
  return value;
}

/** Plain-words notes on the rule, for every output that used it. */
export function pSpeedNotes(rule: PSpeedRule): string[] {
  const notes: string[] = [];
  if (rule.kind === 'fixed') {
    notes.push('P speeds are the fixed values given per layer; they were not estimated.');
    return notes;
  }
  if (rule.defaulted) {
    notes.push(
      `P speeds come from an assumed Poisson's ratio of ${rule.poisson} (the default, common practice for unsaturated soil, not a measurement). ` +
        'Rayleigh-wave speeds depend on it by a few per cent, and more below the water table; give the Poisson\'s ratio or the water-table depth when known.',
    );
  } else {
    notes.push(`P speeds come from the given Poisson's ratio ${rule.poisson}.`);
  }
  if (rule.poisson < 0) {
    notes.push(`A Poisson's ratio below 0 (${rule.poisson}) is possible in theory but not known in soils; check it.`);
  }
  if (rule.kind === 'water-table') {
    notes.push(
      `Below the water table at ${rule.depth} m the P speed is at least ${WATER_P_SPEED} m/s (saturated ground, common practice).`,
    );
  }
  return notes;
}

/** A layer with its P speed, as the forward step uses it. */
export interface ElasticLayer {
  thickness: number;
  vs: number;
  vp: number;
  density: number;
}

/**
 * The layers with P speeds by the rule: `thickness`, `vs`, `density` of the
 * N layers, then the half-space (vs and density at index N). Returns the
 * layers (a layer cut by the water table becomes two; a table inside the
 * half-space makes the half-space's dry top a layer) and the half-space.
 * No validation here: the estimate checks the rule once.
 */
export function withPSpeeds(
  thickness: ArrayLike<number>,
  vs: ArrayLike<number>,
  density: ArrayLike<number>,
  rule: PSpeedRule,
): { layers: ElasticLayer[]; halfspace: { vs: number; vp: number; density: number } } {
  const n = thickness.length;
  const layers: ElasticLayer[] = [];
  const vpAt = (j: number, saturated: boolean): number => {
    if (rule.kind === 'fixed') return j < n ? rule.layers[j] : rule.halfspace;
    const a = vpFromPoisson(vs[j], rule.poisson);
    return saturated ? Math.max(a, WATER_P_SPEED) : a;
  };
  const table = rule.kind === 'water-table' ? rule.depth : Infinity;
  let top = 0;
  for (let j = 0; j < n; j++) {
    const h = thickness[j];
    const bottom = top + h;
    if (table > top && table < bottom) {
      layers.push({ thickness: table - top, vs: vs[j], vp: vpAt(j, false), density: density[j] });
      layers.push({ thickness: bottom - table, vs: vs[j], vp: vpAt(j, true), density: density[j] });
    } else {
      layers.push({ thickness: h, vs: vs[j], vp: vpAt(j, top >= table), density: density[j] });
    }
    top = bottom;
  }
  if (table > top && Number.isFinite(table)) {
    // The water table lies in the half-space: its dry top becomes a layer.
    layers.push({ thickness: table - top, vs: vs[n], vp: vpAt(n, false), density: density[n] });
  }
  return { layers, halfspace: { vs: vs[n], vp: vpAt(n, Number.isFinite(table)), density: density[n] } };
}

/**
 * The P speed (m/s) of layer j (j = N for the half-space) with shear speed
 * `vs`, whose middle lies at depth `middle` m (the half-space: its top),
 * by the rule. A layer cut by the water table has two; this gives the one
 * at its middle.
 */
export function vpOfLayer(rule: PSpeedRule, j: number, vs: number, middle: number, layers: number): number {
  if (rule.kind === 'fixed') return j < layers ? rule.layers[j] : rule.halfspace;
  const a = vpFromPoisson(vs, rule.poisson);
  return rule.kind === 'water-table' && middle >= rule.depth ? Math.max(a, WATER_P_SPEED) : a;
}

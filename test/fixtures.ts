/**
 * Models shared by several test and bench files. Each test still names,
 * beside its check, the source of the values it compares with.
 */
import { loveVelocities, type TwoLayer } from '../core/dispersion/love-layer';
import type { Layer, LayeredModel } from '../core/dispersion/model';
import { picksToCsv, type Pick } from '../core/picks/picks';
import { gaussian } from '../core/shared/random';
import { WAVE_FORWARDS } from '../core/profile/profile-forward';
import { vpFromPoisson } from '../core/profile/p-speed';

/**
 * The crustal layer over mantle of Shearer, *Introduction to Seismology*
 * (2nd ed. 2009), ch. 8 exercises: H = 40 km, β1 = 3.5 km/s, β2 = 4.5 km/s,
 * ρ1 = 2.7 g/cm³, ρ2 = 3.3 g/cm³; here in SI units.
 */
export const SHEARER_CRUST: Readonly<TwoLayer> = Object.freeze({ h: 40_000, vs1: 3500, vs2: 4500, rho1: 2700, rho2: 3300 });

/** SHEARER_CRUST as a LayeredModel (one layer over the half-space). */
export const SHEARER_CRUST_MODEL: LayeredModel = {
  layers: [{ thickness: 40_000, vs: 3500, density: 2700 }],
  halfspace: { vs: 4500, density: 3300 },
};

/** Invented three-layer site with a low-velocity layer at depth. */
export const INVENTED_LVL_SITE: LayeredModel = {
  layers: [
    { thickness: 10, vs: 250, density: 1800 },
    { thickness: 15, vs: 150, density: 1750 },
    { thickness: 20, vs: 350, density: 1900 },
  ],
  halfspace: { vs: 600, density: 2100 },
};

/** Invented five-layer soft-soil site, with a low-velocity layer at depth. */
export const INVENTED_FIVE_LAYER_SITE: LayeredModel = {
  layers: [
    { thickness: 3, vs: 160, density: 1750 },
    { thickness: 5, vs: 220, density: 1850 },
    { thickness: 6, vs: 180, density: 1800 },
    { thickness: 8, vs: 320, density: 1950 },
    { thickness: 12, vs: 450, density: 2050 },
  ],
  halfspace: { vs: 700, density: 2200 },
};

/** Invented soft-soil site (one layer over a half-space) for the estimate tests and benches. */
export const INVENTED_SOFT_SITE: Readonly<TwoLayer> = Object.freeze({ h: 12, vs1: 200, vs2: 500, rho1: 1800, rho2: 2100 });

/**
 * `count` fundamental-mode picks of INVENTED_SOFT_SITE from the closed-form
 * forward model (core/dispersion/love-layer.ts), log-spaced from 3 to 40 Hz, every
 * third (from the first) a phase pick, the rest group picks, each stating
 * sd = 3 % of its exact velocity. With `rand` (uniforms in [0, 1)), each
 * velocity gets Gaussian noise of that sd (core/shared/random.ts gaussian);
 * without, the velocities are exact.
 */
export function softSitePicks(count: number, rand?: () => number): Pick[] {
  return oneLayerPicks(INVENTED_SOFT_SITE, count, rand);
}

/** The same picks (3–40 Hz, every third a phase pick, sd 3 %, optional seeded noise) of any one-layer site. */
export function oneLayerPicks(site: Readonly<TwoLayer>, count: number, rand?: () => number): Pick[] {
  const out: Pick[] = [];
  for (let i = 0; i < count; i++) {
    const f = 3 * Math.pow(40 / 3, i / (count - 1));
    const v = loveVelocities(site, f, 0);
    const phase = i % 3 === 0;
    const exact = phase ? v.phase : v.group;
    const sd = 0.03 * exact;
    out.push({ frequency: f, velocity: rand ? exact + sd * gaussian(rand) : exact, kind: phase ? 'phase' : 'group', mode: 0, sd });
  }
  return out;
}

/** Invented two-layer soft site (fill over alluvium over weathered rock) for the layered-estimate tests and bench. */
export const INVENTED_TWO_LAYER_SITE: LayeredModel = {
  layers: [
    { thickness: 5, vs: 180, density: 1800 },
    { thickness: 10, vs: 320, density: 1800 },
  ],
  halfspace: { vs: 600, density: 2100 },
};

/** Invented three-layer site for the layered-estimate bench. */
export const INVENTED_THREE_LAYER_SITE: LayeredModel = {
  layers: [
    { thickness: 3, vs: 150, density: 1800 },
    { thickness: 6, vs: 250, density: 1800 },
    { thickness: 10, vs: 400, density: 1800 },
  ],
  halfspace: { vs: 700, density: 2100 },
};

/**
 * `count` fundamental-mode picks of a layered model, log-spaced from `from`
 * to `to` Hz, every third (from the first) a phase pick and the rest group
 * picks, each with sd = 3 % of its exact velocity, from the forward step of
 * core/profile/profile-forward.ts for the wave (P speeds by `vp`, per layer
 * then the half-space; ignored by Love waves). With `rand`, Gaussian noise
 * of that sd; without, exact.
 */
export function layeredPicks(
  model: LayeredModel,
  wave: 'love' | 'rayleigh',
  count: number,
  from: number,
  to: number,
  rand?: () => number,
  vp: readonly number[] = [],
): Pick[] {
  const fm = {
    layers: model.layers.map((l, j) => ({ ...l, vp: vp[j] ?? 0 })),
    halfspace: { ...model.halfspace, vp: vp[model.layers.length] ?? 0 },
  };
  const engine = WAVE_FORWARDS[wave]!(fm);
  const out: Pick[] = [];
  for (let i = 0; i < count; i++) {
    const f = from * Math.pow(to / from, i / (count - 1));
    const omega = 2 * Math.PI * f;
    const c = engine.phase(omega, 0);
    const phase = i % 3 === 0;
    const exact = phase ? c : engine.group(omega, 0, c);
    const sd = 0.03 * exact;
    const p: Pick = { frequency: f, velocity: rand ? exact + sd * gaussian(rand) : exact, kind: phase ? 'phase' : 'group', mode: 0, sd };
    if (wave === 'rayleigh') p.wave = 'rayleigh';
    out.push(p);
  }
  return out;
}

/**
 * The invented two-layer site's exact Rayleigh picks (P speeds from
 * Poisson's ratio 0.3, the estimate's default) as a crew would type them:
 * a picks CSV with frequencies to 0.01 Hz and speeds to 0.1 m/s.
 */
export function typedRayleighPicksCsv(count: number, from: number, to: number): string {
  const m = INVENTED_TWO_LAYER_SITE;
  const vp = [...m.layers.map((l) => vpFromPoisson(l.vs, 0.3)), vpFromPoisson(m.halfspace.vs, 0.3)];
  const picks = layeredPicks(m, 'rayleigh', count, from, to, undefined, vp).map((p) => ({
    ...p,
    frequency: Number(p.frequency.toFixed(2)),
    velocity: Number(p.velocity.toFixed(1)),
    sd: Number(p.sd!.toFixed(1)),
  }));
  return picksToCsv(picks, { lineEnding: '\n' });
}

/**
 * One to five seeded random layers for the Rayleigh solver checks: Vs 60–900 m/s,
 * thickness 0.5–30 m, Vp/Vs 1.45–4, density 1500–2500 kg/m³ (invented ranges that
 * span near-surface sites). Draws from `rand` in a fixed order, so a seed gives one set.
 */
export function randomLayers(rand: () => number): Required<Layer>[] {
  const n = 1 + Math.floor(rand() * 5);
  const layers: Required<Layer>[] = [];
  for (let i = 0; i < n; i++) {
    const vs = 60 + rand() * 840;
    layers.push({ thickness: 0.5 + rand() * 29.5, vs, vp: vs * (1.45 + rand() * 2.55), density: 1500 + rand() * 1000 });
  }
  return layers;
}

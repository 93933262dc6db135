/**
 * The layered estimate: thicknesses and shear speeds of N = 1–4 layers over
 * a half-space from Love and/or Rayleigh dispersion picks, with an ensemble
 * that gives 68 % and 95 % intervals, a band of shear speed against depth,
 * Vs30 and site classes, other layerings that fit, and the number of layers
 * the picks support.
 *
 * Method (maximum likelihood for Gaussian pick errors, parameters
 * u = (ln h_1…ln h_N, ln β_1…ln β_N, ln β_H) inside a search box built from
 * the picks, PROFILE_RANGE_RULE):
 *  1. global search by the neighbourhood algorithm (Sambridge 1999, GJI
 *     138:479; neighbourhood.ts) over the box;
 *  2. local refinement of the best few separate samples by
 *     Levenberg–Marquardt (core/numeric/levenberg-marquardt.ts) on the exact
 *     forward step (profile-forward.ts): the best is the fit, the others
 *     are alternatives when they fit within Δχ² = 3.84. Steps 1–2 run the
 *     forward step in its screening form (Rayleigh roots tracked along
 *     frequency under a low-velocity layer too); the χ² of each refined
 *     fit, and everything below, comes from the verified form;
 *  3. appraisal by a Metropolis random walk around the fit (appraisal.ts):
 *     per-parameter central 68.27 % and 95 % intervals, the band, Vs30 and
 *     site classes over that ensemble. When the fit is poor (χ² above its
 *     95 % point for the degrees of freedom) the likelihood is tempered by
 *     χ²/dof, as the one-layer estimate scales its Δχ² levels;
 *  4. model choice by BIC (Schwarz 1978) over the layer counts tried
 *     (BIC_NOT_WORTH_MENTIONING). A fit worse than the pick errors allow is
 *     searched again: by fresh samples for a count that may be reported,
 *     by refinement from the fit of one more layer with one interface
 *     removed (nestedStarts) for a smaller count that is only compared.
 * The P speeds that Rayleigh waves need come from p-speed.ts; densities are
 * fixed (defaults common practice). Randomness is seeded (core/shared/random.ts),
 * so a given seed gives the same result.
 *
 * Bad input throws one InputError naming the field, before any work.
 */
import { checkDensity } from '../dispersion/model';
import { DEFAULT_DENSITY_HALFSPACE, DEFAULT_DENSITY_LAYER } from '../estimate/estimate-types';
import { chi2Upper95 } from '../estimate/estimate-diagnostics';
import { invertSmall, levenbergMarquardt } from '../numeric/levenberg-marquardt';
import { checkPickSet, defaultSdNote, effectiveSd, pickWave, validatePick, type Pick, type PickWave } from '../picks/picks';
import { CAUTION } from '../shared/caution';
import { InputError, describeValue } from '../shared/errors';
import { mulberry32, normals } from '../shared/random';
import { siteClassOf, siteClassesForRanges, siteFigures, vsAverage, VS100FT_DEPTH_M, VS30_DEPTH_M } from '../site/site';
import { metropolisChain, quantileSorted, QUANTILE_68, QUANTILE_95, type Chain } from './appraisal';
import { DEPTHS_PER_WAVELENGTH, wavelengthDepthStart } from './profile-starts';
import { neighbourhoodSearch, type NeighbourhoodEnsemble } from './neighbourhood';
import { checkPoisson, checkWaterTable, DEFAULT_POISSON, MIN_VP_VS_RATIO, pSpeedNotes, vpOfLayer, withPSpeeds, type PSpeedRule } from './p-speed';
import { predictPicks, trackingOrder, WAVE_FORWARDS, type ForwardModel, type ForwardPicks } from './profile-forward';
import {
  BIC_NOT_WORTH_MENTIONING, choiceEffort, defaultEffort, DEPTH_OF_INVESTIGATION_PER_LONGEST_WAVELENGTH, MAX_PROFILE_LAYERS,
  PROFILE_RANGE_RULE, UNRESOLVED_SHARE,
  type Interval, type LayerChoice, type ParameterInterval, type ProfileAlternative, type ProfileBand, type ProfileEffort,
  type ProfileField, type ProfileLayer, type ProfileOptions, type ProfileResult,
} from './profile-types';

export * from './profile-types';

/** Δχ² for a 95 % interval on one parameter (the normal 97.5 % point squared). */
const DELTA_CHI2_95 = 3.841458820694124;
/** The half-space must be at least this much faster than the slowest layer (Love waves need it; as the one-layer estimate). */
const LOG_SPEED_GAP = Math.log(1.001);
/** Residual given to a pick whose prediction failed, in standard deviations (keeps Levenberg–Marquardt finite). */
const FAILED_RESIDUAL = 1e3;
/** Points of the depth band. */
const BAND_POINTS = 161;
/** How many separate samples of the search are refined. */
const REFINED_STARTS = 5;
/** Two fits closer than this in every log parameter (2 %) are one minimum. */
const SAME_MINIMUM = 0.02;

// ---------------------------------------------------------------- the problem

interface Problem {
  n: number;
  picks: ForwardPicks;
  v: Float64Array;
  /** Picked frequency, Hz. */
  frequency: Float64Array;
  sd: Float64Array;
  labels: string[];
  lambdaMin: number;
  lambdaMax: number;
  vmin: number;
  vmax: number;
  waves: Record<PickWave, number>;
  rule: PSpeedRule;
  densityLayers: readonly number[] | null;
  densityHalfspace: number;
  defaultedSd: number;
}

/** One layer count's parameter layout and box. */
interface Layout {
  layers: number;
  k: number;
  lower: Float64Array;
  upper: Float64Array;
}

function label(options: ProfileOptions, field: ProfileField): string {
  return options.fieldLabels?.[field] ?? field;
}

function prepare(picks: readonly Pick[], options: ProfileOptions): Problem {
  const whereOf = options.whereOf ?? ((i: number) => `pick ${i + 1}`);
  if (!Array.isArray(picks) || picks.length === 0) {
    throw new InputError(label(options, 'picks'), 'There are no picks; give at least one dispersion pick.');
  }
  const clean = picks.map((p, i) => validatePick(p, whereOf(i)));
  checkPickSet(clean, whereOf);
  const n = clean.length;
  const waves: Record<PickWave, number> = { love: 0, rayleigh: 0 };
  for (const p of clean) waves[pickWave(p)]++;
  for (const w of ['love', 'rayleigh'] as const) {
    if (waves[w] > 0 && !WAVE_FORWARDS[w]) {
      const i = clean.findIndex((p) => pickWave(p) === w);
      throw new InputError(`${whereOf(i)}, wave`, `${capital(whereOf(i))} is a ${w} pick, but this build has no ${w} forward solver.`);
    }
  }

  // P-speed rule (used by Rayleigh picks only, checked always so that a bad option is never silent).
  const poissonGiven = options.poisson !== undefined;
  const poisson = poissonGiven ? checkPoisson(options.poisson, label(options, 'poisson')) : DEFAULT_POISSON;
  let rule: PSpeedRule;
  if (options.fixedVp !== undefined) {
    if (poissonGiven || options.waterTableDepth !== undefined) {
      const name = label(options, 'fixedVp');
      throw new InputError(name, `${name} gives the P speeds; give it, or a Poisson's ratio and water-table depth, not both.`);
    }
    const fv = options.fixedVp;
    const name = label(options, 'fixedVp');
    if (!fv || !Array.isArray(fv.layers)) throw new InputError(name, `${name} must list a P speed for every layer and the half-space.`);
    const check = (v: unknown, where: string): number => {
      if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
        throw new InputError(name, `${name}: the P speed of ${where} must be a finite speed above 0 m/s, but it is ${describeValue(v)}.`);
      }
      return v;
    };
    rule = { kind: 'fixed', layers: fv.layers.map((v, j) => check(v, `layer ${j + 1}`)), halfspace: check(fv.halfspace, 'the half-space') };
  } else if (options.waterTableDepth !== undefined) {
    rule = {
      kind: 'water-table',
      poisson,
      defaulted: !poissonGiven,
      depth: checkWaterTable(options.waterTableDepth, label(options, 'waterTableDepth')),
    };
  } else {
    rule = { kind: 'poisson', poisson, defaulted: !poissonGiven };
  }

  let densityLayers: readonly number[] | null = null;
  let densityHalfspace = DEFAULT_DENSITY_HALFSPACE;
  if (options.densities !== undefined) {
    const name = label(options, 'densities');
    const d = options.densities;
    if (!d || !Array.isArray(d.layers)) throw new InputError(name, `${name} must list a density for every layer and the half-space.`);
    densityLayers = d.layers.map((v, j) => checkDensity(v, `${name}: layer ${j + 1}`));
    densityHalfspace = checkDensity(d.halfspace, `${name}: the half-space`);
  }

  const omega = new Float64Array(n);
  const mode = new Int32Array(n);
  const isPhase = new Uint8Array(n);
  const wave = new Uint8Array(n);
  const v = new Float64Array(n);
  const sd = new Float64Array(n);
  let lambdaMin = Infinity;
  let lambdaMax = 0;
  let vmin = Infinity;
  let vmax = 0;
  let defaultedSd = 0;
  for (let i = 0; i < n; i++) {
    const p = clean[i];
    omega[i] = 2 * Math.PI * p.frequency;
    mode[i] = p.mode;
    isPhase[i] = p.kind === 'phase' ? 1 : 0;
    wave[i] = pickWave(p) === 'rayleigh' ? 1 : 0;
    v[i] = p.velocity;
    sd[i] = effectiveSd(p);
    if (p.sd === undefined) defaultedSd++;
    const lambda = p.velocity / p.frequency;
    lambdaMin = Math.min(lambdaMin, lambda);
    lambdaMax = Math.max(lambdaMax, lambda);
    vmin = Math.min(vmin, p.velocity);
    vmax = Math.max(vmax, p.velocity);
  }
  return {
    n,
    picks: withTrackingOrder({ n, omega, mode, isPhase, wave }),
    v,
    frequency: Float64Array.from(clean, (p) => p.frequency),
    sd,
    labels: clean.map((_, i) => whereOf(i)),
    lambdaMin,
    lambdaMax,
    vmin,
    vmax,
    waves,
    rule,
    densityLayers,
    densityHalfspace,
    defaultedSd,
  };
}

function withTrackingOrder(picks: ForwardPicks): ForwardPicks {
  return { ...picks, order: trackingOrder(picks) };
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

function layoutFor(P: Problem, layers: number): Layout {
  const R = PROFILE_RANGE_RULE;
  const k = 2 * layers + 1;
  const lower = new Float64Array(k);
  const upper = new Float64Array(k);
  const clipV = (x: number) => Math.min(5000, Math.max(30, x));
  for (let j = 0; j < layers; j++) {
    lower[j] = Math.log(R.thicknessLowPerShortestWavelength * P.lambdaMin);
    upper[j] = Math.log(R.thicknessHighPerLongestWavelength * P.lambdaMax);
    lower[layers + j] = Math.log(clipV(R.vsLowPerSlowestPick * P.vmin));
    upper[layers + j] = Math.log(clipV(R.vsHighPerFastestPick * P.vmax));
  }
  lower[2 * layers] = Math.log(clipV(R.halfspaceLowPerSlowestPick * P.vmin));
  upper[2 * layers] = Math.log(clipV(R.halfspaceHighPerFastestPick * P.vmax));
  return { layers, k, lower, upper };
}

/** The forward model of parameters u, or null when u is outside the physical domain. */
function modelOf(P: Problem, L: Layout, u: ArrayLike<number>): ForwardModel | null {
  const N = L.layers;
  const thickness = new Float64Array(N);
  const vs = new Float64Array(N + 1);
  const density = new Float64Array(N + 1);
  let slowest = Infinity;
  for (let j = 0; j < N; j++) {
    thickness[j] = Math.exp(u[j]);
    vs[j] = Math.exp(u[N + j]);
    slowest = Math.min(slowest, u[N + j]);
    density[j] = P.densityLayers ? P.densityLayers[j] : DEFAULT_DENSITY_LAYER;
  }
  vs[N] = Math.exp(u[2 * N]);
  density[N] = P.densityHalfspace;
  if (!(u[2 * N] >= slowest + LOG_SPEED_GAP * 0.999)) return null;
  const m = withPSpeeds(thickness, vs, density, P.rule);
  if (P.rule.kind === 'fixed') {
    for (const l of m.layers) if (!(l.vp > MIN_VP_VS_RATIO * l.vs)) return null;
    if (!(m.halfspace.vp > MIN_VP_VS_RATIO * m.halfspace.vs)) return null;
  }
  return m;
}

/** Keeps the half-space above the slowest layer (Levenberg–Marquardt's projection; idempotent). */
function projector(L: Layout): (p: Float64Array) => void {
  const N = L.layers;
  return (p) => {
    let slowest = Infinity;
    for (let j = 0; j < N; j++) slowest = Math.min(slowest, p[N + j]);
    if (p[2 * N] < slowest + LOG_SPEED_GAP) p[2 * N] = Math.min(L.upper[2 * N], slowest + LOG_SPEED_GAP);
  };
}

class Misfit {
  private readonly predicted: Float64Array;
  /** Each pick's root of the last model evaluated, and that model's parameters (warm starts, profile-forward.ts). */
  private readonly guesses: Float64Array;
  private readonly last: Float64Array;
  private hasLast = false;
  /** Whether the last model's roots were screened (not verified against a pair below, profile-forward.ts). */
  private lastScreened = false;
  /**
   * Screening forward step (profile-forward.ts): Rayleigh roots of a model with a low-velocity layer
   * tracked along frequency, not each verified by the full scan. On for the search's samples and the
   * steps of Levenberg–Marquardt only: each refined fit's χ² and everything after is verified.
   */
  screening = false;
  evaluations = 0;
  constructor(
    private readonly P: Problem,
    private readonly L: Layout,
  ) {
    this.predicted = new Float64Array(P.n);
    this.guesses = new Float64Array(P.n);
    this.last = new Float64Array(L.k);
  }
  /** Weighted residuals at u into out; false when u has no model (out filled with FAILED_RESIDUAL). */
  residuals(u: ArrayLike<number>, out: Float64Array): boolean {
    this.evaluations++;
    const m = modelOf(this.P, this.L, u);
    if (!m) {
      out.fill(FAILED_RESIDUAL);
      return false;
    }
    // How far the model moved since the last one (the largest change of a log parameter).
    let spread = this.hasLast ? 0 : Infinity;
    for (let j = 0; j < this.L.k; j++) spread = Math.max(spread, Math.abs(u[j] - this.last[j]));
    // Roots of a screened model never start a verified solve.
    if (!this.hasLast || (this.lastScreened && !this.screening)) this.guesses.fill(NaN);
    predictPicks(this.P.picks, m, this.predicted, this.guesses, spread, this.screening);
    for (let j = 0; j < this.L.k; j++) this.last[j] = u[j];
    this.hasLast = true;
    this.lastScreened = this.screening;
    for (let i = 0; i < this.P.n; i++) {
      const r = (this.P.v[i] - this.predicted[i]) / this.P.sd[i];
      out[i] = Number.isFinite(r) ? r : FAILED_RESIDUAL;
    }
    return true;
  }
  /** χ² at u; +∞ outside the box or the physical domain. */
  chi2(u: ArrayLike<number>, scratch: Float64Array): number {
    for (let j = 0; j < this.L.k; j++) if (!(u[j] >= this.L.lower[j] && u[j] <= this.L.upper[j])) return Infinity;
    if (!this.residuals(u, scratch)) return Infinity;
    let s = 0;
    for (let i = 0; i < scratch.length; i++) s += scratch[i] * scratch[i];
    return s;
  }
}

interface Fit {
  u: Float64Array;
  chi2: number;
  normal: Float64Array;
}

interface LayerFit {
  layout: Layout;
  misfit: Misfit;
  ensemble: NeighbourhoodEnsemble;
  /** Refined minima, best first, distinct. */
  minima: Fit[];
}

/** Search and refinement for one layer count. */
function fitLayers(P: Problem, layers: number, effort: ProfileEffort, seed: number, tick: (units: number) => void): LayerFit {
  const L = layoutFor(P, layers);
  const misfit = new Misfit(P, L);
  const scratch = new Float64Array(P.n);
  const u = new Float64Array(L.k);
  const uniform = mulberry32(seed);
  let since = 0;
  misfit.screening = true;
  const ensemble = neighbourhoodSearch(
    L.k,
    (x) => {
      for (let j = 0; j < L.k; j++) u[j] = L.lower[j] + x[j] * (L.upper[j] - L.lower[j]);
      if (++since === 25) {
        tick(since);
        since = 0;
      }
      return misfit.chi2(u, scratch);
    },
    uniform,
    { initial: effort.initial, perIteration: effort.perIteration, cells: effort.cells, iterations: effort.iterations },
  );
  tick(since);

  // Starts: the best samples that lie apart from one another in the unit cube.
  const order = Array.from({ length: ensemble.count }, (_, i) => i).filter((i) => Number.isFinite(ensemble.misfit[i]));
  order.sort((a, b) => ensemble.misfit[a] - ensemble.misfit[b]);
  const starts: number[] = [];
  const apart = 0.12 * Math.sqrt(L.k);
  for (const i of order) {
    if (starts.length >= REFINED_STARTS) break;
    const far = starts.every((s) => {
      let d = 0;
      for (let j = 0; j < L.k; j++) d += (ensemble.points[i * L.k + j] - ensemble.points[s * L.k + j]) ** 2;
      return Math.sqrt(d) > apart;
    });
    if (far) starts.push(i);
  }
  const p0s: Float64Array[] = starts.map((s) => {
    const p0 = new Float64Array(L.k);
    for (let j = 0; j < L.k; j++) p0[j] = L.lower[j] + ensemble.points[s * L.k + j] * (L.upper[j] - L.lower[j]);
    return p0;
  });
  // Starts that do not depend on the search's luck (profile-starts.ts), refined first: they most
  // often reach the deepest basin, and a later start that arrives at a minimum already found stops there.
  p0s.unshift(...DEPTHS_PER_WAVELENGTH.map((d) => wavelengthDepthStart(P.v, P.frequency, layers, L.lower, L.upper, d)));
  const fits = refine(P, L, misfit, p0s, [], tick);
  if (fits.length === 0) {
    // Every refinement left the physical domain: keep the best sample itself.
    const b = order[0];
    const ub = new Float64Array(L.k);
    for (let j = 0; j < L.k; j++) ub[j] = L.lower[j] + ensemble.points[b * L.k + j] * (L.upper[j] - L.lower[j]);
    fits.push({ u: ub, chi2: misfit.chi2(ub, scratch), normal: new Float64Array(L.k * L.k) });
  }
  return { layout: L, misfit, ensemble, minima: distinctMinima(fits, L.k) };
}

/**
 * Levenberg–Marquardt from each start (the steps screened, the χ² of each
 * end point verified); a start stops early at a minimum already in `known`
 * or found before it. Returns the refined fits (those inside the physical domain).
 */
function refine(P: Problem, L: Layout, misfit: Misfit, p0s: readonly Float64Array[], known: readonly Fit[], tick: (units: number) => void): Fit[] {
  const scratch = new Float64Array(P.n);
  const project = projector(L);
  const fits: Fit[] = [];
  const found = (p: Float64Array, chi2: number) =>
    [...known, ...fits].some((f) => {
      if (chi2 < f.chi2) return false;
      for (let j = 0; j < L.k; j++) if (Math.abs(f.u[j] - p[j]) >= SAME_MINIMUM) return false;
      return true;
    });
  for (const p0 of p0s) {
    const before = misfit.evaluations;
    misfit.screening = true;
    const out = levenbergMarquardt(
      (p, r) => {
        misfit.residuals(p, r);
      },
      P.n,
      p0,
      L.lower,
      L.upper,
      { tolerance: 1e-6, maxIterations: 30, stopWhen: found },
      project,
    );
    tick(misfit.evaluations - before);
    misfit.screening = false;
    const chi2 = misfit.chi2(out.p, scratch);
    if (Number.isFinite(chi2)) fits.push({ u: out.p, chi2, normal: out.normal });
  }
  misfit.screening = false;
  return fits;
}

/** The fits best first, without those within SAME_MINIMUM of a better one. */
function distinctMinima(fits: readonly Fit[], k: number): Fit[] {
  const sorted = [...fits].sort((a, b) => a.chi2 - b.chi2);
  const minima: Fit[] = [];
  for (const f of sorted) {
    const dup = minima.some((m) => {
      let far = 0;
      for (let j = 0; j < k; j++) far = Math.max(far, Math.abs(m.u[j] - f.u[j]));
      return far < SAME_MINIMUM;
    });
    if (!dup) minima.push(f);
  }
  return minima;
}

/**
 * Starts for N layers from a fit of N + 1 (nested models): each interface
 * removed in turn, the two layers it parted merged into one of their
 * total thickness and travel-time average speed (h₁ + h₂)/(h₁/β₁ + h₂/β₂),
 * the deepest interface removed by dropping the deepest layer; clipped to the box.
 */
function nestedStarts(deeper: Fit, N: number, L: Layout): Float64Array[] {
  const M = N + 1;
  const h = Array.from({ length: M }, (_, j) => Math.exp(deeper.u[j]));
  const b = Array.from({ length: M }, (_, j) => Math.exp(deeper.u[M + j]));
  const starts: Float64Array[] = [];
  for (let cut = 0; cut < M; cut++) {
    const hs: number[] = [];
    const bs: number[] = [];
    for (let j = 0; j < M; j++) {
      if (j === cut + 1) continue;
      if (j === cut && cut + 1 < M) {
        hs.push(h[j] + h[j + 1]);
        bs.push((h[j] + h[j + 1]) / (h[j] / b[j] + h[j + 1] / b[j + 1]));
      } else if (j !== cut || cut + 1 < M) {
        hs.push(h[j]);
        bs.push(b[j]);
      }
    }
    const p0 = new Float64Array(L.k);
    for (let j = 0; j < N; j++) {
      p0[j] = Math.log(hs[j]);
      p0[N + j] = Math.log(bs[j]);
    }
    p0[2 * N] = deeper.u[2 * M];
    for (let j = 0; j < L.k; j++) p0[j] = Math.min(L.upper[j], Math.max(L.lower[j], p0[j]));
    projector(L)(p0);
    starts.push(p0);
  }
  return starts;
}

// ---------------------------------------------------------------- appraisal

function intervalOf(values: Float64Array, best: number): Interval {
  const s = Float64Array.from(values).sort();
  return {
    best,
    low68: Math.min(best, quantileSorted(s, QUANTILE_68[0])),
    high68: Math.max(best, quantileSorted(s, QUANTILE_68[1])),
    low95: Math.min(best, quantileSorted(s, QUANTILE_95[0])),
    high95: Math.max(best, quantileSorted(s, QUANTILE_95[1])),
  };
}

function parameterOf(chain: Chain, column: number, best: number, L: Layout, widenTo: number[]): ParameterInterval {
  const values = new Float64Array(chain.count);
  for (let s = 0; s < chain.count; s++) values[s] = Math.exp(chain.samples[s * chain.k + column]);
  const iv = intervalOf(values, best);
  for (const w of widenTo) {
    iv.low95 = Math.min(iv.low95, w);
    iv.high95 = Math.max(iv.high95, w);
  }
  const lo = L.lower[column];
  const hi = L.upper[column];
  const share = (Math.log(iv.high95) - Math.log(iv.low95)) / (hi - lo);
  return { ...iv, range: [Math.exp(lo), Math.exp(hi)], resolved: share <= UNRESOLVED_SHARE };
}

/** Shear speed at depth z in a model of N layers given by u. */
function vsAtDepth(u: ArrayLike<number>, N: number, z: number): number {
  let top = 0;
  for (let j = 0; j < N; j++) {
    top += Math.exp(u[j]);
    if (z < top) return Math.exp(u[N + j]);
  }
  return Math.exp(u[2 * N]);
}

function siteModel(m: ForwardModel) {
  return { layers: m.layers.map((l) => ({ thickness: l.thickness, vs: l.vs, density: l.density })), halfspace: { vs: m.halfspace.vs, density: m.halfspace.density } };
}

function round(x: number, digits = 3): string {
  return Number(x.toPrecision(digits)).toString();
}

// ---------------------------------------------------------------- the estimate

/**
 * The layered estimate of `picks` (Love, Rayleigh or both). Throws
 * InputError for bad picks or options, naming the field; otherwise always
 * returns a result, with warnings wherever the picks cannot support it.
 */
export function estimateProfile(picks: readonly Pick[], options: ProfileOptions = {}): ProfileResult {
  const P = prepare(picks, options);
  const layersOption = options.layers ?? 'auto';
  if (layersOption !== 'auto' && (!Number.isInteger(layersOption) || layersOption < 1 || layersOption > MAX_PROFILE_LAYERS)) {
    const name = label(options, 'layers');
    throw new InputError(name, `${name} must be a whole number from 1 to ${MAX_PROFILE_LAYERS} (or let the picks decide), but it is ${describeValue(layersOption)}.`);
  }
  const seed = options.seed ?? 1;
  if (!Number.isInteger(seed)) throw new InputError(label(options, 'seed'), `${label(options, 'seed')} must be a whole number, but it is ${describeValue(seed)}.`);
  const most = layersOption === 'auto' ? MAX_PROFILE_LAYERS : layersOption;
  const compare = layersOption === 'auto' || (options.compareLayers ?? true);
  const tried = compare ? Array.from({ length: most }, (_, i) => i + 1) : [most];
  const tooFew = tried.filter((N) => P.n <= 2 * N + 1);
  if (tooFew.length === tried.length) {
    const N = tried[0];
    throw new InputError(
      label(options, 'picks'),
      `There are ${P.n} picks, too few for ${N} layer${N > 1 ? 's' : ''} over a half-space (${2 * N + 1} free parameters); give at least ${2 * N + 2} picks or fewer layers.`,
    );
  }
  const usable = tried.filter((N) => P.n > 2 * N + 1);
  if (P.rule.kind === 'fixed' && P.rule.layers.length < most) {
    const name = label(options, 'fixedVp');
    throw new InputError(name, `${name} lists ${P.rule.layers.length} layer P speeds, but the estimate uses up to ${most} layers.`);
  }
  if (P.densityLayers && P.densityLayers.length < most) {
    const name = label(options, 'densities');
    throw new InputError(name, `${name} lists ${P.densityLayers.length} layer densities, but the estimate uses up to ${most} layers.`);
  }

  // Effort and progress.
  const efforts = new Map<number, ProfileEffort>();
  for (const N of usable) {
    const chosenSize = layersOption === 'auto' || N === most;
    const base = chosenSize ? defaultEffort(N) : choiceEffort(N);
    efforts.set(N, { ...base, ...(chosenSize ? options.effort : {}), chainSteps: 0, burnIn: 0 });
  }
  const chainEffort = { ...defaultEffort(layersOption === 'auto' ? 2 : most), ...options.effort };
  const naCost = (e: ProfileEffort) => e.initial + e.iterations * Math.max(1, Math.floor(e.perIteration / e.cells)) * e.cells + 40 * (2 * MAX_PROFILE_LAYERS + 2);
  let total = chainEffort.chainSteps + chainEffort.burnIn;
  for (const e of efforts.values()) total += naCost(e);
  let done = 0;
  const progress = options.onProgress;
  const tick = (units: number) => {
    done += units;
    if (progress) progress(Math.min(0.99, done / total));
  };
  progress?.(0);

  // 1–2. Search and refine each layer count, the most layers first (a smaller count only compared
  // is then searched again, when it fits poorly, from the larger count's fit: nestedStarts).
  const fits = new Map<number, LayerFit>();
  for (const N of [...usable].reverse()) {
    let fit = fitLayers(P, N, efforts.get(N)!, seed + 7919 * N, tick);
    // A fit the picks' errors cannot explain may be a local minimum the search settled in:
    // search once more and keep the better (the misfit decides, nothing else).
    const dofN = P.n - (2 * N + 1);
    const larger = fits.get(N + 1);
    if (dofN > 0 && fit.minima[0].chi2 > chi2Upper95(dofN) && layersOption !== 'auto' && N < most && larger) {
      // Only compared: refine from the (N + 1)-layer fit with one interface removed in turn.
      const more = refine(P, fit.layout, fit.misfit, nestedStarts(larger.minima[0], N, fit.layout), fit.minima, tick);
      fit.minima = distinctMinima([...fit.minima, ...more], fit.layout.k);
    } else if (dofN > 0 && fit.minima[0].chi2 > chi2Upper95(dofN)) {
      // Fresh samples.
      const again = fitLayers(P, N, efforts.get(N)!, seed + 7919 * N + 104729, tick);
      if (again.minima[0].chi2 < fit.minima[0].chi2) {
        again.minima.push(...fit.minima);
        again.minima.sort((a, b) => a.chi2 - b.chi2);
        fit = again;
      }
    }
    fits.set(N, fit);
  }

  // 4. Model choice (BIC).
  const choices: LayerChoice[] = usable.map((N) => {
    const chi2 = fits.get(N)!.minima[0].chi2;
    const k = 2 * N + 1;
    return { layers: N, chi2, parameters: k, bic: chi2 + k * Math.log(P.n) };
  });
  const leastBic = Math.min(...choices.map((c) => c.bic));
  const recommended = choices.find((c) => c.bic <= leastBic + BIC_NOT_WORTH_MENTIONING)!.layers;
  const chosen = layersOption === 'auto' ? recommended : most;
  if (!fits.has(chosen)) {
    throw new InputError(
      label(options, 'picks'),
      `There are ${P.n} picks, too few for ${chosen} layers over a half-space (${2 * chosen + 1} free parameters); give at least ${2 * chosen + 2} picks or fewer layers.`,
    );
  }
  const F = fits.get(chosen)!;
  const L = F.layout;
  const N = chosen;
  const best = F.minima[0];
  const dof = P.n - L.k;
  const chi2PerDof = dof > 0 ? best.chi2 / dof : NaN;
  const poorFit = dof > 0 && best.chi2 > chi2Upper95(dof);
  const scale = poorFit ? chi2PerDof : 1;

  // 3. Appraisal: the chain around the best fit.
  const inv = (() => {
    const a = Float64Array.from(best.normal);
    for (let j = 0; j < L.k; j++) {
      const w = (L.upper[j] - L.lower[j]) / 2;
      a[j * L.k + j] += 1 / (w * w);
    }
    return invertSmall(a, L.k) ?? (() => {
      const d = new Float64Array(L.k * L.k);
      for (let j = 0; j < L.k; j++) d[j * L.k + j] = ((L.upper[j] - L.lower[j]) / 4) ** 2;
      return d;
    })();
  })();
  for (let j = 0; j < inv.length; j++) inv[j] *= scale;
  const scratch = new Float64Array(P.n);
  const uniform = mulberry32(seed * 2654435761 + 12345);
  let chainDone = 0;
  const chain = metropolisChain(
    (u) => F.misfit.chi2(u, scratch),
    best.u,
    best.chi2,
    inv,
    scale,
    uniform,
    normals(uniform),
    { steps: chainEffort.chainSteps, burnIn: chainEffort.burnIn },
    (s) => {
      tick(s - chainDone);
      chainDone = s;
    },
  );

  // Alternatives: other minima of this N within Δχ² = 3.84 (scaled), and the best fit of every other N.
  const level95 = best.chi2 + scale * DELTA_CHI2_95;
  const altMinima = F.minima.slice(1).filter((m) => m.chi2 <= level95);
  const alternatives: ProfileAlternative[] = [];
  const describe = (u: Float64Array, layers: number, chi2: number, kind: ProfileAlternative['kind']): ProfileAlternative => ({
    layers,
    thickness: Array.from({ length: layers }, (_, j) => Math.exp(u[j])),
    vs: Array.from({ length: layers }, (_, j) => Math.exp(u[layers + j])),
    halfspaceVs: Math.exp(u[2 * layers]),
    chi2,
    deltaChi2: chi2 - best.chi2,
    kind,
  });
  for (const m of altMinima) alternatives.push(describe(m.u, N, m.chi2, 'minimum'));
  for (const c of choices) {
    if (c.layers === N) continue;
    const m = fits.get(c.layers)!.minima[0];
    if (m.chi2 <= level95) alternatives.push(describe(m.u, c.layers, m.chi2, 'layer-count'));
  }
  alternatives.sort((a, b) => a.chi2 - b.chi2);

  // Per-parameter intervals (widened to span the other minima of this N).
  const bestModel = modelOf(P, L, best.u)!;
  const widen = (col: number) => altMinima.map((m) => Math.exp(m.u[col]));
  const layersOut: ProfileLayer[] = [];
  let top = 0;
  for (let j = 0; j < N; j++) {
    const h = Math.exp(best.u[j]);
    const vs = Math.exp(best.u[N + j]);
    layersOut.push({
      thickness: parameterOf(chain, j, h, L, widen(j)),
      vs: parameterOf(chain, N + j, vs, L, widen(N + j)),
      vp: vpOfLayer(P.rule, j, vs, top + h / 2, N),
      density: P.densityLayers ? P.densityLayers[j] : DEFAULT_DENSITY_LAYER,
    });
    top += h;
  }
  const halfspaceVs = parameterOf(chain, 2 * N, Math.exp(best.u[2 * N]), L, widen(2 * N));

  // Depth of investigation and the band.
  const doi = DEPTH_OF_INVESTIGATION_PER_LONGEST_WAVELENGTH * P.lambdaMax;
  let bestDepth = 0;
  for (let j = 0; j < N; j++) bestDepth += Math.exp(best.u[j]);
  const zMax = Math.max(VS30_DEPTH_M, 1.5 * doi, 1.25 * bestDepth);
  const depth = new Float64Array(BAND_POINTS);
  for (let i = 0; i < BAND_POINTS; i++) depth[i] = (zMax * i) / (BAND_POINTS - 1);
  const band: ProfileBand = {
    depth,
    best: new Float64Array(BAND_POINTS),
    low68: new Float64Array(BAND_POINTS),
    high68: new Float64Array(BAND_POINTS),
    low95: new Float64Array(BAND_POINTS),
    high95: new Float64Array(BAND_POINTS),
    belowFrom: BAND_POINTS,
  };
  let rangeLow = Math.exp(L.lower[2 * N]);
  let rangeHigh = Math.exp(L.upper[2 * N]);
  for (let j = 0; j < N; j++) {
    rangeLow = Math.min(rangeLow, Math.exp(L.lower[N + j]));
    rangeHigh = Math.max(rangeHigh, Math.exp(L.upper[N + j]));
  }
  const column = new Float64Array(chain.count);
  // Each sample's interface depths and speeds, computed once (vsAtDepth's sums, in the same order).
  const bottoms = new Float64Array(chain.count * N);
  const speeds = new Float64Array(chain.count * (N + 1));
  for (let s = 0; s < chain.count; s++) {
    let top = 0;
    for (let j = 0; j < N; j++) {
      top += Math.exp(chain.samples[s * L.k + j]);
      bottoms[s * N + j] = top;
      speeds[s * (N + 1) + j] = Math.exp(chain.samples[s * L.k + N + j]);
    }
    speeds[s * (N + 1) + N] = Math.exp(chain.samples[s * L.k + 2 * N]);
  }
  const altModels = altMinima.map((m) => m.u);
  for (let i = 0; i < BAND_POINTS; i++) {
    const z = depth[i];
    const b = vsAtDepth(best.u, N, z);
    band.best[i] = b;
    if (z > doi) {
      if (band.belowFrom === BAND_POINTS) band.belowFrom = i;
      band.low68[i] = band.low95[i] = Math.min(rangeLow, b);
      band.high68[i] = band.high95[i] = Math.max(rangeHigh, b);
      continue;
    }
    for (let s = 0; s < chain.count; s++) {
      let j = 0;
      while (j < N && !(z < bottoms[s * N + j])) j++;
      column[s] = speeds[s * (N + 1) + j];
    }
    const iv = intervalOf(column, b);
    for (const u of altModels) {
      const a = vsAtDepth(u, N, z);
      iv.low95 = Math.min(iv.low95, a);
      iv.high95 = Math.max(iv.high95, a);
    }
    band.low68[i] = iv.low68;
    band.high68[i] = iv.high68;
    band.low95[i] = iv.low95;
    band.high95[i] = iv.high95;
  }

  // Vs30 and site classes over the ensemble.
  const v30 = new Float64Array(chain.count);
  const v100 = new Float64Array(chain.count);
  for (let s = 0; s < chain.count; s++) {
    const m = siteModel(modelOf(P, L, chain.samples.subarray(s * L.k, (s + 1) * L.k))!);
    v30[s] = vsAverage(m, VS30_DEPTH_M);
    v100[s] = vsAverage(m, VS100FT_DEPTH_M);
  }
  const bestSite = siteModel(bestModel);
  const vs30 = intervalOf(v30, vsAverage(bestSite, VS30_DEPTH_M));
  const vs100ft = intervalOf(v100, vsAverage(bestSite, VS100FT_DEPTH_M));
  // One rule for every estimate (issue 9 §2, §6): the ±30 % speed check is the user's choice, off here.
  const classed = siteClassesForRanges({ vs30: [vs30.low95, vs30.high95], vs100ft: [vs100ft.low95, vs100ft.high95] });
  const share = (values: Float64Array, table: 'asce7_16' | 'asce7_22' | 'en1998_1'): Record<string, number> => {
    const counts: Record<string, number> = {};
    for (const x of values) {
      const c = siteClassOf(table, x);
      counts[c] = (counts[c] ?? 0) + 1;
    }
    for (const c of Object.keys(counts)) counts[c] = counts[c] / Math.max(1, values.length);
    return counts;
  };
  const siteClasses = {
    asce7_16: { classes: classed.classes.asce7_16, share: share(v100, 'asce7_16') },
    asce7_22: { classes: classed.classes.asce7_22, share: share(v100, 'asce7_22') },
    en1998_1: { classes: classed.classes.en1998_1, share: share(v30, 'en1998_1') },
  };
  const siteWarnings = [...classed.warnings];
  const bestFigures = siteFigures(bestSite);
  if (bestFigures.classes.en1998_1.includes('E') && !siteClasses.en1998_1.classes.includes('E')) {
    siteClasses.en1998_1.classes = [...siteClasses.en1998_1.classes, 'E'];
    siteWarnings.push('The best model meets EN 1998-1 Table 3.1 ground type E (5–20 m of type C or D soil over material faster than 800 m/s), so E is listed with the types by Vs30.');
  }

  // Per-pick fit.
  const predicted = new Float64Array(P.n);
  predictPicks(P.picks, bestModel, predicted);
  const residual = new Float64Array(P.n);
  const normalised = new Float64Array(P.n);
  for (let i = 0; i < P.n; i++) {
    residual[i] = P.v[i] - predicted[i];
    normalised[i] = residual[i] / P.sd[i];
  }

  // Warnings, in plain words.
  const warnings: string[] = [];
  if (P.waves.rayleigh > 0) warnings.push(...pSpeedNotes(P.rule));
  if (P.defaultedSd > 0) warnings.push(defaultSdNote(P.defaultedSd, P.n));
  if (poorFit) {
    warnings.push(
      `The fit is poor: the best model misses the picks by more than their stated errors allow (about ${round(Math.sqrt(chi2PerDof), 2)} times their sd on average), so the intervals are widened to match; check the picks, the modes and the number of layers.`,
    );
  }
  if (recommended < N) {
    warnings.push(
      `The picks support only ${recommended} layer${recommended > 1 ? 's' : ''} by the Bayesian information criterion (Schwarz 1978): the ${N}-layer fit is not needed to explain them, and its extra interfaces are not measured; prefer ${recommended} layer${recommended > 1 ? 's' : ''}.`,
    );
  } else if (layersOption !== 'auto' && recommended > N) {
    warnings.push(`The picks support ${recommended} layers by the Bayesian information criterion (Schwarz 1978); ${N} layer${N > 1 ? 's' : ''} may be too simple.`);
  }
  const unresolved: string[] = [];
  layersOut.forEach((l, j) => {
    if (!l.thickness.resolved) unresolved.push(`the thickness of layer ${j + 1}`);
    if (!l.vs.resolved) unresolved.push(`the shear speed of layer ${j + 1}`);
  });
  if (!halfspaceVs.resolved) unresolved.push('the half-space shear speed');
  if (unresolved.length > 0) {
    warnings.push(`Not resolved by the picks (95 % interval over most of the search range): ${unresolved.join(', ')}.`);
  }
  warnings.push(
    `Depth of investigation about ${round(doi)} m (half the longest picked wavelength, ${round(P.lambdaMax)} m; common practice): below it the picks lose depth sensitivity, so the band there spans the whole search range of shear speed and says nothing measured.`,
  );
  if (bestDepth > doi) {
    warnings.push(`The deepest interface of the best fit (${round(bestDepth)} m) lies below the depth of investigation; its depth and the half-space speed are weakly constrained.`);
  }
  if (doi < VS30_DEPTH_M) {
    warnings.push(`Vs30 reaches below the depth of investigation (${round(doi)} m): its range rests partly on depths the picks do not constrain.`);
  }
  if (altMinima.length > 0) {
    warnings.push(`The picks fit ${altMinima.length + 1} separate ${N}-layer models almost equally well (each inside the 95 % level of the best); the intervals and the band span them all (see the other models that fit).`);
  }
  if (chain.count > 0 && chain.acceptance < 0.05) {
    warnings.push(`The appraisal ensemble moved rarely (acceptance ${round(chain.acceptance * 100, 2)} %); the intervals may be too narrow.`);
  }
  const outliers = P.labels.filter((_, i) => Math.abs(normalised[i]) > 3 * Math.sqrt(scale));
  if (outliers.length > 0) warnings.push(`Picks more than 3 standard deviations from the best fit: ${outliers.join(', ')}.`);
  warnings.push(...siteWarnings);

  const criterion =
    `Bayesian information criterion BIC = χ² + k·ln n (Schwarz 1978, Ann. Stat. 6:461), k = 2N + 1 free parameters, n = ${P.n} picks; ` +
    `the smallest N within ${BIC_NOT_WORTH_MENTIONING} of the least BIC is recommended (Kass & Raftery 1995).` +
    (layersOption === 'auto' || usable.length < 2
      ? ''
      : ` Each N is searched by the neighbourhood algorithm; a smaller N that fits worse than the pick errors allow is refined again from the best fit of one more layer with each interface removed in turn (nested models).`);
  const method =
    `Maximum likelihood for Gaussian pick errors over ${N} layer${N > 1 ? 's' : ''} over a half-space (log thickness and shear speed, search box from the picks). ` +
    `Global search by the neighbourhood algorithm (Sambridge 1999, GJI 138:479; ${F.ensemble.count} models), Levenberg–Marquardt refinement of the best separate samples and of two wavelength–depth starts, ` +
    (P.waves.rayleigh > 0
      ? 'the Rayleigh roots of the search samples and refinement steps tracked along frequency even under a low-velocity layer (a screen: each refined fit, the ensemble and the best fit have every root verified by the full scan), '
      : '') +
    `then a Metropolis random walk around the fit (${chain.count} models kept, seed ${seed}) for the 68 %/95 % intervals, the depth band, Vs30 and the site classes` +
    (poorFit ? `, tempered by χ²/dof = ${round(scale)} because the fit is poor.` : '.') +
    ` Forward step: ${P.waves.love > 0 ? 'Love waves by the Thomson–Haskell propagator, group velocity from the energy integrals' : ''}` +
    `${P.waves.love > 0 && P.waves.rayleigh > 0 ? '; ' : ''}` +
    `${P.waves.rayleigh > 0 ? 'Rayleigh waves by the compound-matrix secular function (Dunkin 1965), group velocity by implicit differentiation' : ''}.`;

  progress?.(1);
  return {
    layers: N,
    waves: P.waves,
    profile: { layers: layersOut, halfspace: { vs: halfspaceVs, vp: bestModel.halfspace.vp, density: P.densityHalfspace } },
    band,
    depthOfInvestigation: doi,
    vs30,
    vs100ft,
    siteClasses,
    chi2: best.chi2,
    dof,
    chi2PerDof,
    intervalScale: scale,
    choice: { tried: choices, recommended, criterion },
    alternatives,
    pickFit: { labels: P.labels, predicted, residual, normalised, sd: P.sd },
    pRule: P.rule,
    ensemble: { size: chain.count, acceptance: chain.acceptance, searched: [...fits.values()].reduce((s, f) => s + f.ensemble.count, 0), seed },
    warnings,
    method,
    caution: CAUTION,
  };
}

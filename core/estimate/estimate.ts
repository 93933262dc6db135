/**
 * Layer thickness (and, optionally, both shear speeds) from dispersion picks,
 * for one layer over a half-space, with likelihood intervals.
 *
 * What: the maximum-likelihood model θ = (H, β1, β2) — any of the speeds
 * may be given (fixed) — for Gaussian pick errors, χ²(θ) = Σ ((v_i −
 * v̂_i(θ)) / σ_i)², where v̂_i is the model's group or phase velocity of the
 * pick's own mode at its frequency (love-layer.ts: Aki & Richards,
 * *Quantitative Seismology*, 2nd ed. 2002, §7.2–7.3) and σ_i = effectiveSd.
 * Where the pick's mode does not exist (below its cutoff) v̂ is taken as β2,
 * the value both velocities reach at the cutoff, which keeps χ² continuous.
 *
 * Method:
 *  1. Global search on a grid of (H, β1, β2/β1). For each speed ratio one
 *     dense dimensionless curve per mode (love-dimensionless-table.ts: c/β1
 *     and U/β1 against f·H/β1, shared/PHYSICS.md §2 scaling) serves every H
 *     and β1, so a joint search costs little more than thickness alone.
 *  2. Every grid local minimum is refined with Levenberg–Marquardt
 *     (levenberg-marquardt.ts) on the exact forward model, in log
 *     parameters inside the search box. Minima not separated by a χ²
 *     barrier are merged; every minimum within Δχ² = 3.84 of the best is
 *     reported, ranked.
 *  3. Intervals by the profile likelihood: for each free parameter the other
 *     free parameters are re-optimised, and the interval is where the
 *     profile χ² stays within Δχ² = 1 (68.3 %) and 3.84 (95 %) of the best
 *     (one parameter of interest; Wilks 1938, Ann. Math. Stat. 9:60; Press
 *     et al., *Numerical Recipes*, 3rd ed. 2007, §15.6). Crossings are found
 *     with Brent's method (roots.ts). An interval that reaches the search
 *     range is reported as open (one-sided) there, with a warning. When the
 *     fit is poor (χ² above its 95 % point for the degrees of freedom), the
 *     Δχ² levels are scaled by χ²/dof and the output says so. With several
 *     minima the headline interval spans the Δχ² region of all of them.
 *  4. Diagnostics in plain words (estimate-diagnostics.ts) and site figures
 *     over the box of 95 % intervals (site.ts).
 *
 * Densities are known (given, or DEFAULT_DENSITY_LAYER/HALFSPACE, common
 * practice), so ρ2/ρ1 is fixed and each speed ratio needs one table.
 *
 * Units: SI (m, Hz, m/s, kg/m³). Accuracy: exact picks from the forward
 * model are recovered to ≤ 1e-6 relative (in practice ~1e-14: LM converges
 * quadratically on a zero-residual fit); interval ends to about 2e-6
 * relative (Brent, 2e-6 in ln of the parameter).
 *
 * Failures: bad input throws InputError (one validation step, messages name
 * the field or the pick); the result is a plain, structured-clone-able
 * object (numbers, strings, Float64Arrays), never holding functions.
 */
import { CAUTION } from '../shared/caution';
import { InputError } from '../shared/errors';
import { invertSmall, levenbergMarquardt } from '../numeric/levenberg-marquardt';
import { buildDimensionlessTable, type DimensionlessTable } from '../dispersion/love-dimensionless-table';
import { loveGroupVelocityAt, type TwoLayer } from '../dispersion/love-layer';
import { checkDensity, checkShearSpeed, checkThickness, MODEL_BOUNDS } from '../dispersion/model';
import { checkPickSet, effectiveSd, validatePick, type Pick } from '../picks/picks';
import { brent } from '../numeric/roots';
import { chi2Upper95, diagnoseFit, type EstimateDiagnostics } from './estimate-diagnostics';
import { phaseVelocityFrom, predictVelocity } from './estimate-forward';
import { estimateVerdict, type EstimateVerdict } from './verdict';
import { siteFiguresOfEstimate, type SiteFigures } from '../site/site';

export * from './estimate-types';
import {
  DEFAULT_DENSITY_HALFSPACE, DEFAULT_DENSITY_LAYER, DEFAULT_RANGE_RULE, DELTA_CHI2_68, DELTA_CHI2_95, MIN_SPEED_RATIO,
  type EstimateField, type EstimateMinimum, type EstimateOptions, type EstimateProblem, type MisfitMap, type ParameterEstimate, type PickFit,
} from './estimate-types';

export interface EstimateResult {
  thickness: ParameterEstimate;
  vs1: ParameterEstimate;
  vs2: ParameterEstimate;
  /** Densities used, kg/m³, and whether each was the default. */
  density1: number;
  density2: number;
  density1Defaulted: boolean;
  density2Defaulted: boolean;
  /** Every separate minimum within Δχ² = 3.84 (scaled when the fit is poor) of the best, ranked; the first is the best. */
  alternatives: EstimateMinimum[];
  chi2: number;
  /** Picks − free parameters. */
  dof: number;
  /** χ²/dof; NaN when dof = 0. */
  chi2PerDof: number;
  /** Factor applied to the Δχ² levels (1, or χ²/dof when the fit is poor). */
  intervalScale: number;
  /** Correlation of H and β1 at the best fit (linearised, from the Gauss–Newton covariance in log parameters); NaN when β1 is fixed. */
  correlationThicknessVs1: number;
  misfitMap: MisfitMap;
  pickFit: PickFit;
  /** Plain-word warnings: every diagnostic below, as sentences. */
  warnings: string[];
  diagnostics: EstimateDiagnostics;
  /** The verdict on the thickness (verdict.ts): resolved, rough or unresolved, with one plain sentence. */
  verdict: EstimateVerdict;
  /** Picks that used the default standard deviation (DEFAULT_SD_FRACTION of velocity, common practice). */
  defaultedSdCount: number;
  /** Search ranges used, m and m/s ([v, v] for a fixed speed). */
  searchRange: { thickness: [number, number]; vs1: [number, number]; vs2: [number, number] };
  /**
   * Site figures (site.ts: Vs30 by EN 1998-1 eq. 3.1, v̄s100ft, site classes,
   * f0) of the best model, by site.ts siteFiguresOfEstimate: each range taken
   * exactly over the box of the 95 % intervals, open on the side of an open
   * interval end. Null when site.ts rejects the model, with the reason in
   * siteNote.
   */
  site: SiteFigures | null;
  siteNote: string;
  /** How the estimate and intervals were made, in words. */
  method: string;
  caution: string;
}

const LOG_RATIO_GAP = Math.log(MIN_SPEED_RATIO);
/** Stand-in for an infinite profile χ² inside Brent's method. */
const INFEASIBLE = 1e12;

function label(options: EstimateOptions, field: EstimateField): string {
  return options.fieldLabels?.[field] ?? field;
}

function checkRange(
  range: readonly [number, number] | undefined,
  field: EstimateField,
  options: EstimateOptions,
  check: (v: unknown, f: string) => number,
): [number, number] | undefined {
  if (range === undefined) return undefined;
  const name = label(options, field);
  if (!Array.isArray(range) || range.length !== 2) {
    throw new InputError(name, `${name} must be two numbers, low and high.`);
  }
  const lo = check(range[0], `${name} (low end)`);
  const hi = check(range[1], `${name} (high end)`);
  if (!(lo < hi)) throw new InputError(name, `${name} must have its low end below its high end, but it is ${lo} to ${hi}.`);
  return [lo, hi];
}

/** Validates picks and options once and lays out the problem. Throws InputError. */
export function prepareEstimate(picks: readonly Pick[], options: EstimateOptions = {}): EstimateProblem {
  const whereOf = options.whereOf ?? ((i: number) => `pick ${i + 1}`);
  if (!Array.isArray(picks) || picks.length === 0) {
    throw new InputError(label(options, 'picks'), 'There are no picks; give at least one dispersion pick.');
  }
  const clean = picks.map((p, i) => validatePick(p, whereOf(i)));
  checkPickSet(clean, whereOf);
  const rayleigh = clean.findIndex((p) => p.wave === 'rayleigh');
  if (rayleigh >= 0) {
    throw new InputError(
      `${whereOf(rayleigh)}, wave`,
      `${whereOf(rayleigh).charAt(0).toUpperCase() + whereOf(rayleigh).slice(1)} is a Rayleigh pick, but the one-layer Love estimate models Love waves only; the layered estimate takes Rayleigh picks.`,
    );
  }

  const vs1 = options.vs1 === undefined ? NaN : checkShearSpeed(options.vs1, label(options, 'vs1'));
  const vs2 = options.vs2 === undefined ? NaN : checkShearSpeed(options.vs2, label(options, 'vs2'));
  if (!Number.isNaN(vs1) && !Number.isNaN(vs2) && !(vs2 > vs1)) {
    throw new InputError(
      label(options, 'vs2'),
      `${label(options, 'vs2')} is ${vs2} m/s, but it must be faster than ${label(options, 'vs1')} (${vs1} m/s) for Love waves to be trapped.`,
    );
  }
  const rho1 = options.density1 === undefined ? DEFAULT_DENSITY_LAYER : checkDensity(options.density1, label(options, 'density1'));
  const rho2 = options.density2 === undefined ? DEFAULT_DENSITY_HALFSPACE : checkDensity(options.density2, label(options, 'density2'));
  const userH = checkRange(options.thicknessRange, 'thicknessRange', options, checkThickness);
  const userB1 = checkRange(options.vs1Range, 'vs1Range', options, checkShearSpeed);
  const userB2 = checkRange(options.vs2Range, 'vs2Range', options, checkShearSpeed);

  const n = clean.length;
  const f = new Float64Array(n);
  const v = new Float64Array(n);
  const sd = new Float64Array(n);
  const mode = new Int32Array(n);
  const isPhase = new Uint8Array(n);
  let vmin = Infinity;
  let vmax = 0;
  let lamMin = Infinity;
  let lamMax = 0;
  for (let i = 0; i < n; i++) {
    const p = clean[i];
    f[i] = p.frequency;
    v[i] = p.velocity;
    sd[i] = effectiveSd(p);
    mode[i] = p.mode;
    isPhase[i] = p.kind === 'phase' ? 1 : 0;
    vmin = Math.min(vmin, v[i]);
    vmax = Math.max(vmax, v[i]);
    lamMin = Math.min(lamMin, v[i] / f[i]);
    lamMax = Math.max(lamMax, v[i] / f[i]);
  }
  const lnF = f.map(Math.log);
  const labels = clean.map((p, i) => (p.id ? `${whereOf(i)} (id ${JSON.stringify(p.id)})` : whereOf(i)));

  const R = DEFAULT_RANGE_RULE;
  const clipV = (x: number) => Math.min(MODEL_BOUNDS.vsMax, Math.max(MODEL_BOUNDS.vsMin, x));
  const hRange: [number, number] = userH ?? [R.thicknessLowPerShortestWavelength * lamMin, R.thicknessHighPerLongestWavelength * lamMax];
  let b1Range: [number, number] = Number.isNaN(vs1)
    ? userB1 ?? [clipV(R.vs1LowPerSlowestPick * vmin), clipV(R.vs1HighPerFastestPick * vmax)]
    : [vs1, vs1];
  let b2Range: [number, number] = Number.isNaN(vs2)
    ? userB2 ?? [clipV(R.vs2LowPerSlowestPick * vmin), clipV(R.vs2HighPerFastestPick * vmax)]
    : [vs2, vs2];
  // Keep β2 > β1 where one speed is given.
  if (!Number.isNaN(vs1) && Number.isNaN(vs2)) {
    const lo = Math.max(b2Range[0], vs1 * MIN_SPEED_RATIO);
    if (!(lo < b2Range[1])) {
      const name = label(options, userB2 ? 'vs2Range' : 'vs1');
      throw new InputError(
        name,
        `The half-space speed range ${b2Range[0]}–${b2Range[1]} m/s leaves nothing faster than the layer speed ${vs1} m/s; ` +
          `the half-space must be faster for Love waves to be trapped. Raise ${label(options, 'vs2Range')} or lower ${label(options, 'vs1')}.`,
      );
    }
    b2Range = [lo, b2Range[1]];
  }
  if (Number.isNaN(vs1) && !Number.isNaN(vs2)) {
    const hi = Math.min(b1Range[1], vs2 / MIN_SPEED_RATIO);
    if (!(b1Range[0] < hi)) {
      const name = label(options, userB1 ? 'vs1Range' : 'vs2');
      throw new InputError(
        name,
        `The layer speed range ${b1Range[0]}–${b1Range[1]} m/s leaves nothing slower than the half-space speed ${vs2} m/s; ` +
          `the layer must be slower for Love waves to be trapped. Lower ${label(options, 'vs1Range')} or raise ${label(options, 'vs2')}.`,
      );
    }
    b1Range = [b1Range[0], hi];
  }
  if (Number.isNaN(vs1) && Number.isNaN(vs2) && !(b2Range[1] > b1Range[0] * MIN_SPEED_RATIO)) {
    throw new InputError(
      label(options, 'vs2Range'),
      `${label(options, 'vs2Range')} (${b2Range[0]}–${b2Range[1]} m/s) lies entirely at or below ${label(options, 'vs1Range')} ` +
        `(${b1Range[0]}–${b1Range[1]} m/s); the half-space must be faster than the layer somewhere in the ranges.`,
    );
  }

  const iVs1 = Number.isNaN(vs1) ? 1 : -1;
  const iVs2 = Number.isNaN(vs2) ? (iVs1 >= 0 ? 2 : 1) : -1;
  const k = 1 + (iVs1 >= 0 ? 1 : 0) + (iVs2 >= 0 ? 1 : 0);
  if (n < k) {
    throw new InputError(
      label(options, 'picks'),
      `There ${n === 1 ? 'is 1 pick' : `are ${n} picks`}, too few for ${k} free parameters (thickness${iVs1 >= 0 ? ', vs1' : ''}${iVs2 >= 0 ? ', vs2' : ''}); ` +
        `give at least ${k} picks or fix ${k - n === 1 ? 'a speed' : 'the speeds'}.`,
    );
  }
  const lower = new Float64Array(k);
  const upper = new Float64Array(k);
  lower[0] = Math.log(hRange[0]);
  upper[0] = Math.log(hRange[1]);
  if (iVs1 >= 0) {
    lower[iVs1] = Math.log(b1Range[0]);
    upper[iVs1] = Math.log(b1Range[1]);
  }
  if (iVs2 >= 0) {
    lower[iVs2] = Math.log(b2Range[0]);
    upper[iVs2] = Math.log(b2Range[1]);
  }
  return {
    n,
    f,
    lnF,
    v,
    sd,
    mode,
    isPhase,
    labels,
    rho1,
    rho2,
    fixedVs1: vs1,
    fixedVs2: vs2,
    iVs1,
    iVs2,
    k,
    lower,
    upper,
    ranges: { thickness: hRange, vs1: b1Range, vs2: b2Range },
    guess: new Float64Array(n).fill(NaN),
    scratch: new Float64Array(n),
  };
}

// ---------------------------------------------------------------- exact forward model

/** The model at free-parameter vector u (log H, log β1?, log β2?). */
export function modelAt(P: EstimateProblem, u: ArrayLike<number>): TwoLayer {
  return {
    h: Math.exp(u[0]),
    vs1: P.iVs1 >= 0 ? Math.exp(u[P.iVs1]) : P.fixedVs1,
    vs2: P.iVs2 >= 0 ? Math.exp(u[P.iVs2]) : P.fixedVs2,
    rho1: P.rho1,
    rho2: P.rho2,
  };
}

function residualsAt(P: EstimateProblem, u: ArrayLike<number>, out: Float64Array): void {
  const m = modelAt(P, u);
  const g = P.guess;
  for (let i = 0; i < P.n; i++) {
    const c = phaseVelocityFrom(m, P.f[i], P.mode[i], g[i]);
    let pred: number;
    if (Number.isNaN(c)) pred = m.vs2;
    else {
      g[i] = c;
      pred = P.isPhase[i] === 1 ? c : loveGroupVelocityAt(m, P.f[i], c);
    }
    out[i] = (P.v[i] - pred) / P.sd[i];
  }
}

/** χ² of the exact model at u. */
export function chi2At(P: EstimateProblem, u: ArrayLike<number>): number {
  residualsAt(P, u, P.scratch);
  let s = 0;
  for (let i = 0; i < P.n; i++) s += P.scratch[i] * P.scratch[i];
  return s;
}

/** Keeps β2 ≥ 1.001·β1 when both are free. */
function projectSpeeds(P: EstimateProblem, u: Float64Array): void {
  if (P.iVs1 < 0 || P.iVs2 < 0) return;
  if (u[P.iVs2] < u[P.iVs1] + LOG_RATIO_GAP) {
    u[P.iVs2] = Math.min(P.upper[P.iVs2], u[P.iVs1] + LOG_RATIO_GAP);
    if (u[P.iVs2] < u[P.iVs1] + LOG_RATIO_GAP) u[P.iVs1] = u[P.iVs2] - LOG_RATIO_GAP;
  }
}

interface Fit {
  u: Float64Array;
  chi2: number;
  normal: Float64Array;
}

/** LM on all free parameters from u0. */
function fitAll(P: EstimateProblem, u0: ArrayLike<number>): Fit {
  const out = levenbergMarquardt(
    (u, r) => residualsAt(P, u, r),
    P.n,
    u0,
    P.lower,
    P.upper,
    {},
    (u) => projectSpeeds(P, u),
  );
  return { u: out.p, chi2: out.chi2, normal: out.normal };
}

/**
 * Profile χ²: parameter j held at value uj, the others re-optimised from
 * `warm` (a full vector, updated in place to the new optimum).
 */
function profileAt(P: EstimateProblem, j: number, uj: number, warm: Float64Array): number {
  warm[j] = uj;
  if (P.k === 1) return chi2At(P, warm);
  const others: number[] = [];
  for (let a = 0; a < P.k; a++) if (a !== j) others.push(a);
  const q0 = new Float64Array(others.length);
  const lo = new Float64Array(others.length);
  const hi = new Float64Array(others.length);
  for (let a = 0; a < others.length; a++) {
    q0[a] = warm[others[a]];
    lo[a] = P.lower[others[a]];
    hi[a] = P.upper[others[a]];
  }
  // Hold β2 > β1 through the bounds when one of the two is the fixed one.
  if (j === P.iVs1 && P.iVs2 >= 0) {
    const a = others.indexOf(P.iVs2);
    lo[a] = Math.max(lo[a], uj + LOG_RATIO_GAP);
    if (lo[a] > hi[a]) return Infinity;
  }
  if (j === P.iVs2 && P.iVs1 >= 0) {
    const a = others.indexOf(P.iVs1);
    hi[a] = Math.min(hi[a], uj - LOG_RATIO_GAP);
    if (lo[a] > hi[a]) return Infinity;
  }
  const full = Float64Array.from(warm);
  const out = levenbergMarquardt(
    (q, r) => {
      for (let a = 0; a < others.length; a++) full[others[a]] = q[a];
      residualsAt(P, full, r);
    },
    P.n,
    q0,
    lo,
    hi,
    { tolerance: 1e-10, maxIterations: 40 },
    j === 0 && P.iVs1 >= 0 && P.iVs2 >= 0
      ? (q) => {
          // q holds (β1, β2) in that order: keep β2 ≥ 1.001·β1.
          if (q[1] < q[0] + LOG_RATIO_GAP) {
            q[1] = Math.min(hi[1], q[0] + LOG_RATIO_GAP);
            if (q[1] < q[0] + LOG_RATIO_GAP) q[0] = q[1] - LOG_RATIO_GAP;
          }
        }
      : undefined,
  );
  for (let a = 0; a < others.length; a++) warm[others[a]] = out.p[a];
  return out.chi2;
}

// ---------------------------------------------------------------- global search

interface Grid {
  lnH: Float64Array;
  /** β1 per row of speed pairs (nB), β2/β1 per column (nR); pair = ib·nR + ir. */
  lnB1: Float64Array;
  nB: number;
  nR: number;
  /** ln β2 of each pair (NaN where the pair is outside the box). */
  lnB2: Float64Array;
  chi2: Float64Array;
}

function logGrid(lo: number, hi: number, n: number): Float64Array {
  const a = new Float64Array(n);
  if (n === 1) {
    a[0] = Math.log(lo);
    return a;
  }
  const l0 = Math.log(lo);
  const d = (Math.log(hi) - l0) / (n - 1);
  for (let i = 0; i < n; i++) a[i] = l0 + i * d;
  return a;
}

function gridSizes(P: EstimateProblem): { nH: number; nB: number; nR: number } {
  if (P.k === 1) return { nH: 400, nB: 1, nR: 1 };
  if (P.k === 2) return P.iVs1 >= 0 ? { nH: 120, nB: 48, nR: 1 } : { nH: 120, nB: 1, nR: 48 };
  return { nH: 64, nB: 32, nR: 24 };
}

function globalGrid(P: EstimateProblem, progress: (x: number) => void): Grid {
  const { nH, nB, nR } = gridSizes(P);
  const { thickness, vs1, vs2 } = P.ranges;
  const lnH = logGrid(thickness[0], thickness[1], nH);
  const lnB1 = P.iVs1 >= 0 ? logGrid(vs1[0], vs1[1], nB) : Float64Array.of(Math.log(P.fixedVs1));
  // The column axis: β2/β1 when both are free; β2 itself when only β2 is free (β1 fixed); unused otherwise.
  const bothFree = P.iVs1 >= 0 && P.iVs2 >= 0;
  const lnR = bothFree
    ? logGrid(Math.max(MIN_SPEED_RATIO, vs2[0] / vs1[1]), Math.max(MIN_SPEED_RATIO * 1.0001, vs2[1] / vs1[0]), nR)
    : P.iVs2 >= 0
      ? logGrid(vs2[0], vs2[1], nR).map((l) => l - lnB1[0])
      : new Float64Array(1);
  const nPairs = nB * nR;
  const lnB2 = new Float64Array(nPairs);
  const tol = 1e-9;
  for (let ib = 0; ib < nB; ib++) {
    for (let ir = 0; ir < nR; ir++) {
      let lb2: number;
      if (P.iVs2 < 0) lb2 = Math.log(P.fixedVs2);
      else lb2 = lnB1[ib] + lnR[ir];
      const ok =
        lb2 - lnB1[ib] >= LOG_RATIO_GAP - tol && lb2 >= Math.log(vs2[0]) - tol && lb2 <= Math.log(vs2[1]) + tol;
      lnB2[ib * nR + ir] = ok ? lb2 : NaN;
    }
  }

  // Tables: one per distinct speed ratio, each with every picked mode.
  const modes = Array.from(new Set(P.mode)).sort((a, b) => a - b);
  const modeSlot = new Int32Array(modes[modes.length - 1] + 1).fill(-1);
  modes.forEach((m, i) => (modeSlot[m] = i));
  let lnFMin = Infinity;
  let lnFMax = -Infinity;
  for (let i = 0; i < P.n; i++) {
    lnFMin = Math.min(lnFMin, P.lnF[i]);
    lnFMax = Math.max(lnFMax, P.lnF[i]);
  }
  const lxMin = lnFMin + lnH[0] - lnB1[nB - 1] - 0.01;
  const lxMax = lnFMax + lnH[nH - 1] - lnB1[0] + 0.01;
  const ratioCount = bothFree ? nR : P.iVs2 >= 0 ? nR : nB; // β2 fixed: one ratio per β1 row
  const tables: DimensionlessTable[][] = [];
  const q = P.rho2 / P.rho1;
  for (let t = 0; t < ratioCount; t++) {
    let ratio: number;
    if (bothFree || P.iVs2 >= 0) ratio = Math.exp(lnR[t]);
    else ratio = P.fixedVs2 / Math.exp(lnB1[t]);
    tables.push(modes.map((m) => buildDimensionlessTable(ratio, q, m, lxMin, lxMax)));
    progress((0.3 * (t + 1)) / ratioCount);
  }

  const chi2 = new Float64Array(nPairs * nH).fill(NaN);
  const cols: Float64Array[] = [];
  const tabs: DimensionlessTable[] = [];
  for (let ib = 0; ib < nB; ib++) {
    const lb = lnB1[ib];
    const b1 = Math.exp(lb);
    for (let ir = 0; ir < nR; ir++) {
      const pair = ib * nR + ir;
      if (Number.isNaN(lnB2[pair])) continue;
      const set = tables[bothFree || P.iVs2 >= 0 ? ir : ib];
      for (let i = 0; i < P.n; i++) {
        const tab = set[modeSlot[P.mode[i]]];
        tabs[i] = tab;
        cols[i] = P.isPhase[i] === 1 ? tab.phase : tab.group;
        // (filled densely in pick order, so the arrays stay packed)
      }
      chi2Row(P, b1, lb, lnH, tabs, cols, chi2, pair * nH);
    }
    progress(0.3 + (0.2 * (ib + 1)) / nB);
  }
  return { lnH, lnB1, nB, nR, lnB2, chi2 };
}

/** χ² from the tables along the thickness axis at one speed pair (the hot loop of the search). */
function chi2Row(
  P: EstimateProblem,
  b1: number,
  lnB1: number,
  lnH: Float64Array,
  tabs: DimensionlessTable[],
  cols: Float64Array[],
  out: Float64Array,
  base: number,
): void {
  const n = P.n;
  const v = P.v;
  const sd = P.sd;
  const lnF = P.lnF;
  for (let ih = 0; ih < lnH.length; ih++) {
    const s = lnH[ih] - lnB1;
    let c2 = 0;
    for (let i = 0; i < n; i++) {
      // tableAt, inlined: linear interpolation on the uniform ln-x grid, end values outside.
      const tab = tabs[i];
      const col = cols[i];
      let t = (lnF[i] + s - tab.lnX0) * tab.invStep;
      let y: number;
      if (!(t > 0)) y = col[0];
      else if (t >= tab.n - 1) y = col[tab.n - 1];
      else {
        const j = t | 0;
        t -= j;
        y = col[j] + t * (col[j + 1] - col[j]);
      }
      const d = (v[i] - b1 * y) / sd[i];
      c2 += d * d;
    }
    out[base + ih] = c2;
  }
}

/** Grid local minima (6-neighbourhood), best first, at most `limit`. */
function gridMinima(g: Grid, limit: number): number[] {
  const nH = g.lnH.length;
  const found: number[] = [];
  const at = (ib: number, ir: number, ih: number) =>
    ib < 0 || ib >= g.nB || ir < 0 || ir >= g.nR || ih < 0 || ih >= nH ? NaN : g.chi2[(ib * g.nR + ir) * nH + ih];
  for (let ib = 0; ib < g.nB; ib++) {
    for (let ir = 0; ir < g.nR; ir++) {
      for (let ih = 0; ih < nH; ih++) {
        const c = at(ib, ir, ih);
        if (Number.isNaN(c)) continue;
        const nb = [at(ib, ir, ih - 1), at(ib, ir, ih + 1), at(ib - 1, ir, ih), at(ib + 1, ir, ih), at(ib, ir - 1, ih), at(ib, ir + 1, ih)];
        // Strictly below the earlier neighbours and not above the later ones: one point per flat run.
        if ((nb[0] <= c) || (nb[2] <= c) || (nb[4] <= c)) continue;
        if (nb[1] < c || nb[3] < c || nb[5] < c) continue;
        found.push((ib * g.nR + ir) * nH + ih);
      }
    }
  }
  found.sort((a, b) => g.chi2[a] - g.chi2[b]);
  return found.slice(0, limit);
}

function gridPoint(P: EstimateProblem, g: Grid, index: number): Float64Array {
  const nH = g.lnH.length;
  const ih = index % nH;
  const pair = (index - ih) / nH;
  const ib = Math.floor(pair / g.nR);
  const u = new Float64Array(P.k);
  u[0] = g.lnH[ih];
  if (P.iVs1 >= 0) u[P.iVs1] = g.lnB1[ib];
  if (P.iVs2 >= 0) u[P.iVs2] = g.lnB2[pair];
  return u;
}

/** True when the straight path from a to b (log parameters) never rises more than `rise` above the higher end. */
function sameBasin(P: EstimateProblem, a: Fit, b: Fit, rise: number): boolean {
  const top = Math.max(a.chi2, b.chi2) + rise;
  const u = new Float64Array(P.k);
  for (const t of [0.2, 0.4, 0.5, 0.6, 0.8]) {
    for (let j = 0; j < P.k; j++) u[j] = a.u[j] + t * (b.u[j] - a.u[j]);
    projectSpeeds(P, u);
    if (chi2At(P, u) > top) return false;
  }
  return true;
}

// ---------------------------------------------------------------- intervals

interface Crossing {
  /** Log-parameter value of the crossing (or the box end). */
  u: number;
  /** True when the profile stayed below the level up to the box end. */
  open: boolean;
}

/**
 * Walks parameter j from the minimum `fit` in direction dir until the
 * profile χ² exceeds `level`, then finds the crossing with Brent's method.
 */
function crossing(P: EstimateProblem, fit: Fit, j: number, dir: 1 | -1, level: number, firstStep: number): Crossing {
  const end = dir > 0 ? P.upper[j] : P.lower[j];
  const warm = Float64Array.from(fit.u);
  let prevU = fit.u[j];
  let prevVal = fit.chi2;
  let prevWarm = Float64Array.from(warm);
  let step = firstStep;
  for (let walk = 0; walk < 60; walk++) {
    let cur = prevU + dir * step;
    const atEnd = dir > 0 ? cur >= end : cur <= end;
    if (atEnd) cur = end;
    const w = Float64Array.from(prevWarm);
    const val = profileAt(P, j, cur, w);
    if (val > level) {
      // Bracketed between prevU (below) and cur (above).
      let bestWarm = prevWarm;
      // Where the profile has no feasible model (Infinity) a large finite value keeps Brent's arithmetic sound.
      const g = (x: number) => {
        const ww = Float64Array.from(bestWarm);
        const c = Math.min(profileAt(P, j, x, ww) - level, INFEASIBLE);
        if (c <= 0) bestWarm = ww;
        return c;
      };
      const fb = Math.min(val - level, INFEASIBLE);
      const r = brent(g, prevU, cur, Math.min(0, prevVal - level), fb, { xtol: 2e-6, rtol: 0, maxIterations: 60 });
      return { u: r.status === 'converged' || r.status === 'max-iterations' ? r.x : (prevU + cur) / 2, open: false };
    }
    if (atEnd) return { u: end, open: true };
    prevU = cur;
    prevVal = val;
    prevWarm = w;
    step *= 2;
  }
  return { u: prevU, open: true };
}

/** The search range of free parameter j, in m or m/s. */
function rangeOf(P: EstimateProblem, j: number): [number, number] {
  return j === 0 ? P.ranges.thickness : j === P.iVs1 ? P.ranges.vs1 : P.ranges.vs2;
}

function fixedEstimate(value: number): ParameterEstimate {
  return { best: value, low68: value, high68: value, low95: value, high95: value, free: false, openLow: false, openHigh: false };
}

/** Intervals of every free parameter around one minimum, at levels relative to the best χ². */
function intervalsAround(
  P: EstimateProblem,
  fit: Fit,
  level68: number,
  level95: number,
): ParameterEstimate[] {
  const cov = invertSmall(fit.normal, P.k);
  const out: ParameterEstimate[] = [];
  for (let j = 0; j < P.k; j++) {
    const best = Math.exp(fit.u[j]);
    const width = P.upper[j] - P.lower[j];
    const sigma = cov && cov[j * P.k + j] > 0 ? Math.sqrt(cov[j * P.k + j]) : NaN;
    const est: ParameterEstimate = { best, low68: NaN, high68: NaN, low95: NaN, high95: NaN, free: true, openLow: false, openHigh: false };
    for (const dir of [-1, 1] as const) {
      const ends: Array<[number, number]> = [];
      for (const level of [level68, level95]) {
        if (!(fit.chi2 <= level)) {
          ends.push([NaN, 0]);
          continue;
        }
        const delta = level - fit.chi2;
        const guess = Number.isFinite(sigma) ? Math.sqrt(delta) * sigma : 0.05 * width;
        // Just past the quadratic (Gauss–Newton) estimate, so one step usually brackets the crossing.
        const first = Math.min(Math.max(guess * 1.1, 1e-6), 0.25 * width);
        const c = crossing(P, fit, j, dir, level, first);
        // An open end is the search range's own value, exactly.
        ends.push([c.open ? rangeOf(P, j)[dir < 0 ? 0 : 1] : Math.exp(c.u), c.open ? 1 : 0]);
      }
      if (dir < 0) {
        est.low68 = ends[0][0];
        est.low95 = ends[1][0];
        est.openLow = ends[1][1] === 1;
      } else {
        est.high68 = ends[0][0];
        est.high95 = ends[1][0];
        est.openHigh = ends[1][1] === 1;
      }
    }
    out.push(est);
  }
  return out;
}

/** The three parameter estimates of a fit, with fixed speeds filled in. */
function threeEstimates(P: EstimateProblem, free: ParameterEstimate[]): [ParameterEstimate, ParameterEstimate, ParameterEstimate] {
  return [
    free[0],
    P.iVs1 >= 0 ? free[P.iVs1] : fixedEstimate(P.fixedVs1),
    P.iVs2 >= 0 ? free[P.iVs2] : fixedEstimate(P.fixedVs2),
  ];
}

// ---------------------------------------------------------------- the estimate

/**
 * Estimates the layer thickness (and any speeds not given) from picks. See
 * the module header for the method. Throws InputError on bad picks or
 * options; otherwise returns a structured-clone-able result that always
 * carries CAUTION.
 */
export function estimateLayer(picks: readonly Pick[], options: EstimateOptions = {}): EstimateResult {
  const progress = options.onProgress ?? (() => {});
  const P = prepareEstimate(picks, options);
  progress(0);

  // 1. Global search.
  const grid = globalGrid(P, progress);
  const starts = gridMinima(grid, P.k === 1 ? 10 : 8).map((s) => gridPoint(P, grid, s));
  // A narrow speed box can slip between the grid's speed ratios: then start from the box centre.
  if (starts.length === 0) {
    const centre = new Float64Array(P.k);
    for (let j = 0; j < P.k; j++) centre[j] = 0.5 * (P.lower[j] + P.upper[j]);
    projectSpeeds(P, centre);
    starts.push(centre);
  }

  // 2. Refine each grid minimum; merge those in one basin.
  const fits: Fit[] = [];
  starts.forEach((u0, i) => {
    const fit = fitAll(P, u0);
    if (Number.isFinite(fit.chi2)) fits.push(fit);
    progress(0.5 + (0.15 * (i + 1)) / starts.length);
  });
  fits.sort((a, b) => a.chi2 - b.chi2);
  const minima: Fit[] = [];
  for (const fit of fits) {
    const dup = minima.some((m) => {
      let far = 0;
      for (let j = 0; j < P.k; j++) far = Math.max(far, Math.abs(m.u[j] - fit.u[j]));
      return far < 1e-4 || sameBasin(P, m, fit, 0.5);
    });
    if (!dup) minima.push(fit);
  }
  const best = minima[0];
  const dof = P.n - P.k;
  const chi2PerDof = dof > 0 ? best.chi2 / dof : NaN;
  const poorFit = dof > 0 && best.chi2 > chi2Upper95(dof);
  const scale = poorFit ? chi2PerDof : 1;
  const level68 = best.chi2 + scale * DELTA_CHI2_68;
  const level95 = best.chi2 + scale * DELTA_CHI2_95;

  // 3. Intervals around every minimum that fits within the noise.
  const kept = minima.filter((m) => m.chi2 <= level95);
  const alternatives: EstimateMinimum[] = kept.map((m, i) => {
    const [thickness, vs1, vs2] = threeEstimates(P, intervalsAround(P, m, level68, level95));
    progress(0.65 + (0.3 * (i + 1)) / kept.length);
    return { rank: i + 1, thickness, vs1, vs2, chi2: m.chi2, deltaChi2: m.chi2 - best.chi2 };
  });
  // The headline interval is the envelope of the Δχ² region over every kept basin.
  const envelope = (pick: (a: EstimateMinimum) => ParameterEstimate): ParameterEstimate => {
    const first = pick(alternatives[0]);
    const e: ParameterEstimate = { ...first };
    for (const a of alternatives.slice(1)) {
      const p = pick(a);
      if (!p.free) continue;
      if (Number.isFinite(p.low68)) e.low68 = Math.min(e.low68, p.low68);
      if (Number.isFinite(p.high68)) e.high68 = Math.max(e.high68, p.high68);
      if (p.low95 < e.low95) {
        e.low95 = p.low95;
        e.openLow = p.openLow;
      }
      if (p.high95 > e.high95) {
        e.high95 = p.high95;
        e.openHigh = p.openHigh;
      }
    }
    return e;
  };
  const thickness = envelope((a) => a.thickness);
  const vs1 = envelope((a) => a.vs1);
  const vs2 = envelope((a) => a.vs2);

  const cov = invertSmall(best.normal, P.k);
  const correlationThicknessVs1 =
    P.iVs1 >= 0 && cov ? cov[P.iVs1] / Math.sqrt(cov[0] * cov[P.iVs1 * P.k + P.iVs1]) : NaN;

  const bestModel = modelAt(P, best.u);
  const pickFit = fitOfPicks(P, bestModel);
  const misfitMap = mapOf(P, grid);
  const defaultedSdCount = picks.filter((p) => p.sd === undefined).length;

  const diagnostics = diagnoseFit({
    problem: P,
    model: bestModel,
    pickFit,
    chi2: best.chi2,
    dof,
    poorFit,
    scale,
    estimates: { thickness, vs1, vs2 },
    alternatives,
    defaultedSdCount,
    density1Defaulted: options.density1 === undefined,
    density2Defaulted: options.density2 === undefined,
  });
  const { site, siteNote } = siteOf(thickness, vs1, vs2, P);
  progress(1);

  const method =
    'Maximum likelihood for Gaussian pick errors: a global grid search using the dimensionless scaling ' +
    '(c/β1 against f·H/β1 at fixed β2/β1, ρ2/ρ1), then Levenberg–Marquardt on the exact closed-form ' +
    'Love-wave forward model (Aki & Richards 2002, §7.2–7.3). Intervals: profile likelihood, ' +
    'Δχ² = 1 (68 %) and 3.84 (95 %) with the other free parameters re-optimised (Press et al., Numerical Recipes, 3rd ed., §15.6)' +
    (poorFit ? `, scaled by χ²/dof = ${round(scale)} because the fit is poor` : '') +
    '; an interval that reaches the search range is open there. When several separate minima fit within Δχ² = 3.84, ' +
    'each is listed and the headline interval spans them all. Correlation of H and β1 from the linearised covariance at the best fit.';

  return {
    thickness,
    vs1,
    vs2,
    density1: P.rho1,
    density2: P.rho2,
    density1Defaulted: options.density1 === undefined,
    density2Defaulted: options.density2 === undefined,
    alternatives,
    chi2: best.chi2,
    dof,
    chi2PerDof,
    intervalScale: scale,
    correlationThicknessVs1,
    misfitMap,
    pickFit,
    warnings: diagnostics.sentences,
    diagnostics,
    verdict: estimateVerdict({ thickness, diagnostics, alternatives, model: bestModel }),
    defaultedSdCount,
    searchRange: {
      thickness: [...P.ranges.thickness],
      vs1: [...P.ranges.vs1],
      vs2: [...P.ranges.vs2],
    },
    site,
    siteNote,
    method,
    caution: CAUTION,
  };
}

function siteOf(
  thickness: ParameterEstimate,
  vs1: ParameterEstimate,
  vs2: ParameterEstimate,
  P: EstimateProblem,
): { site: SiteFigures | null; siteNote: string } {
  try {
    // The one path and rule shared with the app, sites-summary and GeoJSON (site.ts).
    const site = siteFiguresOfEstimate({ thickness, vs1, vs2, density1: P.rho1, density2: P.rho2 });
    return { site, siteNote: SITE_NOTE };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    return { site: null, siteNote: `Site figures are not given: ${e.message}` };
  }
}

/** What level the site-figure ranges carry (site.ts siteFiguresOfEstimate says why). */
const SITE_NOTE =
  'Site figures are taken over the box of the 95 % intervals: each figure\'s range covers every model within the 95 % ' +
  'profile level of the best fit, so at least that figure\'s own 95 % interval; it is not a joint 95 % statement about all ' +
  'parameters at once. An open interval end makes the figures open on that side.';

function round(x: number): string {
  return String(Number(x.toPrecision(3)));
}

function fitOfPicks(P: EstimateProblem, m: TwoLayer): PickFit {
  // Fresh solves (no warm start) for the reported predictions.
  const predicted = new Float64Array(P.n);
  const residual = new Float64Array(P.n);
  const normalised = new Float64Array(P.n);
  for (let i = 0; i < P.n; i++) {
    predicted[i] = predictVelocity(m, P.f[i], P.mode[i], P.isPhase[i] === 1);
    residual[i] = P.v[i] - predicted[i];
    normalised[i] = residual[i] / P.sd[i];
  }
  return { labels: P.labels.slice(), predicted, residual, normalised, sd: Float64Array.from(P.sd) };
}

function mapOf(P: EstimateProblem, g: Grid): MisfitMap {
  const nH = g.lnH.length;
  const x = g.lnH.map(Math.exp);
  const byVs1 = P.iVs1 >= 0 || P.iVs2 < 0;
  if (byVs1) {
    const y = P.iVs1 >= 0 ? g.lnB1.map(Math.exp) : Float64Array.of(P.fixedVs1);
    const chi2 = new Float64Array(g.nB * nH).fill(NaN);
    for (let ib = 0; ib < g.nB; ib++) {
      for (let ih = 0; ih < nH; ih++) {
        let m = NaN;
        for (let ir = 0; ir < g.nR; ir++) {
          const c = g.chi2[(ib * g.nR + ir) * nH + ih];
          if (!(c >= m)) m = Number.isNaN(c) ? m : c;
        }
        chi2[ib * nH + ih] = m;
      }
    }
    return { xName: 'thickness_m', yName: 'vs1_m_s', x, y, chi2, rows: g.nB, cols: nH };
  }
  // β1 fixed, β2 free: rows are β2.
  const y = new Float64Array(g.nR);
  for (let ir = 0; ir < g.nR; ir++) y[ir] = Math.exp(g.lnB2[ir]);
  const chi2 = Float64Array.from(g.chi2);
  return { xName: 'thickness_m', yName: 'vs2_m_s', x, y, chi2, rows: g.nR, cols: nH };
}

/**
 * Dense dimensionless Love-wave curves for fast global searches.
 *
 * What: for one layer over a half-space with fixed speed ratio r = β2/β1 and
 * density ratio q = ρ2/ρ1, the phase velocity c/β1 and group velocity U/β1
 * of mode n depend only on x = f·H/β1 (shared/PHYSICS.md §2, scaling;
 * Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.2). One table
 * of both against log x therefore serves every H and β1 at that (r, q): a
 * pick's prediction is β1 · table(log f + log H − log β1).
 *
 * Method: the exact closed forms of love-layer.ts (the period equation solved
 * by safeguarded Newton warm-started from the previous sample,
 * lovePhaseVelocityNear; group velocity from the energy integrals) sampled
 * on a uniform grid in ln x, read back by linear interpolation.
 *
 * Domain: x > 0. Below the cutoff of mode n (x < n r / (2√(r² − 1))) the
 * mode does not exist; the table holds r there, the value both velocities
 * tend to at the cutoff (c → β2 and U → β2), so that a misfit built on it
 * is continuous. Outside the tabulated range the end values are used.
 *
 * Accuracy: linear interpolation at `pointsPerDecade` samples per decade
 * (default 60, step ≈ 3.9 % in x) gives a relative error of order 1e-3 in
 * smooth parts and more within a few steps of a cutoff: fit for a global
 * search only. Refine with the exact forward model.
 */
import { loveGroupVelocityAt, lovePhaseVelocityNear, type TwoLayer } from './love-layer';

export interface DimensionlessTable {
  /** Speed ratio β2/β1 (> 1). */
  vsRatio: number;
  /** Density ratio ρ2/ρ1. */
  densityRatio: number;
  /** Mode number. */
  mode: number;
  /** ln x of the first sample. */
  lnX0: number;
  /** 1 / (ln-x step). */
  invStep: number;
  /** Number of samples. */
  n: number;
  /** c/β1 at each sample (r below cutoff). */
  phase: Float64Array;
  /** U/β1 at each sample (r below cutoff). */
  group: Float64Array;
}

export interface DimensionlessTableOptions {
  /** Samples per decade of x. @default 60 */
  pointsPerDecade?: number;
  /** Upper limit on samples. @default 1200 */
  maxPoints?: number;
}

/** Builds the table of mode `mode` for x in [e^lnXMin, e^lnXMax]. */
export function buildDimensionlessTable(
  vsRatio: number,
  densityRatio: number,
  mode: number,
  lnXMin: number,
  lnXMax: number,
  options: DimensionlessTableOptions = {},
): DimensionlessTable {
  const perDecade = options.pointsPerDecade ?? 60;
  const maxPoints = options.maxPoints ?? 1200;
  const span = Math.max(lnXMax - lnXMin, 1e-9);
  const n = Math.max(2, Math.min(maxPoints, Math.ceil((span / Math.LN10) * perDecade) + 1));
  const step = span / (n - 1);
  const phase = new Float64Array(n);
  const group = new Float64Array(n);
  const p: TwoLayer = { h: 1, vs1: 1, vs2: vsRatio, rho1: 1, rho2: densityRatio };
  let guess = NaN;
  for (let i = 0; i < n; i++) {
    const x = Math.exp(lnXMin + i * step);
    // Warm start from the previous sample (safeguarded Newton, love-layer.ts).
    const r = lovePhaseVelocityNear(p, x, mode, guess);
    if (r.status === 'converged') {
      guess = r.x;
      phase[i] = r.x;
      group[i] = loveGroupVelocityAt(p, x, r.x);
    } else {
      phase[i] = vsRatio;
      group[i] = vsRatio;
    }
  }
  return { vsRatio, densityRatio, mode, lnX0: lnXMin, invStep: 1 / step, n, phase, group };
}

/** Linear interpolation of `column` (the table's phase or group array) at ln x; end values outside. */
export function tableAt(table: DimensionlessTable, column: Float64Array, lnX: number): number {
  let t = (lnX - table.lnX0) * table.invStep;
  if (!(t > 0)) return column[0];
  const last = table.n - 1;
  if (t >= last) return column[last];
  const i = t | 0;
  t -= i;
  return column[i] + t * (column[i + 1] - column[i]);
}

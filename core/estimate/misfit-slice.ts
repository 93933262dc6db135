/**
 * A close-up of the misfit around the best fit, for the app's picture of
 * the thickness–speed trade-off.
 *
 * What: χ² on a fine grid of layer thickness H (across) and one shear speed
 * (up: β1 when it is free, else β2), both log-spaced, over a box a few
 * times wider than the 95 % intervals and inside the search range. The
 * other free speed is held at its best value: this is a slice through the
 * best fit, not a profile (estimate.ts MisfitMap is the coarse profile over
 * the whole search box).
 *
 * Method: the estimate's own χ² (estimate.ts prepareEstimate and chi2At:
 * the picks' forward model of estimate-forward.ts, closed forms of
 * Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.2–7.3).
 *
 * Units: SI (m, m/s). Where the speeds do not trap Love waves (β2 ≤ β1)
 * the entry is NaN. Bad picks or options throw InputError (prepareEstimate).
 */
import { chi2At, prepareEstimate, type EstimateOptions, type EstimateResult, type MisfitMap } from './estimate';

export interface MisfitSliceOptions {
  /** Thickness values across. @default 56 */
  cols?: number;
  /** Speed values up. @default 40 */
  rows?: number;
  /** Box half-width as a multiple of the wider side of each 95 % interval (in log units). @default 3 */
  widen?: number;
}

export const MISFIT_SLICE_DEFAULTS: Required<MisfitSliceOptions> = { cols: 56, rows: 40, widen: 3 };

/** Smallest box half-width, in log units (±5 %), so a very tight interval still shows its surroundings. */
const MIN_HALF_WIDTH = Math.log(1.05);

/** The best-fit parts of an estimate the slice needs. */
export type SliceCentre = Pick<EstimateResult, 'thickness' | 'vs1' | 'vs2' | 'searchRange'>;

export interface MisfitSlice extends MisfitMap {
  /** The free speed held at its best value, if any. */
  held?: { name: 'vs1_m_s' | 'vs2_m_s'; value: number };
}

function logBox(best: number, low: number, high: number, range: readonly [number, number], widen: number): [number, number] {
  const lb = Math.log(best);
  const down = Number.isFinite(low) && low > 0 ? lb - Math.log(low) : Infinity;
  const up = Number.isFinite(high) && high > 0 ? Math.log(high) - lb : Infinity;
  const half = Math.max(MIN_HALF_WIDTH, widen * Math.max(Number.isFinite(down) ? down : 0, Number.isFinite(up) ? up : 0));
  const lo = Math.max(Math.log(range[0]), lb - (Number.isFinite(down) ? half : Infinity));
  const hi = Math.min(Math.log(range[1]), lb + (Number.isFinite(up) ? half : Infinity));
  return [lo, hi > lo ? hi : lo + MIN_HALF_WIDTH];
}

function logSpaced(lo: number, hi: number, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.exp(n === 1 ? lo : lo + ((hi - lo) * i) / (n - 1));
  return out;
}

/**
 * χ² around the best fit of `centre` (an estimate of the same picks and
 * options), row-major: entry [row·cols + col] is at thickness x[col] and
 * speed y[row]. When both speeds are given there is one row.
 */
export function misfitSlice(
  picks: Parameters<typeof prepareEstimate>[0],
  estimateOptions: EstimateOptions,
  centre: SliceCentre,
  options: MisfitSliceOptions = {},
): MisfitSlice {
  const cols = options.cols ?? MISFIT_SLICE_DEFAULTS.cols;
  const widen = options.widen ?? MISFIT_SLICE_DEFAULTS.widen;
  const P = prepareEstimate(picks, estimateOptions);
  const byVs1 = P.iVs1 >= 0;
  const byVs2 = !byVs1 && P.iVs2 >= 0;
  const rows = byVs1 || byVs2 ? (options.rows ?? MISFIT_SLICE_DEFAULTS.rows) : 1;
  const t = centre.thickness;
  const [h0, h1] = logBox(t.best, t.low95, t.high95, centre.searchRange.thickness, widen);
  const x = logSpaced(h0, h1, cols);
  let y: Float64Array;
  if (byVs1 || byVs2) {
    const s = byVs1 ? centre.vs1 : centre.vs2;
    const [s0, s1] = logBox(s.best, s.low95, s.high95, byVs1 ? centre.searchRange.vs1 : centre.searchRange.vs2, widen);
    y = logSpaced(s0, s1, rows);
  } else {
    y = Float64Array.of(P.fixedVs1);
  }
  const u = new Float64Array(P.k);
  if (P.iVs1 >= 0) u[P.iVs1] = Math.log(centre.vs1.best);
  if (P.iVs2 >= 0) u[P.iVs2] = Math.log(centre.vs2.best);
  const chi2 = new Float64Array(rows * cols);
  for (let r = 0; r < rows; r++) {
    if (byVs1) u[P.iVs1] = Math.log(y[r]);
    else if (byVs2) u[P.iVs2] = Math.log(y[r]);
    const vs1 = P.iVs1 >= 0 ? Math.exp(u[P.iVs1]) : P.fixedVs1;
    const vs2 = P.iVs2 >= 0 ? Math.exp(u[P.iVs2]) : P.fixedVs2;
    for (let k = 0; k < cols; k++) {
      u[0] = Math.log(x[k]);
      chi2[r * cols + k] = vs2 > vs1 ? chi2At(P, u) : NaN;
    }
  }
  const out: MisfitSlice = { xName: 'thickness_m', yName: byVs2 ? 'vs2_m_s' : 'vs1_m_s', x, y, chi2, rows, cols };
  if (byVs1 && P.iVs2 >= 0) out.held = { name: 'vs2_m_s', value: centre.vs2.best };
  return out;
}

/**
 * Columns for the dispersion plot: the picks, and the model curves on one
 * shared abscissa, ready for uPlot's aligned data. Pure and DOM-free, so the
 * what-if bench can time it in Node.
 *
 * The curves come from the core (core/dispersion/curve.ts loveCurves); this module only
 * lays them out: one x column (frequency in Hz or period in s, ascending as
 * uPlot needs), and one y column per (mode, kind) with NaN where the mode
 * does not exist (below its cutoff).
 */
import { logBand, loveCurves, loveCutoffFrequencies } from '../../../core/dispersion/curve';
import type { LayeredModel } from '../../../core/dispersion/model';
import { effectiveSd, type PickKind } from '../../../core/picks/picks';

/** Which abscissa the plot shows. */
export type AxisQuantity = 'frequency' | 'period';

/** One drawn curve: which mode and which velocity. */
export interface CurveKey {
  mode: number;
  kind: PickKind;
}

/** The smallest pick shape the plot needs (PickRecord and Pick both fit). */
export interface PlotPick {
  id?: string;
  frequency: number;
  velocity: number;
  kind: PickKind;
  mode: number;
  sd?: number;
  /** Love (default) or Rayleigh. */
  wave?: 'love' | 'rayleigh';
}

/** Picks in columns: x (Hz or s), velocity, sd (m/s), and mode/kind per pick. */
export interface PickColumns {
  x: Float64Array;
  y: Float64Array;
  sd: Float64Array;
  mode: Int32Array;
  /** 1 for phase, 0 for group. */
  phase: Uint8Array;
  /** 1 for a Rayleigh pick, 0 for Love. */
  wave: Uint8Array;
}

/** Model curves in columns on one shared x. */
export interface CurveColumns {
  keys: CurveKey[];
  /** Ascending x (Hz or s). */
  x: Float64Array;
  /** One column per key, NaN where the mode does not exist. */
  y: Float64Array[];
  /** Cutoff of each higher mode drawn, in x units (Hz or s), with its mode. */
  cutoffs: { mode: number; x: number }[];
}

/** Default frequency band when there are no picks yet, Hz (common survey band). */
export const DEFAULT_BAND_HZ: readonly [number, number] = [2, 60];
/** Points per curve: enough for smooth lines on a 1024-px plot. */
export const CURVE_POINTS = 160;

/** The distinct (mode, kind) pairs present in the picks, fundamental first; mode 0 group when none. */
export function curveKeysOf(picks: readonly PlotPick[]): CurveKey[] {
  const seen = new Set<string>();
  const keys: CurveKey[] = [];
  for (const p of picks) {
    const k = `${p.mode}|${p.kind}`;
    if (!seen.has(k)) {
      seen.add(k);
      keys.push({ mode: p.mode, kind: p.kind });
    }
  }
  if (keys.length === 0) keys.push({ mode: 0, kind: 'group' });
  return keys.sort((a, b) => a.mode - b.mode || (a.kind < b.kind ? -1 : a.kind > b.kind ? 1 : 0));
}

/** A frequency band that frames the picks with a margin, Hz. */
export function bandOf(picks: readonly PlotPick[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const p of picks) {
    if (p.frequency < lo) lo = p.frequency;
    if (p.frequency > hi) hi = p.frequency;
  }
  if (!(lo < hi)) {
    if (lo === hi && Number.isFinite(lo)) return [lo / 2, lo * 2];
    return [DEFAULT_BAND_HZ[0], DEFAULT_BAND_HZ[1]];
  }
  return [lo / 1.3, hi * 1.3];
}

/** The picks as columns in the chosen x quantity. */
export function pickColumns(picks: readonly PlotPick[], axis: AxisQuantity): PickColumns {
  const n = picks.length;
  const out: PickColumns = {
    x: new Float64Array(n),
    y: new Float64Array(n),
    sd: new Float64Array(n),
    mode: new Int32Array(n),
    phase: new Uint8Array(n),
    wave: new Uint8Array(n),
  };
  for (let i = 0; i < n; i++) {
    const p = picks[i];
    out.x[i] = axis === 'frequency' ? p.frequency : 1 / p.frequency;
    out.y[i] = p.velocity;
    out.sd[i] = effectiveSd({ ...p, mode: p.mode, kind: p.kind });
    out.mode[i] = p.mode;
    out.phase[i] = p.kind === 'phase' ? 1 : 0;
    out.wave[i] = p.wave === 'rayleigh' ? 1 : 0;
  }
  return out;
}

/**
 * The model's curves for the given keys on `frequencies` (ascending Hz),
 * laid out on one x column in the chosen quantity (period: reversed so that
 * x ascends). Computation is core/dispersion/curve.ts loveCurves.
 */
export function curveColumns(
  model: LayeredModel,
  frequencies: Float64Array,
  keys: readonly CurveKey[],
  axis: AxisQuantity,
): CurveColumns {
  const n = frequencies.length;
  let maxMode = 0;
  for (const k of keys) if (k.mode > maxMode) maxMode = k.mode;
  const curves = loveCurves(model, frequencies, { modes: maxMode + 1 });
  const cut = loveCutoffFrequencies(model, maxMode + 1);
  const reverse = axis === 'period';
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const f = frequencies[reverse ? n - 1 - i : i];
    x[i] = reverse ? 1 / f : f;
  }
  const y = keys.map((k) => {
    const col = new Float64Array(n).fill(NaN);
    const mc = curves.modes[k.mode];
    const src = k.kind === 'phase' ? mc.phase : mc.group;
    // The mode's frequencies are a subsequence of the band, ascending: merge-walk.
    let j = 0;
    for (let i = 0; i < n && j < mc.frequency.length; i++) {
      if (frequencies[i] === mc.frequency[j]) {
        col[reverse ? n - 1 - i : i] = src[j];
        j++;
      }
    }
    return col;
  });
  const cutoffs: { mode: number; x: number }[] = [];
  const drawn = new Set(keys.map((k) => k.mode));
  for (let m = 1; m <= maxMode; m++) {
    const f = cut[m];
    if (drawn.has(m) && f > 0 && Number.isFinite(f)) cutoffs.push({ mode: m, x: reverse ? 1 / f : f });
  }
  return { keys: [...keys], x, y, cutoffs };
}

/** The shared band for a set of picks: CURVE_POINTS log-spaced frequencies, Hz. */
export function plotBand(picks: readonly PlotPick[], points = CURVE_POINTS): Float64Array {
  const [lo, hi] = bandOf(picks);
  return logBand(lo, hi, points);
}

/** Finite extent of a set of columns, for the scale ranges; [NaN, NaN] when empty. */
export function extentOf(columns: readonly ArrayLike<number>[], pad: readonly ArrayLike<number>[] = []): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  columns.forEach((col, c) => {
    const err = pad[c];
    for (let i = 0; i < col.length; i++) {
      const v = col[i];
      if (!Number.isFinite(v)) continue;
      const e = err ? err[i] : 0;
      if (v - e < lo) lo = v - e;
      if (v + e > hi) hi = v + e;
    }
  });
  return lo <= hi ? [lo, hi] : [NaN, NaN];
}

/** Curves computed elsewhere (in the worker) on one band, to lay out for the plot. */
export interface ComputedCurves {
  /** The frequencies the curves were computed on, Hz ascending. */
  band: Float64Array;
  curves: readonly {
    wave: 'love' | 'rayleigh';
    modes: readonly { mode: number; frequency: Float64Array; phase: Float64Array; group: Float64Array }[];
  }[];
}

/** One laid-out curve: its wave, mode and kind. */
export interface ComputedKey extends CurveKey {
  wave: 'love' | 'rayleigh';
}

/**
 * Computed curves on one x column in the chosen quantity: for each wave,
 * every computed mode in the kinds picked for that wave (phase when there
 * are no picks of it), or only in `kind` when given (a dispersion image
 * shows one kind), NaN where a mode does not exist.
 */
export function computedColumns(
  c: ComputedCurves,
  picks: readonly PlotPick[],
  axis: AxisQuantity,
  kind?: PickKind,
): { keys: ComputedKey[]; x: Float64Array; y: Float64Array[] } {
  const band = c.band;
  const n = band.length;
  const reverse = axis === 'period';
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const f = band[reverse ? n - 1 - i : i];
    x[i] = reverse ? 1 / f : f;
  }
  const keys: ComputedKey[] = [];
  const y: Float64Array[] = [];
  for (const w of c.curves) {
    const kinds = kind ? [kind] : [...new Set(picks.filter((p) => (p.wave ?? 'love') === w.wave).map((p) => p.kind))].sort();
    for (const mc of w.modes) {
      if (mc.frequency.length === 0) continue;
      for (const k of kinds.length ? kinds : (['phase'] as const)) {
        const col = new Float64Array(n).fill(NaN);
        const src = k === 'phase' ? mc.phase : mc.group;
        let j = 0;
        for (let i = 0; i < n && j < mc.frequency.length; i++) {
          if (band[i] === mc.frequency[j]) {
            col[reverse ? n - 1 - i : i] = src[j];
            j++;
          }
        }
        keys.push({ wave: w.wave, mode: mc.mode, kind: k });
        y.push(col);
      }
    }
  }
  return { keys, x, y };
}

/**
 * What the compute worker does: the core's computations, called directly,
 * each wrapped so that bad input comes back as data (an InputError keeps
 * its field across the worker boundary) and typed arrays are listed for
 * transfer instead of copying.
 *
 * Runs in the worker (compute.worker.ts exposes it with comlink); kept in
 * its own module so it can also be called in-process (tests, benches).
 * Only core is imported here: no DOM, no IndexedDB.
 */
import { loveCurves, loveCutoffFrequencies, type CurveOptions, type DispersionCurves } from '../../core/dispersion/curve';
import { InputError } from '../../core/shared/errors';
import { estimateLayer, type EstimateOptions, type EstimateResult } from '../../core/estimate/estimate';
import { misfitSlice, type MisfitSlice, type MisfitSliceOptions, type SliceCentre } from '../../core/estimate/misfit-slice';
import type { LayeredModel } from '../../core/dispersion/model';
import { estimateProfile, type ProfileOptions, type ProfileResult } from '../../core/profile/profile-estimate';
import type { Pick } from '../../core/picks/picks';
import {
  siteFigures,
  siteFiguresForRanges,
  type SiteFigures,
  type SiteOptions,
  type TwoLayerBest,
  type TwoLayerRanges,
} from '../../core/site/site';

/** A failure carried across the worker boundary as plain data. */
export interface ComputeFailure {
  ok: false;
  /** 'InputError' for bad input (then `field` names it); otherwise the error's name. */
  name: string;
  message: string;
  field?: string;
}

/** A result and the buffers to transfer with it. */
export interface ComputeSuccess<T> {
  ok: true;
  value: T;
}

export type ComputeOutcome<T> = ComputeSuccess<T> | ComputeFailure;

/** Dispersion curves with the cutoff frequencies of the same modes. */
export interface CurvesResult extends DispersionCurves {
  /** Cutoff frequency of each mode, Hz (0 for the fundamental; NaN if its search failed). */
  cutoffs: Float64Array;
}

/**
 * Estimate options that can cross to the worker (no functions): the core's
 * EstimateOptions, with `pickLabels[i]` naming pick i in messages (e.g.
 * "row 3") in place of `whereOf`.
 */
export interface WorkerEstimateOptions extends Omit<EstimateOptions, 'whereOf' | 'onProgress' | 'fieldLabels'> {
  /** How each pick is named in messages. @default `pick ${i + 1}` */
  pickLabels?: readonly string[];
  /** How the options are named in messages (e.g. a form's labels). @default the option names */
  fieldLabels?: EstimateOptions['fieldLabels'];
}

/**
 * Layered-estimate options that can cross to the worker (no functions):
 * the core's ProfileOptions with `pickLabels[i]` naming pick i in messages.
 * Progress comes through a separate callback argument (a comlink proxy).
 */
export interface WorkerProfileOptions extends Omit<ProfileOptions, 'whereOf' | 'onProgress' | 'fieldLabels'> {
  /** How each pick is named in messages. @default `pick ${i + 1}` */
  pickLabels?: readonly string[];
  /** How the options are named in messages. @default the option names */
  fieldLabels?: ProfileOptions['fieldLabels'];
}

/** Smallest change of the fraction done worth sending to the page (one per cent). */
const PROGRESS_STEP = 0.01;

/** A computed value and the ArrayBuffers it owns (to transfer, not copy). */
export interface Computed<T> {
  outcome: ComputeOutcome<T>;
  transfer: ArrayBuffer[];
}

function run<T>(fn: () => T, buffersOf: (value: T) => ArrayBufferLike[]): Computed<T> {
  try {
    const value = fn();
    return { outcome: { ok: true, value }, transfer: unique(buffersOf(value)) };
  } catch (e) {
    if (e instanceof InputError) {
      return { outcome: { ok: false, name: 'InputError', message: e.message, field: e.field }, transfer: [] };
    }
    const err = e instanceof Error ? e : new Error(String(e));
    return { outcome: { ok: false, name: err.name, message: err.message }, transfer: [] };
  }
}

function unique(buffers: ArrayBufferLike[]): ArrayBuffer[] {
  return [...new Set(buffers)].filter((b): b is ArrayBuffer => b instanceof ArrayBuffer && b.byteLength > 0);
}

/** The core's estimate options from the worker's (pick labels become `whereOf`). */
function coreOptions(options: WorkerEstimateOptions): EstimateOptions {
  const { pickLabels, ...rest } = options;
  const core: EstimateOptions = { ...rest };
  if (pickLabels) core.whereOf = (i) => pickLabels[i] ?? `pick ${i + 1}`;
  return core;
}

/** Every computation the worker offers, on plain (structured-clone) inputs. */
export const computeApi = {
  /** Love-wave curves of `model` at `frequencies` (Hz), plus the modes' cutoffs (core/dispersion/curve.ts). */
  curves(model: LayeredModel, frequencies: ArrayLike<number>, options: CurveOptions = {}): Computed<CurvesResult> {
    return run(
      () => {
        const curves = loveCurves(model, frequencies, options);
        return { ...curves, cutoffs: loveCutoffFrequencies(model, curves.modes.length) };
      },
      (r) => [r.cutoffs.buffer, ...r.modes.flatMap((m) => [m.frequency.buffer, m.period.buffer, m.phase.buffer, m.group.buffer])],
    );
  },

  /** The layer-thickness estimate from picks (core/estimate/estimate.ts estimateLayer). */
  estimate(picks: readonly Pick[], options: WorkerEstimateOptions = {}): Computed<EstimateResult> {
    const core = coreOptions(options);
    return run(
      () => estimateLayer(picks, core),
      (r) => [
        r.misfitMap.x.buffer,
        r.misfitMap.y.buffer,
        r.misfitMap.chi2.buffer,
        r.pickFit.predicted.buffer,
        r.pickFit.residual.buffer,
        r.pickFit.normalised.buffer,
        r.pickFit.sd.buffer,
      ],
    );
  },

  /** A fine χ² slice around an estimate's best fit, for the trade-off picture (core/estimate/misfit-slice.ts). */
  misfitSlice(
    picks: readonly Pick[],
    options: WorkerEstimateOptions,
    centre: SliceCentre,
    sliceOptions: MisfitSliceOptions = {},
  ): Computed<MisfitSlice> {
    const core = coreOptions(options);
    return run(
      () => misfitSlice(picks, core, centre, sliceOptions),
      (r) => [r.x.buffer, r.y.buffer, r.chi2.buffer],
    );
  },

  /**
   * The layered estimate (core/profile/profile-estimate.ts): N = 1–4 layers
   * from Love and/or Rayleigh picks, with the ensemble's intervals and depth
   * band. `onProgress(fraction)` (in the worker, a comlink proxy to the page)
   * hears the fraction done, at most once per per cent.
   */
  profile(picks: readonly Pick[], options: WorkerProfileOptions = {}, onProgress?: (fraction: number) => unknown): Computed<ProfileResult> {
    const { pickLabels, ...rest } = options;
    const core: ProfileOptions = { ...rest };
    if (pickLabels) core.whereOf = (i) => pickLabels[i] ?? `pick ${i + 1}`;
    if (onProgress) {
      let last = -1;
      core.onProgress = (f) => {
        if (f === 1 || f - last >= PROGRESS_STEP) {
          last = f;
          void onProgress(f);
        }
      };
    }
    return run(
      () => estimateProfile(picks, core),
      (r) => [
        r.band.depth.buffer,
        r.band.best.buffer,
        r.band.low68.buffer,
        r.band.high68.buffer,
        r.band.low95.buffer,
        r.band.high95.buffer,
        r.pickFit.predicted.buffer,
        r.pickFit.residual.buffer,
        r.pickFit.normalised.buffer,
        r.pickFit.sd.buffer,
      ],
    );
  },

  /** Site figures of a layered model (core/site/site.ts). */
  siteFigures(model: LayeredModel, options: SiteOptions = {}): Computed<SiteFigures> {
    return run(() => siteFigures(model, options), () => []);
  },

  /** Site figures of one layer over a half-space with uncertainty ranges (core/site/site.ts). */
  siteFiguresForRanges(best: TwoLayerBest, ranges: TwoLayerRanges, options: SiteOptions = {}): Computed<SiteFigures> {
    return run(() => siteFiguresForRanges(best, ranges, options), () => []);
  },
};

export type ComputeApi = typeof computeApi;

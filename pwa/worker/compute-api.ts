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
import { trialBuffers, trialModel, type TrialRequest, type TrialResult } from './model-trial';
import { readRecording } from '../../core/recordings/read';
import type { GeometryOverrides, Recording } from '../../core/recordings/recording';
import { demoRecord } from '../../core/signal/demo-record';
import type { Gather } from '../../core/signal/gather';
import type { DispersionImage, ImageMethod } from '../../core/signal/image';
import { multipleFilterImage, type MultipleFilterOptions } from '../../core/signal/multiple-filter';
import { phaseShiftImage, type PhaseShiftOptions } from '../../core/signal/phase-shift';
import { followRidge, type Ridge } from '../../core/signal/ridge';
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

/** Image options that cross to the worker: the method and its options. */
export type WorkerImageOptions =
  | ({ method: 'phase-shift' } & PhaseShiftOptions)
  | ({ method: 'multiple-filter' } & MultipleFilterOptions);

/** The buffers of an image's columns (to transfer, not copy). */
function imageBuffers(r: DispersionImage): ArrayBufferLike[] {
  const out: ArrayBufferLike[] = [r.frequencies.buffer, r.velocities.buffer, r.power.buffer, r.strength.buffer, r.reliability.buffer];
  if (r.instantaneousFrequency) out.push(r.instantaneousFrequency.buffer);
  if (r.alpha) out.push(r.alpha.buffer);
  return out;
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

  /**
   * A seismograph file (SEG-Y, SEG-2, CSV traces) read into traces and
   * geometry with the crew's overrides (core/recordings/read.ts); the
   * invented demo record when `bytes` is null.
   */
  readRecord(bytes: Uint8Array | null, name: string, overrides: GeometryOverrides = {}): Computed<Recording> {
    return run(
      () => {
        if (bytes !== null) return readRecording(bytes, name, overrides);
        const g = demoRecord();
        return {
          format: 'csv' as const,
          name: g.name ?? name,
          sampleInterval: g.sampleInterval,
          samples: g.traces[0].length,
          delay: g.startTime,
          traces: [...g.traces],
          offsets: Float64Array.from(g.offsets),
          component: 'transverse' as const,
          sources: null,
          receivers: null,
          missingGeometry: false,
          askFor: [],
          warnings: ['This record is invented: a synthetic Love-wave gather of an invented site, for trying the app.'],
        };
      },
      (r) => [...r.traces.map((t) => t.buffer), r.offsets.buffer],
    );
  },

  /** A dispersion image of a gather (core/signal: phase-shift or multiple-filter). */
  dispersionImage(gather: Gather, options: WorkerImageOptions): Computed<DispersionImage> {
    return run(
      () => {
        const { method, ...rest } = options;
        return (method as ImageMethod) === 'phase-shift' ? phaseShiftImage(gather, rest) : multipleFilterImage(gather, rest);
      },
      imageBuffers,
    );
  },

  /** The ridge through a tapped point of an image (core/signal/ridge.ts). */
  followRidge(image: DispersionImage, tap: { frequency: number; velocity: number }): Computed<Ridge> {
    return run(
      () => followRidge(image, tap),
      (r) => [r.rows.buffer, r.frequency.buffer, r.velocity.buffer, r.sd.buffer, r.level.buffer],
    );
  },

  /**
   * A layered model's Love and/or Rayleigh curves on the plot's band, its
   * misfit against the picks and its site figures (model-trial.ts): the
   * what-if of N layers and the layered estimate's best-fit curves.
   */
  modelTrial(model: LayeredModel, request: TrialRequest): Computed<TrialResult> {
    return run(() => trialModel(model, request), trialBuffers);
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

/**
 * The page's one bridge to the compute worker.
 *
 * - The worker starts lazily, on the first call.
 * - Calls queue and run one at a time, in order.
 * - Every call takes an AbortSignal. Aborting a queued call just drops it.
 *   Aborting the running call terminates the worker (a pure-JS loop cannot
 *   be interrupted any other way), rejects that call with an AbortError, and
 *   the next call starts a fresh worker.
 * - Bad input comes back as an InputError with its field, as if the core
 *   had been called here; typed arrays are transferred, not copied.
 * - A worker that crashes rejects its call with a plain-words Error and is
 *   replaced on the next call.
 */
import { proxy, transfer, wrap, type Endpoint, type Remote } from 'comlink';
import type { CurveOptions } from '../../core/dispersion/curve';
import { InputError } from '../../core/shared/errors';
import type { EstimateResult } from '../../core/estimate/estimate';
import type { MisfitSlice, MisfitSliceOptions, SliceCentre } from '../../core/estimate/misfit-slice';
import type { LayeredModel } from '../../core/dispersion/model';
import type { Pick } from '../../core/picks/picks';
import type { SiteFigures, SiteOptions, TwoLayerBest, TwoLayerRanges } from '../../core/site/site';
import type { ProfileResult } from '../../core/profile/profile-estimate';
import type { ComputeApi, ComputeFailure, ComputeOutcome, CurvesResult, WorkerEstimateOptions, WorkerImageOptions, WorkerProfileOptions } from './compute-api';
import type { TrialRequest, TrialResult } from './model-trial';
import type { GeometryOverrides, Recording } from '../../core/recordings/recording';
import type { Gather } from '../../core/signal/gather';
import type { DispersionImage } from '../../core/signal/image';
import type { Ridge } from '../../core/signal/ridge';

export type { CurvesResult, WorkerEstimateOptions, WorkerImageOptions, WorkerProfileOptions } from './compute-api';
export type { TrialCurves, TrialFit, TrialRequest, TrialResult } from './model-trial';

/** What the bridge needs of a worker: a comlink endpoint that can be terminated. */
export interface WorkerLike extends Endpoint {
  terminate(): void;
}

type Method = keyof ComputeApi;
type ValueOf<K extends Method> = ReturnType<ComputeApi[K]>['outcome'] extends ComputeOutcome<infer T> ? T : never;
type RemoteApi = { [K in Method]: (...args: Parameters<ComputeApi[K]>) => ComputeOutcome<ValueOf<K>> };

interface Job {
  method: Method;
  args: unknown[];
  signal?: AbortSignal;
  onAbort?: () => void;
  resolve: (value: never) => void;
  reject: (reason: unknown) => void;
}

/** The AbortError a cancelled computation rejects with. */
export function abortError(): DOMException {
  return new DOMException('The computation was cancelled because its input changed.', 'AbortError');
}

/** True for the rejection of a cancelled computation (ignore it: a newer one is on its way). */
export function isAbortError(e: unknown): boolean {
  return (e as { name?: unknown } | null)?.name === 'AbortError';
}

function errorFrom(f: ComputeFailure): Error {
  if (f.name === 'InputError' && f.field !== undefined) return new InputError(f.field, f.message);
  const e = new Error(`The computation failed: ${f.message}`);
  e.name = f.name === 'InputError' ? 'Error' : f.name;
  return e;
}

function startComputeWorker(): WorkerLike {
  // This exact form lets the build bundle the worker as its own chunk.
  return new Worker(new URL('./compute.worker.ts', import.meta.url), { type: 'module', name: 'shearfield-compute' });
}

export class ComputeBridge {
  /** How many workers this bridge has started (a fresh one after each abort of a running call). */
  workersStarted = 0;
  private worker: WorkerLike | undefined;
  private remote: Remote<RemoteApi> | undefined;
  private readonly queue: Job[] = [];
  private running: Job | undefined;

  /** `spawn` starts a worker; the default starts the app's compute worker. */
  constructor(private readonly spawn: () => WorkerLike = startComputeWorker) {}

  /** Queues a call of `method` with `args`; rejects with an AbortError when `signal` aborts first. */
  call<K extends Method>(method: K, args: Parameters<ComputeApi[K]>, signal?: AbortSignal): Promise<ValueOf<K>> {
    return new Promise<ValueOf<K>>((resolve, reject) => {
      if (signal?.aborted) {
        reject(abortError());
        return;
      }
      const job: Job = { method, args, signal, resolve: resolve as (v: never) => void, reject };
      if (signal) {
        job.onAbort = () => this.abort(job);
        signal.addEventListener('abort', job.onAbort, { once: true });
      }
      this.queue.push(job);
      this.pump();
    });
  }

  /** Calls waiting behind the running one. */
  get pending(): number {
    return this.queue.length;
  }

  /** Stops the worker and rejects every queued and running call with an AbortError. */
  terminate(): void {
    const jobs = [...(this.running ? [this.running] : []), ...this.queue.splice(0)];
    this.running = undefined;
    this.stopWorker();
    for (const job of jobs) this.settle(job, () => job.reject(abortError()));
  }

  private pump(): void {
    if (this.running || this.queue.length === 0) return;
    const job = this.queue.shift()!;
    this.running = job;
    let remote: Remote<RemoteApi>;
    try {
      remote = this.ensureWorker();
    } catch (e) {
      this.running = undefined;
      const why = e instanceof Error ? e.message : String(e);
      this.settle(job, () => job.reject(new Error(`The compute worker could not start (${why}).`)));
      this.pump();
      return;
    }
    const fn = remote[job.method] as unknown as (...args: unknown[]) => Promise<ComputeOutcome<unknown>>;
    fn(...job.args).then(
      (outcome) => this.finish(job, outcome),
      (e: unknown) =>
        this.finish(job, {
          ok: false,
          name: (e as { name?: string } | null)?.name ?? 'Error',
          message: e instanceof Error ? e.message : String(e),
        }),
    );
  }

  private finish(job: Job, outcome: ComputeOutcome<unknown>): void {
    if (this.running !== job) return; // aborted or crashed meanwhile: its answer is stale
    this.running = undefined;
    this.settle(job, () => (outcome.ok ? job.resolve(outcome.value as never) : job.reject(errorFrom(outcome))));
    this.pump();
  }

  private abort(job: Job): void {
    const i = this.queue.indexOf(job);
    if (i >= 0) {
      this.queue.splice(i, 1);
      this.settle(job, () => job.reject(abortError()));
      return;
    }
    if (this.running === job) {
      this.running = undefined;
      this.stopWorker(); // the only way to stop a pure-JS loop
      this.settle(job, () => job.reject(abortError()));
      this.pump();
    }
  }

  private settle(job: Job, how: () => void): void {
    if (job.signal && job.onAbort) job.signal.removeEventListener('abort', job.onAbort);
    how();
  }

  private ensureWorker(): Remote<RemoteApi> {
    if (this.remote) return this.remote;
    const worker = this.spawn();
    this.workersStarted++;
    worker.addEventListener('error', this.onCrash);
    worker.addEventListener('messageerror', this.onCrash);
    this.worker = worker;
    this.remote = wrap<RemoteApi>(worker);
    return this.remote;
  }

  private stopWorker(): void {
    const worker = this.worker;
    this.worker = undefined;
    this.remote = undefined;
    if (!worker) return;
    worker.removeEventListener('error', this.onCrash);
    worker.removeEventListener('messageerror', this.onCrash);
    worker.terminate();
  }

  private readonly onCrash = (event: Event): void => {
    const detail = (event as ErrorEvent).message;
    const job = this.running;
    this.running = undefined;
    this.stopWorker();
    if (job) {
      const why = detail ? ` (${detail})` : '';
      this.settle(job, () =>
        job.reject(new Error(`The compute worker stopped unexpectedly${why}, so the computation did not finish. Try again.`)),
      );
    }
    this.pump();
  };
}

let shared: ComputeBridge | undefined;

/** The app's one bridge (created on first use; the worker starts on the first call). */
export function computeBridge(): ComputeBridge {
  shared ??= new ComputeBridge();
  return shared;
}

/**
 * Love-wave dispersion curves of `model` at `frequencies` (Hz), per mode
 * as Float64Array columns (core/dispersion/curve.ts loveCurves), with each mode's cutoff
 * frequency. Bad input rejects with an InputError naming the field.
 */
export function computeCurves(
  model: LayeredModel,
  frequencies: ArrayLike<number>,
  options: CurveOptions = {},
  signal?: AbortSignal,
): Promise<CurvesResult> {
  const f = frequencies instanceof Float64Array ? frequencies : Float64Array.from(frequencies);
  return computeBridge().call('curves', [model, f, options], signal);
}

/**
 * The layer-thickness estimate (core/estimate/estimate.ts estimateLayer) off the
 * main thread: thickness and speeds with 68/95 % intervals, alternatives,
 * misfit map (Float64Array columns), diagnostics and the caution. Bad picks
 * or options reject with an InputError naming the field (picks named by
 * `options.pickLabels`, e.g. "row 3").
 */
export function computeEstimate(
  picks: readonly Pick[],
  options: WorkerEstimateOptions = {},
  signal?: AbortSignal,
): Promise<EstimateResult> {
  return computeBridge().call('estimate', [picks, options], signal);
}

/**
 * A fine χ² slice around an estimate's best fit (core/estimate/misfit-slice.ts), for
 * the trade-off picture; same picks and options as the estimate.
 */
export function computeMisfitSlice(
  picks: readonly Pick[],
  options: WorkerEstimateOptions,
  centre: SliceCentre,
  sliceOptions: MisfitSliceOptions = {},
  signal?: AbortSignal,
): Promise<MisfitSlice> {
  return computeBridge().call('misfitSlice', [picks, options, centre, sliceOptions], signal);
}

/**
 * The layered estimate (core/profile) off the UI thread, with progress:
 * `onProgress(fraction)` runs on the page as the worker reports (0–1).
 * Abort `signal` to cancel: the running worker is stopped.
 */
export function computeProfile(
  picks: readonly Pick[],
  options: WorkerProfileOptions = {},
  onProgress?: (fraction: number) => void,
  signal?: AbortSignal,
): Promise<ProfileResult> {
  return computeBridge().call('profile', [picks, options, onProgress ? proxy(onProgress) : undefined], signal);
}

/**
 * Reads a seismograph file in the worker (core/recordings/read.ts), with the
 * crew's geometry overrides; `bytes` null gives the invented demo record.
 * The bytes are copied and the copy transferred, so the caller keeps its own.
 */
export function computeReadRecord(bytes: Uint8Array | null, name: string, overrides: GeometryOverrides = {}, signal?: AbortSignal): Promise<Recording> {
  const arg = bytes === null ? null : (() => {
    const copy = bytes.slice();
    return transfer(copy, [copy.buffer]);
  })();
  return computeBridge().call('readRecord', [arg, name, overrides], signal);
}

/** A dispersion image of a gather in the worker (core/signal); its columns come back transferred. */
export function computeImage(gather: Gather, options: WorkerImageOptions, signal?: AbortSignal): Promise<DispersionImage> {
  return computeBridge().call('dispersionImage', [gather, options], signal);
}

/** The ridge through a tapped point of an image, in the worker (core/signal/ridge.ts). */
export function computeRidge(image: DispersionImage, tap: { frequency: number; velocity: number }, signal?: AbortSignal): Promise<Ridge> {
  return computeBridge().call('followRidge', [image, tap], signal);
}

/**
 * A layered model's curves (Love and/or Rayleigh) on `request.band`, its
 * misfit against the picks and its site figures, in the worker
 * (model-trial.ts). Bad models reject with an InputError naming the field.
 */
export function computeModelTrial(model: LayeredModel, request: TrialRequest, signal?: AbortSignal): Promise<TrialResult> {
  return computeBridge().call('modelTrial', [model, request], signal);
}

/** Site figures of a layered model (core/site/site.ts siteFigures). */
export function computeSiteFigures(model: LayeredModel, options: SiteOptions = {}, signal?: AbortSignal): Promise<SiteFigures> {
  return computeBridge().call('siteFigures', [model, options], signal);
}

/** Site figures of one layer over a half-space with uncertainty ranges (core/site/site.ts siteFiguresForRanges). */
export function computeSiteFiguresForRanges(
  best: TwoLayerBest,
  ranges: TwoLayerRanges,
  options: SiteOptions = {},
  signal?: AbortSignal,
): Promise<SiteFigures> {
  return computeBridge().call('siteFiguresForRanges', [best, ranges, options], signal);
}

/**
 * Hands out one AbortSignal at a time: taking a new one aborts the last,
 * so a newer input cancels the stale computation.
 *
 *   const latest = new LatestOnly();
 *   computeCurves(model, f, {}, latest.next()).then(draw, (e) => isAbortError(e) || show(e));
 */
export class LatestOnly {
  private controller: AbortController | undefined;

  /** Aborts the previous signal (if any) and returns a fresh one. */
  next(): AbortSignal {
    this.controller?.abort();
    this.controller = new AbortController();
    return this.controller.signal;
  }

  /** Aborts the current signal, if any. */
  cancel(): void {
    this.controller?.abort();
    this.controller = undefined;
  }
}

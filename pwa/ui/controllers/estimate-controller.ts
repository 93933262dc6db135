/**
 * Estimate runs of the open site (the `estimate` slice of the state): a run
 * starts a short pause after the last change, a new input aborts the stale
 * run (one AbortController per run), a finished estimate is kept with its
 * site, and the fine misfit slice follows on the same signal.
 */
import { nextRevision, type EstimateSettings } from '../../../core/exchange/records';
import { estimateSummary } from '../../../core/estimate/estimate-json';
import type { EstimateResult } from '../../../core/estimate/estimate';
import type { MisfitSlice } from '../../../core/estimate/misfit-slice';
import type { Pick } from '../../../core/picks/picks';
import { newEstimate, pickOf } from '../../store';
import { runEstimate, runMisfitSlice, type EstimateOutcome } from './compute';
import { messageOf, type StateHub } from './state-hub';

/** Delay before an estimate starts after the last change, ms (lets a burst of edits settle). */
const ESTIMATE_DELAY_MS = 250;

/** How the app runs the estimate (the worker bridge in the app; tests may pass their own). */
export type EstimateRunner = (picks: readonly Pick[], settings: EstimateSettings, signal: AbortSignal) => Promise<EstimateOutcome>;
/** How the app asks for the fine misfit picture after an estimate. */
export type SliceRunner = (
  picks: readonly Pick[],
  settings: EstimateSettings,
  result: EstimateOutcome,
  signal: AbortSignal,
) => Promise<MisfitSlice>;

export class EstimateController {
  private abortRun?: AbortController;
  private timer?: ReturnType<typeof setTimeout>;
  /** The chain of estimate saves (one at a time). */
  private keeping: Promise<void> = Promise.resolve();

  constructor(
    private readonly hub: StateHub,
    private readonly estimate: EstimateRunner = runEstimate,
    private readonly slice: SliceRunner = runMisfitSlice,
  ) {}

  /** Aborts the running estimate (a site opens or closes); its answer is dropped. */
  abort(): void {
    this.abortRun?.abort();
  }

  /** Starts a fresh estimate after a short pause; any running one is aborted. */
  scheduleEstimate(): void {
    clearTimeout(this.timer);
    this.abortRun?.abort();
    const s = this.hub.current;
    // The shown result no longer matches the input: say so at once.
    if (s.openSiteId) this.hub.set({ estimate: { ...s.estimate, status: 'running', error: undefined } });
    this.timer = setTimeout(() => void this.estimateNow(), ESTIMATE_DELAY_MS);
  }

  /** Runs the estimate of the open site in the worker now. */
  async estimateNow(): Promise<void> {
    const site = this.hub.openSite();
    if (!site) return;
    this.abortRun?.abort();
    const abort = new AbortController();
    this.abortRun = abort;
    const picks = this.hub.current.picks.map(pickOf);
    this.hub.set({ estimate: { ...this.hub.current.estimate, status: 'running', error: undefined } });
    try {
      const result = await this.estimate(picks, site.settings, abort.signal);
      if (abort.signal.aborted) return;
      this.hub.set({ estimate: { status: 'done', result } });
      this.keepEstimate(site.id, site.settings, result);
      // Then the close-up picture of the misfit; the same signal drops it when the input changes.
      try {
        const slice = await this.slice(picks, site.settings, result, abort.signal);
        if (!abort.signal.aborted) this.hub.set({ estimate: { ...this.hub.current.estimate, slice } });
      } catch {
        // The coarse map of the result still shows; nothing to tell the crew.
      }
    } catch (e) {
      if (abort.signal.aborted || (e as { name?: string })?.name === 'AbortError') return;
      this.hub.set({ estimate: { status: 'error', error: messageOf(e) } });
    }
  }

  /**
   * Keeps a finished estimate with its site (one estimate record per site,
   * a new revision when the result or its settings change), so that sync and
   * bundles carry it. Saves run one after another.
   */
  private keepEstimate(siteId: string, settings: EstimateSettings, result: EstimateResult): void {
    this.keeping = this.keeping.then(async () => {
      const store = this.hub.store;
      if (!store) return;
      try {
        const summary = estimateSummary(result);
        const prior = await store.latestEstimate(siteId);
        if (prior && sameJson(prior.summary, summary) && sameJson(prior.settings, settings)) return;
        const now = new Date();
        await store.saveEstimate(
          prior
            ? nextRevision(prior, { settings, summary, computedAt: now.toISOString() }, now)
            : newEstimate(siteId, settings, summary, now),
        );
      } catch (e) {
        this.hub.notify('error', `The estimate was computed but not kept on this device: ${messageOf(e)}`);
      }
    });
  }
}

/** Whether two JSON-safe values are the same (key order as written). */
function sameJson(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

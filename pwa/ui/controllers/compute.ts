/**
 * The UI's door to the compute worker (pwa/worker/bridge.ts): the estimate
 * runs off the main thread and every call carries the AbortSignal of the
 * input it answers, so a newer input aborts it.
 */
import type { EstimateResult } from '../../../core/estimate/estimate';
import type { Pick } from '../../../core/picks/picks';
import type { EstimateSettings } from '../../../core/exchange/records';
import type { MisfitSlice } from '../../../core/estimate/misfit-slice';
import { computeEstimate, computeMisfitSlice, type WorkerEstimateOptions } from '../../worker/bridge';

/** What the estimate view shows: the core's result as it comes back from the worker. */
export type EstimateOutcome = EstimateResult;

/** The settings form's words for each option, so worker messages name the fields as the crew sees them. */
const FIELD_LABELS: WorkerEstimateOptions['fieldLabels'] = {
  vs1: 'Known layer shear speed β1',
  vs2: 'Known half-space shear speed β2',
  density1: 'Layer density ρ1',
  density2: 'Half-space density ρ2',
  vs1Range: 'The β1 search range',
  vs2Range: 'The β2 search range',
  thicknessRange: 'The thickness search range',
  picks: 'The picks',
};

/** The estimate options of a site's settings. */
export function estimateOptions(settings: EstimateSettings, pickCount: number): WorkerEstimateOptions {
  const o: WorkerEstimateOptions = {
    fieldLabels: FIELD_LABELS,
    pickLabels: Array.from({ length: pickCount }, (_, i) => `pick ${i + 1}`),
  };
  if (settings.vs1 !== undefined) o.vs1 = settings.vs1;
  if (settings.vs2 !== undefined) o.vs2 = settings.vs2;
  if (settings.density1 !== undefined) o.density1 = settings.density1;
  if (settings.density2 !== undefined) o.density2 = settings.density2;
  if (settings.vs1Range && settings.vs1 === undefined) o.vs1Range = settings.vs1Range;
  if (settings.vs2Range && settings.vs2 === undefined) o.vs2Range = settings.vs2Range;
  if (settings.thicknessRange) o.thicknessRange = settings.thicknessRange;
  return o;
}

/** Runs the estimate in the worker; rejects with an AbortError when `signal` aborts. */
export function runEstimate(picks: readonly Pick[], settings: EstimateSettings, signal: AbortSignal): Promise<EstimateOutcome> {
  return computeEstimate(picks, estimateOptions(settings, picks.length), signal);
}

/** The fine misfit slice around a result's best fit, in the worker (same picks and settings as the estimate). */
export function runMisfitSlice(
  picks: readonly Pick[],
  settings: EstimateSettings,
  result: EstimateOutcome,
  signal: AbortSignal,
): Promise<MisfitSlice> {
  const centre = { thickness: result.thickness, vs1: result.vs1, vs2: result.vs2, searchRange: result.searchRange };
  return computeMisfitSlice(picks, estimateOptions(settings, picks.length), centre, {}, signal);
}

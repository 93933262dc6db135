/**
 * The verdict on a thickness estimate: one short word and one plain
 * sentence that a crew reads before leaving the site.
 *
 * Levels (our own naming):
 *  - `resolved`: the 95 % interval is closed on both sides, the best
 *    thickness lies within the cautious depth of investigation (λ_max/3),
 *    the fit is testable and not poor, one minimum, no pick that looks like
 *    another mode, and the 95 % interval is no wider than half the best
 *    value (WIDE_INTERVAL_FRACTION).
 *  - `rough`: resolved in the sense below, but one of those conditions
 *    fails: the number is usable only as a rough figure.
 *  - `unresolved`: the picks do not resolve the thickness: its 95 %
 *    interval runs into the search range on either side, or the best
 *    thickness is deeper than half the longest picked wavelength (the
 *    optimistic depth of investigation, λ_max/2).
 *
 * The depth rules (λ_max/2 optimistic, λ_max/3 cautious; the lowest
 * frequency that carries a wavelength on the best model) are common
 * practice, shared/PHYSICS.md §8, computed in core/site/survey.ts. The
 * interval-width rule is our own rule of thumb, not a published one.
 *
 * The sentence contains the words "not resolved" exactly when the level is
 * `unresolved`; it says what is known (for example "more than 4.2 m") and the
 * one thing to do before leaving (the lowest frequency, wavelength and
 * spread needed, or another change). Pure; no solver of its own beyond
 * survey.ts's root finder.
 */
import type { TwoLayer } from '../dispersion/love-layer';
import { DEPTH_FRACTION_CAUTIOUS, frequencyForWavelength } from '../site/survey';
import type { EstimateDiagnostics } from './estimate-diagnostics';
import type { EstimateMinimum, ParameterEstimate } from './estimate-types';

export type VerdictLevel = 'resolved' | 'rough' | 'unresolved';

/** Every level, from best to worst. */
export const VERDICT_LEVELS: readonly VerdictLevel[] = ['resolved', 'rough', 'unresolved'];

/** Why the level is not `resolved`, worst first. */
export type VerdictReason =
  | 'open-interval'
  | 'beyond-depth'
  | 'several-minima'
  | 'poor-fit'
  | 'untestable-fit'
  | 'mode-doubt'
  | 'only-optimistic-depth'
  | 'wide-interval';

/** A 95 % interval wider than this fraction of the best value makes the verdict `rough` (our own rule of thumb). */
export const WIDE_INTERVAL_FRACTION = 0.5;

export interface EstimateVerdict {
  level: VerdictLevel;
  /** One plain sentence; contains "not resolved" exactly when level is `unresolved`. */
  text: string;
  /** What is known of the thickness in a few words, e.g. "7.49 m (95 %: 7.36–7.62 m)" or "more than 4.2 m". */
  known: string;
  /** The one thing to do before leaving, as a phrase ('' when nothing). */
  action: string;
  reasons: VerdictReason[];
  /** Lowest frequency to pick down to, Hz, when that is the action; NaN otherwise. */
  lowestFrequencyHz: number;
  /** Longest wavelength to pick, m, and the spread for it, when that is the action; NaN otherwise. */
  wavelengthNeeded_m: number;
  spreadNeeded_m: number;
}

export interface VerdictInput {
  thickness: ParameterEstimate;
  diagnostics: Pick<
    EstimateDiagnostics,
    'fit' | 'thicknessResolved' | 'resolvedDepth' | 'longestWavelength' | 'shortestWavelength' | 'betterMode' | 'belowCutoff'
  >;
  alternatives: readonly EstimateMinimum[];
  /** The best model, for the frequency that carries a wavelength. */
  model: TwoLayer;
}

/** Three significant figures, whole numbers from 100 up (as the diagnostics print). */
export function verdictNumber(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  const a = Math.abs(x);
  if (a >= 100) return x.toFixed(0);
  return String(Number(x.toPrecision(3)));
}

const fmt = verdictNumber;

interface DeepAdvice {
  action: string;
  frequency: number;
  wavelength: number;
  spread: number;
}

/** Pick down to the wavelength that sees depth z on the cautious rule (λ = 3z), on a spread at least that long. */
function deepAdvice(z: number, model: TwoLayer): DeepAdvice {
  const wavelength = z / DEPTH_FRACTION_CAUTIOUS;
  const f = frequencyForWavelength(model, wavelength);
  const spread = wavelength;
  const fText = Number.isFinite(f) ? `pick down to about ${fmt(f)} Hz or lower (wavelengths up to ${fmt(wavelength)} m)` : `pick wavelengths up to ${fmt(wavelength)} m`;
  return { action: `${fText} on a spread of at least ${fmt(spread)} m`, frequency: f, wavelength, spread };
}

/** The verdict on an estimate's thickness. */
export function estimateVerdict(input: VerdictInput): EstimateVerdict {
  const { thickness: h, diagnostics: d, model } = input;
  const reasons: VerdictReason[] = [];
  const finite = Number.isFinite(h.best) && Number.isFinite(h.low95) && Number.isFinite(h.high95);
  if (h.openLow || h.openHigh || !finite) reasons.push('open-interval');
  if (!d.thicknessResolved) reasons.push('beyond-depth');
  const unresolved = reasons.length > 0;
  if (input.alternatives.length > 1) reasons.push('several-minima');
  if (d.fit === 'poor') reasons.push('poor-fit');
  if (d.fit === 'untestable') reasons.push('untestable-fit');
  if (d.betterMode.length > 0 || d.belowCutoff.length > 0) reasons.push('mode-doubt');
  if (d.thicknessResolved && h.best > d.longestWavelength * DEPTH_FRACTION_CAUTIOUS) reasons.push('only-optimistic-depth');
  if (finite && h.high95 - h.low95 > WIDE_INTERVAL_FRACTION * h.best) reasons.push('wide-interval');

  let frequency = NaN;
  let wavelength = NaN;
  let spread = NaN;
  const useDeep = (z: number): string => {
    if (!(z > 0 && z <= 1000)) return 'pick lower frequencies (longer wavelengths) on a longer spread';
    const a = deepAdvice(z, model);
    frequency = a.frequency;
    wavelength = a.wavelength;
    spread = a.spread;
    return a.action;
  };

  if (unresolved) {
    // What is known, as a clause of the sentence and as a few words.
    let clause: string;
    let known: string;
    if (!finite) {
      clause = 'its thickness is unknown';
      known = 'unknown';
    } else if (h.openLow && h.openHigh) {
      clause = `the layer could be anywhere from ${fmt(h.low95)} to ${fmt(h.high95)} m thick (the whole search range)`;
      known = `anywhere in ${fmt(h.low95)}–${fmt(h.high95)} m`;
    } else if (h.openHigh) {
      clause = `the layer is more than ${fmt(h.low95)} m thick`;
      known = `more than ${fmt(h.low95)} m`;
    } else if (h.openLow) {
      clause = `the layer is less than ${fmt(h.high95)} m thick`;
      known = `less than ${fmt(h.high95)} m`;
    } else {
      clause = `the 95 % range ${fmt(h.low95)}–${fmt(h.high95)} m relies on ground below what the picks see`;
      known = `${fmt(h.low95)}–${fmt(h.high95)} m, below what the picks see`;
    }
    let action: string;
    if (h.openHigh || !d.thicknessResolved || !finite) {
      // The target: the best thickness, the lower bound when that is deeper, and at least what is seen now.
      const z = Math.max(Number.isFinite(h.best) ? h.best : 0, h.openHigh && !h.openLow ? h.low95 : 0, d.resolvedDepth);
      action = useDeep(z);
    } else {
      action =
        `pick higher frequencies, with wavelengths shorter than the shortest so far (${fmt(d.shortestWavelength)} m), ` +
        `on receivers less than ${fmt(d.shortestWavelength / 2)} m apart (spacing at most half the shortest wavelength, common practice)`;
    }
    const seen = d.resolvedDepth > 0 && Number.isFinite(d.resolvedDepth) ? `the picks see only about ${fmt(d.resolvedDepth)} m deep, and ` : '';
    return {
      level: 'unresolved',
      text: `Layer thickness not resolved: ${seen}${clause}; before leaving, ${action}.`,
      known,
      action,
      reasons,
      lowestFrequencyHz: frequency,
      wavelengthNeeded_m: wavelength,
      spreadNeeded_m: spread,
    };
  }

  const known = `${fmt(h.best)} m (95 %: ${fmt(h.low95)}–${fmt(h.high95)} m)`;
  if (reasons.length === 0) {
    return {
      level: 'resolved',
      text: `Layer thickness resolved: ${fmt(h.best)} m, 95 % range ${fmt(h.low95)}–${fmt(h.high95)} m.`,
      known,
      action: '',
      reasons,
      lowestFrequencyHz: NaN,
      wavelengthNeeded_m: NaN,
      spreadNeeded_m: NaN,
    };
  }

  // Rough: say the main reason and its remedy.
  const main = reasons[0];
  let why: string;
  let action: string;
  switch (main) {
    case 'several-minima':
      why = `the picks fit ${input.alternatives.length} separate models`;
      action = 'add phase-velocity picks or picks on both sides of the group-velocity minimum to tell them apart';
      break;
    case 'poor-fit':
      why = 'the picks scatter more than their standard deviations allow';
      action = 'check the flagged picks, their modes and their standard deviations';
      break;
    case 'untestable-fit':
      why = 'there are too few picks to test the fit';
      action = 'add picks';
      break;
    case 'mode-doubt':
      why = 'some picks may be on another mode';
      action = 'check the mode numbers of the flagged picks';
      break;
    case 'only-optimistic-depth':
      why = `the layer lies deeper than the cautious depth of investigation (about ${fmt(d.longestWavelength * DEPTH_FRACTION_CAUTIOUS)} m)`;
      action = useDeep(h.high95);
      break;
    default:
      why = 'the 95 % range is wide';
      if (d.shortestWavelength > 2 * h.best) {
        // Every pick is long against the layer: shorter wavelengths sample the layer itself (λ ≈ 2H sees depth H, common practice).
        action = `add higher-frequency picks, with wavelengths down to about ${fmt(2 * h.best)} m, which sample the layer itself`;
      } else {
        action = `add picks, especially at lower frequencies: ${useDeep(h.high95)}`;
      }
  }
  return {
    level: 'rough',
    text: `Layer thickness only roughly known: ${fmt(h.best)} m, 95 % range ${fmt(h.low95)}–${fmt(h.high95)} m, because ${why}; before leaving, ${action}.`,
    known,
    action,
    reasons,
    lowestFrequencyHz: frequency,
    wavelengthNeeded_m: wavelength,
    spreadNeeded_m: spread,
  };
}

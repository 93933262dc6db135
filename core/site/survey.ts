/**
 * Survey advice: what a spread and source must reach to see a target depth.
 *
 * Every rule here is common practice for surface-wave surveys, not a
 * published standard (shared/PHYSICS.md §8). The advice says so wherever it
 * is shown.
 *
 *  - Depth of investigation ≈ λ_max/2 (optimistic) to λ_max/3 (cautious),
 *    with λ = c/f the longest reliable wavelength. So a target depth z needs
 *    λ_max ≥ 2z at the least, 3z to be safe.
 *  - Spread length L ≥ z; measured phase velocities are reliable for λ ≤ L
 *    and degraded beyond about 2L. We advise L ≥ λ_max (the safe wavelength).
 *  - Source offset 0.25–0.5 L (surface waves need about half a wavelength
 *    to develop).
 *  - Receiver spacing ≤ λ_min/2, against spatial aliasing.
 *
 * The lowest frequency that carries wavelength λ on the fundamental mode
 * solves c(f)/f = λ. c(f)/f falls strictly with f, and c lies in (β1, β2),
 * so the root lies in [β1/λ, β2/λ]; Brent's method (roots.ts) refines it on
 * the closed-form phase velocity (love-layer.ts). Units: SI.
 */
import { InputError } from '../shared/errors';
import { lovePhaseVelocity, type TwoLayer } from '../dispersion/love-layer';
import type { PickKind } from '../picks/picks';
import { brent } from '../numeric/roots';

/** Depth of investigation as a fraction of the longest wavelength (common practice). */
export const DEPTH_FRACTION_OPTIMISTIC = 1 / 2;
export const DEPTH_FRACTION_CAUTIOUS = 1 / 3;
/** Source offset as fractions of the spread length (common practice). */
export const SOURCE_OFFSET_FRACTIONS: readonly [number, number] = [0.25, 0.5];

/** The label that travels with every piece of advice. */
export const SURVEY_PRACTICE_NOTE =
  'These are common-practice rules of thumb for surface-wave surveys, not a published standard.';

export interface SurveyInput {
  /** Depth the survey must see, m (> 0). */
  targetDepth: number;
  /**
   * The current estimate of the ground, for the velocity at long wavelength.
   * Without it the lowest frequency is given as a range from the speed bounds.
   */
  model?: TwoLayer;
  /** Picked wavelengths so far, m (c/f of each pick); may be empty. */
  pickedWavelengths?: ArrayLike<number>;
}

export interface SurveyAdvice {
  targetDepth: number;
  /** Longest wavelength needed, m: [optimistic 2z, cautious 3z]. */
  wavelength: [number, number];
  /**
   * Lowest frequency needed, Hz, for the cautious and optimistic
   * wavelengths [for 3z, for 2z]; NaN when no model was given.
   */
  lowestFrequency: [number, number];
  /** Spread length, m: [at least z, advised = cautious wavelength]. */
  spreadLength: [number, number];
  /** Source offset from the first receiver, m, for the advised spread. */
  sourceOffset: [number, number];
  /** Depth the picks so far can see, m: [cautious, optimistic]; NaN without picks. */
  reachedDepth: [number, number];
  /** Longest and shortest picked wavelength, m; NaN without picks. */
  pickedLongest: number;
  pickedShortest: number;
  /** Largest receiver spacing for the shortest picked wavelength, m; NaN without picks. */
  receiverSpacing: number;
  /** Whether the picks reach the target with the optimistic rule. */
  reaches: boolean;
  /** Plain sentences: what to change before leaving the site, if anything. */
  actions: string[];
  note: string;
}

/**
 * Lowest frequency, Hz, whose fundamental-mode wavelength is at least
 * `wavelength` m in the model; NaN when the model cannot carry it.
 */
export function frequencyForWavelength(model: TwoLayer, wavelength: number): number {
  if (!(wavelength > 0)) return NaN;
  const g = (f: number) => lovePhaseVelocity(model, f, 0) - wavelength * f;
  const lo = model.vs1 / wavelength;
  const hi = model.vs2 / wavelength;
  const r = brent(g, lo * (1 + 1e-12), hi * (1 - 1e-12), undefined, undefined, { rtol: 1e-10 });
  return r.status === 'converged' ? r.x : NaN;
}

/** The fields of a pick that fix its wavelength. */
export interface WavelengthPick {
  frequency: number;
  velocity: number;
  kind: PickKind;
  mode: number;
}

/**
 * Each pick's wavelength λ = c/f, m, with c the phase velocity: the pick's
 * own for a phase pick; for a group pick, the model's phase velocity of the
 * pick's mode at its frequency (the way the estimate's depth check counts
 * it), or, without a model or below the mode's cutoff, the group velocity
 * itself as an approximation.
 */
export function pickWavelengths(picks: readonly WavelengthPick[], model?: TwoLayer): Float64Array {
  const out = new Float64Array(picks.length);
  picks.forEach((p, i) => {
    let c = p.velocity;
    if (p.kind === 'group' && model) {
      const phase = lovePhaseVelocity(model, p.frequency, p.mode);
      if (Number.isFinite(phase)) c = phase;
    }
    out[i] = c / p.frequency;
  });
  return out;
}

function round(x: number, digits: number): string {
  if (!Number.isFinite(x)) return '—';
  return x >= 100 ? x.toFixed(0) : String(Number(x.toPrecision(digits)));
}

/** The advice for a target depth, from the estimate and the picks so far. */
export function surveyAdvice(input: SurveyInput): SurveyAdvice {
  const z = input.targetDepth;
  if (typeof z !== 'number' || !Number.isFinite(z) || !(z > 0)) {
    throw new InputError('targetDepth', 'The target depth must be a number of metres greater than 0.');
  }
  if (z > 1000) {
    throw new InputError('targetDepth', `The target depth is ${z} m; surface-wave site surveys here reach at most 1000 m.`);
  }
  const lamOpt = z / DEPTH_FRACTION_OPTIMISTIC;
  const lamSafe = z / DEPTH_FRACTION_CAUTIOUS;
  const fSafe = input.model ? frequencyForWavelength(input.model, lamSafe) : NaN;
  const fOpt = input.model ? frequencyForWavelength(input.model, lamOpt) : NaN;

  let longest = NaN;
  let shortest = NaN;
  const waves = input.pickedWavelengths ?? [];
  for (let i = 0; i < waves.length; i++) {
    const w = waves[i];
    if (!(w > 0) || !Number.isFinite(w)) continue;
    if (!(w <= longest)) longest = w;
    if (!(w >= shortest)) shortest = w;
  }
  const reached: [number, number] = [longest * DEPTH_FRACTION_CAUTIOUS, longest * DEPTH_FRACTION_OPTIMISTIC];
  const reaches = reached[1] >= z;
  const spread: [number, number] = [z, lamSafe];
  const offset: [number, number] = [SOURCE_OFFSET_FRACTIONS[0] * lamSafe, SOURCE_OFFSET_FRACTIONS[1] * lamSafe];

  const actions: string[] = [];
  if (!(longest > 0)) {
    actions.push(`No picks yet: record down to wavelengths of ${round(lamSafe, 3)} m to see ${round(z, 3)} m deep.`);
  } else if (!reaches) {
    const fText = Number.isFinite(fSafe) ? ` (about ${round(fSafe, 3)} Hz or lower on the current estimate)` : '';
    actions.push(
      `The longest picked wavelength is ${round(longest, 3)} m, which sees about ${round(reached[0], 3)}–${round(reached[1], 3)} m deep, short of the ${round(z, 3)} m target.`,
      `Pick wavelengths up to ${round(lamSafe, 3)} m${fText} before leaving the site.`,
      `Lengthen the spread to at least ${round(lamSafe, 3)} m and move the source ${round(offset[0], 3)}–${round(offset[1], 3)} m from the first receiver; use a heavier source or longer records for the low frequencies.`,
    );
  } else if (reached[0] < z) {
    actions.push(
      `The picks reach ${round(z, 3)} m only on the optimistic rule (λ/2); wavelengths up to ${round(lamSafe, 3)} m would make it safe.`,
    );
  }
  return {
    targetDepth: z,
    wavelength: [lamOpt, lamSafe],
    lowestFrequency: [fSafe, fOpt],
    spreadLength: spread,
    sourceOffset: offset,
    reachedDepth: reached,
    pickedLongest: longest,
    pickedShortest: shortest,
    receiverSpacing: shortest / 2,
    reaches,
    actions,
    note: SURVEY_PRACTICE_NOTE,
  };
}

/**
 * A trial of a layered model against the site's picks, for the what-if of
 * N layers and for drawing a layered estimate's best fit: the model's Love
 * and/or Rayleigh curves (each wave with its own number of modes) on the
 * plot's frequency band, each pick's predicted velocity with the misfit of
 * the picks of the drawn waves, and the model's site figures with the
 * caution.
 *
 * Runs in the compute worker (compute-api.ts `modelTrial`), never on the
 * page: Rayleigh roots for several layers take tens of milliseconds or
 * more. Only core is imported here: no DOM, no IndexedDB.
 *
 * The curves come from core/dispersion/curve.ts (dispersionCurves); a pick
 * is predicted by the same solver at its own frequency, for its mode, wave
 * and kind. The misfit is χ² = Σ ((v − v_model)/sd)² over the compared picks
 * (sd as the picks' rules give it, core/picks/picks.ts effectiveSd); the
 * model is not fitted, so every pick counts as a degree of freedom and
 * √(χ²/n) is the typical miss in pick standard deviations.
 */
import { dispersionCurves, type BranchApproach, type ModeCurve, type Wave } from '../../core/dispersion/curve';
import type { LayeredModel } from '../../core/dispersion/model';
import { effectiveSd, pickWave, type Pick } from '../../core/picks/picks';
import { CAUTION } from '../../core/shared/caution';
import { siteFigures, type SiteFigures } from '../../core/site/site';

export interface TrialRequest {
  /** The plot's frequencies, Hz, ascending: every curve is computed on these. */
  band: Float64Array;
  /** The waves to draw, each with how many modes from the fundamental up. */
  waves: readonly { wave: Wave; modes: number }[];
  /** The site's picks: those of the drawn waves are compared with the model. */
  picks: readonly Pick[];
  /** Compute the model's site figures too. @default true */
  figures?: boolean;
}

/** One wave's curves on the band. */
export interface TrialCurves {
  wave: Wave;
  modes: ModeCurve[];
  /** Where two neighbouring Rayleigh modes come close (core/dispersion/curve.ts). */
  approaches: BranchApproach[];
  /** The model's warnings for this wave (e.g. a Poisson's ratio below 0). */
  warnings: string[];
  /** Roots the solver could not settle (left out of the curves). */
  failures: number;
}

/** The model against the picks of the drawn waves. */
export interface TrialFit {
  /** Picks compared. */
  n: number;
  /** Σ ((v − v_model)/sd)² over the compared picks. */
  chi2: number;
  /** √(χ²/n): the typical miss in pick standard deviations (NaN when n = 0). */
  rms: number;
  /** Picks of a drawn wave whose mode does not exist at their frequency in this model (left out of χ²). */
  missing: number;
  /** Picks of a wave that is not drawn (not compared). */
  skipped: number;
  /** Each pick's predicted velocity, m/s (NaN where not compared). */
  predicted: Float64Array;
}

export interface TrialResult {
  curves: TrialCurves[];
  fit: TrialFit;
  /** The model's site figures (absent when not asked for, or refused: then figuresError says why). */
  figures?: SiteFigures;
  figuresError?: string;
  caution: string;
}

/** Each pick's predicted velocity for the drawn waves (NaN for a pick not compared or whose mode is absent). */
function predict(model: LayeredModel, picks: readonly Pick[], waves: readonly Wave[]): { predicted: Float64Array; compared: Uint8Array } {
  const n = picks.length;
  const predicted = new Float64Array(n).fill(NaN);
  const compared = new Uint8Array(n);
  for (const wave of waves) {
    const mine: number[] = [];
    for (let i = 0; i < n; i++) if (pickWave(picks[i]) === wave) mine.push(i);
    if (mine.length === 0) continue;
    const freqs = [...new Set(mine.map((i) => picks[i].frequency))].sort((a, b) => a - b);
    const modes = Math.max(...mine.map((i) => picks[i].mode)) + 1;
    const curves = dispersionCurves(model, freqs, { wave, modes });
    // Per mode: frequency → index in that mode's columns (the curve keeps the frequencies it was given, exactly).
    const at = curves.modes.map((m) => new Map(Array.from(m.frequency, (f, j) => [f, j] as const)));
    for (const i of mine) {
      const p = picks[i];
      compared[i] = 1;
      const m = curves.modes[p.mode];
      const j = at[p.mode]?.get(p.frequency);
      if (m && j !== undefined) predicted[i] = p.kind === 'phase' ? m.phase[j] : m.group[j];
    }
  }
  return { predicted, compared };
}

/**
 * The model's curves, fit and figures. The model must be valid for the
 * drawn waves (the editor checks it with core/dispersion/model.ts first);
 * the core throws InputError otherwise.
 */
export function trialModel(model: LayeredModel, request: TrialRequest): TrialResult {
  const curves: TrialCurves[] = request.waves.map(({ wave, modes }) => {
    const c = dispersionCurves(model, request.band, { wave, modes });
    return { wave, modes: c.modes, approaches: c.approaches, warnings: c.warnings, failures: c.failures.length };
  });
  const waves = request.waves.map((w) => w.wave);
  const { predicted, compared } = predict(model, request.picks, waves);
  let chi2 = 0;
  let n = 0;
  let missing = 0;
  let skipped = 0;
  request.picks.forEach((p, i) => {
    if (!compared[i]) skipped++;
    else if (Number.isNaN(predicted[i])) missing++;
    else {
      const z = (p.velocity - predicted[i]) / effectiveSd(p);
      chi2 += z * z;
      n++;
    }
  });
  const result: TrialResult = {
    curves,
    fit: { n, chi2, rms: n > 0 ? Math.sqrt(chi2 / n) : NaN, missing, skipped, predicted },
    caution: CAUTION,
  };
  if (request.figures ?? true) {
    try {
      result.figures = siteFigures(model);
    } catch (e) {
      result.figuresError = e instanceof Error ? e.message : String(e);
    }
  }
  return result;
}

/** The buffers of a trial's columns (to transfer, not copy). */
export function trialBuffers(r: TrialResult): ArrayBufferLike[] {
  return [r.fit.predicted.buffer, ...r.curves.flatMap((c) => c.modes.flatMap((m) => [m.frequency.buffer, m.period.buffer, m.phase.buffer, m.group.buffer]))];
}

/**
 * Plain-word diagnostics for a layer-thickness estimate (estimate.ts).
 *
 * What it checks at the best model, each as a sentence and as data (the
 * sentences are ordered by consequence, CONSEQUENCE below: what makes the
 * answer unusable first, notes on defaults last):
 *  - χ²/dof against the χ² distribution's 5 % and 95 % points
 *    (Wilson–Hilferty approximation, below);
 *  - picks that used the default standard deviation (common practice);
 *  - default densities (common practice);
 *  - picks with residuals over 3σ, named;
 *  - picks that another mode of the best model fits much better;
 *  - picks outside the model's trapping range (phase velocity outside
 *    (β1, β2), group velocity above β2 or below the mode's Airy minimum,
 *    each by more than 3 of the pick's sd, common practice) or
 *    below their mode's cutoff (Aki & Richards, 2nd ed. 2002, §7.2);
 *  - several separate minima;
 *  - parameters whose 95 % interval runs into the search range;
 *  - a thickness deeper than half the longest picked wavelength, with what
 *    wavelength, frequency and spread would resolve it (common practice,
 *    shared/PHYSICS.md §8; survey.ts).
 *
 * Units: SI. Pure; no solver of its own beyond the closed forms.
 */
import { buildDimensionlessTable } from '../dispersion/love-dimensionless-table';
import { loveCutoffHz, loveModeCount, type TwoLayer } from '../dispersion/love-layer';
import { defaultSdNote } from '../picks/picks';
import { surveyAdvice } from '../site/survey';
import type { EstimateMinimum, EstimateProblem, ParameterEstimate, PickFit } from './estimate-types';
import { predictVelocity } from './estimate-forward';

/**
 * Upper 95 % point of χ² with `dof` degrees of freedom, by the
 * Wilson–Hilferty cube-root approximation (Wilson & Hilferty 1931, PNAS
 * 17:684); relative error below 1 % for dof ≥ 3, adequate for a warning.
 */
export function chi2Upper95(dof: number): number {
  const z = 1.6448536269514722;
  const a = 2 / (9 * dof);
  return dof * Math.pow(1 - a + z * Math.sqrt(a), 3);
}
/** Lower 5 % point of χ² (Wilson–Hilferty, as above). */
export function chi2Lower05(dof: number): number {
  const z = -1.6448536269514722;
  const a = 2 / (9 * dof);
  return dof * Math.pow(Math.max(0, 1 - a + z * Math.sqrt(a)), 3);
}

/** Residual beyond which a pick is named as an outlier, in standard deviations. */
export const OUTLIER_SIGMA = 3;

/**
 * Rank of each finding, worst first: a thickness the picks cannot see or
 * bound makes the answer unusable; several models or a poor fit make it
 * doubtful; a doubtful pick may move it; the rest are notes.
 */
export const CONSEQUENCE = {
  beyondDepth: 0,
  thicknessOpen: 1,
  severalMinima: 2,
  poorFit: 3,
  untestableFit: 3,
  modeDoubt: 4,
  outlier: 5,
  outsideTrapping: 6,
  speedOpen: 7,
  tooGoodFit: 8,
  consistentFit: 9,
  defaults: 10,
} as const;

export interface PickNote {
  /** Pick index (input order). */
  index: number;
  label: string;
}

export interface EstimateDiagnostics {
  /** Every finding below as a plain sentence, worst first (CONSEQUENCE). */
  sentences: string[];
  /** 'consistent' | 'poor' (χ² above its 95 % point) | 'too-good' (below its 5 % point) | 'untestable' (dof = 0). */
  fit: 'consistent' | 'poor' | 'too-good' | 'untestable';
  /**
   * The fit's statistics behind the plain sentence, for the detail line (the
   * sentences themselves carry no χ²): "χ²/dof = 1.2 (χ² = 12 with 10 degrees
   * of freedom; between its 5 % point 3.94 and 95 % point 18.3)".
   */
  fitDetail: string;
  outliers: Array<PickNote & { normalised: number }>;
  betterMode: Array<PickNote & { mode: number; normalised: number; ownNormalised: number }>;
  outsideTrapping: Array<PickNote & { reason: string }>;
  belowCutoff: Array<PickNote & { cutoffHz: number }>;
  unconstrained: Array<{ parameter: 'thickness' | 'vs1' | 'vs2'; side: 'low' | 'high' | 'both' }>;
  /**
   * Longest picked wavelength λ = c/f, m (c: the pick's phase velocity, or for
   * a group pick the best model's phase velocity), and the depth it resolves
   * (λ/2, common practice).
   */
  longestWavelength: number;
  /** Shortest picked wavelength, m (same rule). */
  shortestWavelength: number;
  resolvedDepth: number;
  /** False when the best thickness is deeper than resolvedDepth. */
  thicknessResolved: boolean;
}

export interface DiagnoseInput {
  problem: EstimateProblem;
  model: TwoLayer;
  pickFit: PickFit;
  chi2: number;
  dof: number;
  poorFit: boolean;
  scale: number;
  estimates: { thickness: ParameterEstimate; vs1: ParameterEstimate; vs2: ParameterEstimate };
  alternatives: EstimateMinimum[];
  defaultedSdCount: number;
  density1Defaulted: boolean;
  density2Defaulted: boolean;
}

function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  const a = Math.abs(x);
  if (a >= 100) return x.toFixed(0);
  return String(Number(x.toPrecision(3)));
}

function describePick(P: EstimateProblem, i: number): string {
  return `${P.labels[i]} (${fmt(P.f[i])} Hz, ${P.isPhase[i] ? 'phase' : 'group'}, mode ${P.mode[i]}, ${fmt(P.v[i])} m/s)`;
}

/** How many pick sds beyond a bound a pick must lie before it is called impossible for the model (common practice: 3σ). */
export const OUTSIDE_SDS = 3;

/**
 * Lowest group velocity of mode n (the Airy minimum), m/s: the lowest
 * sample of a dimensionless table (40 points a decade) locates it, then a
 * golden-section search on the exact closed-form group velocity between the
 * neighbouring samples refines it to about 1e-10 relative (the table's own
 * minimum overstates it by up to ~1e-3).
 */
export function airyMinimum(m: TwoLayer, mode: number): number {
  const t = buildDimensionlessTable(m.vs2 / m.vs1, m.rho2 / m.rho1, mode, Math.log(1e-3), Math.log(1e3), { pointsPerDecade: 40 });
  let min = Infinity;
  let at = -1;
  for (let i = 0; i < t.n; i++) {
    if (t.group[i] < min) {
      min = t.group[i];
      at = i;
    }
  }
  if (at < 0) return NaN;
  // x = f·H/β1, so f = x·β1/H; search ln f between the neighbours of the lowest sample.
  const lnX = (i: number) => t.lnX0 + Math.min(Math.max(i, 0), t.n - 1) / t.invStep;
  const u = (lnx: number) => {
    const v = predictVelocity(m, (Math.exp(lnx) * m.vs1) / m.h, mode, false);
    return Number.isFinite(v) ? v : Infinity;
  };
  let a = lnX(at - 1);
  let b = lnX(at + 1);
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = u(c);
  let fd = u(d);
  for (let k = 0; k < 80 && b - a > 1e-12; k++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = u(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = u(d);
    }
  }
  return Math.min(min * m.vs1, fc, fd);
}

export function diagnoseFit(input: DiagnoseInput): EstimateDiagnostics {
  const { problem: P, model: m, pickFit, chi2, dof } = input;
  const ranked: Array<{ rank: number; text: string }> = [];
  // Every sentence starts with a capital, whatever the pick labels look like ("pick 6 …" → "Pick 6 …").
  const say = (rank: number, text: string) => void ranked.push({ rank, text: text.charAt(0).toUpperCase() + text.slice(1) });

  // χ²/dof.
  // The sentences say it in plain words; the statistics go to fitDetail.
  let fit: EstimateDiagnostics['fit'];
  let fitDetail: string;
  if (dof === 0) {
    fit = 'untestable';
    fitDetail = `χ² = ${fmt(chi2)} with no degrees of freedom left`;
    say(CONSEQUENCE.untestableFit, 'There are as many picks as free parameters, so the fit cannot be tested; add picks.');
  } else {
    const hi = chi2Upper95(dof);
    const lo = chi2Lower05(dof);
    const stats = `χ²/dof = ${fmt(chi2 / dof)} (χ² = ${fmt(chi2)} with ${dof} degrees of freedom; `;
    if (chi2 > hi) {
      fit = 'poor';
      fitDetail = `${stats}above its 95 % point ${fmt(hi)}; the interval levels were scaled by ${fmt(input.scale)})`;
      say(
        CONSEQUENCE.poorFit,
        'The picks scatter more than their standard deviations allow: the standard deviations may be too small, ' +
          `a pick may be on another mode, or one layer over a half-space may be too simple; the intervals were widened to allow for it.`,
      );
    } else if (chi2 < lo) {
      fit = 'too-good';
      fitDetail = `${stats}below its 5 % point ${fmt(lo)})`;
      say(
        CONSEQUENCE.tooGoodFit,
        'The picks scatter less than their standard deviations suggest: the standard deviations may be too large, so the intervals may be too wide.',
      );
    } else {
      fit = 'consistent';
      fitDetail = `${stats}between its 5 % point ${fmt(lo)} and 95 % point ${fmt(hi)})`;
      say(CONSEQUENCE.consistentFit, "The fit is consistent with the picks' standard deviations.");
    }
  }

  if (input.defaultedSdCount > 0) say(CONSEQUENCE.defaults, defaultSdNote(input.defaultedSdCount, P.n));
  if (input.density1Defaulted || input.density2Defaulted) {
    const parts: string[] = [];
    if (input.density1Defaulted) parts.push(`${P.rho1} kg/m³ for the layer`);
    if (input.density2Defaulted) parts.push(`${P.rho2} kg/m³ for the half-space`);
    say(
      CONSEQUENCE.defaults,
      `No density was given, so the estimate used ${parts.join(' and ')} (common practice for soils and stiffer ground); Love-wave dispersion depends on density only weakly.`,
    );
  }

  // Outliers.
  const outliers: EstimateDiagnostics['outliers'] = [];
  for (let i = 0; i < P.n; i++) {
    const z = pickFit.normalised[i];
    if (Math.abs(z) > OUTLIER_SIGMA) {
      outliers.push({ index: i, label: P.labels[i], normalised: z });
      say(
        CONSEQUENCE.outlier,
        `${describePick(P, i)} misfits the best model by ${fmt(z)} standard deviations (predicted ${fmt(pickFit.predicted[i])} m/s); check the pick.`,
      );
    }
  }

  // Another mode fits better; below cutoff; trapping range.
  const betterMode: EstimateDiagnostics['betterMode'] = [];
  const belowCutoff: EstimateDiagnostics['belowCutoff'] = [];
  const outsideTrapping: EstimateDiagnostics['outsideTrapping'] = [];
  const airy = new Map<number, number>();
  for (let i = 0; i < P.n; i++) {
    const own = pickFit.normalised[i];
    const f = P.f[i];
    const modesHere = loveModeCount(m, f);
    if (P.mode[i] >= modesHere) {
      const cutoffHz = loveCutoffHz(m, P.mode[i]);
      belowCutoff.push({ index: i, label: P.labels[i], cutoffHz });
      say(
        CONSEQUENCE.modeDoubt,
        `${describePick(P, i)} lies below the cutoff of mode ${P.mode[i]} (${fmt(cutoffHz)} Hz) in the best model, so that mode does not exist there; the pick may belong to a lower mode.`,
      );
    }
    if (Math.abs(own) > 2) {
      let bestMode = -1;
      let bestZ = Infinity;
      for (let n = 0; n < Math.min(modesHere, 20); n++) {
        if (n === P.mode[i]) continue;
        const z = (P.v[i] - predictVelocity(m, f, n, P.isPhase[i] === 1)) / P.sd[i];
        if (Math.abs(z) < Math.abs(bestZ)) {
          bestZ = z;
          bestMode = n;
        }
      }
      if (bestMode >= 0 && Math.abs(bestZ) < Math.abs(own) / 2) {
        betterMode.push({ index: i, label: P.labels[i], mode: bestMode, normalised: bestZ, ownNormalised: own });
        say(
          CONSEQUENCE.modeDoubt,
          `${describePick(P, i)} fits mode ${bestMode} of the best model better (${fmt(bestZ)} σ against ${fmt(own)} σ for mode ${P.mode[i]}); check its mode number.`,
        );
      }
    }
    const v = P.v[i];
    // Only a pick more than OUTSIDE_SDS of its own sd beyond a bound is called impossible: normal noise near a bound is not.
    const margin = OUTSIDE_SDS * P.sd[i];
    let reason = '';
    if (P.isPhase[i]) {
      if (v <= m.vs1 - margin || v >= m.vs2 + margin) {
        reason = `a phase velocity must lie between the layer and half-space speeds (${fmt(m.vs1)}–${fmt(m.vs2)} m/s), and this one is more than ${OUTSIDE_SDS} sd beyond`;
      }
    } else {
      if (!airy.has(P.mode[i])) airy.set(P.mode[i], airyMinimum(m, P.mode[i]));
      const umin = airy.get(P.mode[i]) as number;
      if (v >= m.vs2 + margin) reason = `a group velocity cannot exceed the half-space speed (${fmt(m.vs2)} m/s), and this one is more than ${OUTSIDE_SDS} sd above it`;
      else if (v <= umin - margin) reason = `the group velocity of mode ${P.mode[i]} never falls below ${fmt(umin)} m/s (its Airy minimum), and this one is more than ${OUTSIDE_SDS} sd below it`;
    }
    if (reason) {
      outsideTrapping.push({ index: i, label: P.labels[i], reason });
      say(CONSEQUENCE.outsideTrapping, `${describePick(P, i)} lies outside what the best model can carry: ${reason}.`);
    }
  }

  // Several minima.
  if (input.alternatives.length > 1) {
    const list = input.alternatives
      .map((a) => `H = ${fmt(a.thickness.best)} m, β1 = ${fmt(a.vs1.best)} m/s, β2 = ${fmt(a.vs2.best)} m/s`)
      .join('; ');
    say(
      CONSEQUENCE.severalMinima,
      `The picks fit ${input.alternatives.length} separate models almost equally well (each inside the 95 % level of the best): ${list}; the headline intervals span them all, ` +
        'and picks on both sides of the group-velocity minimum, phase-velocity picks or lower frequencies would tell them apart.',
    );
  }

  // Parameters the picks do not constrain.
  const unconstrained: EstimateDiagnostics['unconstrained'] = [];
  const names = { thickness: ['thickness', 'm'], vs1: ['layer speed β1', 'm/s'], vs2: ['half-space speed β2', 'm/s'] } as const;
  for (const key of ['thickness', 'vs1', 'vs2'] as const) {
    const e = input.estimates[key];
    if (!e.free || !(e.openLow || e.openHigh)) continue;
    const side = e.openLow && e.openHigh ? 'both' : e.openLow ? 'low' : 'high';
    unconstrained.push({ parameter: key, side });
    const [name, unit] = names[key];
    const where =
      side === 'both'
        ? `anywhere in the search range ${fmt(e.low95)}–${fmt(e.high95)} ${unit}`
        : side === 'low'
          ? `down to the low end of the search range (${fmt(e.low95)} ${unit})`
          : `up to the high end of the search range (${fmt(e.high95)} ${unit})`;
    let why = '';
    if (key === 'vs2') why = ' Picks at longer wavelengths (lower frequencies), which reach below the layer, would constrain it.';
    if (key === 'thickness' && side !== 'low') why = ' Longer-wavelength picks would constrain it.';
    if (key === 'thickness' && side === 'low') why = ' Shorter-wavelength (higher-frequency) picks, which sample the layer alone, would constrain it.';
    say(key === 'thickness' ? CONSEQUENCE.thicknessOpen : CONSEQUENCE.speedOpen, `The picks do not constrain the ${name}: the 95 % interval is open, fitting ${where}.${why}`);
  }

  // Depth resolution (common practice, shared/PHYSICS.md §8).
  // λ = c/f with c the phase velocity: the pick's own for phase picks, the
  // best model's (of the pick's mode) for group picks.
  const wavelengths = new Float64Array(P.n);
  let longestWavelength = 0;
  let shortestWavelength = Infinity;
  for (let i = 0; i < P.n; i++) {
    const c = P.isPhase[i] ? P.v[i] : predictVelocity(m, P.f[i], P.mode[i], true);
    wavelengths[i] = c / P.f[i];
    longestWavelength = Math.max(longestWavelength, wavelengths[i]);
    shortestWavelength = Math.min(shortestWavelength, wavelengths[i]);
  }
  const resolvedDepth = longestWavelength / 2;
  const h = input.estimates.thickness.best;
  const thicknessResolved = !(h > resolvedDepth);
  if (!thicknessResolved) {
    let advice = '';
    if (h <= 1000) {
      const a = surveyAdvice({ targetDepth: h, model: m, pickedWavelengths: wavelengths });
      // lowestFrequency is [for the safe 3H, for 2H]: the safe one is the lower frequency.
      const fText = Number.isFinite(a.lowestFrequency[1])
        ? `, i.e. picks down to about ${fmt(a.lowestFrequency[1])} Hz` + (Number.isFinite(a.lowestFrequency[0]) ? ` (${fmt(a.lowestFrequency[0])} Hz to be safe)` : '')
        : '';
      advice =
        ` To resolve it, pick wavelengths of at least ${fmt(a.wavelength[0])} m (2H; ${fmt(a.wavelength[1])} m to be safe)${fText}, ` +
        `with a spread of at least ${fmt(a.spreadLength[0])} m (${fmt(a.spreadLength[1])} m advised). ${a.note}`;
    }
    say(
      CONSEQUENCE.beyondDepth,
      `The best thickness, ${fmt(h)} m, is deeper than half the longest picked wavelength (${fmt(longestWavelength)} m, so about ${fmt(resolvedDepth)} m is seen; ` +
        `depth of investigation ≈ λ/2, common practice): the picks do not resolve it, and as they sample the layer alone they say little about the half-space.${advice}`,
    );
  }

  // Worst first; findings of equal consequence keep their order (Array.prototype.sort is stable).
  const sentences = ranked.sort((a, b) => a.rank - b.rank).map((r) => r.text);
  return {
    sentences,
    fit,
    fitDetail,
    outliers,
    betterMode,
    outsideTrapping,
    belowCutoff,
    unconstrained,
    longestWavelength,
    shortestWavelength,
    resolvedDepth,
    thicknessResolved,
  };
}

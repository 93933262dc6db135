/**
 * The verdict on a thickness estimate (core/estimate/verdict.ts) and the
 * order of the diagnostics (core/estimate/estimate-diagnostics.ts).
 *
 * Synthetic picks come from the core's own closed-form forward model
 * (core/dispersion/love-layer.ts: Aki & Richards, *Quantitative Seismology*,
 * 2nd ed. 2002, §7.2–7.3). The sites are INVENTED: a ~6 m soft layer
 * (β1 = 180 m/s over β2 = 450 m/s) picked only at 20–40 Hz (not resolved),
 * the same layer picked at 3–40 Hz (resolved), and the shared invented soft
 * site of test/fixtures.ts. The depth rule (depth of investigation ≈ λ/2,
 * λ/3 to be safe) is common practice (shared/PHYSICS.md §8); the frequency the
 * verdict names is checked against the closed-form phase velocity: at that
 * frequency the wavelength c/f must be the one the verdict asks for.
 */
import { describe, expect, it } from 'vitest';
import { lovePhaseVelocity, loveVelocities, type TwoLayer } from '../../../../core/dispersion/love-layer';
import { estimateLayer, type ParameterEstimate } from '../../../../core/estimate/estimate';
import { estimateJson } from '../../../../core/estimate/estimate-json';
import { estimateVerdict, VERDICT_LEVELS, type VerdictInput } from '../../../../core/estimate/verdict';
import type { Pick } from '../../../../core/picks/picks';
import { softSitePicks } from '../../../fixtures';

/** Invented: a ~6 m soft layer over stiffer ground. */
const SIX_M: TwoLayer = { h: 6, vs1: 180, vs2: 450, rho1: 1800, rho2: 2100 };

function groupPicks(m: TwoLayer, freqs: number[]): Pick[] {
  return freqs.map((f) => {
    const u = loveVelocities(m, f, 0).group;
    return { frequency: f, velocity: u, kind: 'group', mode: 0, sd: 0.03 * u };
  });
}

const notResolvedIff = (level: string, text: string) => expect(text.includes('not resolved')).toBe(level === 'unresolved');

describe('the verdict on an estimate', () => {
  const unresolved = estimateLayer(groupPicks(SIX_M, [20, 22, 25, 28, 32, 36, 40]));
  const resolved = estimateLayer(groupPicks(SIX_M, [3, 4, 5, 6, 8, 10, 13, 16, 20, 25, 30, 40]));

  it('picks only at 20–40 Hz over a ~6 m layer: not resolved, says what is known and the lowest frequency to pick before leaving', () => {
    const v = unresolved.verdict;
    expect(v.level).toBe('unresolved');
    expect(v.reasons).toContain('beyond-depth');
    expect(v.text).toMatch(/^Layer thickness not resolved: the picks see only about [\d.]+ m deep, and /);
    expect(v.text).toMatch(/; before leaving, pick down to about [\d.]+ Hz or lower \(wavelengths up to [\d.]+ m\) on a spread of at least [\d.]+ m\.$/);
    // One sentence: a single full stop, at the end (decimal points aside).
    expect(v.text.replace(/\d\.\d/g, '').split('. ')).toHaveLength(1);
    // The frequency named is below every pick, and carries the wavelength asked for on the best model.
    expect(v.lowestFrequencyHz).toBeLessThan(20);
    const bestModel: TwoLayer = { h: unresolved.thickness.best, vs1: unresolved.vs1.best, vs2: unresolved.vs2.best, rho1: 1800, rho2: 2100 };
    const lambda = lovePhaseVelocity(bestModel, v.lowestFrequencyHz, 0) / v.lowestFrequencyHz;
    expect(Math.abs(lambda - v.wavelengthNeeded_m) / v.wavelengthNeeded_m).toBeLessThan(1e-6);
    // λ ≥ 3 × the depth the picks see now (the cautious rule): longer than anything picked.
    expect(v.wavelengthNeeded_m).toBeGreaterThanOrEqual(3 * unresolved.diagnostics.resolvedDepth - 1e-9);
    expect(v.spreadNeeded_m).toBe(v.wavelengthNeeded_m);
    notResolvedIff(v.level, v.text);
  });

  it('the same layer picked at 3–40 Hz: resolved, with the best value and its 95 % range', () => {
    const v = resolved.verdict;
    expect(v.level).toBe('resolved');
    expect(v.reasons).toEqual([]);
    expect(v.text).toMatch(/^Layer thickness resolved: 6 m, 95 % range [\d.]+–[\d.]+ m\.$/);
    expect(v.action).toBe('');
    notResolvedIff(v.level, v.text);
  });

  it('the invented soft site (12 m, 3–40 Hz) is resolved', () => {
    const r = estimateLayer(softSitePicks(20));
    expect(r.verdict.level).toBe('resolved');
    expect(r.verdict.text).toMatch(/^Layer thickness resolved: 12 m,/);
  });

  it('the JSON carries the verdict as its last key, with the level and the sentence only', () => {
    const j = estimateJson(unresolved);
    const keys = Object.keys(j);
    expect(keys[keys.length - 1]).toBe('verdict');
    expect(keys.slice(0, 7)).toEqual(['thickness_m', 'vs1_m_s', 'vs2_m_s', 'alternatives', 'misfit', 'warnings', 'caution']);
    expect(j.verdict).toEqual({ level: 'unresolved', text: unresolved.verdict.text });
    expect(estimateJson(resolved).verdict.level).toBe('resolved');
  });
});

describe('the verdict rules, one at a time', () => {
  const model: TwoLayer = { h: 8, vs1: 200, vs2: 500, rho1: 1800, rho2: 2100 };
  const param = (best: number, low95: number, high95: number, open: Partial<ParameterEstimate> = {}): ParameterEstimate => ({
    best, low68: low95, high68: high95, low95, high95, free: true, openLow: false, openHigh: false, ...open,
  });
  const base: VerdictInput = {
    thickness: param(8, 7.5, 8.6),
    diagnostics: {
      fit: 'consistent',
      thicknessResolved: true,
      resolvedDepth: 20,
      longestWavelength: 40,
      shortestWavelength: 5,
      betterMode: [],
      belowCutoff: [],
    },
    alternatives: [],
    model,
  };
  const withD = (d: Partial<VerdictInput['diagnostics']>): VerdictInput => ({ ...base, diagnostics: { ...base.diagnostics, ...d } });

  it('a tight closed interval inside the cautious depth is resolved', () => {
    expect(estimateVerdict(base).level).toBe('resolved');
  });

  it('open above: "more than" the low end, and the lower frequency to pick', () => {
    const v = estimateVerdict({ ...base, thickness: param(8, 6.2, 40, { openHigh: true }) });
    expect(v.level).toBe('unresolved');
    expect(v.known).toBe('more than 6.2 m');
    expect(v.text).toContain('the layer is more than 6.2 m thick; before leaving, pick down to about');
    notResolvedIff(v.level, v.text);
  });

  it('open below: "less than" the high end, and shorter wavelengths to pick', () => {
    const v = estimateVerdict({ ...base, thickness: param(1, 0.05, 2.5, { openLow: true }) });
    expect(v.level).toBe('unresolved');
    expect(v.known).toBe('less than 2.5 m');
    expect(v.text).toContain('before leaving, pick higher frequencies, with wavelengths shorter than the shortest so far (5 m), on receivers less than 2.5 m apart');
    expect(v.lowestFrequencyHz).toBeNaN();
  });

  it('a closed interval deeper than the picks see is still not resolved', () => {
    const v = estimateVerdict(withD({ thicknessResolved: false, resolvedDepth: 5, longestWavelength: 10 }));
    expect(v.level).toBe('unresolved');
    expect(v.text).toContain('the 95 % range 7.5–8.6 m relies on ground below what the picks see');
  });

  it('rough, each with its reason and one thing to do, never the words "not resolved"', () => {
    const cases: Array<[VerdictInput, string, RegExp]> = [
      [{ ...base, alternatives: [{}, {}] as never }, 'several-minima', /fit 2 separate models; before leaving, add phase-velocity picks/],
      [withD({ fit: 'poor' }), 'poor-fit', /scatter more than their standard deviations allow; before leaving, check the flagged picks/],
      [withD({ fit: 'untestable' }), 'untestable-fit', /too few picks to test the fit; before leaving, add picks\./],
      [withD({ betterMode: [{}] as never }), 'mode-doubt', /may be on another mode; before leaving, check the mode numbers/],
      [withD({ longestWavelength: 20 }), 'only-optimistic-depth', /deeper than the cautious depth of investigation \(about 6\.67 m\); before leaving, pick down to about/],
      [{ ...base, thickness: param(8, 6, 14) }, 'wide-interval', /the 95 % range is wide; before leaving, add picks, especially at lower frequencies: pick down to/],
      [{ ...base, thickness: param(2, 1.5, 3.5) }, 'wide-interval', /add higher-frequency picks, with wavelengths down to about 4 m/],
    ];
    for (const [input, reason, text] of cases) {
      const v = estimateVerdict(input);
      expect(v.level, reason).toBe('rough');
      expect(v.reasons[0], reason).toBe(reason);
      expect(v.text, reason).toMatch(/^Layer thickness only roughly known: /);
      expect(v.text, reason).toMatch(text);
      notResolvedIff(v.level, v.text);
    }
  });

  it('the levels are the three named, best first', () => {
    expect(VERDICT_LEVELS).toEqual(['resolved', 'rough', 'unresolved']);
  });
});

describe('diagnostics ordered by consequence', () => {
  it('the unresolved case leads with the depth the picks cannot see, then the open thickness, and ends with the default densities', () => {
    const r = estimateLayer(groupPicks(SIX_M, [20, 22, 25, 28, 32, 36, 40]));
    expect(r.warnings[0]).toMatch(/^The best thickness, [\d.]+ m, is deeper than half the longest picked wavelength/);
    expect(r.warnings[1]).toMatch(/^The picks do not constrain the thickness/);
    expect(r.warnings[r.warnings.length - 1]).toMatch(/^No density was given/);
    // Crew words: β1 and β2, never vs1/vs2.
    expect(r.warnings.join(' ')).not.toMatch(/\bvs[12]\b/);
    expect(r.warnings.join(' ')).toMatch(/layer speed β1/);
  });

  it('the depth advice gives the lowest frequency as "down to X Hz (Y Hz to be safe)" with Y below X', () => {
    const r = estimateLayer(groupPicks(SIX_M, [20, 22, 25, 28, 32, 36, 40]));
    const m = r.warnings[0].match(/picks down to about ([\d.]+) Hz \(([\d.]+) Hz to be safe\)/);
    expect(m).not.toBeNull();
    expect(Number(m![2])).toBeLessThan(Number(m![1]));
  });
});

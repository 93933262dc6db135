/**
 * Survey advice (core/site/survey.ts). The rules are common practice
 * (shared/PHYSICS.md §8), not a published standard; the arithmetic is checked
 * by hand here. The lowest frequency is checked against the closed-form
 * branch ω_n(c) of the period equation (Aki & Richards, Quantitative
 * Seismology, 2nd ed. 2002, §7.2), an independent route from the root solve.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../../core/shared/errors';
import { loveBranchOmega, type TwoLayer } from '../../../../core/dispersion/love-layer';
import { frequencyForWavelength, pickWavelengths, surveyAdvice, SURVEY_PRACTICE_NOTE } from '../../../../core/site/survey';

const model: TwoLayer = { h: 8, vs1: 180, vs2: 520, rho1: 1800, rho2: 2100 };

describe('frequencyForWavelength', () => {
  it('inverts the closed-form branch: the frequency whose fundamental wavelength c/f is λ', () => {
    for (const c of [200, 260, 340, 450, 510]) {
      const f = loveBranchOmega(model, c, 0) / (2 * Math.PI); // closed form, A&R §7.2
      const lambda = c / f;
      const got = frequencyForWavelength(model, lambda);
      const tol = 1e-8 * f;
      expect(Math.abs(got - f), `c=${c} λ=${lambda} expected f=${f} got ${got} tol ${tol}`).toBeLessThanOrEqual(tol);
    }
  });

  it('returns NaN for a wavelength that is not positive', () => {
    expect(frequencyForWavelength(model, 0)).toBeNaN();
    expect(frequencyForWavelength(model, -3)).toBeNaN();
  });
});

describe('surveyAdvice', () => {
  it('applies the λ/2 – λ/3 depth rule, the spread and the source-offset rules (common practice)', () => {
    const a = surveyAdvice({ targetDepth: 20, model });
    expect(a.wavelength).toEqual([40, 60]); // 2z and 3z
    expect(a.spreadLength).toEqual([20, 60]); // L ≥ z; advised L = 3z
    expect(a.sourceOffset[0]).toBeCloseTo(15, 12); // 0.25 L
    expect(a.sourceOffset[1]).toBeCloseTo(30, 12); // 0.5 L
    // the cautious wavelength needs the lower frequency
    expect(a.lowestFrequency[0]).toBeLessThan(a.lowestFrequency[1]);
    expect(a.note).toBe(SURVEY_PRACTICE_NOTE);
  });

  it('says the picks do not reach and what to change when the longest wavelength is too short', () => {
    const a = surveyAdvice({ targetDepth: 30, model, pickedWavelengths: [5, 12, 24] });
    expect(a.pickedLongest).toBe(24);
    expect(a.pickedShortest).toBe(5);
    expect(a.receiverSpacing).toBe(2.5);
    expect(a.reachedDepth).toEqual([8, 12]);
    expect(a.reaches).toBe(false);
    expect(a.actions.join(' ')).toMatch(/Pick wavelengths up to 90 m/);
    expect(a.actions.join(' ')).toMatch(/Lengthen the spread to at least 90 m/);
  });

  it('gives no action when the picks reach the target on the cautious rule', () => {
    const a = surveyAdvice({ targetDepth: 10, model, pickedWavelengths: [40, 6] });
    expect(a.reaches).toBe(true);
    expect(a.actions).toEqual([]);
  });

  it('gives the frequency as unknown without a model', () => {
    const a = surveyAdvice({ targetDepth: 10 });
    expect(a.lowestFrequency[0]).toBeNaN();
    expect(a.actions[0]).toMatch(/No picks yet/);
  });

  it('rejects a target depth that is missing, zero, negative or absurd with a full sentence', () => {
    for (const bad of [0, -5, Number.NaN, Infinity]) {
      expect(() => surveyAdvice({ targetDepth: bad })).toThrow(
        'The target depth must be a number of metres greater than 0.',
      );
    }
    expect(() => surveyAdvice({ targetDepth: 5000 })).toThrow(InputError);
    expect(() => surveyAdvice({ targetDepth: 5000 })).toThrow(/at most 1000 m/);
  });
});

describe('pickWavelengths', () => {
  it('takes c/f with the phase velocity: the pick\'s own, or the model\'s for a group pick', () => {
    const c = 300;
    const f = loveBranchOmega(model, c, 0) / (2 * Math.PI); // closed form: mode 0 has phase velocity c at f
    const w = pickWavelengths(
      [
        { frequency: 10, velocity: 250, kind: 'phase', mode: 0 },
        { frequency: f, velocity: 170, kind: 'group', mode: 0 },
      ],
      model,
    );
    expect(w[0]).toBe(25);
    expect(Math.abs(w[1] - c / f)).toBeLessThanOrEqual(1e-9 * (c / f));
  });

  it('falls back to the picked velocity without a model or below the mode\'s cutoff', () => {
    const w0 = pickWavelengths([{ frequency: 10, velocity: 200, kind: 'group', mode: 0 }]);
    expect(w0[0]).toBe(20);
    const w1 = pickWavelengths([{ frequency: 1, velocity: 400, kind: 'group', mode: 3 }], model); // far below mode 3's cutoff
    expect(w1[0]).toBe(400);
  });
});

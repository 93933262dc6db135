/**
 * What-if helpers (pwa/ui/views/whatif-view.tsx): the misfit readout is the
 * estimate's own χ², so at the best fit it equals the estimate's χ²; a
 * model that cannot trap Love waves draws no curves and says why. Picks:
 * the invented demo site (core/exchange/demo.ts).
 */
import { describe, expect, it } from 'vitest';
import { demoPicks } from '../../../../../core/exchange/demo';
import { estimateLayer } from '../../../../../core/estimate/estimate';
import type { PickRecord } from '../../../../../core/exchange/records';
import { CONTROLS, controlRange, layeredOf, startingModel, typedValue, whatIfMisfit } from '../../../../../pwa/ui/views/whatif-view';

const picks = demoPicks().map(
  (p, i) => ({ ...p, id: `p${i}`, rev: 1, updatedAt: '2026-01-01T00:00:00.000Z', type: 'pick', siteId: 's', order: i }) as PickRecord,
);
const result = estimateLayer(demoPicks());

describe('what-if', () => {
  it('starts from the best fit and reads back the best χ² there', () => {
    const m = startingModel(result, picks);
    expect(m).toEqual({ h: result.thickness.best, vs1: result.vs1.best, vs2: result.vs2.best, rho1: result.density1, rho2: result.density2 });
    const r = whatIfMisfit(picks, m)!;
    expect(r.n).toBe(picks.length);
    expect(Math.abs(r.chi2 - result.chi2)).toBeLessThanOrEqual(1e-6 * result.chi2);
  });

  it('gives a larger misfit away from the best fit', () => {
    const m = startingModel(result, picks);
    expect(whatIfMisfit(picks, { ...m, h: m.h * 1.3 })!.chi2).toBeGreaterThan(result.chi2 + 10);
  });

  it('draws nothing and says why when β2 is not faster than β1', () => {
    const m = { h: 5, vs1: 300, vs2: 300, rho1: 1800, rho2: 2100 };
    expect(whatIfMisfit(picks, m)).toBeUndefined();
    expect(layeredOf(m)).toEqual({
      problem: 'β2 (300 m/s) must be faster than β1 (300 m/s) for Love waves to be trapped; no curves are drawn.',
    });
    expect(layeredOf({ ...m, vs2: 600 }).model?.halfspace).toEqual({ vs: 600, density: 2100 });
  });

  it('centres the slider ranges on the best fit with fine steps: a 20 % drag moves β1 by 20 % of its best value, not hundreds of m/s', () => {
    const m = startingModel(result, picks);
    const b1 = CONTROLS.find((c) => c.key === 'vs1')!;
    const r = controlRange(b1, m.vs1);
    expect(r.min).toBeCloseTo(m.vs1 / 2, 9);
    expect(r.max).toBeCloseTo(m.vs1 * 1.5, 9);
    expect((r.min + r.max) / 2).toBeCloseTo(m.vs1, 9);
    expect(r.step).toBeCloseTo((r.max - r.min) / 1000, 12);
    expect(0.2 * (r.max - r.min)).toBeCloseTo(0.2 * m.vs1, 9);
    // The nudge is about 1 % of the best value.
    expect(r.nudge / m.vs1).toBeGreaterThan(0.004);
    expect(r.nudge / m.vs1).toBeLessThan(0.03);
  });

  it('takes a typed value, or refuses it with a sentence naming the field', () => {
    const h = CONTROLS.find((c) => c.key === 'h')!;
    expect(typedValue(h, ' 7,25 ')).toEqual({ value: 7.25 });
    expect(typedValue(h, 'abc')).toEqual({ error: 'Layer thickness H must be a number in m, but it is "abc".' });
    const b2 = CONTROLS.find((c) => c.key === 'vs2')!;
    expect(typedValue(b2, '9000')).toEqual({ error: 'Half-space shear speed β2 must lie between 30 and 5000 m/s, but it is 9000.' });
  });
});

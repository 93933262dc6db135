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
import { layeredOf, startingModel, whatIfMisfit } from '../../../../../pwa/ui/views/whatif-view';

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
});

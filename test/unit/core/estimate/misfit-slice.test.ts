/**
 * The misfit close-up (core/estimate/misfit-slice.ts): every entry is the estimate's
 * own χ² (core/estimate/estimate.ts chi2At) at its grid point, the box holds the 95 %
 * intervals, and the slice through the best fit never dips below the best
 * fit's χ² (the estimate's minimum). Picks: the invented demo site
 * (core/exchange/demo.ts).
 */
import { describe, expect, it } from 'vitest';
import { demoPicks } from '../../../../core/exchange/demo';
import { chi2At, estimateLayer, prepareEstimate } from '../../../../core/estimate/estimate';
import { MISFIT_SLICE_DEFAULTS, misfitSlice } from '../../../../core/estimate/misfit-slice';

const picks = demoPicks();
const result = estimateLayer(picks);

describe('misfitSlice', () => {
  const s = misfitSlice(picks, {}, result);

  it('lays out a cols × rows grid of H and β1, log-spaced and ascending, holding β2 at its best', () => {
    expect(s.cols).toBe(MISFIT_SLICE_DEFAULTS.cols);
    expect(s.rows).toBe(MISFIT_SLICE_DEFAULTS.rows);
    expect(s.chi2.length).toBe(s.cols * s.rows);
    expect(s.yName).toBe('vs1_m_s');
    expect(s.held).toEqual({ name: 'vs2_m_s', value: result.vs2.best });
    for (let i = 1; i < s.cols; i++) expect(s.x[i]).toBeGreaterThan(s.x[i - 1]);
    const ratio = s.x[1] / s.x[0];
    expect(s.x[s.cols - 1] / s.x[s.cols - 2]).toBeCloseTo(ratio, 10);
  });

  it('spans the 95 % intervals of H and β1', () => {
    expect(s.x[0]).toBeLessThan(result.thickness.low95);
    expect(s.x[s.cols - 1]).toBeGreaterThan(result.thickness.high95);
    expect(s.y[0]).toBeLessThan(result.vs1.low95);
    expect(s.y[s.rows - 1]).toBeGreaterThan(result.vs1.high95);
  });

  it('holds the estimate\'s own χ² at each grid point', () => {
    const P = prepareEstimate(picks, {});
    for (const [r, k] of [
      [0, 0],
      [7, 31],
      [s.rows - 1, s.cols - 1],
    ]) {
      const u = Float64Array.of(Math.log(s.x[k]), Math.log(s.y[r]), Math.log(result.vs2.best));
      const expected = chi2At(P, u);
      expect(Math.abs(s.chi2[r * s.cols + k] - expected)).toBeLessThanOrEqual(1e-9 * expected);
    }
  });

  it('never dips below the best fit, and its least value sits next to it', () => {
    let min = Infinity;
    let at = -1;
    s.chi2.forEach((v, i) => {
      if (v < min) {
        min = v;
        at = i;
      }
    });
    expect(min).toBeGreaterThanOrEqual(result.chi2 * (1 - 1e-9));
    const hStep = Math.log(s.x[1] / s.x[0]);
    const yStep = Math.log(s.y[1] / s.y[0]);
    expect(Math.abs(Math.log(s.x[at % s.cols] / result.thickness.best))).toBeLessThanOrEqual(hStep);
    expect(Math.abs(Math.log(s.y[Math.floor(at / s.cols)] / result.vs1.best))).toBeLessThanOrEqual(yStep);
  });

  it('gives one row at the given β1 when both speeds are given', () => {
    const opts = { vs1: 190, vs2: 560 };
    const r = estimateLayer(picks, opts);
    const one = misfitSlice(picks, opts, r, { cols: 12 });
    expect(one.rows).toBe(1);
    expect(Array.from(one.y)).toEqual([190]);
    expect(one.chi2.length).toBe(12);
  });

  it('marks NaN where β2 is not faster than β1', () => {
    // The estimate keeps its own search below β2; a box reaching past it (here by hand) must show NaN there.
    const opts = { vs2: 200 };
    const slow = picks.filter((p) => p.velocity < 200);
    const r = estimateLayer(slow, opts);
    const centre = { ...r, searchRange: { ...r.searchRange, vs1: [100, 300] as [number, number] } };
    const sl = misfitSlice(slow, opts, centre, { widen: 200 });
    let untrapped = 0;
    for (let row = 0; row < sl.rows; row++) {
      const v = sl.chi2[row * sl.cols];
      if (sl.y[row] >= 200) {
        untrapped++;
        expect(v).toBeNaN();
      } else expect(Number.isFinite(v)).toBe(true);
    }
    expect(untrapped).toBeGreaterThan(0);
    expect(untrapped).toBeLessThan(sl.rows);
  });

  it('refuses bad picks with the estimate\'s message', () => {
    expect(() => misfitSlice([], {}, result)).toThrow('There are no picks; give at least one dispersion pick.');
  });
});

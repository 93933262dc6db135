/**
 * The curve API (core/dispersion/curve.ts): columns, ordering, existence above cutoff,
 * defaults, the log band, cutoffs, the dimensionless form, and bad input.
 * Reference values: closed forms (PHYSICS.md §2: cutoffs, scaling); models
 * are invented except Shearer's crust (*Introduction to Seismology*, ch. 8
 * exercises).
 */
import { describe, expect, it } from 'vitest';
import {
  CURVE_DEFAULTS,
  logBand,
  loveCurves,
  loveCutoffFrequencies,
  loveDimensionlessCurve,
} from '../../../../core/dispersion/curve';
import { InputError } from '../../../../core/shared/errors';
import { loveCutoffHz, loveDimensionless, loveVelocities, type TwoLayer } from '../../../../core/dispersion/love-layer';
import type { LayeredModel } from '../../../../core/dispersion/model';

const site: LayeredModel = {
  layers: [{ thickness: 10, vs: 200, density: 1800 }],
  halfspace: { vs: 500, density: 2000 },
};
const P: TwoLayer = { h: 10, vs1: 200, vs2: 500, rho1: 1800, rho2: 2000 };
const threeLayer: LayeredModel = {
  layers: [
    { thickness: 4, vs: 180, density: 1800 },
    { thickness: 6, vs: 140, density: 1750 },
    { thickness: 10, vs: 300, density: 1950 },
  ],
  halfspace: { vs: 600, density: 2100 },
};

function expectInputError(fn: () => unknown, field: string, message: RegExp): void {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).field).toBe(field);
    expect((e as Error).message).toMatch(message);
    return;
  }
  throw new Error('expected an InputError');
}

describe('loveCurves', () => {
  it('computes one mode by default (CURVE_DEFAULTS.modes = 1)', () => {
    expect(CURVE_DEFAULTS.modes).toBe(1);
    const c = loveCurves(site, [5, 10]);
    expect(c.wave).toBe('love');
    expect(c.modes.length).toBe(1);
    expect(c.modes[0].mode).toBe(0);
    expect(c.failures).toEqual([]);
  });

  it('returns Float64Array columns in ascending frequency, with period = 1/f, whatever the input order', () => {
    const c = loveCurves(site, [20, 1, 7.5, 3], { modes: 2 });
    const m0 = c.modes[0];
    for (const col of [m0.frequency, m0.period, m0.phase, m0.group]) expect(col).toBeInstanceOf(Float64Array);
    expect(Array.from(m0.frequency)).toEqual([1, 3, 7.5, 20]);
    m0.frequency.forEach((f, i) => expect(m0.period[i]).toBe(1 / f));
    m0.frequency.forEach((f, i) => {
      const v = loveVelocities(P, f, 0);
      expect(Math.abs(m0.phase[i] / v.phase - 1)).toBeLessThan(1e-12);
      expect(Math.abs(m0.group[i] / v.group - 1)).toBeLessThan(1e-12);
    });
  });

  it('lists a mode only at frequencies above its cutoff (closed form f_n)', () => {
    const f1 = loveCutoffHz(P, 1);
    const f2 = loveCutoffHz(P, 2);
    const band = logBand(1, 40, 60);
    const c = loveCurves(site, band, { modes: 3 });
    expect(c.modes[0].frequency.length).toBe(60);
    expect(Array.from(c.modes[1].frequency)).toEqual(Array.from(band).filter((f) => f > f1));
    expect(Array.from(c.modes[2].frequency)).toEqual(Array.from(band).filter((f) => f > f2));
    const none = loveCurves(site, [1, 2], { modes: 3 });
    expect(none.modes[2].frequency.length).toBe(0);
    expect(none.modes[2].phase.length).toBe(0);
  });

  it('keeps modes ordered (c_0 < c_1 < …) and inside (β_min, β_H), for N layers too', () => {
    for (const model of [site, threeLayer]) {
      const c = loveCurves(model, logBand(1, 80, 120), { modes: 6 });
      const vsMin = Math.min(...model.layers.map((l) => l.vs));
      for (let m = 0; m < 6; m++) {
        const cur = c.modes[m];
        for (let i = 0; i < cur.frequency.length; i++) {
          expect(cur.phase[i]).toBeGreaterThan(vsMin);
          expect(cur.phase[i]).toBeLessThan(model.halfspace.vs);
          if (m > 0) {
            const below = c.modes[m - 1];
            const j = Array.from(below.frequency).indexOf(cur.frequency[i]);
            expect(j).toBeGreaterThanOrEqual(0);
            expect(cur.phase[i]).toBeGreaterThan(below.phase[j]);
          }
        }
      }
    }
  });

  it('rejects bad frequencies and mode counts with a message naming the field', () => {
    expectInputError(() => loveCurves(site, [1, NaN]), 'frequencies[1]', /frequencies\[1\] must be a finite frequency above 0 Hz, but it is NaN\./);
    expectInputError(() => loveCurves(site, [0]), 'frequencies[0]', /above 0 Hz, but it is 0\./);
    expectInputError(() => loveCurves(site, [-2]), 'frequencies[0]', /but it is -2\./);
    expectInputError(() => loveCurves(site, [Infinity]), 'frequencies[0]', /but it is Infinity\./);
    expectInputError(() => loveCurves(site, [1], { modes: 0 }), 'modes', /modes must be a whole number from 1 to 100, but it is 0\./);
    expectInputError(() => loveCurves(site, [1], { modes: 2.5 }), 'modes', /but it is 2\.5\./);
    expect(loveCurves(site, []).modes[0].frequency.length).toBe(0);
  });
});

describe('logBand', () => {
  it('spaces points evenly in log frequency, ends included', () => {
    const b = logBand(1, 100, 5);
    expect(b).toBeInstanceOf(Float64Array);
    expect(b[0]).toBe(1);
    expect(b[4]).toBe(100);
    [1, 10 ** 0.5, 10, 10 ** 1.5, 100].forEach((v, i) => expect(Math.abs(b[i] / v - 1)).toBeLessThan(1e-14));
    expect(Array.from(logBand(3, 3, 1))).toEqual([3]);
  });

  it('rejects bad bands with a message naming the field', () => {
    expectInputError(() => logBand(0, 10, 5), 'from', /lower frequency must be a finite number above 0 Hz, but it is 0\./);
    expectInputError(() => logBand(1, NaN, 5), 'to', /upper frequency must be a finite number above 0 Hz, but it is NaN\./);
    expectInputError(() => logBand(10, 1, 5), 'to', /upper frequency \(1 Hz\) must be above its lower frequency \(10 Hz\)\./);
    expectInputError(() => logBand(1, 10, 0), 'count', /whole number from 1 to 1000000, but it is 0\./);
    expectInputError(() => logBand(1, 10, 2.5), 'count', /but it is 2\.5\./);
    expectInputError(() => logBand(1, 10, 1), 'count', /needs at least 2 points/);
  });
});

describe('loveCutoffFrequencies', () => {
  it('gives 0 for the fundamental and the closed form for one layer', () => {
    const c = loveCutoffFrequencies(site, 4);
    expect(c[0]).toBe(0);
    for (let n = 1; n < 4; n++) expect(c[n]).toBe(loveCutoffHz(P, n));
  });

  it('for N layers gives frequencies where the curve starts each overtone', () => {
    const cut = loveCutoffFrequencies(threeLayer, 4);
    expect(cut[0]).toBe(0);
    for (let n = 1; n < 4; n++) {
      expect(cut[n]).toBeGreaterThan(cut[n - 1]);
      const c = loveCurves(threeLayer, [cut[n] * (1 - 1e-6), cut[n] * (1 + 1e-6)], { modes: n + 1 });
      expect(Array.from(c.modes[n].frequency)).toEqual([cut[n] * (1 + 1e-6)]);
      expect(c.modes[n].phase[0]).toBeGreaterThan(600 * (1 - 1e-4)); // c → β_H at cutoff
    }
  });
});

describe('loveDimensionlessCurve', () => {
  it('equals c/β1 and U/β1 of any model with the same ratios at x = f·H/β1 (closed-form scaling)', () => {
    const x = logBand(0.05, 5, 40);
    const { phase, group } = loveDimensionlessCurve(2.5, 2000 / 1800, x, 1);
    expect(phase).toBeInstanceOf(Float64Array);
    for (let i = 0; i < x.length; i++) {
      const f = (x[i] * P.vs1) / P.h;
      const v = loveVelocities(P, f, 1);
      if (Number.isNaN(v.phase)) {
        expect(phase[i]).toBeNaN(); // below the cutoff of mode 1
        expect(group[i]).toBeNaN();
        continue;
      }
      expect(Math.abs(phase[i] - v.phase / P.vs1)).toBeLessThan(1e-12);
      expect(Math.abs(group[i] - v.group / P.vs1)).toBeLessThan(1e-12);
      const d = loveDimensionless(2.5, 2000 / 1800, x[i], 1);
      expect(Math.abs(phase[i] - d.phase)).toBeLessThan(1e-12);
    }
    expect(phase.some((v) => Number.isNaN(v))).toBe(true);
    expect(phase.some((v) => !Number.isNaN(v))).toBe(true);
  });

  it('rejects bad ratios and modes with a message naming the field', () => {
    expectInputError(() => loveDimensionlessCurve(1, 1, [1], 0), 'vsRatio', /vsRatio \(β2\/β1\) must be a finite number above 1, but it is 1\./);
    expectInputError(() => loveDimensionlessCurve(2, 0, [1], 0), 'densityRatio', /densityRatio \(ρ2\/ρ1\) must be a finite number above 0, but it is 0\./);
    expectInputError(() => loveDimensionlessCurve(2, 1, [1], -1), 'mode', /mode must be a whole number from 0 up, but it is -1\./);
  });
});

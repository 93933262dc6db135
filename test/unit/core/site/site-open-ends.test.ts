/**
 * Site figures from an estimate whose intervals are open (issue 9 §2): an
 * open end is not a bound, so the figure is open on that side and the
 * classes list every class the data cannot rule out.
 *
 * Check values: Vs30 = 30 / Σ(h_i/v_i) over the top 30 m, the half-space
 * continuing below (EN 1998-1:2004 eq. 3.1), evaluated in closed form here;
 * v̄s over 100 ft = 30.48 m the same way (ASCE/SEI 7-16 §20.4); class
 * bands as reproduced in shared/PHYSICS.md §7 (EN 1998-1:2004 Table 3.1:
 * B 360–800 m/s, C 180–360; ASCE/SEI 7-22 Table 20.2-1: CD 1000–1450 ft/s
 * = 304.8–441.96 m/s; ASCE/SEI 7-16 Table 20.3-1: C 1200–2500 ft/s =
 * 365.76–762 m/s). The invented site: 12 m of 250 m/s soil over 700 m/s.
 */
import { describe, expect, it } from 'vitest';
import { loveVelocities } from '../../../../core/dispersion/love-layer';
import { estimateLayer } from '../../../../core/estimate/estimate';
import { estimateFromJson, estimateJson } from '../../../../core/estimate/estimate-json';
import { siteFiguresOfEstimate, type TwoLayerEstimate } from '../../../../core/site/site';
import type { Pick } from '../../../../core/picks/picks';

const vsAvg = (h: number, b1: number, b2: number, depth: number) => depth / (Math.min(h, depth) / b1 + Math.max(0, depth - h) / b2);

/** Invented site (marked invented): 12 m of 250 m/s soil over 700 m/s ground. */
const SITE = { h: 12, vs1: 250, vs2: 700, rho1: 1800, rho2: 2100 };

/** Exact phase picks of the invented site, 8 log-spaced from f1 to f2 Hz, sd 3 % (common practice). */
function picksBetween(f1: number, f2: number): Pick[] {
  return Array.from({ length: 8 }, (_, i) => {
    const f = f1 * (f2 / f1) ** (i / 7);
    const c = loveVelocities(SITE, f, 0).phase;
    return { frequency: f, velocity: c, kind: 'phase', mode: 0, sd: 0.03 * c };
  });
}

const given = (v: number) => ({ best: v, low95: v, high95: v });

describe('siteFiguresOfEstimate with open interval ends', () => {
  it('a thickness open towards depth takes Vs30 down to the layer speed (H → ∞), flagged open, not to the search end', () => {
    const est: TwoLayerEstimate = {
      thickness: { best: 12, low95: 8, high95: 20, openHigh: true },
      vs1: given(250),
      vs2: given(700),
      density1: 1800,
      density2: 2100,
    };
    const s = siteFiguresOfEstimate(est);
    // Closed form: H ≥ 30 m gives Vs30 = β1 = 250 m/s; the search end (20 m) would give 30/(20/250 + 10/700) = 318.2.
    expect(s.vs30.low).toBe(250);
    expect(s.vs30.openLow).toBe(true);
    expect(s.vs30.high).toBeCloseTo(vsAvg(8, 250, 700, 30), 9);
    expect(s.vs30.openHigh).toBe(false);
    expect(s.f0_hz.low).toBe(0);
    expect(s.f0_hz.openLow).toBe(true);
    // 250 m/s is EN type C (180–360): it must be listed beside B.
    expect(s.classes.en1998_1).toContain('C');
    expect(s.classes.en1998_1).toContain('B');
  });

  it('a thickness open below takes the figures down to no layer (Vs30 → β2, f0 unbounded) and says "thinner than"', () => {
    const est: TwoLayerEstimate = {
      thickness: { best: 23.3, low95: 23.3, high95: 56.7, openLow: true },
      vs1: given(250),
      vs2: given(700),
      density1: 1800,
      density2: 2100,
    };
    const s = siteFiguresOfEstimate(est);
    expect(s.vs30.high).toBe(700);
    expect(s.vs30.openHigh).toBe(true);
    expect(s.vs30.low).toBe(250);
    expect(s.vs30.openLow).toBe(false); // H ≥ 30 m is inside the closed high end
    expect(s.f0_hz.high).toBe(Infinity);
    expect(s.f0_hz.openHigh).toBe(true);
    expect(s.warnings[0]).toBe(
      'The data do not rule out a layer thinner than 23.3 m, the low end of the thickness search range: read the thickness as "at most 56.7 m".',
    );
  });

  it('open speed ends take the speeds to the model limits (30–5000 m/s, common practice), so every class they allow is listed', () => {
    const est: TwoLayerEstimate = {
      thickness: given(12),
      vs1: { best: 250, low95: 125, high95: 400, openLow: true },
      vs2: given(700),
      density1: 1800,
      density2: 2100,
    };
    const s = siteFiguresOfEstimate(est);
    expect(s.vs30.low).toBeCloseTo(vsAvg(12, 30, 700, 30), 9);
    expect(s.vs30.openLow).toBe(true);
    // 30/(12/30 + 18/700) = 70.5 m/s: EN type D (< 180) is possible.
    expect(s.classes.en1998_1[0]).toBe('D');
  });

  it('applies the ±30 % sensitivity check only when asked (one rule for every caller)', () => {
    const est: TwoLayerEstimate = { thickness: given(12), vs1: given(250), vs2: given(700), density1: 1800, density2: 2100 };
    // v̄s100ft = 30.48/(12/250 + 18.48/700) = 410.5 m/s: ASCE/SEI 7-22 CD (304.8–441.96); ÷1.3 = 315.8 stays CD, ×1.3 = 533.6 reaches C.
    expect(siteFiguresOfEstimate(est).classes.asce7_22).toEqual(['CD']);
    expect(siteFiguresOfEstimate(est, { estimatedVelocities: true }).classes.asce7_22).toEqual(['CD', 'C']);
  });
});

describe('the estimate and its JSON with open ends', () => {
  it('low-frequency picks (0.3–0.6 Hz): the default search range starts above the true 12 m, the interval is open below, and the classes include the true ones', () => {
    const r = estimateLayer(picksBetween(0.3, 0.6), { vs1: 250, vs2: 700 });
    expect(r.searchRange.thickness[0]).toBeGreaterThan(12);
    expect(r.thickness.openLow).toBe(true);
    // True classes, closed form: Vs30 = 30/(12/250 + 18/700) = 406.98 → EN B; v̄s100ft = 410.5 → ASCE/SEI 7-16 C, 7-22 CD.
    expect(vsAvg(12, 250, 700, 30)).toBeCloseTo(406.98, 2);
    expect(r.site!.classes.en1998_1).toContain('B');
    expect(r.site!.classes.asce7_16).toContain('C');
    expect(r.site!.classes.asce7_22).toContain('CD');
    // The estimate's own figures and the shared path agree exactly (one path).
    expect(siteFiguresOfEstimate(r)).toEqual(r.site);
    const j = estimateJson(r);
    expect(j.thickness_m.low95).toBeNull();
    expect(j.thickness_m.low68).toBeNull();
    expect(j.open_ends.thickness_m.low).toBe(true);
    expect(j.vs30_m_s).toMatchObject({ high95: 700, open_high: true, open_low: false });
    // Read back (null ends are "not bounded"), the figures come out the same.
    const back = estimateFromJson(JSON.parse(JSON.stringify(j)));
    expect(back.thickness.openLow).toBe(true);
    expect(siteFiguresOfEstimate(back).classes).toEqual(r.site!.classes);
  });

  it('high-frequency picks (40–80 Hz): open towards depth, Vs30 from the layer speed up, as the estimate JSON says', () => {
    const r = estimateLayer(picksBetween(40, 80), { vs1: 250, vs2: 700 });
    expect(r.thickness.openHigh).toBe(true);
    const j = estimateJson(r);
    expect(j.thickness_m.high95).toBeNull();
    expect(j.vs30_m_s).toMatchObject({ low95: 250, open_low: true });
    expect(r.site!.classes.en1998_1).toEqual(['C', 'B']);
  });
});

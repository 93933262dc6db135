/**
 * Site figures (core/site/site.ts), checked against the published definitions:
 * - Vs30 = 30 / Σ(h_i/v_i): EN 1998-1:2004 §3.1.2 eq. (3.1); the 100 ft
 *   (30.48 m) average: ASCE/SEI 7-16 §20.4.1. Worked by hand below.
 * - Class tables: ASCE/SEI 7-16 Table 20.3-1, ASCE/SEI 7-22 Table 20.2-1
 *   (both in ft/s; 1 ft = 0.3048 m exactly), EN 1998-1:2004 Table 3.1.
 *   Table values as reproduced (primary texts not at hand): ASCE/SEI 7-16
 *   Table 20.3-1 and ASCE/SEI 7-22 Table 20.2-1 in US Army Corps of
 *   Engineers risk-management documentation (7-16 E also in IBC §1613); an
 *   older reproduction of 7-16 gives D as 600 ≤ v̄s < 1200, so 1200 ft/s is
 *   disputed and straddles D and C; EN 1998-1:2004 Table 3.1 reproductions
 *   leave the side of 180 and 360 m/s unstated, so those straddle too.
 *   EN type A "including at most 5 m of weaker material at the surface"
 *   (same reproductions) is applied.
 * - f0 = β1/(4H), T0 = 4H/β1, impedance ratio ρ1β1/(ρ2β2): Kramer,
 *   *Geotechnical Earthquake Engineering*, 1996, ch. 7 (closed forms).
 */
import { describe, expect, it } from 'vitest';
import { CAUTION } from '../../../../core/shared/caution';
import type { LayeredModel } from '../../../../core/dispersion/model';
import {
  ASCE7_16_TABLE,
  ASCE7_22_TABLE,
  EN1998_1_TABLE,
  enTypeE,
  siteClassesForRanges,
  siteClassesInRange,
  siteClassOf,
  siteFigures,
  siteFiguresForRanges,
  vs100ft,
  vs30,
  vsAverage,
  type SiteClassTableId,
} from '../../../../core/site/site';
import { inputError } from '../../../input-error';

function close(got: number, expected: number, relTol: number, what: string): void {
  const diff = Math.abs(got - expected);
  const tol = relTol * Math.abs(expected);
  expect(diff, `${what}: expected ${expected}, got ${got}, diff ${diff}, tol ${tol}`).toBeLessThanOrEqual(tol);
}

const oneLayer = (h: number, vs1: number, vs2: number, rho1 = 1800, rho2 = 2200): LayeredModel => ({
  layers: [{ thickness: h, vs: vs1, density: rho1 }],
  halfspace: { vs: vs2, density: rho2 },
});

/** Invented example profile (not a real site). */
const layered: LayeredModel = {
  layers: [
    { thickness: 5, vs: 150, density: 1700 },
    { thickness: 10, vs: 250, density: 1800 },
    { thickness: 8, vs: 400, density: 1900 },
  ],
  halfspace: { vs: 600, density: 2000 },
};

describe('Vs30 and the 100 ft average (EN 1998-1:2004 eq. 3.1; ASCE/SEI 7-16 §20.4)', () => {
  it('matches a hand-worked layered example, the half-space continuing below 23 m', () => {
    // Travel time through the top 30 m:
    //   5/150 + 10/250 + 8/400 + (30 − 23)/600
    //   = 20/600 + 24/600 + 12/600 + 7/600 = 63/600 = 0.105 s
    //   Vs30 = 30 / 0.105 = 285.714285… m/s (= 2000/7).
    close(vs30(layered), 2000 / 7, 1e-14, 'Vs30');
    // Top 100 ft = 30.48 m: the half-space part is 7.48 m.
    //   56/600 + 7.48/600 = 63.48/600 = 0.1058 s
    //   v̄s = 30.48 / 0.1058 = 288.090737… m/s.
    close(vs100ft(layered), 30.48 / 0.1058, 1e-14, 'vs100ft');
    close(vs100ft(layered), 288.0907372400756, 1e-12, 'vs100ft digits');
  });

  it('uses only the top 30 m of a thick layer', () => {
    // A 40 m layer at 200 m/s: the whole 30 m is in the layer, Vs30 = 200 exactly.
    expect(vs30(oneLayer(40, 200, 900))).toBe(200);
    expect(vs100ft(oneLayer(40, 200, 900))).toBe(200);
  });

  it('takes other depths and rejects a depth that is not positive', () => {
    // 10 m over 900 m/s, averaged over 20 m: 20 / (10/200 + 10/900) = 327.2727… m/s.
    close(vsAverage(oneLayer(10, 200, 900), 20), 20 / (10 / 200 + 10 / 900), 1e-14, 'Vs20');
    expect(inputError(() => vs30(oneLayer(10, 200, 900), 0)).message).toBe('depth must be greater than 0 m, but it is 0.');
  });

  it('validates the model first (message names the field)', () => {
    expect(inputError(() => vs30(oneLayer(10, 0.2, 900))).message).toBe(
      'layers[0].vs is 0.2 m/s, below the 30 m/s lower bound for shear speed. It looks like km/s; enter the speed in m/s.',
    );
  });
});

/**
 * Every boundary of every table: [boundary, class at it, class just below,
 * class just above]. ASCE values in ft/s as printed; EN in m/s.
 */
const FT = 0.3048;
const BOUNDARIES: Record<SiteClassTableId, { unit: number; rows: [number, string, string, string][] }> = {
  // ASCE/SEI 7-16 Table 20.3-1 (US Army Corps of Engineers reproduction): A > 5000; B 2500 < v ≤ 5000;
  // C 1200 < v ≤ 2500; D 600 ≤ v ≤ 1200; E < 600 ft/s. 1200 disputed (an older reproduction: D < 1200): straddles.
  asce7_16: {
    unit: FT,
    rows: [
      [600, 'D', 'E', 'D'],
      [1200, 'D|C', 'D', 'C'],
      [2500, 'C', 'C', 'B'],
      [5000, 'B', 'B', 'A'],
    ],
  },
  // ASCE/SEI 7-22 Table 20.2-1: "> x to y" bands, open below and closed above; E ≤ 500 ft/s.
  asce7_22: {
    unit: FT,
    rows: [
      [500, 'E', 'E', 'DE'],
      [700, 'DE', 'DE', 'D'],
      [1000, 'D', 'D', 'CD'],
      [1450, 'CD', 'CD', 'C'],
      [2100, 'C', 'C', 'BC'],
      [3000, 'BC', 'BC', 'B'],
      [5000, 'B', 'B', 'A'],
    ],
  },
  // EN 1998-1:2004 Table 3.1 (reproductions): A > 800; B 360–800; C 180–360; D < 180 m/s.
  // The side of 180 and 360 is not stated: both straddle.
  en1998_1: {
    unit: 1,
    rows: [
      [180, 'D|C', 'D', 'C'],
      [360, 'C|B', 'C', 'B'],
      [800, 'B', 'B', 'A'],
    ],
  },
};

describe('site class tables: every boundary, at and either side', () => {
  for (const id of ['asce7_16', 'asce7_22', 'en1998_1'] as const) {
    const { unit, rows } = BOUNDARIES[id];
    for (const [b, at, below, above] of rows) {
      it(`${id}: ${b} ${unit === 1 ? 'm/s' : 'ft/s'} is ${at}, just below ${below}, just above ${above}`, () => {
        const v = b * unit;
        // "X|Y": exactly on a disputed boundary both classes are listed (siteClassOf gives the slower).
        expect(siteClassesInRange(id, [v, v])).toEqual(at.split('|'));
        expect(siteClassOf(id, v)).toBe(at.split('|')[0]);
        expect(siteClassOf(id, v - 1e-6)).toBe(below);
        expect(siteClassOf(id, v + 1e-6)).toBe(above);
      });
    }
  }

  it('converts the ft/s boundaries exactly (1 ft = 0.3048 m)', () => {
    const ends = (t: typeof ASCE7_16_TABLE) => t.bands.slice(0, -1).map((b) => b.upper);
    ends(ASCE7_16_TABLE).forEach((got, i) => close(got, [182.88, 365.76, 762, 1524][i], 1e-15, `7-16 end ${i}`));
    ends(ASCE7_22_TABLE).forEach((got, i) =>
      close(got, [152.4, 213.36, 304.8, 441.96, 640.08, 914.4, 1524][i], 1e-15, `7-22 end ${i}`),
    );
    expect(ends(EN1998_1_TABLE)).toEqual([180, 360, 800]);
  });

  it('tiles the speed axis: neighbouring bands share an end, one side inclusive, both only at the disputed ends', () => {
    const disputed = new Set([`asce7_16 ${1200 * FT}`, 'en1998_1 180', 'en1998_1 360']);
    for (const t of [ASCE7_16_TABLE, ASCE7_22_TABLE, EN1998_1_TABLE]) {
      for (let i = 1; i < t.bands.length; i++) {
        expect(t.bands[i].lower).toBe(t.bands[i - 1].upper);
        const both = t.bands[i].lowerInclusive && t.bands[i - 1].upperInclusive;
        expect(both || t.bands[i].lowerInclusive !== t.bands[i - 1].upperInclusive, `${t.id} ${t.bands[i].lower}`).toBe(true);
        expect(both, `${t.id} ${t.bands[i].lower}`).toBe(disputed.has(`${t.id} ${t.bands[i].lower}`));
      }
    }
  });

  it('classes mid-band values as the tables print them', () => {
    expect(siteClassOf('asce7_16', 400 * FT)).toBe('E');
    expect(siteClassOf('asce7_22', 1700 * FT)).toBe('C');
    expect(siteClassOf('en1998_1', 1200)).toBe('A');
    expect(siteClassOf('en1998_1', 50)).toBe('D');
  });

  it('rejects a speed that is not a number or is negative', () => {
    expect(inputError(() => siteClassOf('en1998_1', NaN)).message).toBe('vs must be a finite speed above 0 m/s, but it is NaN.');
    expect(inputError(() => siteClassOf('en1998_1', 0)).message).toBe('vs must be a finite speed above 0 m/s, but it is 0.');
    expect(inputError(() => siteClassesInRange('en1998_1', [-5, 100])).message).toBe(
      'vs range low end must be 0 or more (the high end above 0), but it is -5.',
    );
  });
});

describe('straddling: every class in a range, never just one', () => {
  it('lists both classes when a range crosses a boundary, one when it does not', () => {
    expect(siteClassesInRange('en1998_1', [350, 370])).toEqual(['C', 'B']);
    expect(siteClassesInRange('en1998_1', [360, 370])).toEqual(['C', 'B']); // 360 itself straddles
    expect(siteClassesInRange('en1998_1', [360.1, 370])).toEqual(['B']);
    expect(siteClassesInRange('en1998_1', [300, 360])).toEqual(['C', 'B']);
    expect(siteClassesInRange('en1998_1', [300, 359.9])).toEqual(['C']);
    // 150 m/s = 492.1 ft/s (E) to 600 m/s = 1968.5 ft/s (C).
    expect(siteClassesInRange('asce7_22', [150, 600])).toEqual(['E', 'DE', 'D', 'CD', 'C']);
    expect(siteClassesInRange('asce7_16', [1000, Infinity])).toEqual(['B', 'A']);
  });

  it('siteClassesForRanges gives every class of all three tables from speed ranges', () => {
    // Vs30 350–370 m/s crosses EN 360 (C|B); v̄s100ft 350–370 m/s = 1148–1214 ft/s crosses
    // 7-16 1200 ft/s (D|C) and lies inside 7-22 CD (1000–1450 ft/s).
    const r = siteClassesForRanges({ vs30: [350, 370], vs100ft: [350, 370] });
    expect(r.classes).toEqual({ asce7_16: ['D', 'C'], asce7_22: ['CD'], en1998_1: ['C', 'B'] });
    expect(r.warnings).toEqual([
      'The average shear speed range 350–370 m/s crosses a class boundary of ASCE/SEI 7-16 Table 20.3-1: classes D, C are all possible.',
      'The average shear speed range 350–370 m/s crosses a class boundary of EN 1998-1:2004 Table 3.1: classes C, B are all possible.',
    ]);
    // With a thickness range reaching past 20 m, type E is possible and listed last.
    const e = siteClassesForRanges({
      vs30: [250, 300],
      vs100ft: [250, 300],
      typeE: { thickness: [18, 24], vs1: [200, 240], vs2: [850, 900] },
    });
    expect(e.classes.en1998_1).toEqual(['C', 'E']);
    expect(e.warnings.some((w) => w.includes('is possible within the ranges'))).toBe(true);
    expect(inputError(() => siteClassesForRanges({ vs30: [300, 250], vs100ft: [250, 300] })).message).toBe(
      'vs30 range is [300, 250]: the low end is above the high end.',
    );
  });

  it('one layer over a half-space with ranges crossing boundaries in all three tables', () => {
    // Invented case. Best: H 12 m, β1 280, β2 520. Ranges: H 10–14 m, β1 250–300, β2 450–600.
    // Vs30 low at (H 14, β1 250, β2 450): 30 / (14/250 + 16/450) = 30/0.0915556 = 327.67 m/s → EN C
    // Vs30 high at (H 10, β1 300, β2 600): 30 / (10/300 + 20/600) = 30/0.0666667 = 450 m/s → EN B
    // v̄s100ft low: 30.48 / (14/250 + 16.48/450) = 329.08 m/s = 1079.7 ft/s → 7-16 D, 7-22 CD
    // v̄s100ft high: 30.48 / (10/300 + 20.48/600) = 451.78 m/s = 1482.2 ft/s → 7-16 C, 7-22 C
    const s = siteFiguresForRanges(
      { thickness: 12, vs1: 280, vs2: 520, density1: 1800, density2: 2000 },
      { thickness: [10, 14], vs1: [250, 300], vs2: [450, 600] },
    );
    close(s.vs30.low, 30 / (14 / 250 + 16 / 450), 1e-14, 'Vs30 low');
    close(s.vs30.high, 450, 1e-14, 'Vs30 high');
    close(s.vs100ft.low, 30.48 / (14 / 250 + 16.48 / 450), 1e-14, 'vs100ft low');
    close(s.vs100ft.high, 30.48 / (10 / 300 + 20.48 / 600), 1e-14, 'vs100ft high');
    close(s.vs30.best, 30 / (12 / 280 + 18 / 520), 1e-14, 'Vs30 best');
    expect(s.classes).toEqual({ asce7_16: ['D', 'C'], asce7_22: ['CD', 'C'], en1998_1: ['C', 'B'] });
    expect(s.warnings).toContain(
      'The average shear speed range 327.7–450 m/s crosses a class boundary of EN 1998-1:2004 Table 3.1: classes C, B are all possible.',
    );
    expect(s.warnings.filter((w) => w.includes('crosses a class boundary'))).toHaveLength(3);
    // f0 = β1/(4H) over the box: 250/(4·14) to 300/(4·10) Hz (Kramer 1996, ch. 7).
    close(s.f0_hz.low, 250 / 56, 1e-15, 'f0 low');
    close(s.f0_hz.high, 7.5, 1e-15, 'f0 high');
    close(s.t0_s.low, 40 / 300, 1e-15, 'T0 low');
    close(s.t0_s.high, 56 / 250, 1e-15, 'T0 high');
    close(s.impedance_ratio.low, (1800 * 250) / (2000 * 600), 1e-15, 'impedance low');
    close(s.impedance_ratio.high, (1800 * 300) / (2000 * 450), 1e-15, 'impedance high');
    expect(s.caution).toBe(CAUTION);
  });

  it('the box corners give the exact Vs30 range (checked on a dense grid, boxes crossing 30 m and overlapping speeds)', () => {
    // Proof in core/site/site.ts: the average is monotone in each of H, β1, β2 with
    // the others fixed, so its extremes over a box sit at corners. Check: no
    // point of a 9×9×9 grid (corners included) lies outside [low, high], and
    // the grid reaches both ends.
    const boxes: [[number, number], [number, number], [number, number]][] = [
      [[5, 40], [150, 400], [300, 900]],
      [[20, 35], [200, 260], [240, 300]], // β1 range overlaps β2 range
      [[1, 3], [100, 120], [1000, 3000]],
    ];
    for (const [H, V1, V2] of boxes) {
      const mid = (r: [number, number]) => (r[0] + r[1]) / 2;
      const s = siteFiguresForRanges(
        { thickness: mid(H), vs1: V1[0], vs2: V2[1], density1: 1800, density2: 2000 },
        { thickness: H, vs1: V1, vs2: V2 },
      );
      for (const [depth, fig] of [
        [30, s.vs30],
        [30.48, s.vs100ft],
      ] as const) {
        let lo = Infinity;
        let hi = -Infinity;
        const step = (r: [number, number], k: number) => r[0] + ((r[1] - r[0]) * k) / 8;
        for (let i = 0; i <= 8; i++)
          for (let j = 0; j <= 8; j++)
            for (let k = 0; k <= 8; k++) {
              const h = step(H, i);
              const a = step(V1, j);
              const b = step(V2, k);
              const inLayer = Math.min(h, depth);
              const v = depth / (inLayer / a + (depth - inLayer) / b);
              lo = Math.min(lo, v);
              hi = Math.max(hi, v);
            }
        close(lo, fig.low, 1e-14, `grid min, depth ${depth}, box ${JSON.stringify([H, V1, V2])}`);
        close(hi, fig.high, 1e-14, `grid max, depth ${depth}, box ${JSON.stringify([H, V1, V2])}`);
      }
    }
  });

  it('takes a one-sided thickness interval (no upper bound)', () => {
    const s = siteFiguresForRanges(
      { thickness: 40, vs1: 200, vs2: 700, density1: 1800, density2: 2000 },
      { thickness: [25, Infinity], vs1: [180, 220], vs2: [600, 800] },
    );
    // H ≥ 30 m puts the whole 30 m in the layer: Vs30 low = β1 low.
    expect(s.vs30.low).toBe(180);
    expect(s.f0_hz.low).toBe(0);
    expect(s.t0_s.high).toBe(Infinity);
    expect(s.warnings).toContain('The thickness has no upper bound, so f0 has no lower bound and T0 no upper bound.');
  });

  it('widens the ASCE/SEI 7-22 range by 1.3 for estimated speeds (from memory, verify)', () => {
    // 40 m at 400 m/s: v̄s100ft = 400 m/s = 1312.3 ft/s → 7-22 CD.
    // ÷1.3: 307.69 m/s = 1009.5 ft/s (CD); ×1.3: 520 m/s = 1706.0 ft/s (C).
    const m = oneLayer(40, 400, 900);
    expect(siteFigures(m).classes.asce7_22).toEqual(['CD']);
    const s = siteFigures(m, { estimatedVelocities: true });
    expect(s.classes.asce7_22).toEqual(['CD', 'C']);
    expect(s.classes.asce7_16).toEqual(['C']);
    expect(s.classes.en1998_1).toEqual(['B']);
    expect(s.warnings[0]).toBe(
      // No reproduction of ASCE/SEI 7-22 has a ×1.3 rule: the text labels it the user's own check and names no standard.
      'Speed sensitivity check (±30 %, chosen by the user, not a rule of any standard): the ASCE/SEI 7-22 classes also cover the average speed divided and multiplied by 1.3.',
    );
  });
});

describe('EN 1998-1:2004 Table 3.1 ground type E', () => {
  const en = (m: LayeredModel) => siteFigures(m).classes.en1998_1;

  it('is recognised: 5–20 m of type C or D soil (vs < 360) over vs > 800', () => {
    for (const h of [10, 20]) expect(en(oneLayer(h, 200, 900)), `H=${h}`).toEqual(['E']);
    // Exactly 5 m is both type E (5–20 m) and type A (at most 5 m of weaker material).
    expect(en(oneLayer(5, 200, 900))).toEqual(['A', 'E']);
    expect(en(oneLayer(10, 359, 801))).toEqual(['E']);
    expect(en(oneLayer(10, 150, 900))).toEqual(['E']); // type D soil
  });

  it('is not recognised thicker than 20 m, thinner than 5 m, on a base ≤ 800 m/s, or with a layer ≥ 360 m/s', () => {
    // 21 m at 200 over 900: Vs30 = 30/(21/200 + 9/900) = 260.87 → C.
    expect(en(oneLayer(21, 200, 900))).toEqual(['C']);
    // 4.9 m at 200 over 900: Vs30 = 30/(4.9/200 + 25.1/900) = 571.8 → B by speed, but type A by its description
    // (at most 5 m of weaker material over rock-like ground faster than 800 m/s).
    expect(en(oneLayer(4.9, 200, 900))).toEqual(['A']);
    // Base exactly 800 is not "> 800": Vs30 = 30/(10/200 + 20/800) = 400 → B.
    expect(en(oneLayer(10, 200, 800))).toEqual(['B']);
    // Layer at 360 is type B soil, not C or D.
    expect(en(oneLayer(10, 360, 900))).toEqual(['B']);
  });

  it('names the Vs30 type it replaces and warns near "about 5 m and 20 m"', () => {
    const s = siteFigures(oneLayer(10, 200, 900));
    // Vs30 = 30/(10/200 + 20/900) = 415.38 → B by Vs30 alone.
    expect(s.warnings).toContain(
      'EN 1998-1 Table 3.1 ground type E: 10 m of type C or D soil (vs < 360 m/s) over material faster than 800 m/s. By Vs30 alone it would be type B.',
    );
    const edge = 'EN 1998-1 type E speaks of "about 5 m and 20 m" of soft soil; this layer is near one of those ends, so the type E decision is borderline.';
    expect(siteFigures(oneLayer(19.5, 200, 900)).warnings).toContain(edge);
    expect(siteFigures(oneLayer(20.5, 200, 900)).warnings).toContain(edge);
    expect(siteFigures(oneLayer(10, 200, 900)).warnings).not.toContain(edge);
  });

  it('is recognised for a soft column of several layers over fast material', () => {
    const m: LayeredModel = {
      layers: [
        { thickness: 4, vs: 150, density: 1700 },
        { thickness: 6, vs: 300, density: 1800 },
        { thickness: 10, vs: 1000, density: 2300 },
      ],
      halfspace: { vs: 1500, density: 2400 },
    };
    expect(en(m)).toEqual(['E']);
    expect(en({ ...m, layers: [m.layers[0], { ...m.layers[1], vs: 500 }, m.layers[2]] })).not.toContain('E');
  });

  it('over ranges: certain, possible or no', () => {
    expect(enTypeE({ thickness: [8, 12], vs1: [180, 220], vs2: [850, 950] })).toBe('certain');
    expect(enTypeE({ thickness: [15, 25], vs1: [180, 220], vs2: [850, 950] })).toBe('possible');
    expect(enTypeE({ thickness: [8, 12], vs1: [300, 400], vs2: [850, 950] })).toBe('possible');
    expect(enTypeE({ thickness: [8, 12], vs1: [180, 220], vs2: [700, 850] })).toBe('possible');
    expect(enTypeE({ thickness: [21, 30], vs1: [180, 220], vs2: [850, 950] })).toBe('no');
    expect(enTypeE({ thickness: [8, 12], vs1: [180, 220], vs2: [600, 800] })).toBe('no');
  });

  it('lists E beside the Vs30 types when only possible, and alone when certain', () => {
    // Possible: H 15–25 m. Vs30 from 30/(25/180 + 5/850) = 207.2 to 30/(15/220 + 15/950) = 357.3 → C only.
    const possible = siteFiguresForRanges(
      { thickness: 18, vs1: 200, vs2: 900, density1: 1800, density2: 2200 },
      { thickness: [15, 25], vs1: [180, 220], vs2: [850, 950] },
    );
    expect(possible.classes.en1998_1).toEqual(['C', 'E']);
    expect(possible.warnings).toContain(
      'EN 1998-1 Table 3.1 ground type E (5–20 m of type C or D soil over material faster than 800 m/s) is possible within the ranges but not certain, so it is listed with the types by Vs30.',
    );
    // Certain: H 8–12 m. Vs30 from 30/(12/180 + 18/850) = 341.5 (C) to 30/(8/220 + 22/950) = 504.0 (B).
    const certain = siteFiguresForRanges(
      { thickness: 10, vs1: 200, vs2: 900, density1: 1800, density2: 2200 },
      { thickness: [8, 12], vs1: [180, 220], vs2: [850, 950] },
    );
    expect(certain.classes.en1998_1).toEqual(['E']);
    expect(certain.warnings).toContain(
      'EN 1998-1 Table 3.1 ground type E over the whole range: 8–12 m of type C or D soil (vs < 360 m/s) over material faster than 800 m/s. By Vs30 alone it would be type C, B.',
    );
  });
});

describe('f0, T0 and the impedance ratio (Kramer 1996, ch. 7)', () => {
  it('one layer: f0 = β1/(4H), T0 = 4H/β1, ratio ρ1β1/(ρ2β2), all closed forms', () => {
    // H 10 m, β1 200 m/s: f0 = 200/40 = 5 Hz, T0 = 0.2 s; ratio = 1800·200/(2200·900) = 0.181818…
    const s = siteFigures(oneLayer(10, 200, 900));
    expect(s.f0_hz).toEqual({ best: 5, low: 5, high: 5 });
    expect(s.t0_s.best).toBe(0.2);
    close(s.impedance_ratio.best, (1800 * 200) / (2200 * 900), 1e-15, 'impedance ratio');
    expect(s.warnings.some((w) => w.includes('approximation'))).toBe(false);
  });

  it('several layers: f0 ≈ 1/(4 Σ h_i/β_i), labelled an approximation', () => {
    // Σ h/β = 5/150 + 10/250 + 8/400 = 56/600 s → f0 ≈ 600/224 = 2.678571… Hz, T0 = 224/600 s.
    const s = siteFigures(layered);
    close(s.f0_hz.best, 600 / 224, 1e-14, 'f0');
    close(s.t0_s.best, 224 / 600, 1e-14, 'T0');
    expect(s.warnings[0]).toBe(
      'f0 and T0 use the approximation f0 ≈ 1/(4 Σ h_i/β_i) over the 3 layers above the half-space (exact only for one uniform layer, Kramer 1996, ch. 7); the true resonance of a layered column can differ.',
    );
    // Column: 23 m, travel time 56/600 s → 246.43 m/s; mean density (5·1700 + 10·1800 + 8·1900)/23 = 1813.04.
    const rho = (5 * 1700 + 10 * 1800 + 8 * 1900) / 23;
    close(s.impedance_ratio.best, (rho * (23 / (56 / 600))) / (2000 * 600), 1e-14, 'impedance ratio');
    expect(s.warnings[1]).toMatch(/^The impedance ratio uses the travel-time average speed .*approximation for several layers\.$/);
  });
});

describe('siteFigures: the whole result', () => {
  it('classes the hand-worked example in all three tables and carries the caution and standing warnings', () => {
    // Vs30 285.71 m/s → EN C; v̄s100ft 288.09 m/s = 945.2 ft/s → 7-16 D, 7-22 D.
    const s = siteFigures(layered);
    expect(s.classes).toEqual({ asce7_16: ['D'], asce7_22: ['D'], en1998_1: ['C'] });
    expect(s.vs30).toEqual({ best: s.vs30.best, low: s.vs30.best, high: s.vs30.best });
    expect(s.caution).toBe(CAUTION);
    expect(s.warnings).toContain(
      'The layers end at 23 m; the half-space speed (600 m/s) is taken to continue down to 30 m and 30.48 m for the averages.',
    );
    expect(siteFigures(oneLayer(30.2, 200, 900)).warnings).toContain(
      'The layers end at 30.2 m; the half-space speed (900 m/s) is taken to continue down to 30.48 m for the 100 ft average.',
    );
    expect(siteFigures(oneLayer(31, 200, 900)).warnings.some((w) => w.startsWith('The layers end'))).toBe(false);
    expect(s.warnings.some((w) => w.startsWith('ASCE/SEI 7 site class F'))).toBe(true);
    expect(s.warnings.some((w) => w.startsWith('EN 1998-1 ground types S1'))).toBe(true);
    expect(s.warnings.some((w) => w.includes('crosses a class boundary'))).toBe(false);
  });

  it('rejects bad ranges with messages naming the field', () => {
    const best = { thickness: 10, vs1: 200, vs2: 900, density1: 1800, density2: 2200 };
    const ok = { thickness: [8, 12] as [number, number], vs1: [180, 220] as [number, number], vs2: [850, 950] as [number, number] };
    expect(inputError(() => siteFiguresForRanges(best, { ...ok, vs1: [220, 180] })).message).toBe(
      'ranges.vs1 is [220, 180]: the low end is above the high end.',
    );
    expect(inputError(() => siteFiguresForRanges(best, { ...ok, thickness: [11, 12] })).message).toBe(
      'The best thickness (10) lies outside its range [11, 12].',
    );
    expect(inputError(() => siteFiguresForRanges(best, { ...ok, vs2: [NaN, 950] })).message).toBe(
      'ranges.vs2 low end must be a number, but it is NaN.',
    );
    expect(inputError(() => siteFiguresForRanges(best, { ...ok, vs2: [850, Infinity] })).message).toBe(
      'ranges.vs2 high end must be finite, but it is Infinity.',
    );
    expect(inputError(() => siteFiguresForRanges({ ...best, density1: 1.8 }, ok)).message).toBe(
      'density1 is 1.8 kg/m³, below the 1000 kg/m³ lower bound for density. It looks like g/cm³; enter the density in kg/m³.',
    );
    expect(inputError(() => siteFiguresForRanges({ ...best, vs2: 150 }, ok)).field).toBe('halfspace.vs');
  });
});

describe('EN 1998-1:2004 Table 3.1 ground type A: at most 5 m of weaker material (issue 9 §6)', () => {
  it('4 m of 150 m/s over 1000 m/s is type A, not B by Vs30, and says so', () => {
    const s = siteFigures(oneLayer(4, 150, 1000));
    // Vs30 = 30/(4/150 + 26/1000) = 569.6 m/s: B by speed alone.
    close(s.vs30.best, 30 / (4 / 150 + 26 / 1000), 1e-12, 'Vs30');
    expect(s.classes.en1998_1).toEqual(['A']);
    expect(s.warnings).toContain(
      'EN 1998-1 Table 3.1 ground type A includes at most 5 m of weaker material at the surface: 4 m of it lies over material faster than 800 m/s. By Vs30 alone it would be type B.',
    );
  });
  it('is not applied over a base of 800 m/s or slower, or above 5 m of weaker material', () => {
    expect(siteFigures(oneLayer(4, 150, 800)).classes.en1998_1).toEqual(['B']);
    expect(siteFigures(oneLayer(6, 150, 1000)).classes.en1998_1).toEqual(['E']);
  });
  it('over ranges: listed as possible when the thickness range reaches 5 m or less, and alone when it stays there', () => {
    const r = (thickness: [number, number]) =>
      siteClassesForRanges({ vs30: [500, 600], vs100ft: [500, 600], typeE: { thickness, vs1: [140, 160], vs2: [950, 1050] } }).classes.en1998_1;
    expect(r([3, 4.5])).toEqual(['A']);
    expect(r([4, 8])).toEqual(['B', 'A', 'E']);
  });
});

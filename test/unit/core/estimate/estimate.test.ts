/**
 * The layer-thickness estimate (core/estimate/estimate.ts): recovery of the model
 * behind exact synthetic picks, the reported minima, open intervals,
 * diagnostics, defaults and every bad input.
 *
 * Synthetic picks come from the core's own closed-form forward model
 * (core/dispersion/love-layer.ts: Aki & Richards, *Quantitative Seismology*, 2nd ed.
 * 2002, §7.2–7.3); the estimate must give back the model that made them.
 * The model (H = 12 m, β1 = 200 m/s, β2 = 500 m/s) is invented.
 */
import { describe, expect, it } from 'vitest';
import { CAUTION } from '../../../../core/shared/caution';
import {
  DEFAULT_DENSITY_HALFSPACE,
  DEFAULT_DENSITY_LAYER,
  DEFAULT_RANGE_RULE,
  DELTA_CHI2_68,
  DELTA_CHI2_95,
  estimateLayer,
  type EstimateOptions,
} from '../../../../core/estimate/estimate';
import { loveCutoffHz, loveVelocities, type TwoLayer } from '../../../../core/dispersion/love-layer';
import { DEFAULT_SD_FRACTION, type Pick } from '../../../../core/picks/picks';
import { inputError as inputErrorOf } from '../../../input-error';

const TRUE: TwoLayer = { h: 12, vs1: 200, vs2: 500, rho1: DEFAULT_DENSITY_LAYER, rho2: DEFAULT_DENSITY_HALFSPACE };

/** Exact picks of `m`: log-spaced frequencies, every third a phase pick. */
function exactPicks(m: TwoLayer, count: number, fFrom: number, fTo: number, mode = 0, sdFraction = 0.03): Pick[] {
  const out: Pick[] = [];
  for (let i = 0; i < count; i++) {
    const f = fFrom * Math.pow(fTo / fFrom, i / (count - 1));
    const v = loveVelocities(m, f, mode);
    const phase = i % 3 === 0;
    const velocity = phase ? v.phase : v.group;
    out.push({ frequency: f, velocity, kind: phase ? 'phase' : 'group', mode, sd: sdFraction * velocity });
  }
  return out;
}

function relErr(got: number, want: number): number {
  return Math.abs(got - want) / Math.abs(want);
}

function expectRecovered(got: number, want: number, tol: number, what: string) {
  const e = relErr(got, want);
  if (!(e <= tol)) throw new Error(`${what}: expected ${want}, got ${got}, relative difference ${e} > tolerance ${tol}`);
}

describe('exact synthetic picks recover the model to 1e-6 relative', () => {
  const picks = exactPicks(TRUE, 30, 3, 40);

  it('(a) thickness only, speeds and densities known', () => {
    const r = estimateLayer(picks, { vs1: 200, vs2: 500 });
    expectRecovered(r.thickness.best, 12, 1e-6, 'H');
    expect(r.vs1).toMatchObject({ best: 200, low95: 200, high95: 200, free: false });
    expect(r.alternatives).toHaveLength(1);
    expect(r.chi2).toBeLessThan(1e-12);
    expect(r.dof).toBe(29);
  });

  it('(a) with densities given, not defaulted', () => {
    const m = { ...TRUE, rho1: 1650, rho2: 2400 };
    const r = estimateLayer(exactPicks(m, 20, 3, 40), { vs1: 200, vs2: 500, density1: 1650, density2: 2400 });
    expectRecovered(r.thickness.best, 12, 1e-6, 'H');
    expect(r.density1).toBe(1650);
    expect(r.density2).toBe(2400);
    expect(r.density1Defaulted).toBe(false);
    expect(r.warnings.join(' ')).not.toMatch(/No density was given/);
  });

  it('(b) thickness and both speeds jointly', () => {
    const r = estimateLayer(picks);
    expectRecovered(r.thickness.best, 12, 1e-6, 'H');
    expectRecovered(r.vs1.best, 200, 1e-6, 'β1');
    expectRecovered(r.vs2.best, 500, 1e-6, 'β2');
    expect(r.vs1.free && r.vs2.free).toBe(true);
    expect(r.dof).toBe(27);
  });

  it('(b) with first-higher-mode phase picks mixed in', () => {
    const f1 = loveCutoffHz(TRUE, 1);
    const higher = exactPicks(TRUE, 8, f1 * 1.2, f1 * 3, 1);
    const r = estimateLayer([...exactPicks(TRUE, 12, 3, 40), ...higher]);
    expectRecovered(r.thickness.best, 12, 1e-6, 'H');
    expectRecovered(r.vs1.best, 200, 1e-6, 'β1');
    expectRecovered(r.vs2.best, 500, 1e-6, 'β2');
  });

  it('(c) layer speed given, half-space speed estimated', () => {
    const r = estimateLayer(picks, { vs1: 200 });
    expectRecovered(r.thickness.best, 12, 1e-6, 'H');
    expectRecovered(r.vs2.best, 500, 1e-6, 'β2');
    expect(r.vs1.free).toBe(false);
    expect(r.dof).toBe(28);
  });

  it('(c) half-space speed given, layer speed estimated', () => {
    const r = estimateLayer(picks, { vs2: 500 });
    expectRecovered(r.thickness.best, 12, 1e-6, 'H');
    expectRecovered(r.vs1.best, 200, 1e-6, 'β1');
    expect(r.vs2).toMatchObject({ best: 500, low68: 500, high95: 500, free: false });
  });
});

describe('intervals', () => {
  it('bracket the best value, 95 % containing 68 %, at the stated Δχ² levels', () => {
    expect(DELTA_CHI2_68).toBe(1);
    // 95 % point of χ² with one degree of freedom = (normal 97.5 % point)², 1.959963984540054².
    expect(DELTA_CHI2_95).toBeCloseTo(1.959963984540054 ** 2, 14);
    const r = estimateLayer(exactPicks(TRUE, 30, 3, 40));
    for (const e of [r.thickness, r.vs1, r.vs2]) {
      expect(e.low95).toBeLessThan(e.low68);
      expect(e.low68).toBeLessThan(e.best);
      expect(e.best).toBeLessThan(e.high68);
      expect(e.high68).toBeLessThan(e.high95);
      expect(e.openLow || e.openHigh).toBe(false);
    }
    expect(r.method).toMatch(/profile likelihood/);
    expect(r.method).toMatch(/Δχ² = 1 \(68 %\) and 3\.84 \(95 %\)/);
  });

  it('on exact data, the 1σ and 2σ widths in thickness scale as √Δχ² (locally quadratic profile)', () => {
    const r = estimateLayer(exactPicks(TRUE, 30, 3, 40), { vs1: 200, vs2: 500 });
    const w68 = Math.log(r.thickness.high68 / r.thickness.low68);
    const w95 = Math.log(r.thickness.high95 / r.thickness.low95);
    // For a quadratic profile the ratio is √3.84 = 1.96; a 5 % allowance covers the curvature over ±2σ.
    expect(w95 / w68).toBeGreaterThan(1.96 * 0.95);
    expect(w95 / w68).toBeLessThan(1.96 * 1.05);
  });

  it('report the H–β1 correlation when β1 is free, and NaN when it is fixed', () => {
    const picks = exactPicks(TRUE, 30, 3, 40);
    const joint = estimateLayer(picks);
    expect(joint.correlationThicknessVs1).toBeGreaterThan(-1);
    expect(joint.correlationThicknessVs1).toBeLessThan(1);
    // A faster layer needs a thicker layer to keep the same dispersion: positive trade-off.
    expect(joint.correlationThicknessVs1).toBeGreaterThan(0);
    expect(Number.isNaN(estimateLayer(picks, { vs1: 200 }).correlationThicknessVs1)).toBe(true);
  });
});

describe('ambiguity and unconstrained cases', () => {
  // Airy minimum of the fundamental group velocity of TRUE, by a fine scan (0.001 Hz steps).
  let fAiry = 0;
  let uAiry = Infinity;
  for (let f = 3; f < 8; f += 0.001) {
    const u = loveVelocities(TRUE, f, 0).group;
    if (u < uAiry) {
      uAiry = u;
      fAiry = f;
    }
  }
  const xAiry = (fAiry * TRUE.h) / TRUE.vs1;

  it('group picks just above the Airy frequency: both thicknesses are reported, either side of the minimum', () => {
    const picks: Pick[] = [1.3, 1.32, 1.34].map((k) => ({
      frequency: fAiry * k,
      velocity: loveVelocities(TRUE, fAiry * k, 0).group,
      kind: 'group',
      mode: 0,
    }));
    const r = estimateLayer(picks, { vs1: 200, vs2: 500 });
    expect(r.alternatives.length).toBe(2);
    const [a, b] = r.alternatives;
    expect(a.rank).toBe(1);
    expect(b.rank).toBe(2);
    expect(b.deltaChi2).toBeGreaterThanOrEqual(0);
    expect(b.deltaChi2).toBeLessThan(DELTA_CHI2_95);
    const xs = r.alternatives.map((m) => (fAiry * 1.32 * m.thickness.best) / 200);
    // One explanation lies on the high-frequency side of the Airy minimum (the truth), one on the low side.
    expect(Math.max(...xs)).toBeGreaterThan(xAiry);
    expect(Math.min(...xs)).toBeLessThan(xAiry);
    expectRecovered(a.thickness.best, 12, 1e-6, 'best H');
    // The headline interval spans both.
    expect(r.thickness.low95).toBeLessThanOrEqual(b.thickness.best);
    expect(r.thickness.high95).toBeGreaterThanOrEqual(a.thickness.best);
    expect(r.warnings.join(' ')).toMatch(/fit 2 separate models/);
  });

  it('a single group pick below β1 gives two exact thicknesses', () => {
    const f = 1.5 * fAiry;
    const u = loveVelocities(TRUE, f, 0).group;
    const r = estimateLayer([{ frequency: f, velocity: u, kind: 'group', mode: 0 }], { vs1: 200, vs2: 500 });
    expect(r.alternatives).toHaveLength(2);
    for (const m of r.alternatives) {
      const got = loveVelocities({ ...TRUE, h: m.thickness.best }, f, 0).group;
      expectRecovered(got, u, 1e-9, `group velocity at H = ${m.thickness.best}`);
    }
    expect(r.dof).toBe(0);
    // Two models fitting is worse news than an untestable fit, so it comes first.
    expect(r.warnings[0]).toMatch(/^The picks fit 2 separate models almost equally well/);
    expect(r.warnings[1]).toBe('There are as many picks as free parameters, so the fit cannot be tested; add picks.');
    expect(r.diagnostics.fitDetail).toMatch(/^χ² = \S+ with no degrees of freedom left$/);
  });

  it('short-wavelength picks only: the thickness is open above, with advice on what would resolve it', () => {
    const deep = { ...TRUE, h: 30 };
    const picks: Pick[] = Array.from({ length: 10 }, (_, i) => {
      const f = 20 + 2 * i;
      const u = loveVelocities(deep, f, 0).group;
      return { frequency: f, velocity: u, kind: 'group', mode: 0, sd: 0.03 * u };
    });
    const r = estimateLayer(picks, { vs1: 200, vs2: 500, thicknessRange: [1, 100] });
    expect(r.thickness.openHigh).toBe(true);
    expect(r.thickness.high95).toBe(100);
    expect(r.thickness.low95).toBeLessThan(30);
    expect(r.diagnostics.thicknessResolved).toBe(false);
    const text = r.warnings.join('\n');
    expect(text).toMatch(/do not constrain the thickness: the 95 % interval is open, fitting up to the high end of the search range \(100 m\)/);
    expect(text).toMatch(/deeper than half the longest picked wavelength/);
    expect(text).toMatch(/as they sample the layer alone they say little about the half-space/);
    expect(text).toMatch(/To resolve it, pick wavelengths of at least/);
    expect(text).toMatch(/with a spread of at least/);
    expect(text).toMatch(/common-practice rules of thumb/);
  });

  it('joint fit on short-wavelength picks says the half-space speed is not constrained', () => {
    const picks: Pick[] = Array.from({ length: 10 }, (_, i) => {
      const f = 25 + 2 * i;
      const u = loveVelocities(TRUE, f, 0).group;
      return { frequency: f, velocity: u, kind: 'group', mode: 0, sd: 0.03 * u };
    });
    const r = estimateLayer(picks);
    expect(r.vs2.openLow || r.vs2.openHigh).toBe(true);
    expect(r.diagnostics.unconstrained.map((u) => u.parameter)).toContain('vs2');
    expect(r.warnings.join(' ')).toMatch(/do not constrain the half-space speed β2/);
    // Wide, not confident: the 95 % range of β2 covers the truth.
    expect(r.vs2.low95).toBeLessThanOrEqual(500);
    expect(r.vs2.high95).toBeGreaterThanOrEqual(500);
  });
});

describe('diagnostics in plain words', () => {
  it('names an outlier pick by its label, with its misfit in σ', () => {
    const picks = exactPicks(TRUE, 15, 3, 40);
    picks[6] = { ...picks[6], velocity: picks[6].velocity * 1.25, id: 'P7' };
    const r = estimateLayer(picks, { vs1: 200, vs2: 500 });
    expect(r.diagnostics.outliers.map((o) => o.index)).toContain(6);
    expect(r.warnings.join('\n')).toMatch(/Pick 7 \(id "P7"\) \([\d.]+ Hz, phase, mode 0, [\d.]+ m\/s\) misfits the best model by [\d.]+ standard deviations/);
    expect(r.diagnostics.fit).toBe('poor');
    expect(r.intervalScale).toBeGreaterThan(1);
    // The poor fit in plain words; its numbers, the scale among them, only in the detail line.
    expect(r.warnings.find((w) => w.startsWith('The picks scatter more'))).toMatch(/the intervals were widened to allow for it\.$/);
    for (const w of r.warnings) expect(w).not.toMatch(/χ²|degrees of freedom/);
    expect(r.diagnostics.fitDetail).toMatch(/with 14 degrees of freedom; above its 95 % point \S+; the interval levels were scaled by \S+\)$/);
  });

  it('flags a pick that another mode fits better', () => {
    const picks = exactPicks(TRUE, 15, 3, 40);
    const f = loveCutoffHz(TRUE, 1) * 1.5;
    // A first-higher-mode phase velocity mislabelled as mode 0.
    picks.push({ frequency: f, velocity: loveVelocities(TRUE, f, 1).phase, kind: 'phase', mode: 0, sd: 5 });
    const r = estimateLayer(picks, { vs1: 200, vs2: 500 });
    const flagged = r.diagnostics.betterMode.find((b) => b.index === 15);
    expect(flagged?.mode).toBe(1);
    expect(r.warnings.join('\n')).toMatch(/Pick 16 .* fits mode 1 of the best model better/);
  });

  it('flags a pick below its mode’s cutoff and a phase pick outside (β1, β2)', () => {
    const picks = exactPicks(TRUE, 15, 3, 40);
    const f1 = loveCutoffHz(TRUE, 1);
    picks.push({ frequency: f1 * 0.8, velocity: 450, kind: 'phase', mode: 1, sd: 10 });
    // 4 sd below β1 = 200 m/s: beyond the 3-sd allowance the diagnostic makes for the pick's own noise (issue 9 §3).
    picks.push({ frequency: 35.5, velocity: 180, kind: 'phase', mode: 0, sd: 5 });
    const r = estimateLayer(picks, { vs1: 200, vs2: 500 });
    expect(r.diagnostics.belowCutoff.map((b) => b.index)).toContain(15);
    expect(r.diagnostics.outsideTrapping.map((b) => b.index)).toContain(16);
    const text = r.warnings.join('\n');
    expect(text).toMatch(/Pick 16 .* lies below the cutoff of mode 1/);
    expect(text).toMatch(/Pick 17 .* lies outside what the best model can carry: a phase velocity must lie between the layer and half-space speeds \(200–500 m\/s\)/);
  });

  it('says how many picks used the default standard deviation, and that densities were defaulted', () => {
    const picks = exactPicks(TRUE, 12, 3, 40).map((p, i) => (i < 5 ? { ...p, sd: undefined } : p));
    const r = estimateLayer(picks, { vs1: 200, vs2: 500 });
    expect(r.defaultedSdCount).toBe(5);
    expect(r.pickFit.sd[0]).toBeCloseTo(DEFAULT_SD_FRACTION * picks[0].velocity, 12);
    const text = r.warnings.join('\n');
    expect(text).toMatch(/5 of 12 picks gave no sd_m_s; each uses 3 % of its velocity \(common practice/);
    expect(text).toMatch(/used 1800 kg\/m³ for the layer and 2100 kg\/m³ for the half-space \(common practice/);
    expect(r.density1).toBe(DEFAULT_DENSITY_LAYER);
    expect(r.density2).toBe(DEFAULT_DENSITY_HALFSPACE);
  });

  it('states the fit in plain words with no statistics in the sentence, keeps χ²/dof in the detail line, and the caution', () => {
    const r = estimateLayer(exactPicks(TRUE, 12, 3, 40), { vs1: 200, vs2: 500 });
    expect(r.warnings).toContain('The picks scatter less than their standard deviations suggest: the standard deviations may be too large, so the intervals may be too wide.');
    for (const w of r.warnings) expect(w).not.toMatch(/χ²|degrees of freedom/);
    // Exact picks: χ² ≈ 0, below the 5 % point of χ² with 11 degrees of freedom (12 picks, thickness free).
    expect(r.diagnostics.fit).toBe('too-good');
    expect(r.diagnostics.fitDetail).toMatch(/^χ²\/dof = \S+ \(χ² = \S+ with 11 degrees of freedom; below its 5 % point \S+\)$/);
    expect(r.caution).toBe(CAUTION);
  });
});

describe('the result', () => {
  const r = estimateLayer(exactPicks(TRUE, 20, 3, 40));

  it('is structured-clone-able (for the compute worker) and keeps its typed arrays', () => {
    const copy = structuredClone(r);
    expect(copy.thickness).toEqual(r.thickness);
    expect(copy.misfitMap.chi2).toBeInstanceOf(Float64Array);
    expect(copy.misfitMap.chi2.length).toBe(r.misfitMap.rows * r.misfitMap.cols);
    expect(copy.pickFit.predicted).toEqual(r.pickFit.predicted);
  });

  it('has a misfit map on thickness × β1, row-major, whose smallest entry lies next to the best model', () => {
    const m = r.misfitMap;
    expect(m.xName).toBe('thickness_m');
    expect(m.yName).toBe('vs1_m_s');
    expect(m.x.length).toBe(m.cols);
    expect(m.y.length).toBe(m.rows);
    let best = Infinity;
    let at = -1;
    for (let i = 0; i < m.chi2.length; i++) if (m.chi2[i] < best) [best, at] = [m.chi2[i], i];
    const col = at % m.cols;
    const row = (at - col) / m.cols;
    const hStep = m.x[1] / m.x[0];
    const bStep = m.y[1] / m.y[0];
    expect(Math.abs(Math.log(m.x[col] / 12))).toBeLessThanOrEqual(Math.log(hStep) * 1.01);
    expect(Math.abs(Math.log(m.y[row] / 200))).toBeLessThanOrEqual(Math.log(bStep) * 1.01);
  });

  it('has a single-row map on thickness when both speeds are given, and a β2 map when only β1 is', () => {
    const picks = exactPicks(TRUE, 12, 3, 40);
    const a = estimateLayer(picks, { vs1: 200, vs2: 500 }).misfitMap;
    expect(a.rows).toBe(1);
    expect(a.y[0]).toBe(200);
    const c = estimateLayer(picks, { vs1: 200 }).misfitMap;
    expect(c.yName).toBe('vs2_m_s');
    expect(c.y[0]).toBeGreaterThanOrEqual(200);
  });

  it('reports progress from 0 to 1, never going back', () => {
    const seen: number[] = [];
    estimateLayer(exactPicks(TRUE, 12, 3, 40), { vs1: 200, onProgress: (x) => seen.push(x) });
    expect(seen[0]).toBe(0);
    expect(seen[seen.length - 1]).toBe(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
  });

  it('carries Vs30 with its range over the 95 % box (site.ts)', () => {
    expect(r.site).not.toBeNull();
    const s = r.site!;
    // EN 1998-1:2004 eq. 3.1 for 12 m at 200 m/s over 500 m/s: 30 / (12/200 + 18/500).
    expectRecovered(s.vs30.best, 30 / (12 / 200 + 18 / 500), 1e-6, 'Vs30');
    expect(s.vs30.low).toBeLessThan(s.vs30.best);
    expect(s.vs30.high).toBeGreaterThan(s.vs30.best);
  });
});

describe('defaults', () => {
  it('search ranges follow DEFAULT_RANGE_RULE from the picks', () => {
    const picks = exactPicks(TRUE, 12, 3, 40);
    const v = picks.map((p) => p.velocity);
    const lam = picks.map((p) => p.velocity / p.frequency);
    const r = estimateLayer(picks);
    const R = DEFAULT_RANGE_RULE;
    expect(r.searchRange.thickness[0]).toBeCloseTo(R.thicknessLowPerShortestWavelength * Math.min(...lam), 10);
    expect(r.searchRange.thickness[1]).toBeCloseTo(R.thicknessHighPerLongestWavelength * Math.max(...lam), 10);
    expect(r.searchRange.vs1).toEqual([R.vs1LowPerSlowestPick * Math.min(...v), R.vs1HighPerFastestPick * Math.max(...v)]);
    expect(r.searchRange.vs2).toEqual([R.vs2LowPerSlowestPick * Math.min(...v), R.vs2HighPerFastestPick * Math.max(...v)]);
    expect(R).toEqual({
      thicknessLowPerShortestWavelength: 0.02,
      thicknessHighPerLongestWavelength: 3,
      vs1LowPerSlowestPick: 0.5,
      vs1HighPerFastestPick: 1.1,
      vs2LowPerSlowestPick: 1,
      vs2HighPerFastestPick: 4,
    });
  });

  it('densities default to 1800 and 2100 kg/m³', () => {
    expect(DEFAULT_DENSITY_LAYER).toBe(1800);
    expect(DEFAULT_DENSITY_HALFSPACE).toBe(2100);
  });

  it('a narrow half-space range that the speed-ratio grid straddles still recovers the model', () => {
    const r = estimateLayer(exactPicks(TRUE, 20, 3, 40), { vs1Range: [100, 500], vs2Range: [495, 505] });
    expectRecovered(r.thickness.best, 12, 1e-6, 'H');
    expectRecovered(r.vs1.best, 200, 1e-6, 'β1');
    expectRecovered(r.vs2.best, 500, 1e-6, 'β2');
  });

  it('a given speed clips the other speed’s range to keep β2 > β1', () => {
    const r = estimateLayer(exactPicks(TRUE, 12, 3, 40), { vs1: 200, vs2Range: [100, 900] });
    expect(r.searchRange.vs2[0]).toBeCloseTo(200 * 1.001, 9);
    expect(r.searchRange.vs2[1]).toBe(900);
  });
});

describe('bad input is an InputError naming the field', () => {
  const picks = exactPicks(TRUE, 6, 3, 40);
  const cases: Array<[string, () => unknown, RegExp]> = [
    ['no picks', () => estimateLayer([]), /There are no picks; give at least one dispersion pick\./],
    [
      'too few picks for the free parameters',
      () => estimateLayer(picks.slice(0, 2)),
      /There are 2 picks, too few for 3 free parameters \(thickness, vs1, vs2\); give at least 3 picks or fix a speed\./,
    ],
    [
      'a NaN frequency',
      () => estimateLayer([{ ...picks[0], frequency: NaN }, ...picks.slice(1)], { vs1: 200, vs2: 500 }),
      /Pick 1, column frequency_hz: is NaN/,
    ],
    [
      'a km/s velocity',
      () => estimateLayer([picks[0], { ...picks[1], velocity: 0.2 }], { vs1: 200, vs2: 500 }),
      /Pick 2, column velocity_m_s: .*looks like km\/s/,
    ],
    [
      'a duplicate pick',
      () => estimateLayer([picks[0], { ...picks[0] }], { vs1: 200, vs2: 500 }),
      /Pick 2, column frequency_hz: repeats/,
    ],
    [
      'a Rayleigh pick (this estimate is for Love waves)',
      () => estimateLayer([picks[0], { ...picks[1], wave: 'rayleigh' }], { vs1: 200, vs2: 500 }),
      /^Pick 2 is a Rayleigh pick, but the one-layer Love estimate models Love waves only; the layered estimate takes Rayleigh picks\.$/,
    ],
    ['vs2 not above vs1', () => estimateLayer(picks, { vs1: 300, vs2: 250 }), /vs2 is 250 m\/s, but it must be faster than vs1 \(300 m\/s\)/],
    ['vs1 in km/s', () => estimateLayer(picks, { vs1: 0.2 }), /vs1 is 0\.2 m\/s, below the 30 m\/s lower bound for shear speed\. It looks like km\/s/],
    ['vs2 NaN', () => estimateLayer(picks, { vs2: NaN }), /vs2 must be a finite number, but it is NaN/],
    ['density in g/cm³', () => estimateLayer(picks, { density1: 1.8 }), /density1 is 1\.8 kg\/m³.*looks like g\/cm³/],
    ['density too high', () => estimateLayer(picks, { density2: 9000 }), /density2 is 9000 kg\/m³, above the 3500 kg\/m³ upper bound/],
    ['reversed range', () => estimateLayer(picks, { thicknessRange: [50, 5] }), /thicknessRange must have its low end below its high end, but it is 50 to 5\./],
    ['range with zero thickness', () => estimateLayer(picks, { thicknessRange: [0, 5] }), /thicknessRange \(low end\) must be greater than 0 m/],
    [
      'a range that is not two numbers',
      () => estimateLayer(picks, { vs1Range: [100] as unknown as [number, number] }),
      /vs1Range must be two numbers, low and high\./,
    ],
    ['a speed range beyond the bounds', () => estimateLayer(picks, { vs2Range: [100, 9000] }), /vs2Range \(high end\) is 9000 m\/s, above the 5000 m\/s upper bound/],
    [
      'a half-space range below a given layer speed',
      () => estimateLayer(picks, { vs1: 400, vs2Range: [100, 300] }),
      /The half-space speed range 100–300 m\/s leaves nothing faster than the layer speed 400 m\/s/,
    ],
    [
      'a layer range above a given half-space speed',
      () => estimateLayer(picks, { vs2: 150, vs1Range: [200, 300] }),
      /The layer speed range 200–300 m\/s leaves nothing slower than the half-space speed 150 m\/s/,
    ],
    [
      'speed ranges with no faster half-space',
      () => estimateLayer(picks, { vs1Range: [400, 600], vs2Range: [100, 300] }),
      /vs2Range \(100–300 m\/s\) lies entirely at or below vs1Range \(400–600 m\/s\)/,
    ],
  ];
  for (const [what, fn, message] of cases) {
    it(what, () => {
      const e = inputErrorOf(fn);
      expect(e.message).toMatch(message);
    });
  }

  it('uses the caller’s labels for options and picks', () => {
    const opts: EstimateOptions = { vs1: 300, vs2: 250, fieldLabels: { vs1: '--vs1', vs2: '--vs2' } };
    expect(inputErrorOf(() => estimateLayer(picks, opts)).message).toMatch(/--vs2 is 250 m\/s, but it must be faster than --vs1/);
    const e = inputErrorOf(() => estimateLayer([{ ...picks[0], velocity: -1 }], { vs1: 200, vs2: 500, whereOf: (i) => `row ${i + 1}` }));
    expect(e.message).toMatch(/^Row 1, column velocity_m_s: must be greater than 0 m\/s/);
  });

  it('changes nothing in the picks it was given', () => {
    const before = JSON.stringify(picks);
    estimateLayer(picks, { vs1: 200, vs2: 500 });
    expect(JSON.stringify(picks)).toBe(before);
  });
});

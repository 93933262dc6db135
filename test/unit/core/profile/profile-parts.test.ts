/**
 * The parts of the layered estimate (core/profile/): P speeds from a
 * Poisson's ratio or a water table, the neighbourhood algorithm, the
 * Metropolis appraisal and its quantiles. Sources are named beside each check.
 */
import { Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { ADAPT_MIN_BURN_IN, cholesky, metropolisChain, quantileSorted, QUANTILE_68, QUANTILE_95 } from '../../../../core/profile/appraisal';
import { neighbourhoodSearch } from '../../../../core/profile/neighbourhood';
import { checkPoisson, checkWaterTable, pSpeedNotes, vpFromPoisson, WATER_P_SPEED, withPSpeeds } from '../../../../core/profile/p-speed';
import { mulberry32, normals } from '../../../../core/shared/random';
import { inputError } from '../../../input-error';

describe('P speeds from a Poisson ratio or a water table', () => {
  it('gives α = √3·β for ν = 1/4 (the Poisson solid, a closed form) and α = √2·β for ν = 0', () => {
    expect(vpFromPoisson(200, 0.25) / 200).toBeCloseTo(Math.sqrt(3), 14);
    expect(vpFromPoisson(200, 0) / 200).toBeCloseTo(Math.SQRT2, 14);
  });

  it('inverts ν = (α² − 2β²)/(2(α² − β²)) (isotropic elasticity) for any ν in range', () => {
    for (const nu of [-0.5, 0, 0.1, 0.3, 0.45, 0.49]) {
      const a = vpFromPoisson(1, nu);
      expect((a * a - 2) / (2 * (a * a - 1))).toBeCloseTo(nu, 12);
    }
  });

  it('splits a layer cut by the water table and keeps P ≥ 1500 m/s below it (common practice)', () => {
    const m = withPSpeeds([4, 10], [150, 300, 600], [1800, 1800, 2100], { kind: 'water-table', poisson: 0.3, defaulted: false, depth: 6 });
    expect(m.layers.map((l) => l.thickness)).toEqual([4, 2, 8]);
    expect(m.layers[0].vp).toBeCloseTo(vpFromPoisson(150, 0.3), 12);
    expect(m.layers[1].vp).toBeCloseTo(vpFromPoisson(300, 0.3), 12); // above the table
    expect(m.layers[2].vp).toBe(WATER_P_SPEED); // 300 m/s at ν 0.3 gives 561 m/s < 1500
    expect(m.halfspace.vp).toBeCloseTo(Math.max(WATER_P_SPEED, vpFromPoisson(600, 0.3)), 12);
  });

  it('makes the dry top of the half-space a layer when the water table lies below every interface', () => {
    const m = withPSpeeds([4], [150, 600], [1800, 2100], { kind: 'water-table', poisson: 0.3, defaulted: false, depth: 10 });
    expect(m.layers.map((l) => [l.thickness, l.vs])).toEqual([
      [4, 150],
      [6, 600],
    ]);
    expect(m.layers[1].vp).toBeCloseTo(vpFromPoisson(600, 0.3), 12);
    expect(m.halfspace.vp).toBe(Math.max(WATER_P_SPEED, vpFromPoisson(600, 0.3)));
    // No water table: nothing is split and nothing is raised.
    const dry = withPSpeeds([4], [150, 600], [1800, 2100], { kind: 'poisson', poisson: 0.3, defaulted: false });
    expect(dry.layers).toHaveLength(1);
    expect(dry.halfspace.vp).toBeCloseTo(vpFromPoisson(600, 0.3), 12);
  });

  it('refuses a Poisson ratio outside (−1, 0.5) and a negative water-table depth, naming the field', () => {
    expect(inputError(() => checkPoisson(0.5, '--poisson')).message).toBe(
      '--poisson is 0.5, outside the range −1 to 0.5 (exclusive) of a stable elastic solid; soils are about 0.25–0.49.',
    );
    expect(inputError(() => checkPoisson(NaN, '--poisson')).message).toBe('--poisson must be a finite number, but it is NaN.');
    expect(inputError(() => checkWaterTable(-2, '--water-table-m')).message).toBe('--water-table-m must be a depth of 0 m or more, but it is -2.');
  });

  it('says when the Poisson ratio was assumed, and warns about one below 0', () => {
    expect(pSpeedNotes({ kind: 'poisson', poisson: 0.3, defaulted: true })[0]).toMatch(/^P speeds come from an assumed Poisson's ratio of 0\.3 \(the default/);
    expect(pSpeedNotes({ kind: 'poisson', poisson: -0.2, defaulted: false }).join(' ')).toMatch(/below 0 \(-0\.2\) is possible in theory but not known in soils/);
  });
});

describe('the neighbourhood algorithm (Sambridge 1999)', () => {
  const bowl = (x: Float64Array) => 100 * ((x[0] - 0.3) ** 2 + (x[1] - 0.7) ** 2 + (x[2] - 0.55) ** 2);

  it('keeps every sample inside the unit cube and concentrates them near the minimum of a bowl', () => {
    const e = neighbourhoodSearch(3, bowl, mulberry32(11), { initial: 30, perIteration: 30, cells: 5, iterations: 12 });
    expect(e.count).toBe(30 + 12 * 30);
    for (const v of e.points) expect(v >= 0 && v <= 1).toBe(true);
    const best = Math.min(...e.misfit);
    // Uniform sampling alone (30 + 360 points) rarely gets within 0.05 of the centre in 3-D; the search should.
    expect(best).toBeLessThan(100 * 0.05 ** 2);
    // The later rounds sample near the minimum more often than the uniform start does.
    const near = (from: number, to: number) => {
      let c = 0;
      for (let i = from; i < to; i++) if (e.misfit[i] < 1) c++;
      return c / (to - from);
    };
    expect(near(e.count - 60, e.count)).toBeGreaterThan(3 * near(0, 30) + 0.2);
  });

  it('draws each new sample inside the Voronoi cell it was generated from (the cell of a best sample at the round start)', () => {
    // With one cell resampled per round, every new sample of the round must be nearer that cell's sample than any other.
    const e = neighbourhoodSearch(2, bowl, mulberry32(5), { initial: 12, perIteration: 6, cells: 1, iterations: 4 });
    let start = 12;
    for (let round = 0; round < 4; round++) {
      const order = Array.from({ length: start }, (_, i) => i).sort((a, b) => e.misfit[a] - e.misfit[b]);
      const k = order[0];
      for (let s = start; s < start + 6; s++) {
        const dist = (j: number) => (e.points[s * 2] - e.points[j * 2]) ** 2 + (e.points[s * 2 + 1] - e.points[j * 2 + 1]) ** 2;
        for (let j = 0; j < start; j++) expect(dist(k)).toBeLessThanOrEqual(dist(j) + 1e-12);
      }
      start += 6;
    }
  });

  it('is reproducible for a seed', () => {
    const a = neighbourhoodSearch(3, bowl, mulberry32(9), { initial: 10, perIteration: 10, cells: 2, iterations: 3 });
    const b = neighbourhoodSearch(3, bowl, mulberry32(9), { initial: 10, perIteration: 10, cells: 2, iterations: 3 });
    expect(Array.from(a.points)).toEqual(Array.from(b.points));
  });
});

describe('the Metropolis appraisal', () => {
  it('factors a covariance as L·Lᵀ (checked with ml-matrix) and refuses one that is not positive definite', () => {
    const a = [4, 2, 0.4, 2, 3, 0.5, 0.4, 0.5, 2];
    const l = cholesky(a, 3)!;
    const L = new Matrix([Array.from(l.subarray(0, 3)), Array.from(l.subarray(3, 6)), Array.from(l.subarray(6, 9))]);
    const back = L.mmul(L.transpose()).to1DArray();
    back.forEach((v, i) => expect(v).toBeCloseTo(a[i], 12));
    expect(cholesky([1, 2, 2, 1], 2)).toBeNull();
  });

  it('samples a known Gaussian: the 68 % and 95 % quantiles match μ ± 1σ and μ ± 1.96σ (normal quantiles) within Monte Carlo error', () => {
    // χ² of a 2-D Gaussian with σ = (0.2, 0.5), correlation 0.6, mean (1, −2).
    const s1 = 0.2;
    const s2 = 0.5;
    const rho = 0.6;
    const chi2 = (u: Float64Array) => {
      const a = (u[0] - 1) / s1;
      const b = (u[1] + 2) / s2;
      return (a * a - 2 * rho * a * b + b * b) / (1 - rho * rho);
    };
    const cov = [s1 * s1, rho * s1 * s2, rho * s1 * s2, s2 * s2];
    const u = mulberry32(2026);
    const chain = metropolisChain(chi2, [1, -2], 0, cov, 1, u, normals(u), { steps: 20000, burnIn: 1000 });
    expect(chain.acceptance).toBeGreaterThan(0.15);
    expect(chain.acceptance).toBeLessThan(0.6);
    const x = Float64Array.from({ length: chain.count }, (_, i) => chain.samples[2 * i]).sort();
    // Tolerance: a few Monte Carlo standard errors for ~2000 effective samples (from memory: SE of a quantile ≈ √(p(1−p)/n)/f(x)).
    expect(quantileSorted(x, QUANTILE_68[0])).toBeCloseTo(1 - s1, 1);
    expect(quantileSorted(x, QUANTILE_68[1])).toBeCloseTo(1 + s1, 1);
    expect(Math.abs(quantileSorted(x, QUANTILE_95[0]) - (1 - 1.959964 * s1))).toBeLessThan(0.05);
    expect(Math.abs(quantileSorted(x, QUANTILE_95[1]) - (1 + 1.959964 * s1))).toBeLessThan(0.05);
  });

  it('takes the shape of the likelihood during burn-in (adaptive Metropolis, Haario et al. 2001) when started with a covariance of the wrong shape', () => {
    // A narrow ridge (correlation 0.995), but the chain is given an isotropic covariance, 1500 kept steps.
    const s1 = 0.2;
    const s2 = 0.5;
    const rho = 0.995;
    const chi2 = (u: Float64Array) => {
      const a = (u[0] - 1) / s1;
      const b = (u[1] + 2) / s2;
      return (a * a - 2 * rho * a * b + b * b) / (1 - rho * rho);
    };
    const run = (burnIn: number) => {
      const u = mulberry32(7);
      const chain = metropolisChain(chi2, [1, -2], 0, [0.0004, 0, 0, 0.0004], 1, u, normals(u), { steps: 1500, burnIn });
      const x = Float64Array.from({ length: chain.count }, (_, i) => chain.samples[2 * i]).sort();
      return quantileSorted(x, QUANTILE_95[1]) - quantileSorted(x, QUANTILE_95[0]);
    };
    // True central 95 % width of u0: 2·1.96·σ1 = 0.784 (normal quantiles). Below ADAPT_MIN_BURN_IN the proposal only rescales.
    const adapted = run(1000);
    const scaledOnly = run(ADAPT_MIN_BURN_IN - 1);
    expect(Math.abs(adapted - 2 * 1.959964 * s1)).toBeLessThan(0.08);
    expect(Math.abs(scaledOnly - 2 * 1.959964 * s1)).toBeGreaterThan(Math.abs(adapted - 2 * 1.959964 * s1));
  });

  it('interpolates quantiles between order statistics (Hyndman & Fan 1996, type 7)', () => {
    expect(quantileSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantileSorted([1, 2, 3, 4], 0)).toBe(1);
    expect(quantileSorted([1, 2, 3, 4], 1)).toBe(4);
    expect(Number.isNaN(quantileSorted([], 0.5))).toBe(true);
  });
});

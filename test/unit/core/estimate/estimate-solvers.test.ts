/**
 * The estimate's two building blocks:
 *  - Levenberg–Marquardt (core/numeric/levenberg-marquardt.ts; Press et al.,
 *    *Numerical Recipes*, 3rd ed. 2007, §15.5) against a general-purpose
 *    reference library from the npm registry (ml-matrix's least-squares
 *    solve) on a weighted linear problem, and on the Rosenbrock function
 *    (Rosenbrock 1960, Comput. J. 3:175), whose minimum (1, 1) is known in
 *    closed form;
 *  - the dense dimensionless tables (core/dispersion/love-dimensionless-table.ts)
 *    against the exact closed-form forward model (core/dispersion/love-layer.ts), with
 *    the scaling c/β1 = F(f·H/β1) (shared/PHYSICS.md §2).
 */
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { invertSmall, levenbergMarquardt, solveSmall } from '../../../../core/numeric/levenberg-marquardt';
import { buildDimensionlessTable, tableAt } from '../../../../core/dispersion/love-dimensionless-table';
import { chi2Lower05, chi2Upper95 } from '../../../../core/estimate/estimate-diagnostics';
import { loveCutoffHz, loveVelocities } from '../../../../core/dispersion/love-layer';

describe('Levenberg–Marquardt', () => {
  it('matches ml-matrix on a weighted quadratic least-squares fit', () => {
    // y = 2 − 0.5x + 0.1x² with fixed wiggles, weights 1/σ.
    const xs = Array.from({ length: 25 }, (_, i) => i * 0.4);
    const ys = xs.map((x, i) => 2 - 0.5 * x + 0.1 * x * x + 0.05 * Math.sin(3 * i));
    const sd = xs.map((_, i) => 0.1 + 0.01 * i);
    const A = new Matrix(xs.map((x, i) => [1 / sd[i], x / sd[i], (x * x) / sd[i]]));
    const b = Matrix.columnVector(ys.map((y, i) => y / sd[i]));
    const ref = solve(A, b).to1DArray();
    const fit = levenbergMarquardt(
      (p, r) => {
        for (let i = 0; i < xs.length; i++) r[i] = (ys[i] - (p[0] + p[1] * xs[i] + p[2] * xs[i] * xs[i])) / sd[i];
      },
      xs.length,
      [0, 0, 0],
      [-10, -10, -10],
      [10, 10, 10],
    );
    expect(fit.status).toBe('converged');
    for (let j = 0; j < 3; j++) {
      // Tolerance: forward-difference Jacobian (step 1e-7) on a linear model is exact to rounding; 1e-8 absolute.
      expect(Math.abs(fit.p[j] - ref[j])).toBeLessThan(1e-8);
    }
  });

  it('finds the Rosenbrock minimum (1, 1) from (−1.2, 1)', () => {
    const fit = levenbergMarquardt(
      (p, r) => {
        r[0] = 10 * (p[1] - p[0] * p[0]);
        r[1] = 1 - p[0];
      },
      2,
      [-1.2, 1],
      [-5, -5],
      [5, 5],
    );
    expect(fit.status).toBe('converged');
    expect(Math.abs(fit.p[0] - 1)).toBeLessThan(1e-10);
    expect(Math.abs(fit.p[1] - 1)).toBeLessThan(1e-10);
    expect(fit.chi2).toBeLessThan(1e-20);
  });

  it('stops on a bound when the minimum lies outside the box', () => {
    const fit = levenbergMarquardt((p, r) => void (r[0] = p[0] - 5), 1, [0], [-1], [2]);
    expect(fit.p[0]).toBe(2);
    expect(fit.chi2).toBeCloseTo(9, 12);
  });

  it('stops when asked after an accepted step, with status stopped and the χ² reached', () => {
    // Rosenbrock's valley as residuals (10(y − x²), 1 − x), minimum (1, 1); stop once χ² < 1.
    const res = (p: Float64Array, r: Float64Array) => {
      r[0] = 10 * (p[1] - p[0] * p[0]);
      r[1] = 1 - p[0];
    };
    let asked = 0;
    const fit = levenbergMarquardt(res, 2, [-1.2, 1], [-5, -5], [5, 5], {
      stopWhen: (_p, chi2) => {
        asked++;
        return chi2 < 1;
      },
    });
    expect(fit.status).toBe('stopped');
    expect(fit.chi2).toBeLessThan(1);
    expect(fit.chi2).toBeGreaterThan(0);
    expect(asked).toBe(fit.iterations);
  });

  it('reports a start with no finite misfit instead of a number', () => {
    const fit = levenbergMarquardt((_p, r) => void (r[0] = NaN), 1, [0], [-1], [1]);
    expect(fit.status).toBe('no-finite-start');
  });

  it('solves and inverts small systems, and says when singular', () => {
    const a = Float64Array.of(4, 1, 1, 3);
    const inv = invertSmall(a, 2)!;
    // Closed form for a 2×2 inverse: [[d, −b], [−c, a]] / (ad − bc), ad − bc = 11.
    expect(Array.from(inv).map((v) => v * 11)).toEqual([3, -1, -1, 4].map((v) => expect.closeTo(v, 12)));
    expect(solveSmall(Float64Array.of(1, 2, 2, 4), Float64Array.of(1, 1), 2)).toBe(false);
  });
});

describe('dimensionless tables', () => {
  const r = 2.5;
  const q = 2100 / 1800;

  it('interpolate the exact curve to 2e-3 relative for mode 0, both velocities, over five decades of f·H/β1', () => {
    const t = buildDimensionlessTable(r, q, 0, Math.log(1e-3), Math.log(1e2));
    let worst = 0;
    for (let i = 0; i < 500; i++) {
      const x = 1e-3 * Math.pow(1e5, (i + 0.37) / 500);
      const exact = loveVelocities({ h: 1, vs1: 1, vs2: r, rho1: 1, rho2: q }, x, 0);
      worst = Math.max(
        worst,
        Math.abs(tableAt(t, t.phase, Math.log(x)) - exact.phase) / exact.phase,
        Math.abs(tableAt(t, t.group, Math.log(x)) - exact.group) / exact.group,
      );
    }
    expect(worst).toBeLessThan(2e-3);
  });

  it('serve any H and β1 by the scaling: β1·F(f·H/β1) equals the forward model of the real model', () => {
    const t = buildDimensionlessTable(r, q, 0, Math.log(1e-3), Math.log(1e2), { pointsPerDecade: 400 });
    for (const [h, b1, f] of [
      [12, 200, 7],
      [3, 150, 25],
      [40, 320, 2.2],
    ]) {
      const m = { h, vs1: b1, vs2: r * b1, rho1: 1800, rho2: 2100 };
      const exact = loveVelocities(m, f, 0).group;
      const fromTable = b1 * tableAt(t, t.group, Math.log((f * h) / b1));
      expect(Math.abs(fromTable - exact) / exact).toBeLessThan(1e-4);
    }
  });

  it('hold β2/β1 below the cutoff of a higher mode, where the mode does not exist', () => {
    const t = buildDimensionlessTable(r, q, 1, Math.log(1e-2), Math.log(10));
    const xCut = loveCutoffHz({ h: 1, vs1: 1, vs2: r, rho1: 1, rho2: q }, 1);
    // Closed form: x_1 = r / (2√(r² − 1)) (shared/PHYSICS.md §2, cutoffs).
    expect(xCut).toBeCloseTo(r / (2 * Math.sqrt(r * r - 1)), 14);
    expect(tableAt(t, t.phase, Math.log(xCut * 0.8))).toBe(r);
    expect(tableAt(t, t.group, Math.log(xCut * 0.8))).toBe(r);
    expect(tableAt(t, t.phase, Math.log(xCut * 2))).toBeLessThan(r);
  });
});

describe('χ² goodness-of-fit points (Wilson–Hilferty, used only to word the fit warning)', () => {
  // Table values from memory, verify: Abramowitz & Stegun 1964, Table 26.8 (percentage points of χ²).
  const table: Array<[number, number, number]> = [
    // dof, 5 % point, 95 % point
    [10, 3.940, 18.307],
    [20, 10.851, 31.410],
    [30, 18.493, 43.773],
  ];
  for (const [dof, lo, hi] of table) {
    it(`dof ${dof}: within 1 % of ${lo} and ${hi}`, () => {
      expect(Math.abs(chi2Lower05(dof) - lo) / lo).toBeLessThan(0.01);
      expect(Math.abs(chi2Upper95(dof) - hi) / hi).toBeLessThan(0.01);
    });
  }
});

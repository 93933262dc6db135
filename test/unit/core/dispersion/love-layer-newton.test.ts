/**
 * The warm-started one-layer solver (love-layer.ts lovePhaseVelocityNear,
 * safeguarded Newton in φ) against Brent on the same period equation
 * (Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.2), over wide
 * frequency sweeps, extreme contrasts and poor guesses. Models invented,
 * except Shearer's crust (*Introduction to Seismology*, ch. 8 exercises).
 */
import { describe, expect, it } from 'vitest';
import { logBand } from '../../../../core/dispersion/curve';
import { loveCutoffHz, lovePhaseResidual, lovePhaseVelocityNear, lovePhaseVelocitySolve, type TwoLayer } from '../../../../core/dispersion/love-layer';
import { SHEARER_CRUST } from '../../../fixtures';

const models: [string, TwoLayer][] = [
  ['Shearer crust', SHEARER_CRUST],
  ['soft soil on rock', { h: 12, vs1: 180, vs2: 650, rho1: 1800, rho2: 2100 }],
  ['extreme contrast 1:49', { h: 5, vs1: 100, vs2: 4900, rho1: 1800, rho2: 3000 }],
  ['near-equal speeds', { h: 50, vs1: 300, vs2: 301, rho1: 1800, rho2: 3000 }],
];

describe('lovePhaseVelocityNear', () => {
  for (const [name, p] of models) {
    it(`agrees with Brent to 1e-12 over nine decades of x = fH/β1, modes 0–5: ${name}`, () => {
      const band = logBand((1e-4 * p.vs1) / p.h, (1e3 * p.vs1) / p.h, 900);
      let iterations = 0;
      let roots = 0;
      for (let n = 0; n < 6; n++) {
        let previous = NaN;
        for (const f of band) {
          const a = lovePhaseVelocitySolve(p, f, n);
          const b = lovePhaseVelocityNear(p, f, n, previous);
          expect(b.status, `mode ${n} at ${f} Hz`).toBe(a.status);
          previous = b.x;
          if (a.status !== 'converged') continue;
          const rel = Math.abs(b.x / a.x - 1);
          expect(rel, `mode ${n} at ${f} Hz: Brent ${a.x}, Newton ${b.x}`).toBeLessThan(1e-12);
          // Residual of the φ form (well conditioned; the c form has infinite slope at β1 and β2),
          // and of the c form where c is clear of both ends.
          // The stop rule is a step below 1e-13 rad, so |g| ≤ 1e-13·g′ with g′ ≤ ωHD + μ2/μ1.
          const slope = (2 * Math.PI * f * p.h) / p.vs1 + (p.rho2 * p.vs2 ** 2) / (p.rho1 * p.vs1 ** 2);
          expect(Math.abs(b.fx), `mode ${n} at ${f} Hz`).toBeLessThan(1e-13 * (1 + n + slope));
          if (b.x > p.vs1 * (1 + 1e-3) && b.x < p.vs2 * (1 - 1e-3)) {
            expect(Math.abs(lovePhaseResidual(p, 2 * Math.PI * f, b.x, n))).toBeLessThan(1e-10 * (1 + n));
          }
          iterations += b.iterations;
          roots++;
        }
      }
      expect(roots).toBeGreaterThan(900);
      // Warm starts pay: a few iterations per root on average (not a timing, a count).
      expect(iterations / roots).toBeLessThan(5);
    });
  }

  it('reports bracket-lost below cutoff and at non-positive frequency, never a number', () => {
    const p = models[1][1];
    const f1 = loveCutoffHz(p, 1);
    for (const [f, n] of [
      [f1 * 0.999, 1],
      [0, 0],
      [-1, 0],
    ]) {
      const r = lovePhaseVelocityNear(p, f, n, NaN);
      expect(r.status).toBe('bracket-lost');
      expect(r.x).toBeNaN();
    }
  });

  it('converges from any guess, in range or not', () => {
    const p = models[0][1];
    const want = lovePhaseVelocitySolve(p, 0.3, 2).x; // f2 ≈ 0.139 Hz (closed form), so mode 2 exists
    for (const guess of [NaN, -5, 0, 3500, 3500.000001, 4000, 4499.999999, 4500, 1e9]) {
      const r = lovePhaseVelocityNear(p, 0.3, 2, guess);
      expect(r.status).toBe('converged');
      expect(Math.abs(r.x / want - 1), `guess ${guess}`).toBeLessThan(1e-12);
    }
  });
});

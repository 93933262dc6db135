/**
 * The layered estimate's cheaper forward step (core/profile/profile-forward.ts)
 * gives the same predictions as solving every pick from scratch, and the
 * wavelength–depth start (core/profile/profile-starts.ts) stays in its box.
 *
 * Reference: the full root solvers of core/dispersion (Love: Sturm-counted
 * Thomson–Haskell; Rayleigh: the compound-matrix scan), checked elsewhere
 * against closed forms and the thin-layer method. Tracking along frequency
 * and warm starts must reproduce them to the roots' tolerance (1e-11
 * relative on c; the group velocity to about 1e-8).
 */
import { describe, expect, it } from 'vitest';
import { withPSpeeds } from '../../../../core/profile/p-speed';
import { forwardWork, predictPicks, trackingOrder, WAVE_FORWARDS, type ForwardPicks } from '../../../../core/profile/profile-forward';
import { DEPTHS_PER_WAVELENGTH, wavelengthDepthStart } from '../../../../core/profile/profile-starts';
import { mulberry32 } from '../../../../core/shared/random';

function randomModel(rand: () => number) {
  const N = 1 + Math.floor(rand() * 3);
  const thickness = Array.from({ length: N }, () => Math.exp(Math.log(0.5) + rand() * Math.log(100)));
  const vs = Array.from({ length: N + 1 }, () => 80 + rand() * 700);
  vs[N] = Math.max(...vs) * (1.01 + rand());
  const density = Array.from({ length: N + 1 }, (_, j) => (j < N ? 1800 : 2100));
  return withPSpeeds(thickness, vs, density, { kind: 'poisson', poisson: 0.3, defaulted: false });
}

function picksOf(n: number, wave: number, shuffle: () => number): ForwardPicks {
  // Log-spaced 3–40 Hz, in a shuffled order (the tracking must sort them itself), every third a phase pick.
  const f = Array.from({ length: n }, (_, i) => 3 * Math.pow(40 / 3, i / (n - 1)));
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(shuffle() * (i + 1));
    [f[i], f[j]] = [f[j], f[i]];
  }
  const p: ForwardPicks = {
    n,
    omega: Float64Array.from(f, (x) => 2 * Math.PI * x),
    mode: new Int32Array(n),
    isPhase: Uint8Array.from({ length: n }, (_, i) => (i % 3 === 0 ? 1 : 0)),
    wave: new Uint8Array(n).fill(wave),
  };
  return { ...p, order: trackingOrder(p) };
}

describe('the forward step of the layered estimate, tracked and warm-started', () => {
  for (const [wave, name, tol] of [
    [0, 'love', 1e-9],
    [1, 'rayleigh', 1e-7],
  ] as const) {
    it(`predicts ${name} picks of 60 seeded random models (some with a low-velocity layer) as the full solver does, tracked along frequency and warm from a nearby model`, () => {
      const rand = mulberry32(wave === 0 ? 11 : 12);
      const before = { ...forwardWork };
      for (let t = 0; t < 60; t++) {
        const m = randomModel(rand);
        const picks = picksOf(24, wave, rand);
        const engine = WAVE_FORWARDS[name]!(m);
        const reference = Array.from({ length: picks.n }, (_, i) => {
          const c = engine.phase(picks.omega[i], 0);
          return picks.isPhase[i] ? c : engine.group(picks.omega[i], 0, c);
        });
        const guesses = new Float64Array(picks.n).fill(NaN);
        const out = new Float64Array(picks.n);
        predictPicks(picks, m, out, guesses);
        for (let i = 0; i < picks.n; i++) expect(Math.abs(out[i] - reference[i]) / reference[i]).toBeLessThan(tol);
        // A model 1e-7 away (a Jacobian column) and one 3 % away (an ensemble step), from the roots above.
        for (const move of [1e-7, 0.03, 0.1]) {
          const near = withPSpeeds(
            m.layers.map((l) => l.thickness * (1 + move)),
            [...m.layers.map((l) => l.vs * (1 - move)), m.halfspace.vs],
            [...m.layers.map((l) => l.density), m.halfspace.density],
            { kind: 'poisson', poisson: 0.3, defaulted: false },
          );
          const e2 = WAVE_FORWARDS[name]!(near);
          const warm = Float64Array.from(guesses);
          predictPicks(picks, near, out, warm, move);
          for (let i = 0; i < picks.n; i++) {
            const c = e2.phase(picks.omega[i], 0);
            const ref = picks.isPhase[i] ? c : e2.group(picks.omega[i], 0, c);
            expect(Math.abs(out[i] - ref) / ref).toBeLessThan(tol);
          }
        }
      }
      // Most picks are tracked or warm, not solved from scratch (Rayleigh: fewer, as models with a
      // low-velocity layer and 10 % moves are always solved in full).
      const full = forwardWork.fullSolves - before.fullSolves;
      const warm = forwardWork.warmSolves - before.warmSolves - (forwardWork.warmMisses - before.warmMisses);
      expect(warm).toBeGreaterThan((wave === 0 ? 3 : 1) * full);
    }, 60_000);
  }
});

describe('the screening form of the forward step (search samples and refinement steps only)', () => {
  it('predicts Rayleigh picks exactly as the verified form where no speed decreases with depth, and under a low-velocity layer tracks instead of solving every pick in full', () => {
    const rand = mulberry32(21);
    let lowVelocity = 0;
    let fullVerified = 0;
    let fullScreened = 0;
    for (let t = 0; t < 60; t++) {
      const m = randomModel(rand);
      const picks = picksOf(24, 1, rand);
      const verified = new Float64Array(picks.n);
      const screened = new Float64Array(picks.n);
      let before = forwardWork.fullSolves;
      predictPicks(picks, m, verified);
      fullVerified += forwardWork.fullSolves - before;
      before = forwardWork.fullSolves;
      const screenedBefore = forwardWork.screenedModels;
      predictPicks(picks, m, screened, undefined, undefined, true);
      expect(forwardWork.screenedModels - screenedBefore).toBe(1);
      const all = [...m.layers, m.halfspace];
      const decreases = all.some((l, j) => j > 0 && (l.vs < all[j - 1].vs || l.vp < all[j - 1].vp));
      if (decreases) {
        lowVelocity++;
        fullScreened += forwardWork.fullSolves - before;
      } else {
        for (let i = 0; i < picks.n; i++) expect(screened[i]).toBe(verified[i]);
      }
    }
    expect(lowVelocity).toBeGreaterThan(10);
    // Verified: every pick of a low-velocity model in full; screened: about one per model.
    expect(fullScreened).toBeLessThan(fullVerified / 4);
  }, 60_000);
});

describe('the wavelength–depth start (common practice)', () => {
  it('puts interfaces in order inside the box, speeds from 1.1 × the picked velocity, the half-space the fastest', () => {
    const v = [400, 330, 260, 210, 190, 185];
    const f = [3, 5, 8, 13, 21, 34];
    const lower = [Math.log(0.1), Math.log(0.1), Math.log(50), Math.log(50), Math.log(100)];
    const upper = [Math.log(80), Math.log(80), Math.log(600), Math.log(600), Math.log(2000)];
    for (const d of DEPTHS_PER_WAVELENGTH) {
      const u = wavelengthDepthStart(v, f, 2, lower, upper, d);
      u.forEach((x, j) => {
        expect(x).toBeGreaterThanOrEqual(lower[j]);
        expect(x).toBeLessThanOrEqual(upper[j]);
      });
      expect(Math.exp(u[4])).toBeCloseTo(1.1 * 400, 9);
      expect(Math.exp(u[2])).toBeLessThan(Math.exp(u[3])); // slower on top for a normally dispersive curve
      const zmin = (d * 185) / 34;
      const zmax = (d * 400) / 3;
      expect(Math.exp(u[0])).toBeCloseTo(zmin * Math.pow(zmax / zmin, 1 / 3), 9);
      expect(Math.exp(u[0]) + Math.exp(u[1])).toBeCloseTo(zmin * Math.pow(zmax / zmin, 2 / 3), 9);
    }
  });
});

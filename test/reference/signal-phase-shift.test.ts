/**
 * The phase-shift image (core/signal/phase-shift.ts, Park, Miller & Xia
 * 1998, SEG Expanded Abstracts 1377–1380) against two outside references:
 *
 * 1. A plane wave of one velocity c0 over N receivers dx apart. Its unit
 *    spectra are e^(−i2πf·x_j/c0), so the steered sum is a geometric series:
 *      V(c) = Σ_{j=0}^{N−1} e^(ijθ) = e^(i(N−1)θ/2)·sin(Nθ/2)/sin(θ/2),
 *      θ = 2πf·dx·(1/c − 1/c0),
 *    and the normalised power is |sin(Nθ/2)/(N sin(θ/2))|², 1 at c = c0. Its
 *    half-power points are the root θ_h in (0, 2π/N) of
 *    sin²(Nθ/2)/(N² sin²(θ/2)) = 1/2 (found here by bisection), so the
 *    half-power width in slowness is 2θ_h/(2πf·dx). (Derived here; shared/
 *    PHYSICS.md §10 quotes the same response.)
 * 2. Synthetic Love-wave records from the core's own modal solution
 *    (test/signal-fixtures.ts): the followed ridge recovers the phase
 *    velocity of core/dispersion (Aki & Richards, *Quantitative Seismology*,
 *    2nd ed. 2002, §7.2) within 1 % wherever the wavelength is under the
 *    spread length (the bound the issue sets; common practice).
 */
import { describe, expect, it } from 'vitest';
import { loveVelocities } from '../../core/dispersion/love-layer';
import { linearAxis, MARGINAL, RELIABLE, UNRELIABLE } from '../../core/signal/image';
import { incoherentBelow, phaseShiftImage } from '../../core/signal/phase-shift';
import { followRidge, sdFloor, strongestRidgeSeed } from '../../core/signal/ridge';
import { gaussian, mulberry32 } from '../../core/shared/random';
import { INVENTED_SOFT_SITE } from '../fixtures';
import { SOFT_GATHER, softSiteGather } from '../signal-fixtures';

/** Root θ_h in (0, 2π/N) of the array response's half-power equation, by bisection to 1e-15. */
function halfPowerTheta(N: number): number {
  const response = (t: number) => (Math.sin((N * t) / 2) / (N * Math.sin(t / 2))) ** 2 - 0.5;
  let lo = 1e-12;
  let hi = (2 * Math.PI) / N;
  for (let k = 0; k < 200 && hi - lo > 1e-15; k++) {
    const mid = (lo + hi) / 2;
    if (response(mid) > 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** A Gaussian pulse exp(−((t − x/c0)/w)²) at each receiver: one plane wave of velocity c0 (non-dispersive). */
function planeWave(N: number, dx: number, c0: number, dt: number, samples: number) {
  const w = 0.01;
  const t0 = -0.05;
  const offsets = Array.from({ length: N }, (_, j) => 20 + j * dx);
  const traces = offsets.map((x) => {
    const tr = new Float64Array(samples);
    for (let k = 0; k < samples; k++) tr[k] = Math.exp(-(((t0 + k * dt - x / c0) / w) ** 2));
    return tr;
  });
  return { traces, offsets, sampleInterval: dt, startTime: t0 };
}

describe('phase-shift image of one plane wave (array response derived above)', () => {
  const N = 24;
  const dx = 2;
  const c0 = 300;
  const g = planeWave(N, dx, c0, 0.001, 1024);
  // c0 lies on the velocity grid, so each row's largest cell is the peak itself.
  const velocities = linearAxis(200, 450, 1001, 'velocity', 'm/s');
  const img = phaseShiftImage(g, { frequencies: [10, 20, 30], velocities });
  const theta = halfPowerTheta(N);

  for (let r = 0; r < 3; r++) {
    const f = img.frequencies[r];
    it(`peaks at c0 = ${c0} m/s with the derived half-power width at ${f.toFixed(3)} Hz`, () => {
      const cols = velocities.length;
      const row = img.power.subarray(r * cols, (r + 1) * cols);
      let peak = 0;
      for (let c = 1; c < cols; c++) if (row[c] > row[peak]) peak = c;
      expect(velocities[peak]).toBeCloseTo(c0, 9);
      // Coherence of a perfect plane wave is 1 (the series' modulus is N at θ = 0).
      expect(Math.abs(img.strength[r] - 1)).toBeLessThan(1e-9);
      const cross = (dir: 1 | -1) => {
        let c = peak;
        while (row[c + dir] > 0.5) c += dir;
        const w = (row[c] - 0.5) / (row[c] - row[c + dir]);
        return velocities[c] + w * (velocities[c + dir] - velocities[c]);
      };
      const widthSlowness = 1 / cross(-1) - 1 / cross(1);
      const expected = (2 * theta) / (2 * Math.PI * f * dx);
      const diff = Math.abs(widthSlowness - expected) / expected;
      // Tolerance: linear interpolation between grid cells 0.25 m/s apart (≈ 1e-4 of the width).
      if (!(diff < 2e-3)) throw new Error(`f ${f}: expected width ${expected} s/m, got ${widthSlowness}, relative difference ${diff} > 2e-3`);
      // For large N the width tends to 2·2.7831/(2π·f·N·dx) = 0.886/(f·N·dx) (sin(u)/u = 1/√2 at
      // u = 1.39156). shared/PHYSICS.md §10 quotes 1.207/(f·N·dx): that is the width where the
      // *amplitude* falls to one half (sin(u)/u = 1/2 at u = 1.89549), not the half-power width.
      expect(expected * f * N * dx).toBeGreaterThan(0.88);
      expect(expected * f * N * dx).toBeLessThan(0.9);
    });
  }
});

describe('ridge sd on the plane wave: the Gaussian sd of the derived half-power width', () => {
  it('gives each point sd = W/(2√(2 ln 2)), W the array response\'s half-power width in velocity, above the record\'s floor', () => {
    const N = 24;
    const dx = 2;
    const c0 = 300;
    const g = planeWave(N, dx, c0, 0.001, 1024);
    const velocities = linearAxis(200, 450, 1001, 'velocity', 'm/s');
    const img = phaseShiftImage(g, { frequencies: linearAxis(15, 30, 16, 'frequency', 'Hz'), velocities });
    const ridge = followRidge(img, { frequency: 20, velocity: c0 });
    expect(ridge.velocity.length).toBe(16);
    const theta = halfPowerTheta(N);
    for (let k = 0; k < ridge.velocity.length; k++) {
      const f = ridge.frequency[k];
      const ds = theta / (2 * Math.PI * f * dx); // half the half-power width in slowness
      const width = 1 / (1 / c0 - ds) - 1 / (1 / c0 + ds);
      const want = width / (2 * Math.sqrt(2 * Math.LN2));
      const diff = Math.abs(ridge.sd[k] - want) / want;
      // Tolerance: half-power crossings interpolated between cells 0.25 m/s apart.
      if (!(diff < 5e-3)) throw new Error(`f ${f} Hz: expected sd ${want} m/s, got ${ridge.sd[k]}, relative difference ${diff} > 5e-3`);
      const floor = sdFloor(img, f, c0, 0);
      expect(ridge.sd[k]).toBeGreaterThan(floor);
      // The floor: one slowness cell 1/(f·L) over the spread, as the sd of a uniform spread (cell/√12).
      expect(floor).toBeCloseTo((c0 * c0) / (f * dx * (N - 1)) / Math.sqrt(12), 9);
    }
  });
});

describe('phase-shift ridge on a synthetic Love-wave gather (modal solution of core/dispersion)', () => {
  const g = softSiteGather();
  const spread = SOFT_GATHER.spacing * (SOFT_GATHER.traces - 1);
  const img = phaseShiftImage(g, {
    frequencies: linearAxis(4, 60, 113, 'frequency', 'Hz'),
    velocities: linearAxis(100, 700, 241, 'velocity', 'm/s'),
  });

  it('recovers the fundamental phase velocity within 1 % wherever the wavelength is under the spread length', () => {
    const seed = strongestRidgeSeed(img);
    expect(seed).not.toBeNull();
    const ridge = followRidge(img, seed!);
    let checked = 0;
    for (let k = 0; k < ridge.velocity.length; k++) {
      const f = ridge.frequency[k];
      const want = loveVelocities(INVENTED_SOFT_SITE, f, 0).phase;
      if (want / f >= spread) continue;
      checked++;
      const diff = Math.abs(ridge.velocity[k] - want) / want;
      if (!(diff < 0.01)) throw new Error(`f ${f} Hz: expected ${want} m/s, got ${ridge.velocity[k]}, relative difference ${diff} > 0.01`);
    }
    // The ridge covers the band from about 5 Hz to where aliasing or the source's band ends.
    expect(checked).toBeGreaterThan(60);
  });

  it('marks aliased, marginal and too-long wavelengths by the spread and spacing, and rows of noise', () => {
    const cols = img.velocities.length;
    const floor = incoherentBelow(SOFT_GATHER.traces, img.velocities.length);
    for (let i = 0; i < img.frequencies.length; i += 7) {
      for (let c = 0; c < cols; c += 13) {
        const lambda = img.velocities[c] / img.frequencies[i];
        const want =
          img.strength[i] < floor || lambda < 2 * SOFT_GATHER.spacing || lambda > 2 * spread ? UNRELIABLE : lambda > spread ? MARGINAL : RELIABLE;
        expect(img.reliability[i * cols + c]).toBe(want);
      }
    }
    expect(img.notes.some((n) => n.includes('aliased'))).toBe(true);
  });

  it('gives rows of power from 0 to 1 with the maximum exactly 1', () => {
    const cols = img.velocities.length;
    for (let i = 0; i < img.frequencies.length; i++) {
      let m = 0;
      let low = Infinity;
      for (let c = 0; c < cols; c++) {
        m = Math.max(m, img.power[i * cols + c]);
        low = Math.min(low, img.power[i * cols + c]);
      }
      if (m !== 1 || low < 0) throw new Error(`row ${i}: power from ${low} to ${m}, expected 0 to exactly 1`);
    }
  });
});

describe('phase-shift image of noise alone', () => {
  it('marks every row unreliable: random unit spectra agree only by chance (coherence near 1/N)', () => {
    // Seeded noise; the floor (ln M + 5)/N is passed by a noise row with probability about 0.7 % (derived in phase-shift.ts).
    const rand = mulberry32(77);
    const traces = Array.from({ length: 24 }, () => Float64Array.from({ length: 512 }, () => gaussian(rand)));
    const img = phaseShiftImage(
      { traces, offsets: traces.map((_, j) => 10 + 2 * j), sampleInterval: 0.001, startTime: 0 },
      { frequencies: linearAxis(5, 60, 23, 'frequency', 'Hz'), velocities: linearAxis(100, 700, 61, 'velocity', 'm/s') },
    );
    expect(img.reliability.every((r) => r === UNRELIABLE)).toBe(true);
    expect(img.notes.some((n) => n.includes('hardly agree'))).toBe(true);
  });
});

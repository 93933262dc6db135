/**
 * The multiple-filter image (core/signal/multiple-filter.ts; Dziewonski,
 * Bloch & Landisman 1969, BSSA 59:427–444) against outside references:
 *
 * 1. A non-dispersive Gaussian pulse travelling at c0: every filter's output
 *    is symmetric about t = x/c0 (a zero-phase filter of a zero-phase
 *    pulse), so the envelope peaks at U = c0 exactly, and the instantaneous
 *    frequency there is the centroid ∫f·A(f)df / ∫A(f)df of the filtered
 *    amplitude spectrum A = S·H_n (derived: at the peak a = ∫A, a' = i2π∫fA).
 *    The centroid is integrated here by the trapezoid rule.
 * 2. Synthetic Love-wave records from the core's own modal solution
 *    (test/signal-fixtures.ts): the followed ridge recovers the group
 *    velocity of core/dispersion (energy integrals, Aki & Richards,
 *    *Quantitative Seismology*, 2nd ed. 2002, §7.3) within 3 % where the
 *    offset is over 3 wavelengths and the frequency is above 1.25 × that of
 *    the group-velocity minimum; the band near and below that minimum (the
 *    Airy phase), where the method is biased, is reported as unreliable.
 */
import { describe, expect, it } from 'vitest';
import { loveCurves } from '../../core/dispersion/curve';
import { loveVelocities } from '../../core/dispersion/love-layer';
import { linearAxis, UNRELIABLE } from '../../core/signal/image';
import { AIRY_FACTOR, FAINT_ROW, multipleFilterImage } from '../../core/signal/multiple-filter';
import { followRidge, strongestRidgeSeed } from '../../core/signal/ridge';
import { INVENTED_SOFT_SITE } from '../fixtures';
import { syntheticLoveGather } from '../../core/signal/synthetic-love';
import { SOFT_SITE_MODEL, softSiteTrace } from '../signal-fixtures';

/** The true group-velocity minimum's frequency (the Airy phase) of the invented site, on a 0.01 Hz grid. */
const fAiry = (() => {
  const curve = loveCurves(SOFT_SITE_MODEL, Array.from({ length: 2901 }, (_, i) => 1 + i * 0.01)).modes[0];
  let m = 0;
  for (let i = 1; i < curve.group.length; i++) if (curve.group[i] < curve.group[m]) m = i;
  return curve.frequency[m];
})();

describe('multiple-filter image of a non-dispersive pulse (closed form above)', () => {
  const c0 = 250;
  const x = 200;
  const w = 0.02;
  const dt = 0.001;
  const t0 = -0.1;
  const n = 2048;
  const trace = new Float64Array(n);
  for (let k = 0; k < n; k++) trace[k] = Math.exp(-(((t0 + k * dt - x / c0) / w) ** 2));
  // c0 is on the grid (step 0.5 m/s).
  const velocities = linearAxis(150, 400, 501, 'velocity', 'm/s');
  const frequencies = [8, 15, 25, 35];
  const alpha = 20;
  const img = multipleFilterImage({ traces: [trace], offsets: [x], sampleInterval: dt, startTime: t0 }, { frequencies, velocities, alpha });
  const cols = velocities.length;
  const at = velocities.indexOf(c0);

  for (let r = 0; r < frequencies.length; r++) {
    const fn = frequencies[r];
    it(`peaks at U = c0 with the filtered spectrum's centroid as its frequency, filter at ${fn} Hz`, () => {
      let peak = 0;
      for (let c = 1; c < cols; c++) if (img.power[r * cols + c] > img.power[r * cols + peak]) peak = c;
      expect(Math.abs(velocities[peak] - c0)).toBeLessThanOrEqual(0.5);
      // Centroid of A(f) = S(f)·exp(−α((f − fn)/fn)²), S(f) ∝ exp(−(πwf)²) for the Gaussian pulse.
      let num = 0;
      let den = 0;
      const h = 1e-3;
      for (let f = h; f < 200; f += h) {
        const a = Math.exp(-((Math.PI * w * f) ** 2)) * Math.exp(-alpha * ((f - fn) / fn) ** 2);
        num += f * a;
        den += a;
      }
      const want = num / den;
      const got = img.instantaneousFrequency![r * cols + at];
      const diff = Math.abs(got - want) / want;
      // Tolerance: the spectral lines are 0.24 Hz apart and the envelope is sampled, not continuous.
      if (!(diff < 2e-3)) throw new Error(`filter ${fn} Hz: expected ${want} Hz, got ${got}, relative difference ${diff} > 2e-3`);
    });
  }
});

describe('multiple-filter ridge on a synthetic Love-wave trace (modal solution of core/dispersion)', () => {
  const g = softSiteTrace();
  const x = 150;
  const img = multipleFilterImage(g, {
    frequencies: linearAxis(2, 60, 117, 'frequency', 'Hz'),
    velocities: linearAxis(100, 700, 241, 'velocity', 'm/s'),
  });

  it('recovers the group velocity within 3 % where x > 3 wavelengths and f > 1.25 × the Airy frequency', () => {
    const ridge = followRidge(img, strongestRidgeSeed(img)!);
    let checked = 0;
    for (let k = 0; k < ridge.velocity.length; k++) {
      const f = ridge.frequency[k];
      const v = loveVelocities(INVENTED_SOFT_SITE, f, 0);
      if (!(x > (3 * v.phase) / f && f > AIRY_FACTOR * fAiry)) continue;
      checked++;
      const diff = Math.abs(ridge.velocity[k] - v.group) / v.group;
      if (!(diff < 0.03)) throw new Error(`f ${f} Hz: expected ${v.group} m/s, got ${ridge.velocity[k]}, relative difference ${diff} > 0.03`);
    }
    expect(checked).toBeGreaterThan(20);
  });

  it('reports the band near and below the group-velocity minimum as unreliable, and the ridge stays out of it', () => {
    const note = img.notes.find((s) => s.includes('Airy'));
    expect(note).toBeDefined();
    const ridge = followRidge(img, strongestRidgeSeed(img)!);
    expect(Math.min(...ridge.frequency)).toBeGreaterThan(AIRY_FACTOR * fAiry);
    // Every cell whose frequency is at or below the true minimum's is marked.
    const cols = img.velocities.length;
    for (let i = 0; i < img.frequencies.length; i++) {
      for (let c = 0; c < cols; c++) {
        const f = img.instantaneousFrequency![i * cols + c];
        if (Number.isFinite(f) && f <= fAiry && img.reliability[i * cols + c] !== UNRELIABLE) {
          throw new Error(`cell at ${f} Hz, ${img.velocities[c]} m/s is below the Airy frequency ${fAiry} Hz but not marked unreliable`);
        }
      }
    }
  });

  it('marks rows with too little energy (under 10 % of the strongest envelope) as unreliable throughout', () => {
    const cols = img.velocities.length;
    let faint = 0;
    for (let i = 0; i < img.frequencies.length; i++) {
      if (img.strength[i] >= FAINT_ROW) continue;
      faint++;
      for (let c = 0; c < cols; c++) expect(img.reliability[i * cols + c]).toBe(UNRELIABLE);
    }
    // The 12 Hz source has little energy near 2 Hz and 60 Hz.
    expect(faint).toBeGreaterThan(0);
  });

  it('marks travel under 2 wavelengths as unreliable', () => {
    const cols = img.velocities.length;
    let marked = 0;
    for (let i = 0; i < img.frequencies.length; i++) {
      for (let c = 0; c < cols; c++) {
        const f = img.instantaneousFrequency![i * cols + c];
        if (Number.isFinite(f) && f > 0 && (x * f) / img.velocities[c] < 2) {
          expect(img.reliability[i * cols + c]).toBe(UNRELIABLE);
          marked++;
        }
      }
    }
    expect(marked).toBeGreaterThan(0);
  });
});

describe('two-receiver multiple-filter image (difference of arrival times)', () => {
  // Two receivers of the invented site, 80 m and 160 m out; the record's delay is then mis-stated by 30 ms.
  const g = syntheticLoveGather(SOFT_SITE_MODEL, { offsets: [80, 160], sampleInterval: 0.001, samples: 4096, startTime: -0.1, peakHz: 12, noise: { level: 0.02, seed: 9 } });
  const wrong = { ...g, startTime: g.startTime + 0.03 };
  const axes = { frequencies: linearAxis(6, 30, 49, 'frequency', 'Hz'), velocities: linearAxis(100, 700, 241, 'velocity', 'm/s') };

  it('recovers the group velocity within 3 % where the receivers are over 3 wavelengths apart, whatever the trigger error', () => {
    const img = multipleFilterImage(wrong, { ...axes, trace: 1, reference: 0 });
    const ridge = followRidge(img, strongestRidgeSeed(img)!);
    let checked = 0;
    for (let k = 0; k < ridge.velocity.length; k++) {
      const f = ridge.frequency[k];
      const v = loveVelocities(INVENTED_SOFT_SITE, f, 0);
      if (!(80 > (3 * v.phase) / f && f > AIRY_FACTOR * fAiry)) continue;
      checked++;
      const diff = Math.abs(ridge.velocity[k] - v.group) / v.group;
      if (!(diff < 0.03)) throw new Error(`f ${f} Hz: expected ${v.group} m/s, got ${ridge.velocity[k]}, relative difference ${diff} > 0.03`);
    }
    expect(checked).toBeGreaterThan(10);
  });

  it('while one trace with the wrong delay is off by more than 3 % (the error the pair removes)', () => {
    const img = multipleFilterImage(wrong, { ...axes, trace: 1 });
    const ridge = followRidge(img, strongestRidgeSeed(img)!);
    const k = Math.floor(ridge.velocity.length / 2);
    const u = loveVelocities(INVENTED_SOFT_SITE, ridge.frequency[k], 0).group;
    expect(Math.abs(ridge.velocity[k] - u) / u).toBeGreaterThan(0.03);
  });
});

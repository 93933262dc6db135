/**
 * The model trial the compute worker runs for the layer builder and the
 * layered estimate's best-fit curves (pwa/worker/model-trial.ts), called
 * in-process: curves per wave and mode on the band, each pick's prediction
 * and the misfit, the site figures with the caution.
 */
import { describe, expect, it } from 'vitest';
import { logBand } from '../../../../core/dispersion/curve';
import type { LayeredModel } from '../../../../core/dispersion/model';
import type { Pick } from '../../../../core/picks/picks';
import { CAUTION } from '../../../../core/shared/caution';
import { computeApi } from '../../../../pwa/worker/compute-api';
import { trialModel } from '../../../../pwa/worker/model-trial';

// Invented: a thick soft layer over stiffer ground, P speeds at Poisson's ratio 0.25 (vp = √3·vs).
const THICK_TOP: LayeredModel = {
  layers: [{ thickness: 100, vs: 200, vp: 200 * Math.sqrt(3), density: 1800 }],
  halfspace: { vs: 400, vp: 400 * Math.sqrt(3), density: 2000 },
};

describe('a model trial', () => {
  it('draws Rayleigh waves at the top layer’s own Rayleigh speed where the wavelength is short (closed form)', () => {
    // Rayleigh's equation at ν = 0.25: c_R = √(2 − 2/√3)·β = 0.9194017·β (closed form; e.g. Aki & Richards 2002, §5.1).
    const r = trialModel(THICK_TOP, { band: logBand(40, 60, 3), waves: [{ wave: 'rayleigh', modes: 1 }], picks: [], figures: false });
    const c = r.curves[0].modes[0].phase;
    const expected = Math.sqrt(2 - 2 / Math.sqrt(3)) * 200;
    for (let i = 0; i < c.length; i++) expect(Math.abs(c[i] - expected) / expected, `f=${r.curves[0].modes[0].frequency[i]} got ${c[i]} expected ${expected}`).toBeLessThan(1e-6);
  });

  it('scores picks made from the model itself as a perfect fit, and picks one sd off as a typical miss of one sd', () => {
    const band = logBand(5, 40, 20);
    const own = trialModel(THICK_TOP, { band, waves: [{ wave: 'love', modes: 1 }, { wave: 'rayleigh', modes: 1 }], picks: [], figures: false });
    const picks: Pick[] = [];
    for (const c of own.curves) {
      const m = c.modes[0];
      for (const i of [2, 9, 15]) {
        const kind = i === 9 ? 'group' : 'phase';
        const v = kind === 'phase' ? m.phase[i] : m.group[i];
        picks.push({ frequency: m.frequency[i], velocity: v, sd: 0.02 * v, kind, mode: 0, wave: c.wave });
      }
    }
    const exact = trialModel(THICK_TOP, { band, waves: [{ wave: 'love', modes: 2 }, { wave: 'rayleigh', modes: 2 }], picks, figures: false });
    expect(exact.fit.n).toBe(6);
    expect(exact.fit.chi2).toBeLessThan(1e-12);
    const off = picks.map((p) => ({ ...p, velocity: p.velocity + p.sd! }));
    const miss = trialModel(THICK_TOP, { band, waves: [{ wave: 'love', modes: 1 }, { wave: 'rayleigh', modes: 1 }], picks: off, figures: false });
    // Each pick moved by exactly its own sd: every miss is 1 sd, χ² = n, so the RMS is 1.
    expect(miss.fit.rms).toBeCloseTo(1, 6);
  });

  it('leaves picks of a wave not drawn out of the misfit, and counts picks whose mode the model lacks', () => {
    const picks: Pick[] = [
      { frequency: 10, velocity: 190, kind: 'phase', mode: 0, wave: 'rayleigh' },
      { frequency: 0.2, velocity: 390, kind: 'phase', mode: 3, wave: 'love' },
      { frequency: 10, velocity: 190, kind: 'phase', mode: 0, wave: 'love' },
    ];
    const r = trialModel(THICK_TOP, { band: logBand(1, 20, 5), waves: [{ wave: 'love', modes: 1 }], picks, figures: false });
    expect(r.fit).toMatchObject({ n: 1, missing: 1, skipped: 1 });
    expect(Number.isNaN(r.fit.predicted[0])).toBe(true);
  });

  it('gives the model’s site figures with the caution, through the worker API with its columns listed for transfer', () => {
    const out = computeApi.modelTrial(THICK_TOP, { band: logBand(2, 30, 10), waves: [{ wave: 'love', modes: 3 }], picks: [] });
    expect(out.outcome.ok).toBe(true);
    if (!out.outcome.ok) return;
    // Vs30 of a 100 m layer of 200 m/s: 200 m/s (EN 1998-1 eq. 3.1, a closed form here).
    expect(out.outcome.value.figures!.vs30.best).toBeCloseTo(200, 9);
    expect(out.outcome.value.caution).toBe(CAUTION);
    expect(out.outcome.value.curves[0].modes.length).toBe(3);
    expect(out.transfer.length).toBeGreaterThan(0);
  });

  it('refuses a Rayleigh model without P speeds, naming the field, as data across the worker boundary', () => {
    const noP: LayeredModel = { layers: [{ thickness: 5, vs: 200, density: 1800 }], halfspace: { vs: 400, density: 2000 } };
    const out = computeApi.modelTrial(noP, { band: logBand(2, 30, 4), waves: [{ wave: 'rayleigh', modes: 1 }], picks: [] });
    expect(out.outcome).toMatchObject({ ok: false, name: 'InputError', field: 'layers[0].vp' });
  });
});

/**
 * P speeds in the model (core/dispersion/model.ts) and the Rayleigh-wave
 * curve API (core/dispersion/curve.ts). Sources: the stability limit
 * vp/vs > √(4/3) (bulk modulus K = ρ(vp² − 4/3·vs²) > 0) and Poisson's
 * ratio ν = (r² − 2)/(2(r² − 1)), r = vp/vs (Aki & Richards, *Quantitative
 * Seismology*, 2nd ed. 2002, §2.2); the half-space Rayleigh speed
 * √(2 − 2/√3)·β at ν = 1/4 (closed form from Rayleigh's equation). Models
 * are invented for the tests.
 */
import { describe, expect, it } from 'vitest';
import { dispersionCurves, loveCurves, rayleighCurves } from '../../../../core/dispersion/curve';
import {
  checkRayleighModel,
  modelFromJson,
  modelToJson,
  poissonRatio,
  pSpeedFromPoisson,
  validateModel,
  type LayeredModel,
} from '../../../../core/dispersion/model';
import { inputError as fails } from '../../../input-error';

const good = {
  layers: [{ thickness_m: 10, vs_m_s: 200, density_kg_m3: 1800, vp_m_s: 450 }],
  halfspace: { vs_m_s: 500, density_kg_m3: 2000, vp_m_s: 1100 },
};

const withoutVp: LayeredModel = {
  layers: [{ thickness: 10, vs: 200, density: 1800 }],
  halfspace: { vs: 500, density: 2000 },
};

describe('P speeds in the model file', () => {
  it('reads vp_m_s per layer and for the half-space, and writes it back', () => {
    const m = modelFromJson(good);
    expect(m.layers[0].vp).toBe(450);
    expect(m.halfspace.vp).toBe(1100);
    expect(modelToJson(m)).toEqual(good);
  });

  it('leaves models without P speeds as they were (Love waves ignore them)', () => {
    const m = validateModel(withoutVp);
    expect(m).toEqual(withoutVp);
    expect(modelToJson(m)).toEqual({
      layers: [{ thickness_m: 10, vs_m_s: 200, density_kg_m3: 1800 }],
      halfspace: { vs_m_s: 500, density_kg_m3: 2000 },
    });
    const withVp = validateModel({ ...withoutVp, layers: [{ ...withoutVp.layers[0], vp: 450 }], halfspace: { ...withoutVp.halfspace, vp: 1100 } });
    const f = [1, 5, 20];
    expect(loveCurves(withVp, f, { modes: 2 })).toEqual(loveCurves(m, f, { modes: 2 }));
  });

  it('refuses a P speed that is not a usable number, naming the field', () => {
    const cases: [unknown, string][] = [
      ['450', 'layers[0].vp_m_s must be a number, but it is "450".'],
      [-3, 'layers[0].vp_m_s must be greater than 0 m/s, but it is -3.'],
      [0.45, 'layers[0].vp_m_s is 0.45 m/s, far too slow for a P wave. It looks like km/s; enter the speed in m/s.'],
      [20000, 'layers[0].vp_m_s is 20000 m/s, above the 10000 m/s upper bound for P speed.'],
    ];
    for (const [vp, message] of cases) {
      const e = fails(() => modelFromJson({ ...good, layers: [{ ...good.layers[0], vp_m_s: vp }] }));
      expect(e.field).toBe('layers[0].vp_m_s');
      expect(e.message).toBe(message);
    }
    const e = fails(() => modelFromJson({ ...good, halfspace: { ...good.halfspace, vp_m_s: Infinity } }));
    expect(e.message).toBe('halfspace.vp_m_s must be a finite number, but it is Infinity.');
  });
});

describe('checkRayleighModel', () => {
  it('accepts a model with P speeds and gives no warnings for Poisson ratios of 0 or more', () => {
    expect(checkRayleighModel(modelFromJson(good), 'file')).toEqual([]);
  });

  it('refuses a missing P speed in one sentence naming the layer and field', () => {
    const e = fails(() => checkRayleighModel(modelFromJson({ ...good, layers: [good.layers[0], { thickness_m: 5, vs_m_s: 300, density_kg_m3: 1900 }] }), 'file'));
    expect(e.field).toBe('layers[1].vp_m_s');
    expect(e.message).toBe('layers[1].vp_m_s is missing; Rayleigh waves need the P-wave speed of every layer and of the half-space.');
    const h = fails(() => checkRayleighModel({ ...withoutVp, layers: [{ ...withoutVp.layers[0], vp: 450 }] }));
    expect(h.field).toBe('halfspace.vp');
  });

  it('refuses vp/vs at or below √(4/3), which no stable elastic solid has', () => {
    const atLimit = 200 * Math.sqrt(4 / 3);
    for (const vp of [atLimit, 220, 150]) {
      const e = fails(() => checkRayleighModel(modelFromJson({ ...good, layers: [{ ...good.layers[0], vp_m_s: vp }] }), 'file'));
      expect(e.field).toBe('layers[0].vp_m_s');
      expect(e.message).toBe(
        `layers[0].vp_m_s is ${vp} m/s, but it must be more than √(4/3) ≈ 1.155 times layers[0].vs_m_s (200 m/s), since no stable elastic solid has a lower P/S speed ratio.`,
      );
    }
  });

  it('warns (without refusing) about a Poisson ratio below 0', () => {
    const w = checkRayleighModel(modelFromJson({ ...good, halfspace: { ...good.halfspace, vp_m_s: 650 } }), 'file');
    expect(w).toEqual([
      "halfspace: vp_m_s / vs_m_s = 1.300 gives a Poisson's ratio of -0.225, below 0, which is rare in soils and rocks; check the P speed.",
    ]);
  });

  it('converts between Poisson ratio and P speed (ν = 1/4 ↔ vp = √3·vs; ν = 0 ↔ vp = √2·vs)', () => {
    expect(pSpeedFromPoisson(100, 0.25)).toBeCloseTo(100 * Math.sqrt(3), 10);
    expect(pSpeedFromPoisson(100, 0)).toBeCloseTo(100 * Math.SQRT2, 10);
    expect(poissonRatio(Math.sqrt(3), 1)).toBeCloseTo(0.25, 12);
    expect(poissonRatio(pSpeedFromPoisson(250, 0.4), 250)).toBeCloseTo(0.4, 12);
  });
});

describe('dispersionCurves with a wave option', () => {
  it('is Love by default and Rayleigh on request', () => {
    const m = modelFromJson(good);
    const f = [2, 8, 30];
    expect(dispersionCurves(m, f)).toEqual(loveCurves(m, f));
    const r = dispersionCurves(m, f, { wave: 'rayleigh', modes: 2 });
    expect(r.wave).toBe('rayleigh');
    expect(r).toEqual(rayleighCurves(m, f, { modes: 2 }));
    expect(r.modes[0].frequency.length).toBe(3);
  });

  it('gives the half-space Rayleigh speed at every frequency for a layer identical to the half-space (ν = 1/4)', () => {
    const hs = { vs: 300, vp: 300 * Math.sqrt(3), density: 1900 };
    const r = rayleighCurves({ layers: [{ thickness: 6, ...hs }], halfspace: hs }, [0.5, 5, 50, 500], { modes: 3 });
    const want = Math.sqrt(2 - 2 / Math.sqrt(3)) * 300;
    expect(r.modes[0].phase.length).toBe(4);
    for (const c of r.modes[0].phase) expect(Math.abs(c - want)).toBeLessThan(1e-11 * want);
    for (const u of r.modes[0].group) expect(Math.abs(u - want)).toBeLessThan(1e-9 * want);
    expect(r.modes[1].phase.length).toBe(0);
  });

  it('refuses an unknown wave type and a model without P speeds for Rayleigh waves', () => {
    const e = fails(() => dispersionCurves(withoutVp, [1], { wave: 'shear' as 'love' }));
    expect(e.message).toBe('wave must be "love" or "rayleigh", but it is "shear".');
    const r = fails(() => dispersionCurves(withoutVp, [1], { wave: 'rayleigh' }));
    expect(r.message).toBe('layers[0].vp is missing; Rayleigh waves need the P-wave speed of every layer and of the half-space.');
  });
});

/**
 * Model validation (core/dispersion/model.ts): every bad value gets one full-sentence
 * message naming the field and the reason. Bounds are common practice
 * (shared/PHYSICS.md §9); the trapping condition (half-space faster than the
 * slowest layer) is from Aki & Richards, *Quantitative Seismology*, 2nd ed.
 * 2002, §7.2.
 */
import { describe, expect, it } from 'vitest';
import { modelFromJson, modelToJson, validateModel, type LayeredModel } from '../../../../core/dispersion/model';
import { inputError as fails } from '../../../input-error';

const good = {
  layers: [{ thickness_m: 10, vs_m_s: 200, density_kg_m3: 1800 }],
  halfspace: { vs_m_s: 500, density_kg_m3: 2000 },
};

function withLayer(patch: Record<string, unknown>) {
  return { ...good, layers: [{ ...good.layers[0], ...patch }] };
}

function withHalfspace(patch: Record<string, unknown>) {
  return { ...good, halfspace: { ...good.halfspace, ...patch } };
}

describe('modelFromJson', () => {
  it('reads a good model into SI fields and back', () => {
    const m = modelFromJson(good);
    expect(m).toEqual({ layers: [{ thickness: 10, vs: 200, density: 1800 }], halfspace: { vs: 500, density: 2000 } });
    expect(modelToJson(m)).toEqual(good);
    expect(Object.isFrozen(m)).toBe(true);
  });

  const cases: [string, unknown, string, string][] = [
    ['not an object', [1, 2], 'model', 'The model file must hold a JSON object with "layers" and "halfspace".'],
    ['null', null, 'model', 'The model file must hold a JSON object with "layers" and "halfspace".'],
    ['no layers', { halfspace: good.halfspace }, 'layers', 'layers must be a list of at least one layer over the half-space.'],
    ['empty layers', { ...good, layers: [] }, 'layers', 'layers must be a list of at least one layer over the half-space.'],
    ['a layer that is not an object', { ...good, layers: [5] }, 'layers[0]', 'layers[0] must be an object with thickness_m, vs_m_s and density_kg_m3.'],
    ['missing thickness', withLayer({ thickness_m: undefined }), 'layers[0].thickness_m', 'layers[0].thickness_m is missing; give a number.'],
    ['text thickness', withLayer({ thickness_m: '10' }), 'layers[0].thickness_m', 'layers[0].thickness_m must be a number, but it is "10".'],
    ['zero thickness', withLayer({ thickness_m: 0 }), 'layers[0].thickness_m', 'layers[0].thickness_m must be greater than 0 m, but it is 0.'],
    ['negative speed', withLayer({ vs_m_s: -200 }), 'layers[0].vs_m_s', 'layers[0].vs_m_s must be greater than 0 m/s, but it is -200.'],
    [
      'speed in km/s',
      withLayer({ vs_m_s: 0.2 }),
      'layers[0].vs_m_s',
      'layers[0].vs_m_s is 0.2 m/s, below the 30 m/s lower bound for shear speed. It looks like km/s; enter the speed in m/s.',
    ],
    ['speed too high', withLayer({ vs_m_s: 6000 }), 'layers[0].vs_m_s', 'layers[0].vs_m_s is 6000 m/s, above the 5000 m/s upper bound for shear speed.'],
    [
      'density in g/cm³',
      withLayer({ density_kg_m3: 1.8 }),
      'layers[0].density_kg_m3',
      'layers[0].density_kg_m3 is 1.8 kg/m³, below the 1000 kg/m³ lower bound for density. It looks like g/cm³; enter the density in kg/m³.',
    ],
    [
      'density too high',
      withLayer({ density_kg_m3: 8000 }),
      'layers[0].density_kg_m3',
      'layers[0].density_kg_m3 is 8000 kg/m³, above the 3500 kg/m³ upper bound for density.',
    ],
    ['no half-space', { layers: good.layers }, 'halfspace', 'halfspace is missing; give an object with vs_m_s and density_kg_m3.'],
    ['half-space speed null', withHalfspace({ vs_m_s: null }), 'halfspace.vs_m_s', 'halfspace.vs_m_s is missing; give a number.'],
    ['half-space density text', withHalfspace({ density_kg_m3: 'x' }), 'halfspace.density_kg_m3', 'halfspace.density_kg_m3 must be a number, but it is "x".'],
    [
      'half-space not faster than the slowest layer',
      withHalfspace({ vs_m_s: 200 }),
      'halfspace.vs_m_s',
      'halfspace.vs_m_s is 200 m/s, but it must be faster than the slowest layer (200 m/s) for Love waves to be trapped.',
    ],
  ];
  for (const [what, json, field, message] of cases) {
    it(`rejects ${what}, naming ${field}`, () => {
      const e = fails(() => modelFromJson(json));
      expect(e.field).toBe(field);
      expect(e.message).toBe(message);
    });
  }
});

describe('validateModel', () => {
  const base: LayeredModel = { layers: [{ thickness: 10, vs: 200, density: 1800 }], halfspace: { vs: 500, density: 2000 } };

  it('returns a frozen copy of a good model', () => {
    const m = validateModel(base);
    expect(m).toEqual(base);
    expect(m).not.toBe(base);
    expect(Object.isFrozen(m.layers[0])).toBe(true);
  });

  it('rejects non-finite and out-of-bound values, naming the field', () => {
    const e1 = fails(() => validateModel({ ...base, layers: [{ thickness: Infinity, vs: 200, density: 1800 }] }));
    expect(e1.field).toBe('layers[0].thickness');
    expect(e1.message).toBe('layers[0].thickness must be a finite number, but it is Infinity.');
    const e2 = fails(() => validateModel({ ...base, layers: [...base.layers, { thickness: 5, vs: NaN, density: 1800 }] }));
    expect(e2.field).toBe('layers[1].vs');
    expect(e2.message).toBe('layers[1].vs must be a finite number, but it is NaN.');
    const e3 = fails(() => validateModel({ layers: [], halfspace: base.halfspace }));
    expect(e3.message).toBe('layers must list at least one layer over the half-space.');
    const e4 = fails(() =>
      validateModel({ layers: [{ thickness: 5, vs: 300, density: 1800 }, { thickness: 5, vs: 150, density: 1800 }], halfspace: { vs: 140, density: 2000 } }),
    );
    expect(e4.field).toBe('halfspace.vs');
    expect(e4.message).toBe('halfspace.vs is 140 m/s, but it must be faster than the slowest layer (150 m/s) for Love waves to be trapped.');
  });

  it('accepts a layer faster than the half-space when a slower layer traps the waves', () => {
    expect(() =>
      validateModel({ layers: [{ thickness: 5, vs: 900, density: 2000 }, { thickness: 5, vs: 150, density: 1800 }], halfspace: { vs: 600, density: 2000 } }),
    ).not.toThrow();
  });
});

/**
 * The layer builder's form (pwa/ui/controllers/layered-form.ts): typed rows
 * read into a model with the core's rules, every bad value named in one
 * sentence with its layer and field, P speed and Poisson's ratio derived
 * from each other, and the starting rows.
 */
import { describe, expect, it } from 'vitest';
import type { EstimateResult } from '../../../../../core/estimate/estimate';
import {
  crewWords,
  derivedP,
  readRows,
  readStored,
  rowsOfEstimate,
  switchPInput,
  type LayerRowText,
} from '../../../../../pwa/ui/controllers/layered-form';

const row = (thickness: string, vs: string, p: string, density: string): LayerRowText => ({ thickness, vs, p, density });

/** An invented two-layer site with P speeds. */
const TWO: LayerRowText[] = [row('4', '180', '340', '1800'), row('10', '300', '1550', '1900'), row('', '600', '1900', '2100')];

describe('reading the builder rows', () => {
  it('makes a model of two layers over the half-space, P speeds included', () => {
    const r = readRows(TWO, 'vp', true);
    expect(r.errors).toEqual([]);
    expect(r.model).toEqual({
      layers: [
        { thickness: 4, vs: 180, vp: 340, density: 1800 },
        { thickness: 10, vs: 300, vp: 1550, density: 1900 },
      ],
      halfspace: { vs: 600, vp: 1900, density: 2100 },
    });
  });

  it('refuses a P speed at or below √(4/3) times the shear speed in one sentence naming the layer and field', () => {
    const rows = TWO.map((r) => ({ ...r }));
    rows[1].p = '340'; // 340/300 = 1.133 < √(4/3) ≈ 1.155 (Aki & Richards 2002, §2.2: bulk modulus > 0)
    const r = readRows(rows, 'vp', true);
    expect(r.model).toBeUndefined();
    expect(r.errors).toEqual([
      'Layer 2 P speed is 340 m/s, but it must be more than √(4/3) ≈ 1.155 times Layer 2 shear speed (300 m/s), since no stable elastic solid has a lower P/S speed ratio.',
    ]);
  });

  it('names every bad value, each in its own sentence, and the half-space without a thickness', () => {
    const rows = [row('-2', '180', '340', '1.8'), row('', 'fast', '1900', '2100')];
    const r = readRows(rows, 'vp', true);
    expect(r.model).toBeUndefined();
    expect(r.errors).toEqual([
      'Layer 1 thickness must be greater than 0 m, but it is -2.',
      'Layer 1 density is 1.8 kg/m³, below the 1000 kg/m³ lower bound for density. It looks like g/cm³; enter the density in kg/m³.',
      'Half-space shear speed must be a number in m/s, but it is "fast".',
    ]);
  });

  it('warns for a Poisson’s ratio below 0 and still makes the model', () => {
    const rows = TWO.map((r) => ({ ...r }));
    rows[0].p = '240'; // 240/180 = 1.333 < √2: ν < 0
    const r = readRows(rows, 'vp', true);
    expect(r.model).toBeDefined();
    expect(r.warnings).toHaveLength(1);
    expect(r.warnings[0]).toMatch(/^Layer 1: the P\/S speed ratio = 1\.333 gives a Poisson's ratio of -0\.\d+, below 0/);
  });

  it('takes Poisson’s ratios as vp = vs·√((2 − 2ν)/(1 − 2ν)): ν = 0.25 gives vp = √3·vs (closed form)', () => {
    const rows = [row('5', '200', '0.25', '1800'), row('', '400', '0.25', '2000')];
    const r = readRows(rows, 'poisson', true);
    expect(r.model!.layers[0].vp).toBeCloseTo(200 * Math.sqrt(3), 10);
    expect(r.model!.halfspace.vp).toBeCloseTo(400 * Math.sqrt(3), 10);
    expect(readRows([row('5', '200', '0.5', '1800'), row('', '400', '0.25', '2000')], 'poisson', true).errors[0]).toBe(
      "Layer 1 Poisson's ratio is 0.5, outside the range −1 to 0.5 (exclusive) of a stable elastic solid; soils are about 0.25–0.49.",
    );
  });

  it('needs no P speeds for Love waves alone, but all or none', () => {
    const none = TWO.map((r) => ({ ...r, p: '' }));
    expect(readRows(none, 'vp', false).model!.layers[0].vp).toBeUndefined();
    const rayleigh = readRows(none, 'vp', true);
    expect(rayleigh.model).toBeUndefined();
    expect(rayleigh).toMatchObject({ errors: [], empty: 3 });
    const some = TWO.map((r, i) => ({ ...r, p: i === 1 ? '' : r.p }));
    expect(readRows(some, 'vp', false).errors).toEqual([
      'Layer 2 P speed is empty; give it for every layer and the half-space, or leave them all empty (Love waves need none).',
    ]);
  });

  it('refuses a half-space slower than the slowest layer in the crew’s words', () => {
    const rows = [row('5', '300', '', '1800'), row('', '250', '', '2000')];
    expect(readRows(rows, 'vp', false).errors).toEqual([
      'Half-space shear speed is 250 m/s, but it must be faster than the slowest layer (300 m/s) for Love waves to be trapped.',
    ]);
  });
});

describe('P speed and Poisson’s ratio', () => {
  it('shows the other quantity derived, and converts the typed values when the crew switches', () => {
    expect(derivedP(row('5', '200', '400', '1800'), 'vp')).toBe('ν = 0.333'); // vp = 2·vs ↔ ν = 1/3 (closed form)
    expect(derivedP(row('5', '200', '0.25', '1800'), 'poisson')).toBe('P speed 346.4 m/s'); // √3·200
    const switched = switchPInput([row('5', '200', '400', '1800'), row('', '400', 'x', '2000'), row('', '', '900', '2000')], 'vp', 'poisson');
    expect(switched.map((r) => r.p)).toEqual(['0.3333', '', '']); // what cannot be converted is cleared, never read as a ratio
    expect(switchPInput(switched.slice(0, 1), 'poisson', 'vp')[0].p).toBe('400'); // and back: 200·√(1.3334/0.3334) = 400.0
  });

  it('fills the one-layer estimate with P speeds from Poisson’s ratio 0.3', () => {
    const r = { thickness: { best: 6 }, vs1: { best: 180 }, vs2: { best: 450 }, density1: 1800, density2: 2000 } as unknown as EstimateResult;
    expect(rowsOfEstimate(r, 'poisson')).toEqual([row('6', '180', '0.3', '1800'), row('', '450', '0.3', '2000')]);
    // vp = 180·√(1.4/0.4) = 336.7 m/s at ν = 0.3 (closed form).
    expect(rowsOfEstimate(r, 'vp')[0].p).toBe('336.7');
  });
});

describe('the kept model', () => {
  it('reads back only a model that passes every check', () => {
    const kept = { v: 1, pInput: 'vp', rows: TWO, waves: { love: true, rayleigh: true }, modes: 3 };
    expect(readStored(kept)).toEqual(kept);
    expect(readStored({ ...kept, rows: [row('4', '180', '100', '1800'), row('', '600', '1900', '2100')] })).toBeUndefined();
    expect(readStored({ v: 2 })).toBeUndefined();
    expect(readStored(undefined)).toBeUndefined();
  });

  it('says the core’s field names in the crew’s words', () => {
    expect(crewWords('halfspace.vp is missing; layers[2].vs too')).toBe('Half-space P speed is missing; Layer 3 shear speed too');
  });
});

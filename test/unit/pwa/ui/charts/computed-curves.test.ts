/**
 * Curves computed in the worker laid out for the dispersion plot
 * (pwa/ui/charts/chart-data.ts computedColumns): one x column in Hz or s,
 * each wave's modes in the kinds picked for that wave, NaN where a mode
 * does not exist; and the misfit words of the layer builder
 * (pwa/ui/views/layer-builder.tsx misfitWords).
 */
import { describe, expect, it } from 'vitest';
import { computedColumns, type ComputedCurves } from '../../../../../pwa/ui/charts/chart-data';
import { misfitWords } from '../../../../../pwa/ui/views/layer-builder';

const band = Float64Array.of(2, 4, 8);
const curves: ComputedCurves = {
  band,
  curves: [
    { wave: 'love', modes: [{ mode: 0, frequency: band, phase: Float64Array.of(300, 250, 200), group: Float64Array.of(280, 220, 180) }] },
    {
      wave: 'rayleigh',
      modes: [
        { mode: 0, frequency: band, phase: Float64Array.of(290, 240, 190), group: Float64Array.of(270, 210, 170) },
        { mode: 1, frequency: Float64Array.of(8), phase: Float64Array.of(260), group: Float64Array.of(230) },
      ],
    },
  ],
};

describe('computed curves on the plot', () => {
  it('draws each wave in the kinds picked for it, phase when it has no picks, with NaN below a mode’s cutoff', () => {
    const picks = [{ frequency: 3, velocity: 260, kind: 'group' as const, mode: 0, wave: 'love' as const }];
    const c = computedColumns(curves, picks, 'frequency');
    expect(c.keys).toEqual([
      { wave: 'love', mode: 0, kind: 'group' },
      { wave: 'rayleigh', mode: 0, kind: 'phase' },
      { wave: 'rayleigh', mode: 1, kind: 'phase' },
    ]);
    expect([...c.x]).toEqual([2, 4, 8]);
    expect([...c.y[0]]).toEqual([280, 220, 180]);
    expect([...c.y[2]]).toEqual([NaN, NaN, 260]);
  });

  it('lays out only the kind a dispersion image shows when asked, for every wave', () => {
    const picks = [{ frequency: 3, velocity: 260, kind: 'phase' as const, mode: 0, wave: 'love' as const }];
    const c = computedColumns(curves, picks, 'frequency', 'group');
    expect(c.keys).toEqual([
      { wave: 'love', mode: 0, kind: 'group' },
      { wave: 'rayleigh', mode: 0, kind: 'group' },
      { wave: 'rayleigh', mode: 1, kind: 'group' },
    ]);
    expect([...c.y[1]]).toEqual([270, 210, 170]);
    expect([...c.y[2]]).toEqual([NaN, NaN, 230]);
  });

  it('lays the columns out in ascending period when the plot is against period', () => {
    const c = computedColumns(curves, [], 'period');
    expect([...c.x]).toEqual([1 / 8, 1 / 4, 1 / 2]);
    expect([...c.y[0]]).toEqual([200, 250, 300]);
  });
});

describe('the misfit in plain words', () => {
  it('grades the typical miss in pick sd and says which picks were left out', () => {
    const fit = { n: 4, chi2: 4, rms: 1, missing: 1, skipped: 2, predicted: new Float64Array(7) };
    expect(misfitWords(fit)).toBe(
      'The curves pass within the picks’ errors: on average 1 sd from a pick (RMS of the misses in pick sd; χ² = 4 over 4 picks). 1 pick lies where this model has no such mode (left out). 2 picks of a wave not drawn are not compared.',
    );
    expect(misfitWords({ ...fit, chi2: 64, rms: 4, missing: 0, skipped: 0 })).toMatch(/^The curves clearly miss the picks: on average 4 sd/);
    expect(misfitWords({ ...fit, n: 0 })).toBe('No pick of the drawn waves can be compared with this model.');
  });
});

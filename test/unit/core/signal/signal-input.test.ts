/** Bad input to the signal functions: one sentence naming the field and the reason, and the input left as it was. */
import { describe, expect, it } from 'vitest';
import { checkGather, spreadOf } from '../../../../core/signal/gather';
import { linearAxis, checkAxis } from '../../../../core/signal/image';
import { multipleFilterImage } from '../../../../core/signal/multiple-filter';
import { phaseShiftImage } from '../../../../core/signal/phase-shift';
import { followRidge } from '../../../../core/signal/ridge';
import { syntheticLoveGather } from '../../../../core/signal/synthetic-love';
import { inputError } from '../../../input-error';
import { SOFT_SITE_MODEL } from '../../../signal-fixtures';

function gather(traces = 4, n = 64) {
  return {
    traces: Array.from({ length: traces }, (_, j) => Float64Array.from({ length: n }, (_, k) => Math.sin(k * 0.3 + j))),
    sampleInterval: 0.001,
    startTime: 0,
    offsets: Array.from({ length: traces }, (_, j) => 5 + 2 * j),
  };
}

describe('checkGather', () => {
  it('names the trace and sample that is not a number, and changes nothing', () => {
    const g = gather();
    g.traces[2][10] = NaN;
    const before = Array.from(g.traces[1]);
    const e = inputError(() => checkGather(g, 1));
    expect(e.field).toBe('record.traces[3]');
    expect(e.message).toBe('Trace 3 of the record has a sample that is not a finite number at sample 11.');
    expect(Array.from(g.traces[1])).toEqual(before);
  });

  it('refuses traces of different lengths, too few traces, a bad interval, delay or offset', () => {
    const g = gather();
    expect(inputError(() => checkGather({ ...g, traces: [g.traces[0], new Float64Array(10)] }, 1)).message).toBe(
      'Trace 2 of the record must have 64 samples like trace 1, but it has 10.',
    );
    expect(inputError(() => phaseShiftImage({ ...g, traces: [g.traces[0]], offsets: [5] })).message).toBe(
      'The record has 1 trace, but this method needs at least 2.',
    );
    expect(inputError(() => checkGather({ ...g, sampleInterval: 0 }, 1)).field).toBe('record.sampleInterval');
    expect(inputError(() => checkGather({ ...g, startTime: 99 }, 1)).field).toBe('record.startTime');
    expect(inputError(() => checkGather({ ...g, offsets: [1, 2, -3, 4] }, 1)).message).toBe(
      'The offset of trace 3 must be a distance from 0 to 100000 m, but it is -3.',
    );
    expect(inputError(() => checkGather({ ...g, offsets: [1, 2] }, 1)).message).toBe('The record needs one offset per trace (4), but it has 2.');
  });

  it('refuses a gather whose traces all share one offset for the phase-shift method', () => {
    const g = { ...gather(), offsets: [7, 7, 7, 7] };
    expect(inputError(() => phaseShiftImage(g)).message).toMatch(/two or more different offsets/);
  });
});

describe('spreadOf', () => {
  it('gives length, median spacing and regularity', () => {
    expect(spreadOf([10, 12, 14, 16])).toMatchObject({ length: 6, spacing: 2, regular: true });
    expect(spreadOf([10, 12, 15, 16])).toMatchObject({ length: 6, spacing: 2, regular: false });
    expect(spreadOf([3])).toMatchObject({ length: 0, spacing: 0, regular: false });
  });
});

describe('image axes and options', () => {
  it('name the axis and the reason', () => {
    expect(inputError(() => linearAxis(0, 10, 5, '--freq', 'Hz')).message).toBe('The --freq axis must start above 0 Hz, but it starts at 0.');
    expect(inputError(() => linearAxis(5, 4, 5, '--freq', 'Hz')).message).toBe('The --freq axis must end above its start (5 Hz), but it ends at 4.');
    expect(inputError(() => linearAxis(5, 40, 1, '--freq', 'Hz')).field).toBe('--freq');
    expect(inputError(() => checkAxis([1, 3, 2], 'velocity', 'm/s')).message).toBe(
      'The velocity axis must rise from point to point, but point 3 (2 m/s) does not.',
    );
  });

  it('refuses frequencies at or above the Nyquist frequency', () => {
    expect(inputError(() => phaseShiftImage(gather(), { frequencies: [100, 600] })).message).toMatch(/Nyquist frequency \(500 Hz\)/);
    expect(inputError(() => multipleFilterImage(gather(), { frequencies: [100, 600] })).message).toMatch(/Nyquist/);
  });

  it('refuses a trace or reference out of range, a reference farther than the trace, a trace at offset 0, and a bad alpha', () => {
    const g = gather();
    expect(inputError(() => multipleFilterImage(g, { trace: 4 })).message).toBe('The trace trace must be a trace number from 1 to 4, but it is 5.');
    expect(inputError(() => multipleFilterImage(g, { trace: 0, reference: 2 })).field).toBe('reference');
    expect(inputError(() => multipleFilterImage({ ...g, offsets: [0, 1, 2, 3] }, { trace: 0 })).message).toMatch(/offset 0 m/);
    expect(inputError(() => multipleFilterImage(g, { alpha: -1 })).field).toBe('alpha');
  });
});

describe('followRidge', () => {
  const g = syntheticLoveGather(SOFT_SITE_MODEL, { offsets: [10, 12, 14, 16, 18, 20, 22, 24], sampleInterval: 0.001, samples: 512, startTime: -0.1, peakHz: 20 });
  const img = phaseShiftImage(g, { frequencies: linearAxis(5, 50, 46, 'frequency', 'Hz'), velocities: linearAxis(100, 600, 101, 'velocity', 'm/s') });

  it('refuses a tap off the image', () => {
    expect(inputError(() => followRidge(img, { frequency: 200, velocity: 200 })).field).toBe('tap.frequency');
    expect(inputError(() => followRidge(img, { frequency: 20, velocity: 5000 })).message).toBe(
      'The tapped velocity must lie on the image (100–600 m/s), but it is 5000.',
    );
  });

  it('gives an empty ridge and a reason where the tap lies in the aliased band', () => {
    // λ = 120/45 ≈ 2.7 m, under two receiver spacings (4 m).
    const r = followRidge(img, { frequency: 45, velocity: 120 });
    expect(r.velocity.length).toBe(0);
    expect(r.reason).not.toBe('');
  });
});

describe('syntheticLoveGather', () => {
  it('names the bad option', () => {
    const base = { offsets: [10], sampleInterval: 0.001, samples: 256, peakHz: 20 };
    expect(inputError(() => syntheticLoveGather(SOFT_SITE_MODEL, { ...base, samples: 3 })).field).toBe('samples');
    expect(inputError(() => syntheticLoveGather(SOFT_SITE_MODEL, { ...base, peakHz: 400 })).field).toBe('peakHz');
    expect(inputError(() => syntheticLoveGather(SOFT_SITE_MODEL, { ...base, offsets: [-1] })).field).toBe('offsets[1]');
    expect(inputError(() => syntheticLoveGather(SOFT_SITE_MODEL, { ...base, modes: [{ mode: 0.5, amplitude: 1 }] })).field).toBe('modes');
  });

  it('is deterministic for a seed and differs for another', () => {
    const opts = { offsets: [10, 20], sampleInterval: 0.001, samples: 256, peakHz: 20 };
    const a = syntheticLoveGather(SOFT_SITE_MODEL, { ...opts, noise: { level: 0.1, seed: 1 } });
    const b = syntheticLoveGather(SOFT_SITE_MODEL, { ...opts, noise: { level: 0.1, seed: 1 } });
    const c = syntheticLoveGather(SOFT_SITE_MODEL, { ...opts, noise: { level: 0.1, seed: 2 } });
    expect(Array.from(a.traces[1])).toEqual(Array.from(b.traces[1]));
    expect(Array.from(a.traces[1])).not.toEqual(Array.from(c.traces[1]));
  });
});

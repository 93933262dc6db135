/**
 * The compute API's record and image calls (pwa/worker/compute-api.ts), run
 * in-process: a file comes back as a recording with its trace buffers
 * listed for transfer; a bad file comes back as an InputError naming the
 * byte offset, as data; an image and a ridge list their columns for
 * transfer. The record is invented (test/signal-fixtures.ts).
 */
import { describe, expect, it } from 'vitest';
import { writeSegy } from '../../../../core/recordings/segy-write';
import { gatherOfRecording } from '../../../../core/signal/gather';
import { computeApi } from '../../../../pwa/worker/compute-api';
import { softSiteGather } from '../../../signal-fixtures';

const g = softSiteGather(12, 12);
const bytes = writeSegy({ sampleInterval: g.sampleInterval, delay: g.startTime, traces: [...g.traces], offsets: g.offsets, component: 'transverse' });

describe('compute API: records and images', () => {
  it('reads a file into a recording and lists its trace buffers for transfer', () => {
    const r = computeApi.readRecord(bytes, 'shot.sgy');
    if (!r.outcome.ok) throw new Error(r.outcome.message);
    expect(r.outcome.value.traces).toHaveLength(12);
    expect(r.transfer).toContain(r.outcome.value.traces[0].buffer);
    expect(r.transfer).toContain(r.outcome.value.offsets.buffer);
  });

  it('returns a truncated file as an InputError, as data', () => {
    const r = computeApi.readRecord(bytes.slice(0, 3300), 'cut.sgy');
    expect(r.outcome.ok).toBe(false);
    if (!r.outcome.ok) {
      expect(r.outcome.name).toBe('InputError');
      expect(r.outcome.message).toMatch(/byte/);
    }
    expect(r.transfer).toEqual([]);
  });

  it('makes the invented demo record when no bytes are given, and says it is invented', () => {
    const r = computeApi.readRecord(null, 'demo');
    if (!r.outcome.ok) throw new Error(r.outcome.message);
    expect(r.outcome.value.name).toMatch(/^Invented demo record/);
    expect(r.outcome.value.warnings[0]).toMatch(/invented/);
  });

  it('computes an image and a ridge, listing their columns for transfer', () => {
    const read = computeApi.readRecord(bytes, 'shot.sgy');
    if (!read.outcome.ok) throw new Error(read.outcome.message);
    const img = computeApi.dispersionImage(gatherOfRecording(read.outcome.value), { method: 'phase-shift', frequencies: [10, 15, 20, 25, 30], velocities: Array.from({ length: 61 }, (_, i) => 100 + 10 * i) });
    if (!img.outcome.ok) throw new Error(img.outcome.message);
    expect(img.transfer).toContain(img.outcome.value.power.buffer);
    expect(img.transfer).toContain(img.outcome.value.reliability.buffer);
    const ridge = computeApi.followRidge(img.outcome.value, { frequency: 20, velocity: 205 });
    if (!ridge.outcome.ok) throw new Error(ridge.outcome.message);
    expect(ridge.outcome.value.velocity.length).toBeGreaterThan(2);
    expect(ridge.transfer).toContain(ridge.outcome.value.velocity.buffer);
    const bad = computeApi.followRidge(img.outcome.value, { frequency: 20, velocity: 99999 });
    expect(bad.outcome.ok).toBe(false);
  });
});

/**
 * `shearfield image` and `shearfield pick` on invented synthetic records
 * (test/signal-fixtures.ts) written as a SEG-Y gather and a SEG-2 single
 * trace by the project's byte-by-byte writers, run as a user runs them
 * (node bin/shearfield.mjs, spawned concurrently). The pick output must be a
 * picks CSV that `shearfield estimate` reads; the truth for the thickness is
 * the invented model itself (H = 12 m).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnShearfield, type CliRun } from './cli-process';
import { parsePicksCsv, picksToCsv } from '../../../core/picks/picks';
import { CAUTION } from '../../../core/shared/caution';
import { writeSeg2 } from '../../../core/recordings/seg2-write';
import { writeSegy } from '../../../core/recordings/segy-write';
import { INVENTED_SOFT_SITE } from '../../fixtures';
import { softSiteGather, softSiteTrace } from '../../signal-fixtures';

let dir = '';

type Run = CliRun;

const run = (args: string[]): Promise<Run> => spawnShearfield([...args], dir);

const V = ['--velocity', '100:700:241'];
const scenarios: Record<string, string[]> = {
  image: ['image', 'gather.sgy', '--method', 'phase-shift', '--freq', '5:50:10', '--velocity', '100:600:11'],
  pickPhase: ['pick', 'gather.sgy', '--method', 'phase-shift', ...V],
  pickGroup: ['pick', 'trace.sg2', '--method', 'multiple-filter', ...V],
  noMethod: ['image', 'gather.sgy'],
  badMethod: ['image', 'gather.sgy', '--method', 'fk'],
  traceWithPhase: ['image', 'gather.sgy', '--method', 'phase-shift', '--trace', '2'],
  traceRange: ['image', 'gather.sgy', '--method', 'multiple-filter', '--trace', '49'],
  badFreq: ['image', 'gather.sgy', '--method', 'phase-shift', '--freq', '5:50'],
  missing: ['image', 'nowhere.sgy', '--method', 'phase-shift'],
  noOffsets: ['image', 'bare.sgy', '--method', 'phase-shift'],
  withOffsets: ['image', 'bare.sgy', '--method', 'phase-shift', '--offsets', '10:2', '--freq', '5:50:3', '--velocity', '100:600:3'],
  badSeed: ['pick', 'gather.sgy', '--method', 'phase-shift', '--seed-hz', 'x'],
};
const results = new Map<string, Run>();

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'shearfield-signal-'));
  const g = softSiteGather();
  writeFileSync(join(dir, 'gather.sgy'), writeSegy({ sampleInterval: g.sampleInterval, delay: g.startTime, traces: [...g.traces], offsets: g.offsets, component: 'transverse' }));
  writeFileSync(join(dir, 'bare.sgy'), writeSegy({ sampleInterval: g.sampleInterval, delay: g.startTime, traces: [...g.traces.slice(0, 8)], component: 'transverse' }));
  const t = softSiteTrace();
  writeFileSync(join(dir, 'trace.sg2'), writeSeg2({ sampleInterval: t.sampleInterval, delay: t.startTime, traces: [...t.traces], offsets: t.offsets }));
  const entries = Object.entries(scenarios);
  const runs = await Promise.all(entries.map(([, args]) => run(args)));
  entries.forEach(([name], i) => results.set(name, runs[i]));
  // The picks of both records, joined into one file for the estimate.
  const phase = results.get('pickPhase')!.out;
  // (The second file without its caution comment line and header.)
  const group = results.get('pickGroup')!.out.split('\n').slice(2).join('\n');
  writeFileSync(join(dir, 'picks.csv'), phase + group);
  results.set('estimate', await run(['estimate', 'picks.csv']));
}, 180_000);

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const get = (name: string): Run => results.get(name)!;

describe('shearfield image', () => {
  it('prints method, frequencies_hz, velocities_m_s and power (one row per frequency, 0–1), then the reliability marks and notes', () => {
    const r = get('image');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Object.keys(j)).toEqual(['method', 'frequencies_hz', 'velocities_m_s', 'power', 'reliability', 'notes']);
    expect(j.method).toBe('phase-shift');
    expect(j.frequencies_hz).toHaveLength(10);
    expect(j.velocities_m_s).toEqual([100, 150, 200, 250, 300, 350, 400, 450, 500, 550, 600]);
    expect(j.power).toHaveLength(10);
    for (const row of j.power) {
      expect(row).toHaveLength(11);
      expect(Math.max(...row)).toBe(1);
    }
    expect(j.reliability[0]).toHaveLength(11);
  });

  it('uses --offsets where the file has none, and asks for them otherwise', () => {
    expect(get('withOffsets').code).toBe(0);
    const r = get('noOffsets');
    expect(r.code).toBe(1);
    expect(r.out).toBe('');
    expect(r.err).toMatch(/offset of the first receiver.*--offsets FIRST:SPACING/);
  });

  it('answers bad options and files with one sentence naming them', () => {
    const cases: [string, RegExp][] = [
      ['noMethod', /Give --method multiple-filter or --method phase-shift\./],
      ['badMethod', /--method must be multiple-filter or phase-shift, but it is "fk"\./],
      ['traceWithPhase', /--trace applies to --method multiple-filter only/],
      ['traceRange', /--trace must be a trace number from 1 to 48, but it is 49\./],
      ['badFreq', /--freq must be FROM:TO:COUNT/],
      ['missing', /The record file "nowhere.sgy" does not exist\./],
      ['badSeed', /--seed-hz must be a frequency above 0 Hz, but it is "x"\./],
    ];
    for (const [name, message] of cases) {
      const r = get(name);
      expect(r.code, name).toBe(1);
      expect(r.out, name).toBe('');
      expect(r.err.trim().split('\n'), name).toHaveLength(1);
      expect(r.err, name).toMatch(message);
    }
  });
});

describe('shearfield pick', () => {
  it('prints a picks CSV: phase picks from the phase-shift image, group picks from the multiple-filter one, naming the file', () => {
    const phase = parsePicksCsv(get('pickPhase').out).picks;
    const group = parsePicksCsv(get('pickGroup').out).picks;
    expect(phase.length).toBeGreaterThan(20);
    expect(group.length).toBeGreaterThan(10);
    expect(new Set(phase.map((p) => p.kind))).toEqual(new Set(['phase']));
    expect(new Set(group.map((p) => p.kind))).toEqual(new Set(['group']));
    expect(phase[0].note).toBe('gather.sgy, phase-shift image');
    expect(group.every((p) => p.sd !== undefined && p.mode === 0)).toBe(true);
    // The notes, where the ridge stopped, and the caution go to standard error.
    expect(get('pickGroup').err).toMatch(/Airy phase/);
    expect(get('pickPhase').err).toMatch(/the ridge stopped below because/);
    expect(get('pickPhase').err).toMatch(/Screening estimate only/);
    // The file itself starts with the caution as a comment line, and still reads back exactly.
    for (const name of ['pickPhase', 'pickGroup']) {
      const out = get(name).out;
      expect(out.split('\n')[0]).toBe(`# ${CAUTION}`);
      expect(picksToCsv(parsePicksCsv(out).picks, { lineEnding: '\n' })).toBe(out);
    }
  });

  it('gives picks that shearfield estimate reads, whose 95 % interval holds the invented thickness', () => {
    const r = get('estimate');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.thickness_m.low95).toBeLessThanOrEqual(INVENTED_SOFT_SITE.h);
    expect(j.thickness_m.high95).toBeGreaterThanOrEqual(INVENTED_SOFT_SITE.h);
  });
});

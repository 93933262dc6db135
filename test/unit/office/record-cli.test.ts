/**
 * `shearfield record FILE`: the geometry JSON contract (issue 12: {"format",
 * "traces","samples","sample_interval_s","delay_s","offsets_m":[…],
 * "component"}) and every bad-input path, run as a user runs them (node
 * bin/shearfield.mjs, spawned concurrently). The files are invented
 * synthetic records written by core/recordings/segy-write.ts and
 * seg2-write.ts (checked against the standards' layouts and segyio in
 * test/unit/core/recordings/ and test/reference/).
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnShearfield, type CliRun } from './cli-process';
import { writeSeg2 } from '../../../core/recordings/seg2-write';
import { writeSegy } from '../../../core/recordings/segy-write';

let dir = '';

type Run = CliRun;

const run = (...args: string[]): Promise<Run> => spawnShearfield(['record', ...args], dir);

const wave = (k: number) => Array.from({ length: 64 }, (_, i) => Math.sin(0.2 * i - k));
const gather = writeSegy(
  { sampleInterval: 0.0005, delay: 0.002, traces: [0, 1, 2, 3].map(wave), offsets: [4, 6, 8, 10], component: 'transverse' },
  { revision: 2, littleEndian: true },
);
const single = writeSeg2({ sampleInterval: 0.00025, delay: 0, traces: [wave(0)], offsets: [30] });
const bare = writeSegy({ sampleInterval: 0.001, delay: 0, traces: [0, 1, 2].map(wave) });

const results = new Map<string, Run>();
const scenarios: Record<string, string[]> = {
  segy: ['gather.sgy'],
  seg2: ['single.sg2'],
  csv: ['traces.csv'],
  bare: ['bare.sgy'],
  overrides: ['bare.sgy', '--offsets', '5:2.5', '--delay=-0.01', '--component', 'Crossline'],
  help: ['--help'],
  missing: ['nowhere.sgy'],
  folder: ['adir'],
  truncated: ['cut.sgy'],
  notRecord: ['noise.bin'],
  noFile: [],
  twoFiles: ['gather.sgy', 'single.sg2'],
  offsetsShape: ['bare.sgy', '--offsets', '5'],
  offsetsText: ['bare.sgy', '--offsets', '5:x'],
  offsetsZero: ['bare.sgy', '--offsets', '5:0'],
  delayText: ['bare.sgy', '--delay', 'soon'],
  delayHuge: ['bare.sgy', '--delay', '1e9'],
  component: ['bare.sgy', '--component', 'radial'],
  unknownOption: ['bare.sgy', '--colour'],
};

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'shearfield-record-'));
  writeFileSync(join(dir, 'gather.sgy'), gather);
  writeFileSync(join(dir, 'single.sg2'), single);
  writeFileSync(join(dir, 'bare.sgy'), bare);
  writeFileSync(join(dir, 'cut.sgy'), gather.slice(0, gather.length - 7));
  writeFileSync(join(dir, 'noise.bin'), new Uint8Array(4000).fill(0xee));
  writeFileSync(join(dir, 'traces.csv'), '# invented\ntime_s,12,14\n0.1,1,2\n0.102,3,4\n0.104,5,6\n');
  mkdirSync(join(dir, 'adir'));
  const entries = Object.entries(scenarios);
  const runs = await Promise.all(entries.map(([, args]) => run(...args)));
  entries.forEach(([name], i) => results.set(name, runs[i]));
}, 120_000);

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

function get(name: string): Run {
  const r = results.get(name);
  if (!r) throw new Error(`no run ${name}`);
  return r;
}

describe('shearfield record: the geometry JSON', () => {
  it('prints exactly the seven keys for a SEG-Y gather, in order', () => {
    const r = get('segy');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    expect(r.out).toBe(
      '{"format":"segy","traces":4,"samples":64,"sample_interval_s":0.0005,"delay_s":0.002,"offsets_m":[4,6,8,10],"component":"transverse"}\n',
    );
  });
  it('reads a SEG-2 single-trace record, asking on stderr for the component it does not give', () => {
    const r = get('seg2');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out)).toEqual({ format: 'seg2', traces: 1, samples: 64, sample_interval_s: 0.00025, delay_s: 0, offsets_m: [30], component: 'unknown' });
    expect(r.err).toBe('shearfield record: missing: Give the geophone component (vertical, inline, crossline or transverse): the file does not say which it is.\n');
  });
  it('reads CSV traces with offsets from the header row', () => {
    expect(get('csv').out).toBe('{"format":"csv","traces":2,"samples":3,"sample_interval_s":0.002,"delay_s":0.1,"offsets_m":[12,14],"component":"unknown"}\n');
  });
  it('prints null offsets and asks for them when the file has none (exit 0)', () => {
    const r = get('bare');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).offsets_m).toEqual([null, null, null]);
    expect(r.err).toMatch(/^shearfield record: missing: Give the offset of the first receiver from the source and the receiver spacing, in metres/m);
  });
  it('applies --offsets, --delay and --component and says what they replace', () => {
    const r = get('overrides');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out)).toMatchObject({ offsets_m: [5, 7.5, 10], delay_s: -0.01, component: 'crossline' });
    expect(r.err).toBe('shearfield record: warning: The file\'s delay of 0 s is replaced by the given -0.01 s.\n');
  });
  it('--help names every output key and option', () => {
    const r = get('help');
    expect(r.code).toBe(0);
    for (const key of ['format', 'traces', 'samples', 'sample_interval_s', 'delay_s', 'offsets_m', 'component', '--offsets', '--delay', '--component']) {
      expect(r.out).toContain(key);
    }
  });
});

describe('shearfield record: bad input gives one line naming the file, byte offset or option', () => {
  const cases: [string, number, string][] = [
    ['missing', 1, 'shearfield record: The record file "nowhere.sgy" does not exist.\n'],
    ['folder', 1, 'shearfield record: The record file "adir" is a folder, not a file.\n'],
    [
      'truncated',
      1,
      'shearfield record: The record file "cut.sgy" cannot be read: Trace 4 at byte offset 5088 needs 496 bytes (headers and 64 samples of IEEE float32), but only 489 bytes remain in the file.\n',
    ],
    [
      'notRecord',
      1,
      'shearfield record: The record file "noise.bin" cannot be read: The file "noise.bin" is not a recording this app reads: it has no SEG-2 block id 0x3A55 at byte offset 0, no SEG-Y format code at byte offset 3224, and it is not CSV text.\n',
    ],
    ['noFile', 1, 'shearfield record: Give one record file (SEG-Y, SEG-2 or CSV traces), e.g. shearfield record shot-01.sgy.\n'],
    ['twoFiles', 1, 'shearfield record: Give exactly one record file, but 2 were given.\n'],
    ['offsetsShape', 1, 'shearfield record: --offsets must be FIRST:SPACING in metres, e.g. 5:2, but it is "5".\n'],
    ['offsetsText', 1, 'shearfield record: --offsets SPACING must be a number of metres, but it is "x".\n'],
    ['offsetsZero', 1, 'shearfield record: --offsets: The receiver spacing must not be 0 m for a record of 3 traces.\n'],
    ['delayText', 1, 'shearfield record: --delay S must be a number of seconds, but it is "soon".\n'],
    ['delayHuge', 1, 'shearfield record: --delay: The trigger delay must lie within ±3600 s, but it is 1000000000 s.\n'],
    ['component', 1, 'shearfield record: --component must be one of vertical, inline, crossline, transverse, unknown, but it is "radial".\n'],
    ['unknownOption', 2, "shearfield record: Unknown option '--colour'. See shearfield record --help for the options.\n"],
  ];
  it.each(cases)('%s → exit %i', (name, code, err) => {
    const r = get(name);
    expect(r.code).toBe(code);
    expect(r.err).toBe(err);
    expect(r.out).toBe('');
  });
});

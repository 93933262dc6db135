/**
 * SEG-Y against an independent, general-purpose reader and writer:
 * segyio (Equinor), as Debian packages it (python3-segyio; installed by
 * scripts/ensure-env.sh). Both directions:
 * - segyio reads files that core/recordings/segy-write.ts wrote (formats 1,
 *   2, 3, 5 and 8, which segyio 1.8 reads; both byte orders; EBCDIC and
 *   ASCII textual headers; an extended textual header): the textual header,
 *   binary header interval, sample count and format, trace header offset,
 *   delay and trace id, and every sample must agree with what was written.
 * - our reader reads files that segyio wrote (IBM and IEEE floats, with
 *   offsets, delay, coordinates and a coordinate scalar): traces and
 *   geometry must agree with what segyio reports.
 * Skipped, with the reason, where /usr/bin/python3 cannot import segyio.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readSegy } from '../../core/recordings/segy-read';
import { writeSegy, type SegyInput } from '../../core/recordings/segy-write';
import type { SegyFormatCode } from '../../core/recordings/segy-formats';

const PYTHON = '/usr/bin/python3';
const probe = spawnSync(PYTHON, ['-c', 'import segyio'], { encoding: 'utf8' });
const available = probe.status === 0;
const reason = 'python3-segyio (Debian) is not importable by /usr/bin/python3; scripts/ensure-env.sh installs it';

const dir = mkdtempSync(join(tmpdir(), 'shearfield-segyio-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function python(script: string, arg: string): unknown {
  const r = spawnSync(PYTHON, ['-c', script, arg], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  if (r.status !== 0) throw new Error(`segyio script failed: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

const READ_SCRIPT = `
import json, sys, segyio
jobs = json.loads(sys.argv[1])
out = []
for job in jobs:
    with segyio.open(job['path'], ignore_geometry=True, endian=job['endian']) as f:
        h = [f.header[i] for i in range(f.tracecount)]
        text = f.text[0]
        out.append({
            'text': bytes(text).decode('latin-1') if isinstance(text, (bytes, bytearray)) else text,
            'format': int(f.bin[segyio.BinField.Format]),
            'interval': int(f.bin[segyio.BinField.Interval]),
            'samples': int(f.bin[segyio.BinField.Samples]),
            'ext': int(f.bin[segyio.BinField.ExtendedHeaders]),
            'times_ms': [float(t) for t in f.samples],
            'offsets': [int(x[segyio.TraceField.offset]) for x in h],
            'delay_ms': [int(x[segyio.TraceField.DelayRecordingTime]) for x in h],
            'ids': [int(x[segyio.TraceField.TraceIdentificationCode]) for x in h],
            'traces': [[float(v) for v in f.trace[i]] for i in range(f.tracecount)],
        })
print(json.dumps(out))
`;

const WRITE_SCRIPT = `
import json, sys, segyio, numpy as np
job = json.loads(sys.argv[1])
n = len(job['traces'][0])
spec = segyio.spec()
spec.samples = list(range(n))
spec.format = job['format']
spec.tracecount = len(job['traces'])
with segyio.create(job['path'], spec) as f:
    f.bin.update({segyio.BinField.Interval: job['interval_us'], segyio.BinField.Samples: n, segyio.BinField.Format: job['format'], segyio.BinField.MeasurementSystem: 1})
    for i, tr in enumerate(job['traces']):
        f.header[i] = {
            segyio.TraceField.offset: job['offsets'][i],
            segyio.TraceField.TRACE_SAMPLE_INTERVAL: job['interval_us'],
            segyio.TraceField.TRACE_SAMPLE_COUNT: n,
            segyio.TraceField.DelayRecordingTime: job['delay_ms'],
            segyio.TraceField.TraceIdentificationCode: 13,
            segyio.TraceField.SourceGroupScalar: -100,
            segyio.TraceField.SourceX: 150000,
            segyio.TraceField.GroupX: 150000 + 100 * job['offsets'][i],
        }
        f.trace[i] = np.array(tr, dtype=np.float32)
with segyio.open(job['path'], ignore_geometry=True) as f:
    print(json.dumps({'traces': [[float(v) for v in f.trace[i]] for i in range(f.tracecount)], 'times_ms': [float(t) for t in f.samples]}))
`;

interface SegyioView {
  text: string;
  format: number;
  interval: number;
  samples: number;
  ext: number;
  times_ms: number[];
  offsets: number[];
  delay_ms: number[];
  ids: number[];
  traces: number[][];
}

/** Values exact in every format segyio reads (int8 range, float32- and IBM-exact quarters). */
const input: SegyInput = {
  sampleInterval: 0.0005,
  delay: 0.004,
  traces: Array.from({ length: 4 }, (_, k) => Array.from({ length: 32 }, (_, i) => ((i * 7 + k * 13) % 101) - 50 + (k % 2) * 0.25)),
  offsets: [3, 5, 7, 9],
  component: 'transverse',
};

describe.skipIf(!available)('segyio (Debian python3-segyio) reads the files we write', () => {
  const cases: { format: SegyFormatCode; little: boolean; encoding: 'ebcdic' | 'ascii'; extended: boolean }[] = [];
  for (const format of [1, 2, 3, 5, 8] as SegyFormatCode[]) {
    for (const little of [false, true]) cases.push({ format, little, encoding: little ? 'ascii' : 'ebcdic', extended: format === 5 });
  }
  const jobs = cases.map((c, i) => {
    const path = join(dir, `ours-${i}.sgy`);
    const traces = input.traces.map((t) => Array.from(t, (x) => ([1, 5].includes(c.format) ? x : Math.round(x))));
    writeFileSync(path, writeSegy({ ...input, traces }, { format: c.format, littleEndian: c.little, textEncoding: c.encoding, extendedHeaders: c.extended ? ['((SEG: invented test stanza))'] : [] }));
    return { path, endian: c.little ? 'little' : 'big', traces };
  });
  const views = available ? (python(READ_SCRIPT, JSON.stringify(jobs)) as SegyioView[]) : [];

  cases.forEach((c, i) => {
    it(`format ${c.format}, ${c.little ? 'little' : 'big'}-endian, ${c.encoding} text${c.extended ? ', one extended header' : ''}: headers and samples agree`, () => {
      const v = views[i];
      // segyio 1.8 decodes the textual header as EBCDIC always, so only the EBCDIC file's text can agree.
      if (c.encoding === 'ebcdic') expect(v.text.slice(0, 80).trimEnd()).toBe('C 1 Synthetic record by Shearfield: invented data, not a field recording.');
      expect({ format: v.format, interval: v.interval, samples: v.samples, ext: v.ext }).toEqual({ format: c.format, interval: 500, samples: 32, ext: c.extended ? 1 : 0 });
      expect(v.times_ms[0]).toBe(4);
      expect(v.times_ms[1]).toBe(4.5);
      expect(v.offsets).toEqual([3, 5, 7, 9]);
      expect(v.delay_ms).toEqual([4, 4, 4, 4]);
      expect(v.ids).toEqual([16, 16, 16, 16]);
      expect(v.traces).toEqual(jobs[i].traces);
      // and our reader agrees with segyio on the same bytes
      const rec = readSegy(new Uint8Array(readFileSync(jobs[i].path)), 'f.sgy');
      expect(rec.traces.map((t) => Array.from(t))).toEqual(v.traces);
    });
  });
});

describe.skipIf(!available)('our reader reads the files segyio writes', () => {
  for (const format of [1, 5]) {
    it(`format ${format}: traces, interval, delay, offsets, component and scaled coordinates agree with segyio`, () => {
      const path = join(dir, `theirs-${format}.sgy`);
      const job = { path, format, interval_us: 250, delay_ms: 12, offsets: [2, 4, 6], traces: [0, 1, 2].map((k) => Array.from({ length: 20 }, (_, i) => (i - 10) * 0.5 + k)) };
      const theirs = python(WRITE_SCRIPT, JSON.stringify(job)) as { traces: number[][]; times_ms: number[] };
      const rec = readSegy(new Uint8Array(readFileSync(path)), 'theirs.sgy');
      expect(rec.traces.map((t) => Array.from(t))).toEqual(theirs.traces);
      expect(rec.sampleInterval).toBe(250e-6);
      expect(rec.delay * 1000).toBe(theirs.times_ms[0]);
      expect(Array.from(rec.offsets)).toEqual([2, 4, 6]);
      expect(rec.component).toBe('crossline');
      expect(rec.sources?.[0].x).toBe(1500);
      expect(rec.receivers?.[2].x).toBe(1506);
    });
  }
});

if (!available) {
  describe('segyio reference checks', () => {
    it.skip(`skipped: ${reason}`, () => {});
  });
}

/**
 * The SEG-2 reader (core/recordings/seg2-read.ts) against files laid out
 * from Pullan, S.E., 1990, Geophysics 55(9):1260–1271 (file descriptor block
 * 0x3A55, trace pointers, strings, trace descriptor blocks 0x4422, data
 * formats 1–5). One file is assembled here with plain DataView writes; the
 * others come from core/recordings/seg2-write.ts, in both byte orders and
 * every format. Format 3's packing (four 4-bit exponents, four int16
 * mantissas, value = M/2¹⁵ · 2^C) is the SEG-D 20-bit layout from memory:
 * verify against a field file.
 */
import { describe, expect, it } from 'vitest';
import { geometrySummary } from '../../../../core/recordings/recording';
import { readSeg2 } from '../../../../core/recordings/seg2-read';
import { writeSeg2, type Seg2FormatCode } from '../../../../core/recordings/seg2-write';
import { inputError } from '../../../input-error';

/** Writes "KEY value" strings as Pullan lays them out: uint16 offset to the next, text, NUL; then a 0 offset. */
function strings(v: DataView, at: number, list: string[], little: boolean): number {
  let p = at;
  for (const s of list) {
    v.setUint16(p, 2 + s.length + 1, little);
    for (let i = 0; i < s.length; i++) v.setUint8(p + 2 + i, s.charCodeAt(i));
    p += 2 + s.length + 1;
  }
  v.setUint16(p, 0, little);
  return p + 2;
}

/** A big-endian, one-trace, int16 file with a descaling factor, assembled byte by byte. */
function handBuiltFile(): Uint8Array {
  const bytes = new Uint8Array(512);
  const v = new DataView(bytes.buffer);
  v.setUint16(0, 0x3a55); // block id, big-endian
  v.setUint16(2, 1); // revision
  v.setUint16(4, 4); // M: one pointer
  v.setUint16(6, 1); // N
  v.setUint8(8, 1); // string terminator: one NUL
  v.setUint8(11, 1);
  v.setUint8(12, 0x0a);
  v.setUint32(32, 128); // trace 1 at byte 128
  strings(v, 36, ['UNITS FEET', 'NOTE invented'], false);
  v.setUint16(128, 0x4422);
  v.setUint16(130, 192); // X: 192-byte descriptor
  v.setUint32(132, 8); // Y: 8 data bytes
  v.setUint32(136, 4); // NS
  v.setUint8(140, 1); // int16
  strings(v, 160, ['SAMPLE_INTERVAL 0.000125', 'DELAY -0.01', 'RECEIVER_LOCATION 30', 'SOURCE_LOCATION 10', 'DESCALING_FACTOR 0.5'], false);
  [100, -200, 300, -32768].forEach((x, i) => v.setInt16(320 + 2 * i, x));
  return bytes;
}

describe('readSeg2 on a file assembled from the standard layout', () => {
  const rec = readSeg2(handBuiltFile(), 'hand.sg2');
  it('reads the samples times the DESCALING_FACTOR', () => {
    expect(Array.from(rec.traces[0])).toEqual([50, -100, 150, -16384]);
  });
  it('reads SAMPLE_INTERVAL, DELAY and the offset from the locations in the file UNITS (feet)', () => {
    expect(geometrySummary(rec)).toEqual({
      format: 'seg2',
      traces: 1,
      samples: 4,
      sample_interval_s: 0.000125,
      delay_s: -0.01,
      offsets_m: [20 * 0.3048],
      component: 'unknown',
    });
    expect(rec.missingGeometry).toBe(false);
    expect(rec.textHeader).toBe('invented');
    expect(rec.askFor).toEqual(['Give the geophone component (vertical, inline, crossline or transverse): the file does not say which it is.']);
  });
});

const FORMAT_VALUES: Record<Seg2FormatCode, number[]> = {
  1: [0, 1, -2, 32767, -32768, 123],
  2: [0, 1, -2, 2147483647, -2147483648, 123456],
  // format 3: values exact in M/2¹⁵ · 2^C
  3: [0, 0.5, -1, 3, 1024, -32768, 0.25],
  4: [0, 0.5, -1.25, 1e6, -3.5e-3 * 2 ** 10, 7],
  5: [0, Math.PI, -1e-300, 1e300, 0.1, 7],
};

describe('readSeg2 reads back every data format in both byte orders', () => {
  for (const format of [1, 2, 3, 4, 5] as Seg2FormatCode[]) {
    for (const littleEndian of [true, false]) {
      it(`format ${format}, ${littleEndian ? 'little' : 'big'}-endian`, () => {
        const values = FORMAT_VALUES[format];
        const traces = [values, [...values].reverse(), values.slice(0, 5)];
        const expected = traces.map((t) => [...t, ...Array(values.length - t.length).fill(0)].map((x) => x + 0));
        const rec = readSeg2(writeSeg2({ sampleInterval: 0.0005, delay: 0.002, traces, offsets: [3, 5, 7] }, { format, littleEndian }), 'f.sg2');
        const got = rec.traces.map((t) => Array.from(t, (x) => x + 0));
        if (format === 4) expect(got).toEqual(expected.map((t) => t.map((x) => Math.fround(x) + 0)));
        else expect(got).toEqual(expected);
        expect(Array.from(rec.offsets)).toEqual([3, 5, 7]);
        expect(rec.delay).toBe(0.002);
        expect(rec.warnings.join(' ')).toMatch(/padded with zeros/);
      });
    }
  }
});

describe('readSeg2 asks for what the file does not say', () => {
  it('offsets are unknown without SOURCE_LOCATION and RECEIVER_LOCATION', () => {
    const rec = readSeg2(writeSeg2({ sampleInterval: 0.001, delay: 0, traces: [[1, 2, 3]] }), 'f.sg2');
    expect(rec.missingGeometry).toBe(true);
    expect(geometrySummary(rec).offsets_m).toEqual([null]);
  });
  it('a missing DELAY is taken as 0 s and said so', () => {
    const rec = readSeg2(writeSeg2({ sampleInterval: 0.001, delay: 0, traces: [[1, 2]] }, { omitDelay: true }), 'f.sg2');
    expect(rec.delay).toBe(0);
    expect(rec.warnings.join(' ')).toMatch(/no DELAY key; 0 s/);
  });
});

describe('readSeg2 refuses bad files with one sentence naming the byte offset or key', () => {
  const good = writeSeg2({ sampleInterval: 0.001, delay: 0, traces: [[1, 2, 3, 4]], offsets: [5] }, { format: 4 });
  const patched = (write: (v: DataView, b: Uint8Array) => void) => {
    const copy = good.slice();
    write(new DataView(copy.buffer), copy);
    return copy;
  };
  const traceAt = new DataView(good.buffer).getUint32(32, true);
  it('wrong magic', () => {
    expect(inputError(() => readSeg2(patched((v) => v.setUint16(0, 0x1234)), 'x.sg2')).message).toBe(
      '"x.sg2" does not start with the SEG-2 block id 0x3A55 at byte offset 0 (it starts 0x1234).',
    );
  });
  it('a trace pointer outside the file', () => {
    expect(inputError(() => readSeg2(patched((v) => v.setUint32(32, 99999, true)), 'x.sg2')).message).toMatch(/^Trace pointer 1 \(byte offset 32\) points to byte offset 99999, outside/);
  });
  it('a wrong trace block id', () => {
    expect(inputError(() => readSeg2(patched((v) => v.setUint16(traceAt, 0x1111, true)), 'x.sg2')).message).toBe(
      `Trace 1's descriptor at byte offset ${traceAt} does not start with the block id 0x4422.`,
    );
  });
  it('an unknown data format', () => {
    expect(inputError(() => readSeg2(patched((v) => v.setUint8(traceAt + 12, 9)), 'x.sg2')).message).toMatch(/data format code \(byte offset \d+\) is 9; SEG-2 has codes 1 to 5/);
  });
  it('a sample count beyond the data block', () => {
    expect(inputError(() => readSeg2(patched((v) => v.setUint32(traceAt + 8, 4_000_000_000, true)), 'x.sg2')).message).toMatch(/needs 16000000000 bytes for 4000000000 samples/);
  });
  it('a truncated file', () => {
    expect(inputError(() => readSeg2(good.slice(0, good.length - 3), 'x.sg2')).message).toMatch(/^Trace 1 at byte offset \d+ needs 16 bytes for 4 samples of format 4, but its data block holds 13/);
  });
  it('a string offset running past its block', () => {
    expect(inputError(() => readSeg2(patched((v) => v.setUint16(traceAt + 32, 60000, true)), 'x.sg2')).message).toMatch(/says the next one is 60000 bytes on/);
  });
  it('a missing SAMPLE_INTERVAL', () => {
    const bytes = patched((_, b) => {
      const at = traceAt + 34;
      b.set([0x58, 0x58], at); // "SAMPLE_INTERVAL" → "XXMPLE_INTERVAL"
    });
    expect(inputError(() => readSeg2(bytes, 'x.sg2')).message).toBe(`Trace 1's descriptor (byte offset ${traceAt}) has no SAMPLE_INTERVAL key.`);
  });
  it('a NaN sample', () => {
    const size = new DataView(good.buffer).getUint16(traceAt + 2, true);
    expect(inputError(() => readSeg2(patched((v) => v.setFloat32(traceAt + size + 4, NaN, true)), 'x.sg2')).message).toBe(
      `Sample 2 of trace 1 (byte offset ${traceAt + size + 4}) is NaN, not a finite number.`,
    );
  });
});

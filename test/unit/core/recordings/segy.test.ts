/**
 * The SEG-Y reader (core/recordings/segy-read.ts) against files laid out
 * byte by byte from the standard [SEG Technical Standards Committee, SEG-Y
 * rev 1 (2002) and SEG-Y_r2.0 (2017): textual header 1–3200, binary header
 * 3201–3600, 240-byte trace headers; byte numbers counted from 1]. One file
 * is assembled here with plain DataView writes, independent of the core's
 * writer; the others come from core/recordings/segy-write.ts and are read
 * back (every format code, both byte orders, EBCDIC and ASCII, extended
 * headers by count and by the EndText stanza, variable lengths, rev 2
 * additional trace headers). IBM float check values are the format's
 * definition [IBM System/360 Principles of Operation, hexadecimal floating
 * point]: 0xC276A000 = −118.625, 0x42640000 = 100.0, 0x41100000 = 1.0.
 */
import { describe, expect, it } from 'vitest';
import { ebcdicFromText, textFromEbcdic } from '../../../../core/recordings/ebcdic';
import { ibmBitsFromNumber, numberFromIbmBits } from '../../../../core/recordings/ibm-float';
import { applyOverrides, geometrySummary } from '../../../../core/recordings/recording';
import { SEGY_FORMAT_CODES, integerRange, type SegyFormatCode } from '../../../../core/recordings/segy-formats';
import { readSegy } from '../../../../core/recordings/segy-read';
import { writeSegy, type SegyInput } from '../../../../core/recordings/segy-write';
import { inputError } from '../../../input-error';

describe('IBM System/360 single-precision floats', () => {
  const checks: [number, number][] = [
    [0xc276a000, -118.625],
    [0x42640000, 100.0],
    [0x41100000, 1.0],
  ];
  it.each(checks)('decodes 0x%s to the value the format defines', (bits, value) => {
    expect(numberFromIbmBits(bits)).toBe(value);
  });
  it.each(checks)('encodes back to the same bits (0x%s)', (bits, value) => {
    expect(ibmBitsFromNumber(value).toString(16)).toBe(bits.toString(16));
  });
  it('round-trips zero and values with 24-bit fractions exactly', () => {
    for (const x of [0, 0.5, -3.25, 1e-10, 123456.75, -7.2e70]) {
      const back = numberFromIbmBits(ibmBitsFromNumber(x));
      expect(Math.abs(back - x)).toBeLessThanOrEqual(Math.abs(x) * 2 ** -20);
    }
  });
});

describe('EBCDIC (code page 037)', () => {
  it('maps the letters, digits and space of a SEG-Y card image as code page 037 does', () => {
    // C = 0xC3, space = 0x40, 0 = 0xF0, 9 = 0xF9, A = 0xC1, a = 0x81 (from memory of the code page 037 chart;
    // test/reference/ebcdic-cp037.test.ts compares all 256 values with Python's cp037 codec).
    expect(Array.from(ebcdicFromText('C A0 9a'))).toEqual([0xc3, 0x40, 0xc1, 0xf0, 0x40, 0xf9, 0x81]);
    const all = new Uint8Array(256).map((_, i) => i);
    expect(Array.from(ebcdicFromText(textFromEbcdic(all)))).toEqual(Array.from(all));
  });
});

/** A rev 1 big-endian EBCDIC file with two IBM-float traces, assembled with plain DataView writes. */
function handBuiltFile(): Uint8Array {
  const n = 3;
  const bytes = new Uint8Array(3600 + 2 * (240 + 4 * n));
  const v = new DataView(bytes.buffer);
  const text = 'C 1 HAND-BUILT TEST FILE'.padEnd(3200, ' ');
  bytes.set(ebcdicFromText(text), 0);
  v.setInt16(3212, 2); // 3213 traces per ensemble
  v.setUint16(3216, 500); // 3217 interval, µs
  v.setUint16(3220, n); // 3221 samples
  v.setInt16(3224, 1); // 3225 IBM float
  v.setInt16(3254, 1); // 3255 metres
  v.setUint16(3500, 0x0100); // 3501 rev 1
  v.setInt16(3502, 1); // 3503 fixed length
  const bits = [0xc276a000, 0x42640000, 0x41100000];
  for (let k = 0; k < 2; k++) {
    const p = 3600 + k * (240 + 4 * n);
    v.setInt32(p, k + 1);
    v.setInt16(p + 28, 16); // 29–30 trace id: transverse
    v.setInt32(p + 36, 5 + 2 * k); // 37–40 offset, m
    v.setInt16(p + 70, -10); // 71–72 coordinate scalar: divide by 10
    v.setInt32(p + 72, 1234); // 73 source X → 123.4 m
    v.setInt32(p + 80, 1234 + 50 + 20 * k); // 81 receiver X
    v.setInt16(p + 108, -25); // 109–110 delay, ms
    v.setUint16(p + 114, n);
    v.setUint16(p + 116, 500);
    v.setInt16(p + 214, -10); // 215–216 time scalar: divide by 10 → −2.5 ms
    for (let i = 0; i < n; i++) v.setUint32(p + 240 + 4 * i, bits[(i + k) % 3]);
  }
  return bytes;
}

describe('readSegy on a file assembled from the standard layout', () => {
  const rec = readSegy(handBuiltFile(), 'hand.sgy');
  it('reads the IBM samples as the format defines them', () => {
    expect(Array.from(rec.traces[0])).toEqual([-118.625, 100, 1]);
    expect(Array.from(rec.traces[1])).toEqual([100, 1, -118.625]);
  });
  it('reads interval, samples, offsets, delay with its time scalar, component and scaled coordinates', () => {
    expect(geometrySummary(rec)).toEqual({
      format: 'segy',
      traces: 2,
      samples: 3,
      sample_interval_s: 0.0005,
      delay_s: -0.0025,
      offsets_m: [5, 7],
      component: 'transverse',
    });
    expect(rec.sources?.[0].x).toBeCloseTo(123.4, 12);
    expect(rec.receivers?.[1].x).toBeCloseTo(130.4, 12);
    expect(rec.missingGeometry).toBe(false);
    expect(rec.askFor).toEqual([]);
  });
});

/** Values each format holds exactly: small integers, within unsigned ranges, float32-exact fractions. */
function valuesFor(code: SegyFormatCode, n: number, k: number): number[] {
  const range = integerRange(code);
  return Array.from({ length: n }, (_, i) => {
    const base = ((i * 37 + k * 11) % 200) - 100;
    if (range === null) return base * 0.25;
    return range[0] === 0 ? base + 100 : base;
  });
}

function input(code: SegyFormatCode, traces = 3, n = 17): SegyInput {
  return {
    sampleInterval: 0.00025,
    delay: 0.0125,
    traces: Array.from({ length: traces }, (_, k) => valuesFor(code, n, k)),
    offsets: Array.from({ length: traces }, (_, k) => 4 + 2 * k),
    component: 'crossline',
  };
}

describe('readSegy reads back every format code in both byte orders', () => {
  for (const code of SEGY_FORMAT_CODES) {
    for (const littleEndian of [false, true]) {
      it(`format ${code}, ${littleEndian ? 'little' : 'big'}-endian, rev 2 with the byte-order integer`, () => {
        const inp = input(code);
        const rec = readSegy(writeSegy(inp, { format: code, littleEndian, revision: 2 }), 'f.sgy');
        expect(rec.traces.map((t) => Array.from(t))).toEqual(inp.traces);
        expect(rec.sampleInterval).toBe(0.00025);
        expect(rec.delay).toBeCloseTo(0.0125, 15);
        expect(Array.from(rec.offsets)).toEqual([4, 6, 8]);
        expect(rec.component).toBe('crossline');
      });
    }
  }
  for (const code of [1, 2, 3, 5, 8] as SegyFormatCode[]) {
    it(`format ${code}, little-endian rev 1 without the byte-order integer (told by the format code)`, () => {
      const inp = input(code);
      const rec = readSegy(writeSegy(inp, { format: code, littleEndian: true, revision: 1 }), 'f.sgy');
      expect(rec.traces.map((t) => Array.from(t))).toEqual(inp.traces);
      expect(rec.warnings.join(' ')).toMatch(/little-endian/);
    });
  }
});

describe('readSegy: textual headers, revisions and trace layouts', () => {
  it('reads EBCDIC and ASCII textual headers alike, keeping their lines for display', () => {
    for (const textEncoding of ['ebcdic', 'ascii'] as const) {
      const rec = readSegy(writeSegy(input(5), { textEncoding, textLines: ['CLIENT invented', 'LINE 7'] }), 'f.sgy');
      expect(rec.traces.length).toBe(3);
      const lines = rec.textHeader?.split('\n') ?? [];
      expect(lines.slice(0, 3)).toEqual(['C 1 CLIENT invented', 'C 2 LINE 7', 'C 3']);
      expect(lines[38]).toBe('C39 SEG Y REV1');
      expect(lines.length).toBe(40);
    }
  });
  it('warns when the traces come from several field records (trace bytes 9–12)', () => {
    const rec = readSegy(writeSegy(input(5), { patchTraceHeader: (k, h) => h.setInt32(8, k < 2 ? 1 : 2) }), 'f.sgy');
    expect(rec.warnings).toContain('The file holds 2 field records (trace bytes 9–12); all 3 traces are read as one gather.');
  });
  it('skips extended textual headers given by count', () => {
    const bytes = writeSegy(input(5), { extendedHeaders: ['((SEG: Invented survey ver 1.0))', 'more text'], extendedForm: 'count' });
    expect(bytes.length).toBe(3600 + 2 * 3200 + 3 * (240 + 17 * 4));
    expect(readSegy(bytes, 'f.sgy').traces[2][5]).toBe(input(5).traces[2][5]);
  });
  it('skips a variable run of extended textual headers up to the EndText stanza, in EBCDIC and ASCII', () => {
    for (const textEncoding of ['ebcdic', 'ascii'] as const) {
      const bytes = writeSegy(input(3), { format: 3, revision: 2, extendedHeaders: ['first', 'second'], extendedForm: 'variable', textEncoding });
      expect(bytes.length).toBe(3600 + 3 * 3200 + 3 * (240 + 17 * 2));
      expect(readSegy(bytes, 'f.sgy').traces.map((t) => Array.from(t))).toEqual(input(3).traces);
    }
  });
  it('skips rev 2 additional trace headers', () => {
    const rec = readSegy(writeSegy(input(6), { revision: 2, extraTraceHeaders: 2 }), 'f.sgy');
    expect(rec.traces.map((t) => Array.from(t))).toEqual(input(6).traces);
  });
  it('reads the rev 2 extended sample interval (IEEE double, µs) when it is not whole µs', () => {
    const rec = readSegy(writeSegy({ ...input(5), sampleInterval: 62.5e-6 }, { revision: 2 }), 'f.sgy');
    expect(rec.sampleInterval).toBe(62.5e-6);
  });
  it('reads rev 0 files (no fixed-length flag, no time scalar)', () => {
    const rec = readSegy(writeSegy({ ...input(3), delay: 0.012 }, { revision: 0, format: 3 }), 'f.sgy');
    expect(rec.delay).toBe(0.012);
  });
  it('reads traces of their own lengths when the fixed-length flag is 0, padding with zeros and saying so', () => {
    const traces = [
      [1, 2, 3],
      [4, 5, 6, 7, 8],
      [9, 10],
    ];
    const rec = readSegy(writeSegy({ sampleInterval: 0.001, delay: 0, traces }, { format: 2, variableLengths: true }), 'v.sgy');
    expect(rec.samples).toBe(5);
    expect(rec.traces.map((t) => Array.from(t))).toEqual([
      [1, 2, 3, 0, 0],
      [4, 5, 6, 7, 8],
      [9, 10, 0, 0, 0],
    ]);
    expect(rec.warnings.join(' ')).toMatch(/vary from 2 to 5 samples; shorter traces are padded with zeros/);
  });
  it('takes the binary header\'s sample count for a variable-length trace whose own count (bytes 115–116) is 0', () => {
    const bytes = writeSegy(input(5), { variableLengths: true, patchTraceHeader: (k, h) => k === 1 && h.setUint16(114, 0) });
    expect(readSegy(bytes, 'f.sgy').traces[1].length).toBe(17);
  });
  it('reads a rev 2 variable-length trace of more than 65535 samples from trace header extension 1 (bytes 137–140)', () => {
    const long = Array.from({ length: 70_000 }, (_, i) => i % 251);
    const bytes = writeSegy({ sampleInterval: 0.001, delay: 0, traces: [long, [1, 2, 3]] }, { revision: 2, format: 16, variableLengths: true, extraTraceHeaders: 1 });
    const rec = readSegy(bytes, 'f.sgy');
    expect(rec.samples).toBe(70_000);
    expect(rec.traces[0][69_999]).toBe(69_999 % 251);
    expect(Array.from(rec.traces[1].subarray(0, 4))).toEqual([1, 2, 3, 0]);
  });
  it('converts feet to metres (binary header 3255–3256 = 2)', () => {
    const rec = readSegy(writeSegy(input(5), { lengthUnit: 2 }), 'f.sgy');
    expect(rec.offsets[1]).toBeCloseTo(6 * 0.3048, 12);
  });
  it('maps the trace identification codes to components (rev 1: 12 vertical, 13 crossline, 14 inline, 16 transverse)', () => {
    for (const component of ['vertical', 'crossline', 'inline', 'transverse'] as const) {
      expect(readSegy(writeSegy({ ...input(5), component }), 'f.sgy').component).toBe(component);
    }
  });
});

describe('readSegy asks for geometry it cannot find, and never guesses silently', () => {
  it('marks offsets unknown and asks for them when bytes 37–40 are all 0 and no coordinates are given', () => {
    const rec = readSegy(writeSegy({ ...input(5), offsets: undefined, component: 'unknown' }), 'f.sgy');
    expect(Array.from(rec.offsets).every(Number.isNaN)).toBe(true);
    expect(rec.missingGeometry).toBe(true);
    expect(rec.askFor[0]).toMatch(/Give the offset of the first receiver from the source and the receiver spacing/);
    expect(rec.askFor[1]).toMatch(/Give the geophone component/);
    expect(geometrySummary(rec).offsets_m).toEqual([null, null, null]);
  });
  it('computes offsets from the coordinates when bytes 37–40 are 0, and says so', () => {
    const sources = [0, 1, 2].map(() => ({ x: 100, y: 200, z: 0 }));
    const receivers = [0, 1, 2].map((k) => ({ x: 103 + 3 * k, y: 204 + 4 * k, z: 0 }));
    const rec = readSegy(writeSegy({ ...input(5), offsets: undefined, sources, receivers }), 'f.sgy');
    expect(Array.from(rec.offsets)).toEqual([5, 10, 15]);
    expect(rec.warnings.join(' ')).toMatch(/computed from the source and receiver coordinates/);
  });
  it('takes offsets beyond ±100 km (junk in bytes 37–40) as unknown, says so, and asks for them', () => {
    const rec = readSegy(writeSegy(input(5), { patchTraceHeader: (k, h) => k === 1 && h.setInt32(36, 2_000_000_000) }), 'f.sgy');
    expect(geometrySummary(rec).offsets_m).toEqual([4, null, 8]);
    expect(rec.warnings).toContain('The offsets of trace 2 lie beyond ±100000 m; they are taken as unknown.');
    expect(rec.missingGeometry).toBe(true);
    expect(applyOverrides(rec, { offsets: { first: 4, spacing: 2 } }).missingGeometry).toBe(false);
  });
  it('applies the user overrides and names what they replace', () => {
    const rec = applyOverrides(readSegy(writeSegy(input(5)), 'f.sgy'), { offsets: { first: 2, spacing: 1.5 }, delay: 0, component: 'transverse' });
    expect(geometrySummary(rec)).toMatchObject({ offsets_m: [2, 3.5, 5], delay_s: 0, component: 'transverse' });
    expect(rec.warnings.join(' ')).toMatch(/offsets are replaced.*delay of 0.0125 s is replaced.*crossline; the given transverse/);
  });
  it('refuses bad overrides with one sentence naming the field', () => {
    const rec = readSegy(writeSegy(input(5)), 'f.sgy');
    expect(inputError(() => applyOverrides(rec, { offsets: { first: 1, spacing: 0 } })).message).toBe('The receiver spacing must not be 0 m for a record of 3 traces.');
    expect(inputError(() => applyOverrides(rec, { delay: NaN })).field).toBe('delay');
    expect(inputError(() => applyOverrides(rec, { component: 'radial' as never })).message).toMatch(/component must be one of vertical/);
  });
});

describe('readSegy refuses bad files with one sentence naming the byte offset or header bytes', () => {
  const good = writeSegy(input(5), { revision: 2 });
  const patched = (write: (v: DataView) => void) => {
    const copy = good.slice();
    write(new DataView(copy.buffer));
    return copy;
  };
  it('a file shorter than the two file headers', () => {
    expect(inputError(() => readSegy(good.slice(0, 3000), 'short.sgy')).message).toBe(
      '"short.sgy" is 3000 bytes long; a SEG-Y file needs at least 3600 bytes for its textual and binary headers.',
    );
  });
  it('an unknown format code', () => {
    const bad = patched((v) => {
      v.setUint32(3296, 0);
      v.setInt16(3224, 13);
    });
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toMatch(/format code at byte offset 3224 reads 13 \(big-endian\) or 3328 \(little-endian\)/);
  });
  it('the obsolete format code 4', () => {
    const bad = patched((v) => {
      v.setInt16(3224, 4);
      v.setUint32(3296, 0);
    });
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toMatch(/format code is 4 \(fixed point with gain\)/);
  });
  it('a truncated last trace', () => {
    expect(inputError(() => readSegy(good.slice(0, good.length - 10), 'f.sgy')).message).toBe(
      'Trace 3 at byte offset 4216 needs 308 bytes (headers and 17 samples of IEEE float32), but only 298 bytes remain in the file.',
    );
  });
  it('an absurd sample count', () => {
    const bad = patched((v) => v.setInt32(3268, 2_000_000_000));
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toMatch(/^Trace 1 at byte offset 3600 needs 8000000240 bytes/);
  });
  it('extended textual headers that overrun the file', () => {
    const bad = patched((v) => v.setInt16(3504, 30000));
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toMatch(/counts 30000 extended textual headers .* but the file ends at byte offset/);
  });
  it('a variable run of extended headers without the EndText stanza', () => {
    const bad = patched((v) => {
      v.setInt16(3504, -1);
      v.setBigUint64(3520, 0n);
    });
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toMatch(/no \(\(SEG: ENDTEXT\)\) stanza before the file ends/);
  });
  it('a NaN sample', () => {
    const bad = patched((v) => v.setFloat32(3600 + 240 + 8, NaN));
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toBe('Sample 3 of trace 1 (byte offset 3848) is NaN, not a finite number.');
  });
  it('a zero sample interval everywhere', () => {
    const bad = patched((v) => {
      v.setUint16(3216, 0);
      v.setFloat64(3272, 0);
      v.setUint16(3600 + 116, 0);
    });
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toMatch(/sample interval is 0 in the binary header/);
  });
  it('traces whose lengths vary so much that padding would exceed 16 times the file', () => {
    const traces = [Array(20000).fill(1), ...Array.from({ length: 200 }, () => [1])];
    const bytes = writeSegy({ sampleInterval: 0.001, delay: 0, traces }, { format: 8, variableLengths: true });
    expect(inputError(() => readSegy(bytes, 'f.sgy')).message).toBe(
      "The traces hold 1 to 20000 samples; padding them to one length would need more than 16 times the file's size.",
    );
  });
  it('a trace count larger than the file holds', () => {
    const bad = patched((v) => v.setBigUint64(3512, 5n));
    expect(inputError(() => readSegy(bad, 'f.sgy')).message).toBe('The binary header counts 5 traces, but the file holds 3.');
  });
});

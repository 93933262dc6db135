/**
 * CSV traces (core/recordings/csv-traces.ts) and the format detection of
 * readRecording (core/recordings/read.ts). The CSV layout (a time column in
 * seconds, one column per trace, offsets in a header row) is the issue's;
 * cells follow RFC 4180 (Shafranovich 2005) without quoting.
 */
import { describe, expect, it } from 'vitest';
import { csvOfTraces, readCsvTraces } from '../../../../core/recordings/csv-traces';
import { readRecording } from '../../../../core/recordings/read';
import { geometrySummary } from '../../../../core/recordings/recording';
import { writeSeg2 } from '../../../../core/recordings/seg2-write';
import { writeSegy } from '../../../../core/recordings/segy-write';
import { inputError } from '../../../input-error';

const TEXT = '# invented test record\ntime_s,10,12,14\n0.010,1,2,3\n0.012,4,5,6\n0.014,-7,8.5,9e-3\n';

describe('readCsvTraces', () => {
  it('reads the time column, the traces and the offsets of the header row', () => {
    const rec = readCsvTraces(TEXT, 't.csv');
    expect(geometrySummary(rec)).toEqual({
      format: 'csv',
      traces: 3,
      samples: 3,
      sample_interval_s: 0.002,
      delay_s: 0.01,
      offsets_m: [10, 12, 14],
      component: 'unknown',
    });
    expect(Array.from(rec.traces[0])).toEqual([1, 4, -7]);
    expect(Array.from(rec.traces[2])).toEqual([3, 6, 9e-3]);
  });
  it('reads semicolons and tabs, CRLF line ends and a file without a header (offsets then asked for)', () => {
    expect(readCsvTraces('t;1\r\n0;1\r\n0.5;2\r\n', 'a.csv').offsets[0]).toBe(1);
    const rec = readCsvTraces('0\t1\t2\n0.5\t3\t4\n', 'b.csv');
    expect(rec.traces.length).toBe(2);
    expect(rec.missingGeometry).toBe(true);
  });
  it('reads quoted cells and, in semicolon files, decimal commas', () => {
    const rec = readCsvTraces('"time_s";"2,5";"4"\n0;1,5;-2\n0,25;"3,0";4\n', 'q.csv');
    expect(Array.from(rec.offsets)).toEqual([2.5, 4]);
    expect(rec.sampleInterval).toBe(0.25);
    expect(Array.from(rec.traces[0])).toEqual([1.5, 3]);
  });
  it('keeps the offsets unknown, and says so, when the header names the traces instead', () => {
    const rec = readCsvTraces('time_s,geo1,geo2\n0,1,2\n1,3,4\n', 'c.csv');
    expect(rec.missingGeometry).toBe(true);
    expect(rec.warnings[0]).toMatch(/does not give the offsets as numbers/);
  });
  it('refuses more than 10 000 trace columns (the per-trace cost would outgrow the file)', () => {
    const text = `0${',1'.repeat(10_001)}\n1${',1'.repeat(10_001)}\n`;
    expect(inputError(() => readCsvTraces(text, 'wide.csv')).message).toBe('Row 1 has 10001 trace columns; at most 10000 are read.');
  });
  it('round-trips through csvOfTraces', () => {
    const rec = readCsvTraces(TEXT, 't.csv');
    const back = readCsvTraces(csvOfTraces(rec), 't.csv');
    expect(back.traces.map((t) => Array.from(t))).toEqual(rec.traces.map((t) => Array.from(t)));
    expect(Array.from(back.offsets)).toEqual([10, 12, 14]);
  });
  it.each([
    ['time_s,1\n0,1\n0.1,x\n', 'Row 3, column 2: "x" is not a number.'],
    ['time_s,1\n0,1\n0.1,2,3\n', 'Row 3 has 3 columns, but the rows above have 2.'],
    ['time_s,1,2\n0,1\n0.1,2\n', 'The header row gives 2 offsets, but row 2 has 1 trace columns.'],
    ['time_ms,1\n0,1\n1,2\n', 'The time column must be in seconds, but its header says "time_ms".'],
    ['time_s,1\n0,1\n0.1,2\n0.3,2\n', 'Row 3: the time steps by 0.1 s, but the record\'s sample interval is 0.15 s; the times must be evenly spaced.'],
    ['time_s,1\n0,1\n', '"e.csv" has 1 row of samples; a trace needs at least 2.'],
    ['time_s,1\n0.2,1\n0.1,2\n', 'The times in column 1 must rise, but they run from 0.2 s to 0.1 s.'],
    ['time_s,1\n0,1\n0.1,NaN\n', 'Row 3, column 2: "NaN" is not a number.'],
  ])('refuses %j with one sentence', (text, message) => {
    expect(inputError(() => readCsvTraces(text, 'e.csv')).message).toBe(message);
  });
});

describe('readRecording tells the formats apart and applies overrides', () => {
  const enc = (s: string) => Uint8Array.from(s, (c) => c.charCodeAt(0));
  it('reads SEG-Y, SEG-2 and CSV by content, whatever the name', () => {
    const g = { sampleInterval: 0.001, delay: 0, traces: [[1, 2, 3]], offsets: [4] };
    expect(readRecording(writeSegy(g), 'a.bin').format).toBe('segy');
    expect(readRecording(writeSegy(g, { textEncoding: 'ascii' }), 'a.bin').format).toBe('segy');
    expect(readRecording(writeSeg2(g), 'a.bin').format).toBe('seg2');
    expect(readRecording(enc(TEXT), 'a.bin').format).toBe('csv');
    expect(readRecording(writeSegy(g).buffer as ArrayBuffer, 'a.bin').traces[0][2]).toBe(3);
  });
  it('applies the overrides after reading', () => {
    const rec = readRecording(enc(TEXT), 't.csv', { offsets: { first: 1, spacing: 2 }, component: 'transverse' });
    expect(geometrySummary(rec)).toMatchObject({ offsets_m: [1, 3, 5], component: 'transverse' });
    expect(rec.askFor).toEqual([]);
  });
  it('names an empty file and a file of no known format', () => {
    expect(inputError(() => readRecording(new Uint8Array(0), 'e.dat')).message).toBe('The file "e.dat" is empty.');
    expect(inputError(() => readRecording(new Uint8Array(5000).fill(7), 'x.dat')).message).toBe(
      'The file "x.dat" is not a recording this app reads: it has no SEG-2 block id 0x3A55 at byte offset 0, no SEG-Y format code at byte offset 3224, and it is not CSV text.',
    );
  });
  it('lets the extension pick the reader whose message explains a damaged file', () => {
    expect(inputError(() => readRecording(new Uint8Array(100).fill(7), 'x.sg2')).message).toMatch(/does not start with the SEG-2 block id 0x3A55/);
    expect(inputError(() => readRecording(new Uint8Array(100).fill(7), 'x.sgy')).message).toMatch(/a SEG-Y file needs at least 3600 bytes/);
  });
});

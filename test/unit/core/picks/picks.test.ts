/**
 * The picks CSV file (core/picks/picks.ts): reading, writing, and the rules every
 * pick meets. The file format follows RFC 4180 (Shafranovich 2005, "Common
 * Format and MIME Type for Comma-Separated Values (CSV) Files"): quoted
 * fields, doubled quotes, CRLF line ends. The semicolon separator with a
 * decimal comma, the default standard deviation and the numeric limits are
 * common practice (stated in core/picks/picks.ts PICK_LIMITS), not a standard.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  DEFAULT_SD_FRACTION,
  PICK_LIMITS,
  checkPickSet,
  checkPicksCsv,
  effectiveSd,
  parsePicksCsv,
  pickFromCells,
  picksToCsv,
  validatePick,
  type Pick,
} from '../../../../core/picks/picks';
import { inputError } from '../../../input-error';
import { CAUTION } from '../../../../core/shared/caution';

/** The first line picksToCsv writes (CRLF by default). */
const CAUTION_LINE = `# ${CAUTION}\r\n`;

describe('parsePicksCsv: well-formed files', () => {
  it('reads a minimal comma file and fills the defaults: group, mode 0, default sd counted', () => {
    const r = parsePicksCsv('frequency_hz,velocity_m_s\n5,320\n10,250.5\n');
    expect(r.picks).toEqual([
      { frequency: 5, velocity: 320, kind: 'group', mode: 0 },
      { frequency: 10, velocity: 250.5, kind: 'group', mode: 0 },
    ]);
    expect(r.separator).toBe(',');
    expect(r.unit).toBe('frequency');
    expect(r.decimalComma).toBe(false);
    expect(r.defaultedSd).toBe(2);
    // The default is visible and labelled common practice.
    expect(r.sdNote).toBe(
      '2 of 2 picks gave no sd_m_s; each uses 3 % of its velocity (common practice for surface-wave picks, not a published standard).',
    );
    expect(effectiveSd(r.picks[0])).toBeCloseTo(DEFAULT_SD_FRACTION * 320, 12);
  });

  it('reads every column, in any order, with header names trimmed and case-folded', () => {
    const text =
      ' Note ,MODE,kind,sd_m_s,velocity_m_s,frequency_hz,id,time\n' +
      'first pick,1,phase,12.5,400,7.25,p-1,2026-05-04T10:30:00Z\n' +
      ',0,GROUP,,380,7.25,p-2,2026-05-04\n';
    const r = parsePicksCsv(text);
    expect(r.picks).toEqual([
      { frequency: 7.25, velocity: 400, kind: 'phase', mode: 1, sd: 12.5, id: 'p-1', note: 'first pick', time: '2026-05-04T10:30:00Z' },
      { frequency: 7.25, velocity: 380, kind: 'group', mode: 0, id: 'p-2', time: '2026-05-04' },
    ]);
    expect(r.defaultedSd).toBe(1);
  });

  it('reads a semicolon file with decimal commas (and decimal points)', () => {
    const r = parsePicksCsv('frequency_hz;velocity_m_s;sd_m_s\n12,5;240,25;7\n14.5;230;6,5\n');
    expect(r.separator).toBe(';');
    expect(r.decimalComma).toBe(true);
    expect(r.picks.map((p) => [p.frequency, p.velocity, p.sd])).toEqual([
      [12.5, 240.25, 7],
      [14.5, 230, 6.5],
    ]);
    expect(r.sdNote).toBe('');
  });

  it('reads a semicolon file without decimal commas and says so', () => {
    const r = parsePicksCsv('frequency_hz;velocity_m_s\n12.5;240\n');
    expect(r.separator).toBe(';');
    expect(r.decimalComma).toBe(false);
  });

  it('reads periods: frequency = 1/period, the period kept, unit "period"', () => {
    const r = parsePicksCsv('period_s,velocity_m_s\n0.2,300\n0.125,280\n');
    expect(r.unit).toBe('period');
    expect(r.picks[0]).toEqual({ frequency: 1 / 0.2, period: 0.2, velocity: 300, kind: 'group', mode: 0 });
    expect(r.picks[1].frequency).toBe(8);
  });

  it('follows RFC 4180: quoted separators, doubled quotes, line breaks in quotes, CRLF, BOM', () => {
    const text =
      '\uFEFFfrequency_hz,velocity_m_s,note\r\n' +
      '5,320,"a, b and ""c"""\r\n' +
      '6,310,"two\r\nlines"\r\n' +
      '7,300,plain\r\n';
    const r = parsePicksCsv(text);
    expect(r.picks.map((p) => p.note)).toEqual(['a, b and "c"', 'two\r\nlines', 'plain']);
  });

  it('accepts lone CR line ends, skips blank lines and a last line without a line end', () => {
    const r = parsePicksCsv('\n\nfrequency_hz,velocity_m_s\r5,320\r\r6,310');
    expect(r.picks.map((p) => p.frequency)).toEqual([5, 6]);
  });

  it('skips rows of empty fields (as spreadsheets write them)', () => {
    const r = parsePicksCsv('frequency_hz;velocity_m_s;note\n5;320;x\n;;\n6;310;y\n');
    expect(r.picks).toHaveLength(2);
  });

  it('trims unquoted fields but keeps quoted text exactly', () => {
    const r = parsePicksCsv('frequency_hz,velocity_m_s,note,id\n 5 , 320 ,  spaced  ,"  kept  "\n');
    expect(r.picks[0]).toMatchObject({ frequency: 5, velocity: 320, note: 'spaced', id: '  kept  ' });
  });

  it('accepts exponents and signs in numbers', () => {
    const r = parsePicksCsv('frequency_hz,velocity_m_s\n1.5e1,+3.2E2\n');
    expect(r.picks[0]).toMatchObject({ frequency: 15, velocity: 320 });
  });

  it('allows the same frequency for a different kind or mode', () => {
    const r = parsePicksCsv('frequency_hz,velocity_m_s,kind,mode\n10,300,group,0\n10,320,phase,0\n10,450,group,1\n');
    expect(r.picks).toHaveLength(3);
  });

  it('keeps hostile text in notes as plain text, exactly', () => {
    const hostile = [
      '<script>alert(1)</script>',
      '<img src=x onerror="alert(1)">',
      '=HYPERLINK("http://example.invalid","x")',
      "'; DROP TABLE picks; --",
      '${process.exit()}',
      '\u202Ereversed',
    ];
    const text =
      'frequency_hz,velocity_m_s,note\n' + hostile.map((h, i) => `${i + 1},300,"${h.replace(/"/g, '""')}"`).join('\n');
    const r = parsePicksCsv(text);
    expect(r.picks.map((p) => p.note)).toEqual(hostile);
    // Written back, they read back the same (never interpreted).
    expect(parsePicksCsv(picksToCsv(r.picks)).picks).toEqual(r.picks);
  });

  it(`accepts exactly ${PICK_LIMITS.maxRows} rows`, () => {
    const rows = ['frequency_hz,velocity_m_s'];
    for (let i = 1; i <= PICK_LIMITS.maxRows; i++) rows.push(`${1 + i / 1000},300`);
    const r = parsePicksCsv(rows.join('\n'));
    expect(r.picks).toHaveLength(PICK_LIMITS.maxRows);
  });
});

describe('parsePicksCsv: bad files name the row, its line and the column', () => {
  const bad = (text: string) => inputError(() => parsePicksCsv(text));

  it('rejects an empty file (also whitespace or a lone BOM)', () => {
    for (const t of ['', '   \n\n', '\uFEFF']) {
      expect(bad(t).message).toBe(
        'The picks file is empty; it needs a header row (e.g. frequency_hz,velocity_m_s) and at least one pick.',
      );
    }
    expect(bad('').field).toBe('file');
  });

  it('rejects a file of empty fields only as having no header', () => {
    expect(bad(',,\n,,\n').message).toMatch(/^The picks file has no header row/);
  });

  it('rejects a header with no rows', () => {
    expect(bad('frequency_hz,velocity_m_s\n').message).toBe('The picks file has a header but no picks; add at least one row.');
  });

  it('rejects a missing header (the first row holds numbers)', () => {
    expect(bad('5,320\n6,310\n').message).toBe(
      'Line 1: the first row must be a header naming the columns (e.g. frequency_hz,velocity_m_s), but it holds numbers.',
    );
    expect(bad('5;320,5\n').message).toMatch(/^Line 1: the first row must be a header/);
    expect(bad('\n\n5,320\n').message).toMatch(/^Line 3: the first row must be a header/);
  });

  it('rejects an unknown column, naming it, with a hint where the intent is clear', () => {
    expect(bad('frequency_hz,velocity_km_s\n5,0.3\n').message).toBe(
      'Line 1: unknown column "velocity_km_s"; velocities must be in m/s: velocity_m_s (values are not converted).',
    );
    expect(bad('frequency,velocity_m_s\n5,300\n').message).toBe(
      'Line 1: unknown column "frequency"; give the unit in the name: frequency_hz.',
    );
    expect(bad('frequency_hz,velocity_m_s,colour\n5,300,red\n').message).toBe(
      'Line 1: unknown column "colour". Known columns: frequency_hz, period_s, velocity_m_s, sd_m_s, kind, mode, wave, id, note, time.',
    );
  });

  it('rejects missing, doubled, empty and conflicting header columns', () => {
    expect(bad('velocity_m_s,kind\n300,group\n').message).toBe(
      'Line 1: the required column frequency_hz (or period_s) is missing.',
    );
    expect(bad('frequency_hz,sd_m_s\n5,3\n').message).toBe('Line 1: the required column velocity_m_s is missing.');
    expect(bad('frequency_hz,period_s,velocity_m_s\n5,0.2,300\n').message).toBe(
      'Line 1: give frequency_hz or period_s, not both.',
    );
    expect(bad('frequency_hz,velocity_m_s,velocity_m_s\n5,300,300\n').message).toBe(
      'Line 1: the column velocity_m_s appears twice.',
    );
    expect(bad('frequency_hz,velocity_m_s,\n5,300,\n').message).toBe('Line 1: header column 3 is empty; name every column.');
    expect(bad('frequency_hz;velocity_m_s,sd_m_s\n5;300;3\n').message).toBe(
      'The header row mixes commas and semicolons; separate all columns with one of them.',
    );
  });

  it('rejects non-numeric values', () => {
    const e = bad('frequency_hz,velocity_m_s\n5,320\n6,fast\n');
    expect(e.message).toBe('Row 2 (line 3), column velocity_m_s: must be a number, but it is "fast".');
    expect(e.field).toBe('row 2 (line 3), velocity_m_s');
    expect(bad('frequency_hz,velocity_m_s\n0x10,320\n').message).toBe(
      'Row 1 (line 2), column frequency_hz: must be a number, but it is "0x10".',
    );
    expect(bad('frequency_hz,velocity_m_s,sd_m_s\n5,320,3%\n').message).toBe(
      'Row 1 (line 2), column sd_m_s: is "3%"; give an absolute value in the column\'s unit, not a percentage.',
    );
    expect(bad('frequency_hz;velocity_m_s\n5;1.234,5\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is "1.234,5", which mixes separators; write one decimal comma and no thousands separator.',
    );
  });

  it('rejects NaN and infinities', () => {
    expect(bad('frequency_hz,velocity_m_s\nNaN,320\n').message).toBe(
      'Row 1 (line 2), column frequency_hz: is NaN (not a number); give a number.',
    );
    expect(bad('frequency_hz,velocity_m_s\n5,Infinity\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: must be a finite number, but it is "Infinity".',
    );
    expect(bad('frequency_hz,velocity_m_s\n5,1e999\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: must be a finite number, but it is Infinity.',
    );
  });

  it('rejects values ≤ 0', () => {
    expect(bad('frequency_hz,velocity_m_s\n0,320\n').message).toBe(
      'Row 1 (line 2), column frequency_hz: must be greater than 0 Hz, but it is 0.',
    );
    expect(bad('period_s,velocity_m_s\n-0.2,320\n').message).toBe(
      'Row 1 (line 2), column period_s: must be greater than 0 s, but it is -0.2.',
    );
    expect(bad('frequency_hz,velocity_m_s\n5,-320\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: must be greater than 0 m/s, but it is -320.',
    );
    expect(bad('frequency_hz,velocity_m_s,sd_m_s\n5,320,0\n').message).toBe(
      'Row 1 (line 2), column sd_m_s: must be greater than 0 m/s, but it is 0.',
    );
  });

  it('rejects empty required cells', () => {
    expect(bad('frequency_hz,velocity_m_s\n,320\n').message).toBe(
      'Row 1 (line 2), column frequency_hz: is empty; give a number.',
    );
    expect(bad('frequency_hz,velocity_m_s\n5,\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is empty; give the velocity in m/s.',
    );
  });

  it('says a velocity looks like km/s and does not convert it', () => {
    expect(bad('frequency_hz,velocity_m_s\n5,0.32\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is 0.32 m/s, below the 30 m/s lower bound. It looks like km/s; the velocity must be given in m/s (the value was not converted).',
    );
    // 20 m/s is too slow but not a km/s figure (it would be 20 000 m/s).
    expect(bad('frequency_hz,velocity_m_s\n5,20\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is 20 m/s, below the 30 m/s lower bound.',
    );
    expect(bad('frequency_hz,velocity_m_s\n5,6000\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is 6000 m/s, above the 5000 m/s upper bound.',
    );
  });

  it('hints at periods typed as frequencies and the other way round', () => {
    // 0.05 "Hz" at 300 m/s would be a 6000 m wavelength: 0.05 is a period (20 Hz).
    expect(bad('frequency_hz,velocity_m_s\n0.05,300\n').message).toBe(
      'Row 1 (line 2), column frequency_hz: with a velocity of 300 m/s gives a wavelength of 6000 m, which a wave slower than 500 m/s cannot have (limit 2000 m, common practice). If the column holds periods (name the column period_s), fix the header.',
    );
    expect(bad('period_s,velocity_m_s\n20,300\n').message).toBe(
      'Row 1 (line 2), column period_s: with a velocity of 300 m/s gives a wavelength of 6000 m, which a wave slower than 500 m/s cannot have (limit 2000 m, common practice). If the column holds frequencies (name the column frequency_hz), fix the header.',
    );
    // Crustal-scale picks are fast and pass: 0.05 Hz at 4000 m/s (PHYSICS.md §6 scale).
    expect(parsePicksCsv('frequency_hz,velocity_m_s\n0.05,4000\n').picks).toHaveLength(1);
  });

  it('rejects frequencies and periods outside the accepted range', () => {
    expect(bad('frequency_hz,velocity_m_s\n2000,320\n').message).toBe(
      'Row 1 (line 2), column frequency_hz: is 2000 Hz, outside the 0.001–1000 Hz range this tool accepts.',
    );
    expect(bad('period_s,velocity_m_s\n5000,4000\n').message).toBe(
      'Row 1 (line 2), column period_s: is 5000 s, outside the 0.001–1000 s range this tool accepts.',
    );
  });

  it('rejects a standard deviation not smaller than the velocity', () => {
    expect(bad('frequency_hz,velocity_m_s,sd_m_s\n5,320,320\n').message).toBe(
      'Row 1 (line 2), column sd_m_s: is 320 m/s, not smaller than the velocity (320 m/s); check the units and the value.',
    );
  });

  it('rejects a bad kind and a bad mode', () => {
    expect(bad('frequency_hz,velocity_m_s,kind\n5,320,love\n').message).toBe(
      'Row 1 (line 2), column kind: must be "group" or "phase" (empty means group), but it is "love".',
    );
    for (const m of ['1.5', '-1', 'one']) {
      expect(bad(`frequency_hz,velocity_m_s,mode\n5,320,${m}\n`).message).toBe(
        `Row 1 (line 2), column mode: must be a whole number 0 or more (0 = fundamental; empty means 0), but it is "${m}".`,
      );
    }
    expect(bad('frequency_hz,velocity_m_s,mode\n5,320,51\n').message).toBe(
      'Row 1 (line 2), column mode: is 51, above the limit of 50.',
    );
  });

  it('rejects a time that is not ISO 8601', () => {
    expect(bad('frequency_hz,velocity_m_s,time\n5,320,yesterday\n').message).toBe(
      'Row 1 (line 2), column time: must be an ISO 8601 date or date-time such as 2026-05-04T10:30:00Z, but it is "yesterday".',
    );
    for (const t of ['2026-13-01', '2026-02-29', '2026-04-31', '2026-05-04T24:00:00Z', '2026-05-04T10:60:00Z', '2026-05-04T10:30:00+15:00', '04/05/2026']) {
      expect(bad(`frequency_hz,velocity_m_s,time\n5,320,${t}\n`).message, t).toMatch(/column time: must be an ISO 8601/);
    }
    for (const t of ['2024-02-29', '2026-05-04 10:30', '2026-05-04T10:30:00+0200', '2026-12-31T23:59:59.999Z']) {
      expect(parsePicksCsv(`frequency_hz,velocity_m_s,time\n5,320,${t}\n`).picks[0].time, t).toBe(t);
    }
  });

  it('rejects a duplicate frequency of the same kind and mode, naming both rows', () => {
    expect(bad('frequency_hz,velocity_m_s,kind\n10,300,phase\n12,290,phase\n10,310,phase\n').message).toBe(
      'Row 3 (line 4), column frequency_hz: repeats 10 Hz for a phase pick of mode 0, already given in row 1 (line 2); keep one pick per frequency, kind and mode.',
    );
    // 10 and 10.0 are the same frequency; so are two equal periods.
    expect(bad('frequency_hz,velocity_m_s\n10,300\n10.0,310\n').message).toMatch(/^Row 2 \(line 3\), column frequency_hz: repeats 10 Hz/);
    expect(bad('period_s,velocity_m_s\n0.1,300\n0.10,310\n').message).toMatch(/^Row 2 \(line 3\), column period_s: repeats 0.1 s/);
  });

  it('rejects a duplicate id', () => {
    expect(bad('frequency_hz,velocity_m_s,id\n10,300,a\n12,290,a\n').message).toBe(
      'Row 2 (line 3), column id: repeats the id "a" of row 1 (line 2); ids must be unique.',
    );
  });

  it('counts physical lines, so a row after a multi-line note is named by its real line', () => {
    const e = bad('frequency_hz,velocity_m_s,note\n5,320,"one\ntwo\nthree"\n\n6,abc,x\n');
    expect(e.message).toBe('Row 2 (line 6), column velocity_m_s: must be a number, but it is "abc".');
  });

  it('rejects rows with too few or too many fields', () => {
    expect(bad('frequency_hz,velocity_m_s,sd_m_s\n5,320\n').message).toBe(
      'Row 1 (line 2), column sd_m_s: is missing: the row has 2 fields but the header names 3 columns.',
    );
    expect(bad('frequency_hz;velocity_m_s\n5;320;9\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is followed by 1 extra field(s); the header names 2 columns.',
    );
  });

  it('rejects a decimal comma in a comma-separated file', () => {
    // Unquoted, it splits the row; the message points at semicolons.
    expect(bad('frequency_hz,velocity_m_s\n5,320,5\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is followed by 1 extra field(s); the header names 2 columns. If a number uses a decimal comma, separate the columns with semicolons instead.',
    );
    // Quoted, it is read as one field and refused.
    expect(bad('frequency_hz,velocity_m_s\n5,"320,5"\n').message).toBe(
      'Row 1 (line 2), column velocity_m_s: is "320,5": a decimal comma is allowed only in files separated by semicolons; write a decimal point.',
    );
  });

  it('rejects malformed quoting', () => {
    expect(bad('frequency_hz,velocity_m_s,note\n5,320,"never closed\n6,300,x\n').message).toBe(
      'Line 2: a quoted field is never closed; end it with a double quote (write "" for a quote inside it).',
    );
    expect(bad('frequency_hz,velocity_m_s,note\n5,320,"quoted"tail\n').message).toBe(
      'Line 2: text follows a closing quote; put the whole field inside the quotes.',
    );
    expect(bad('frequency_hz,velocity_m_s,note\n5,320,say "hi"\n').message).toBe(
      'Line 2: a double quote appears inside an unquoted field; enclose the field in double quotes and write the quote as "".',
    );
  });

  it('rejects control characters in text', () => {
    expect(bad('frequency_hz,velocity_m_s,note\n5,320,bell\u0007\n').message).toBe(
      'Row 1 (line 2), column note: contains a control character; only printable text, tabs and line breaks are allowed.',
    );
  });

  it('rejects over-long fields', () => {
    const longNote = 'x'.repeat(PICK_LIMITS.maxNoteLength + 1);
    expect(bad(`frequency_hz,velocity_m_s,note\n5,320,${longNote}\n`).message).toBe(
      'Row 1 (line 2), column note: is 1001 characters long; the limit is 1000.',
    );
    expect(parsePicksCsv(`frequency_hz,velocity_m_s,note\n5,320,${'x'.repeat(1000)}\n`).picks[0].note).toHaveLength(1000);
    expect(bad(`frequency_hz,velocity_m_s\n5,${'3'.repeat(101)}\n`).message).toBe(
      'Row 1 (line 2), column velocity_m_s: is 101 characters long; the limit is 100.',
    );
  });

  it(`rejects more than ${PICK_LIMITS.maxRows} rows`, () => {
    const rows = ['frequency_hz,velocity_m_s'];
    for (let i = 1; i <= PICK_LIMITS.maxRows + 1; i++) rows.push(`${i},300`);
    expect(bad(rows.join('\n')).message).toBe(
      'The picks file has more than 100000 rows (stopped at line 100002); split it into smaller files.',
    );
  });

  it('rejects a file over the character limit before reading it', () => {
    const huge = 'frequency_hz,velocity_m_s\n' + 'x'.repeat(PICK_LIMITS.maxChars);
    expect(bad(huge).message).toBe(
      `The picks file has ${huge.length} characters, more than the 50000000 limit; split it into smaller files.`,
    );
  });

  it('rejects a row whose only field is a huge unquoted blob', () => {
    expect(bad(`frequency_hz\n${'9'.repeat(200_000)}\n`).message).toBe('Line 1: the required column velocity_m_s is missing.');
    expect(bad(`frequency_hz,velocity_m_s\n${'9'.repeat(200_000)},300\n`).message).toBe(
      'Row 1 (line 2), column frequency_hz: is 200000 characters long; the limit is 100.',
    );
  });
});

describe('validatePick and pickFromCells: the same rules for a typed row', () => {
  it('names the pick as the caller does, e.g. "pick 3"', () => {
    const e = inputError(() => pickFromCells({ frequency_hz: '5', velocity_m_s: '0.3' }, 'pick 3'));
    expect(e.message).toBe(
      'Pick 3, column velocity_m_s: is 0.3 m/s, below the 30 m/s lower bound. It looks like km/s; the velocity must be given in m/s (the value was not converted).',
    );
    expect(e.field).toBe('pick 3, velocity_m_s');
  });

  it('reads a typed row with a decimal comma when asked to', () => {
    expect(pickFromCells({ frequency_hz: '7,5', velocity_m_s: '310' }, 'pick 1', { decimalComma: true })).toEqual({
      frequency: 7.5,
      velocity: 310,
      kind: 'group',
      mode: 0,
    });
    expect(inputError(() => pickFromCells({ frequency_hz: '7,5', velocity_m_s: '310' }, 'pick 1')).message).toBe(
      'Pick 1, column frequency_hz: is "7,5": a decimal comma is allowed only in files separated by semicolons; write a decimal point.',
    );
  });

  it('needs exactly one of frequency and period in a typed row', () => {
    expect(inputError(() => pickFromCells({ velocity_m_s: '310' }, 'pick 2')).message).toBe(
      'Pick 2: give exactly one of frequency_hz and period_s.',
    );
  });

  it('checks a pick object the app built', () => {
    const ok: Pick = { frequency: 4, period: 0.25, velocity: 300, kind: 'phase', mode: 1, sd: 9 };
    expect(validatePick(ok, 'pick 1')).toEqual(ok);
    expect(inputError(() => validatePick({ ...ok, frequency: 5 }, 'pick 1')).message).toBe(
      "Pick 1, column period_s: gives 4 Hz, but the pick's frequency is 5; they must agree.",
    );
    expect(inputError(() => validatePick({ ...ok, kind: 'love' as never }, 'pick 1')).message).toBe(
      'Pick 1, column kind: must be "group" or "phase", but it is "love".',
    );
    expect(inputError(() => validatePick({ ...ok, mode: 0.5 }, 'pick 1')).message).toBe(
      'Pick 1, column mode: must be a whole number 0 or more (0 = fundamental), but it is 0.5.',
    );
    expect(inputError(() => validatePick({ ...ok, period: undefined, frequency: NaN }, 'pick 1')).message).toBe(
      'Pick 1, column frequency_hz: is NaN (not a number); give a number.',
    );
    expect(inputError(() => validatePick({ ...ok, note: 42 as never }, 'pick 1')).message).toBe(
      'Pick 1, column note: must be text, but it is 42.',
    );
  });

  it('checkPickSet finds duplicates in a table', () => {
    const a: Pick = { frequency: 4, velocity: 300, kind: 'group', mode: 0 };
    expect(() => checkPickSet([a, { ...a, kind: 'phase' }], (i) => `pick ${i + 1}`)).not.toThrow();
    expect(inputError(() => checkPickSet([a, { ...a, velocity: 310 }], (i) => `pick ${i + 1}`)).message).toBe(
      'Pick 2, column frequency_hz: repeats 4 Hz for a group pick of mode 0, already given in pick 1; keep one pick per frequency, kind and mode.',
    );
  });
});

describe('the wave column: Love by default, Rayleigh when stated', () => {
  it('reads love and rayleigh in any case, and leaves an empty cell (or no column) as Love', () => {
    const r = parsePicksCsv('frequency_hz,velocity_m_s,wave\n5,320,Rayleigh\n6,300,\n7,290,love\n');
    expect(r.picks.map((p) => p.wave)).toEqual(['rayleigh', undefined, 'love']);
    expect(parsePicksCsv('frequency_hz,velocity_m_s\n5,320\n').picks[0].wave).toBeUndefined();
  });

  it('rejects another wave name, naming the row, line and column', () => {
    expect(inputError(() => parsePicksCsv('frequency_hz,velocity_m_s,wave\n5,320,scholte\n')).message).toBe(
      'Row 1 (line 2), column wave: must be "love" or "rayleigh" (empty means love), but it is "scholte".',
    );
    expect(inputError(() => validatePick({ frequency: 5, velocity: 300, kind: 'group', mode: 0, wave: 'sh' as never }, 'pick 1')).message).toBe(
      'Pick 1, column wave: must be "love" or "rayleigh", but it is "sh".',
    );
  });

  it('allows a Love and a Rayleigh pick at the same frequency, kind and mode, but not two Rayleigh picks', () => {
    const two = parsePicksCsv('frequency_hz,velocity_m_s,wave\n5,320,love\n5,300,rayleigh\n');
    expect(two.picks).toHaveLength(2);
    expect(inputError(() => parsePicksCsv('frequency_hz,velocity_m_s,wave\n5,320,rayleigh\n5,300,rayleigh\n')).message).toBe(
      'Row 2 (line 3), column frequency_hz: repeats 5 Hz for a Rayleigh group pick of mode 0, already given in row 1 (line 2); keep one pick per frequency, kind and mode of each wave.',
    );
  });

  it('writes the wave column only when a pick states its wave', () => {
    expect(picksToCsv([{ frequency: 5, velocity: 300, kind: 'group', mode: 0 }])).toBe(`${CAUTION_LINE}frequency_hz,velocity_m_s,sd_m_s,kind,mode\r\n5,300,,group,0\r\n`);
    expect(
      picksToCsv([
        { frequency: 5, velocity: 300, kind: 'group', mode: 0, wave: 'rayleigh' },
        { frequency: 6, velocity: 280, kind: 'phase', mode: 0 },
      ]),
    ).toBe(`${CAUTION_LINE}frequency_hz,velocity_m_s,sd_m_s,kind,mode,wave\r\n5,300,,group,0,rayleigh\r\n6,280,,phase,0,\r\n`);
  });
});

describe('picksToCsv: round trip', () => {
  const text = fc
    .string({ unit: 'grapheme', minLength: 1, maxLength: 40 })
    .filter((s) => !/[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/.test(s));
  const optional = <T>(arb: fc.Arbitrary<T>) => fc.option(arb, { nil: undefined });
  const pickArb = fc
    .record({
      useperiod: fc.boolean(),
      x: fc.double({ min: 0.5, max: 200, noNaN: true, noDefaultInfinity: true }),
      velocity: fc.double({ min: 30, max: 5000, noNaN: true, noDefaultInfinity: true }),
      sdFraction: optional(fc.double({ min: 0.001, max: 0.5, noNaN: true })),
      kind: fc.constantFrom('group' as const, 'phase' as const),
      mode: fc.integer({ min: 0, max: 5 }),
      wave: optional(fc.constantFrom('love' as const, 'rayleigh' as const)),
      note: optional(text),
      time: optional(fc.constantFrom('2026-05-04', '2026-05-04T10:30:00Z', '2026-05-04T10:30:00.125+02:00')),
    })
    .map((r): Pick => {
      // A period pick has period 1/x in 0.005–2 s and frequency 1/period, as the parser makes it.
      const p: Pick = r.useperiod
        ? { frequency: 1 / (1 / r.x), period: 1 / r.x, velocity: r.velocity, kind: r.kind, mode: r.mode }
        : { frequency: r.x, velocity: r.velocity, kind: r.kind, mode: r.mode };
      if (r.sdFraction !== undefined) p.sd = r.sdFraction * r.velocity;
      if (r.wave !== undefined) p.wave = r.wave;
      if (r.note !== undefined) p.note = r.note;
      if (r.time !== undefined) p.time = r.time;
      return p;
    });
  const toPeriod = (p: Pick): Pick => (p.period !== undefined ? p : { ...p, period: 1 / p.frequency, frequency: 1 / (1 / p.frequency) });
  const picksArb = (allPeriod: boolean) =>
    fc
      .uniqueArray(pickArb.map((p) => (allPeriod ? toPeriod(p) : p)), {
        minLength: 1,
        maxLength: 30,
        selector: (p) => `${p.wave ?? 'love'}|${p.kind}|${p.mode}|${p.frequency}`,
      })
      .map((ps) => ps.map((p, i) => ({ ...p, id: `pick-${i}` })));

  it('parsePicksCsv(picksToCsv(p)) gives p back exactly, with commas, semicolons and decimal commas', () => {
    fc.assert(
      fc.property(
        picksArb(false),
        fc.constantFrom(
          { separator: ',' as const },
          { separator: ';' as const },
          { separator: ';' as const, decimalComma: true },
          { separator: ',' as const, lineEnding: '\n' as const },
        ),
        (ps, opts) => {
          const picks = ps;
          const csv = picksToCsv(picks, opts);
          const back = parsePicksCsv(csv);
          const allPeriod = picks.every((p) => p.period !== undefined);
          // When picks mix periods and frequencies, the file has frequency_hz; periods are then dropped.
          const expected = allPeriod ? picks : picks.map(({ period: _period, ...rest }) => rest);
          expect(back.picks).toEqual(expected);
          expect(back.separator).toBe(opts.separator);
          expect(back.defaultedSd).toBe(picks.filter((p) => p.sd === undefined).length);
        },
      ),
      { numRuns: 200, seed: 20261201 },
    );
  });

  it('a file of periods keeps period_s', () => {
    fc.assert(
      fc.property(picksArb(true), (ps) => {
        const picks = ps;
        const csv = picksToCsv(picks);
        expect(csv.startsWith(`${CAUTION_LINE}period_s,`)).toBe(true);
        const back = parsePicksCsv(csv);
        expect(back.unit).toBe('period');
        expect(back.picks).toEqual(picks);
      }),
      { numRuns: 100, seed: 7 },
    );
  });

  it('writes the documented columns, CRLF line ends and shortest number text', () => {
    const csv = picksToCsv([
      { frequency: 0.1 + 0.2, velocity: 300, kind: 'group', mode: 0, note: 'a, "b"' },
      { frequency: 5, velocity: 250, kind: 'phase', mode: 1, sd: 7.5 },
    ]);
    expect(csv).toBe(
      CAUTION_LINE +
        'frequency_hz,velocity_m_s,sd_m_s,kind,mode,note\r\n' +
        '0.30000000000000004,300,,group,0,"a, ""b"""\r\n' +
        '5,250,7.5,phase,1,\r\n',
    );
  });

  it('starts with the caution as a # comment line, which the reader skips, with every separator and line end', () => {
    const picks: Pick[] = [{ frequency: 5, velocity: 300, kind: 'group', mode: 0, note: '# not a comment: a note' }];
    for (const opts of [{}, { separator: ';' as const, decimalComma: true }, { lineEnding: '\n' as const }]) {
      const csv = picksToCsv(picks, opts);
      expect(csv.split(/\r?\n/)[0]).toBe(`# ${CAUTION}`);
      expect(parsePicksCsv(csv).picks).toEqual(picks);
      expect(checkPicksCsv(csv).parsed!.picks).toEqual(picks);
    }
  });

  it('refuses a decimal comma with the comma separator', () => {
    expect(inputError(() => picksToCsv([], { separator: ',', decimalComma: true })).message).toBe(
      'decimalComma needs the semicolon separator; a comma cannot be both.',
    );
  });
});

describe('parsePicksCsv: # comment lines above the header', () => {
  it('skips comment and blank lines above the header, keeps true line numbers, and takes the separator from the header', () => {
    const text = '\uFEFF# Invented survey, line A; spread 46 m\n\n  # second comment, with "quotes"\r\nfrequency_hz;velocity_m_s\n5;300\n6;-4\n';
    expect(inputError(() => parsePicksCsv(text)).message).toMatch(/^Row 2 \(line 6\), column velocity_m_s: /);
    expect(parsePicksCsv(text.replace('6;-4\n', '')).picks).toEqual([{ frequency: 5, velocity: 300, kind: 'group', mode: 0 }]);
    expect(parsePicksCsv(text.replace('6;-4\n', '')).separator).toBe(';');
  });

  it('a file of comments only is empty, and a # line below the header is a row (an id may start with #), with a hint when it does not fit', () => {
    expect(inputError(() => parsePicksCsv('# only a comment\n')).message).toBe(
      'The picks file is empty; it needs a header row (e.g. frequency_hz,velocity_m_s) and at least one pick.',
    );
    expect(parsePicksCsv('id,frequency_hz,velocity_m_s\n#7,5,300\n').picks).toEqual([{ id: '#7', frequency: 5, velocity: 300, kind: 'group', mode: 0 }]);
    expect(inputError(() => parsePicksCsv('frequency_hz,velocity_m_s\n5,300\n# a late comment\n')).message).toBe(
      'Row 2 (line 3), column velocity_m_s: is missing: the row has 1 fields but the header names 2 columns. A line starting with # is a comment only above the header row.',
    );
  });
});

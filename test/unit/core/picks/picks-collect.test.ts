/**
 * checkPicksCsv (core/picks/picks.ts): the picks CSV reader that checks the whole
 * file and lists every bad row (row, line, column, message), so the app can
 * show them all at once and import nothing. It runs the same row rules as
 * parsePicksCsv, which still throws its first problem exactly as before.
 * The file format is RFC 4180 (Shafranovich 2005); the cap of 50 listed
 * problems is common practice (stated in core/picks/picks.ts).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../../core/shared/errors';
import {
  PICK_PROBLEMS_LISTED,
  checkPicksCsv,
  morePickProblemsNote,
  parsePicksCsv,
  picksToCsv,
  type PickProblem,
} from '../../../../core/picks/picks';

/** What parsePicksCsv throws for the text, or undefined when it reads it. */
function thrown(text: string): InputError | undefined {
  try {
    parsePicksCsv(text);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  return undefined;
}

const where = (p: PickProblem) => [p.row, p.line, p.column];

// Seven bad rows of seven kinds, one good row between, and a blank line that shifts the lines.
const SEVERAL_BAD = [
  'frequency_hz,velocity_m_s,sd_m_s,kind,mode,id',
  '5,320,,,,a', // row 1, good
  '6,abc,,,,b', // row 2: not a number
  '7,0.3,,,,', // row 3: km/s
  '',
  '5,330,,,,', // row 4 (line 6): repeats 5 Hz of row 1
  '8,300,400,,,', // row 5: sd not below the velocity
  '9,280,,sideways,,', // row 6: kind
  '10,270,,,,a', // row 7: repeats id a
  '11,260', // row 8: too few fields
  '12,250,,,,', // row 9, good
  '',
].join('\n');

describe('checkPicksCsv: every bad row is listed with its row, line and column', () => {
  it('reports all bad rows of one file, in row order, with parsePicksCsv’s words, and returns no picks', () => {
    const r = checkPicksCsv(SEVERAL_BAD);
    expect(r.parsed).toBeNull();
    expect(r.moreProblems).toBe(0);
    expect(r.problems.map(where)).toEqual([
      [2, 3, 'velocity_m_s'],
      [3, 4, 'velocity_m_s'],
      [4, 6, 'frequency_hz'],
      [5, 7, 'sd_m_s'],
      [6, 8, 'kind'],
      [7, 9, 'id'],
      [8, 10, 'sd_m_s'],
    ]);
    expect(r.problems.map((p) => p.message)).toEqual([
      'Row 2 (line 3), column velocity_m_s: must be a number, but it is "abc".',
      'Row 3 (line 4), column velocity_m_s: is 0.3 m/s, below the 30 m/s lower bound. It looks like km/s; the velocity must be given in m/s (the value was not converted).',
      'Row 4 (line 6), column frequency_hz: repeats 5 Hz for a group pick of mode 0, already given in row 1 (line 2); keep one pick per frequency, kind and mode.',
      'Row 5 (line 7), column sd_m_s: is 400 m/s, not smaller than the velocity (300 m/s); check the units and the value.',
      'Row 6 (line 8), column kind: must be "group" or "phase" (empty means group), but it is "sideways".',
      'Row 7 (line 9), column id: repeats the id "a" of row 1 (line 2); ids must be unique.',
      'Row 8 (line 10), column sd_m_s: is missing: the row has 2 fields but the header names 6 columns.',
    ]);
    expect(r.problems[0].field).toBe('row 2 (line 3), velocity_m_s');
  });

  it('gives each bad row the very problem parsePicksCsv throws for that row alone', () => {
    const lines = SEVERAL_BAD.split('\n');
    const header = lines[0];
    // A row that is bad on its own (not a repeat) read alone after the header is row 1 on line 2.
    for (const p of checkPicksCsv(SEVERAL_BAD).problems.filter((q) => !q.message.includes('repeats'))) {
      const alone = thrown(`${header}\n${lines[p.line - 1]}\n`);
      const relabel = (s: string) => s.replace(`ow ${p.row} (line ${p.line})`, 'ow 1 (line 2)');
      expect(alone?.message, lines[p.line - 1]).toBe(relabel(p.message));
      expect(alone?.field).toBe(relabel(p.field));
    }
  });

  it('reports repeated frequencies of the same kind and mode in period files too, each naming the first row', () => {
    const r = checkPicksCsv('period_s;velocity_m_s;kind\n0,5;300;phase\n0,5;310;phase\n0,5;320;group\n0,5;330;phase\n');
    expect(r.problems.map((p) => p.message)).toEqual([
      'Row 2 (line 3), column period_s: repeats 0.5 s for a phase pick of mode 0, already given in row 1 (line 2); keep one pick per frequency, kind and mode.',
      'Row 4 (line 5), column period_s: repeats 0.5 s for a phase pick of mode 0, already given in row 1 (line 2); keep one pick per frequency, kind and mode.',
    ]);
  });

  it('keeps a problem of the whole file single, with its line when it names one', () => {
    const cases: [string, PickProblem][] = [
      [
        '',
        {
          row: 0,
          line: 0,
          column: '',
          field: 'file',
          message: 'The picks file is empty; it needs a header row (e.g. frequency_hz,velocity_m_s) and at least one pick.',
        },
      ],
      [
        '\n5,320\nabc,def\n',
        {
          row: 0,
          line: 2,
          column: '',
          field: 'header',
          message: 'Line 2: the first row must be a header naming the columns (e.g. frequency_hz,velocity_m_s), but it holds numbers.',
        },
      ],
      [
        'frequency_hz,velocity_m_s,colour\n5,abc,red\n6,-1,blue\n',
        {
          row: 0,
          line: 1,
          column: '',
          field: 'header',
          message: 'Line 1: unknown column "colour". Known columns: frequency_hz, period_s, velocity_m_s, sd_m_s, kind, mode, wave, id, note, time.',
        },
      ],
      [
        'frequency_hz,velocity_m_s\n5,abc\n6,"3"20\n7,-1\n',
        { row: 0, line: 3, column: '', field: 'line 3', message: 'Line 3: text follows a closing quote; put the whole field inside the quotes.' },
      ],
      [
        'frequency_hz,velocity_m_s\n',
        { row: 0, line: 0, column: '', field: 'rows', message: 'The picks file has a header but no picks; add at least one row.' },
      ],
    ];
    for (const [text, problem] of cases) {
      expect(checkPicksCsv(text), JSON.stringify(text)).toEqual({ parsed: null, problems: [problem], moreProblems: 0 });
      expect(thrown(text)?.message).toBe(problem.message);
    }
  });

  it('reports a file over the row limit as one problem, without reading its rows', () => {
    const text = 'frequency_hz,velocity_m_s\n' + '5,abc\n'.repeat(100_001);
    const r = checkPicksCsv(text);
    expect(r.problems).toHaveLength(1);
    expect(r.problems[0].message).toMatch(/^The picks file has more than 100000 rows/);
    expect(r.problems[0].row).toBe(0);
  });
});

describe('checkPicksCsv: the list is capped and the rest counted', () => {
  // 60 bad rows: 40 with a non-numeric velocity, then 20 repeats of the first good frequency.
  const bad60 = ['frequency_hz,velocity_m_s', '1,300'];
  for (let i = 0; i < 40; i++) bad60.push(`${2 + i},x${i}`);
  for (let i = 0; i < 20; i++) bad60.push('1,300');
  const text = bad60.join('\n');

  it(`lists ${PICK_PROBLEMS_LISTED} problems by default (the documented default) and counts the other 10`, () => {
    expect(PICK_PROBLEMS_LISTED).toBe(50);
    const r = checkPicksCsv(text);
    expect(r.problems).toHaveLength(50);
    expect(r.moreProblems).toBe(10);
    expect(r.problems[0].message).toBe('Row 2 (line 3), column velocity_m_s: must be a number, but it is "x0".');
    expect(r.problems[49].message).toBe(
      'Row 51 (line 52), column frequency_hz: repeats 1 Hz for a group pick of mode 0, already given in row 1 (line 2); keep one pick per frequency, kind and mode.',
    );
    expect(r.problems.map((p) => p.row)).toEqual(Array.from({ length: 50 }, (_, i) => i + 2));
    expect(morePickProblemsNote(r.moreProblems)).toBe('…and 10 more rows have problems.');
    expect(morePickProblemsNote(1)).toBe('…and 1 more row has a problem.');
  });

  it('lists the earliest rows when repeats come before other bad rows and the cap is small', () => {
    const r = checkPicksCsv('frequency_hz,velocity_m_s\n5,300\n5,310\n6,abc\n5,320\n7,-1\n', { maxProblems: 2 });
    expect(r.problems.map(where)).toEqual([
      [2, 3, 'frequency_hz'],
      [3, 4, 'velocity_m_s'],
    ]);
    expect(r.moreProblems).toBe(2);
  });

  it('takes a cap of 1 and refuses a cap that is not a whole number 1 or more', () => {
    const r = checkPicksCsv(text, { maxProblems: 1 });
    expect(r.problems).toHaveLength(1);
    expect(r.moreProblems).toBe(59);
    for (const bad of [0, -1, 2.5, Number.NaN]) {
      expect(() => checkPicksCsv(text, { maxProblems: bad })).toThrow(
        `maxProblems must be a whole number 1 or more, but it is ${bad}.`,
      );
    }
  });
});

describe('checkPicksCsv agrees with parsePicksCsv', () => {
  it('reads a good file exactly as parsePicksCsv does', () => {
    const files = [
      'frequency_hz,velocity_m_s\n5,320\n10,250.5\n',
      '\uFEFFfrequency_hz;velocity_m_s;sd_m_s;note\r\n12,5;240,25;7;"a; b"\r\n14.5;230;;""""\r\n',
      'period_s,velocity_m_s,kind,mode,id,time\n0.2,300,phase,1,p1,2026-05-04T10:30:00Z\n0.125,280,,,p2,\n',
    ];
    for (const f of files) {
      const r = checkPicksCsv(f);
      expect(r.problems).toEqual([]);
      expect(r.moreProblems).toBe(0);
      expect(r.parsed).toEqual(parsePicksCsv(f));
    }
  });

  it('parsePicksCsv still throws only the first bad row, even when a repeat comes earlier', () => {
    const e = thrown(SEVERAL_BAD);
    expect(e?.message).toBe('Row 2 (line 3), column velocity_m_s: must be a number, but it is "abc".');
    expect(e?.field).toBe('row 2 (line 3), velocity_m_s');
    // a repeat in row 2 is checked after every row is read: the bad row 3 is what parsePicksCsv throws
    const text = 'frequency_hz,velocity_m_s\n5,300\n5,310\n6,abc\n';
    expect(thrown(text)?.message).toBe('Row 3 (line 4), column velocity_m_s: must be a number, but it is "abc".');
    expect(checkPicksCsv(text).problems.map((p) => p.row)).toEqual([2, 3]);
  });

  it('on 2000 mutated files: returns picks exactly when parsePicksCsv does, and lists what parsePicksCsv throws', () => {
    const good = picksToCsv(
      [
        { frequency: 5, velocity: 320, kind: 'group', mode: 0, sd: 9, id: 'a' },
        { frequency: 8, velocity: 290, kind: 'phase', mode: 0 },
        { frequency: 12, velocity: 250, kind: 'group', mode: 1, note: 'x, "y"' },
        { frequency: 20, velocity: 220, kind: 'group', mode: 0, id: 'b' },
      ],
      { lineEnding: '\n' },
    );
    const pieces = ['', ',', ';', '"', '\n', '-', '0', '5', 'abc', 'a', 'phase', '9e9', '\r\n', ' '];
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.nat(good.length), fc.nat(3), fc.constantFrom(...pieces)), { minLength: 1, maxLength: 4 }),
        (edits) => {
          let text = good;
          for (const [at, cut, piece] of edits) {
            const k = Math.min(at, text.length);
            text = text.slice(0, k) + piece + text.slice(k + cut);
          }
          const r = checkPicksCsv(text);
          const e = thrown(text);
          if (e === undefined) {
            expect(r.problems).toEqual([]);
            expect(r.parsed).toEqual(parsePicksCsv(text));
          } else {
            expect(r.parsed).toBeNull();
            expect(r.problems.map((p) => [p.field, p.message])).toContainEqual([e.field, e.message]);
            for (const p of r.problems) expect(p.message.startsWith(p.row === 0 ? '' : `Row ${p.row} (line ${p.line}), column ${p.column}: `)).toBe(true);
          }
        },
      ),
      { numRuns: 2000, seed: 4 },
    );
  });
});

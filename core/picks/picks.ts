/**
 * Dispersion picks: the shared shape, the rules every pick must meet, and
 * the picks CSV file (read and write).
 *
 * The CSV file follows RFC 4180 (Shafranovich 2005, "Common Format and MIME
 * Type for Comma-Separated Values (CSV) Files"): quoted fields, doubled
 * quotes inside them, CRLF or LF line ends, an optional UTF-8 byte-order
 * mark. A header row is required and carries the units in the column names:
 *
 *   frequency_hz | period_s   exactly one of the two (required)
 *   velocity_m_s              required
 *   sd_m_s                    optional; empty = the default below
 *   kind                      optional; group | phase; empty = group
 *   mode                      optional; integer ≥ 0; empty = 0
 *   wave                      optional; love | rayleigh; empty = love
 *   id, note, time            optional text (time as ISO 8601)
 *
 * Columns may come in any order; header names are matched without regard
 * to case or surrounding spaces. The separator is a comma or a semicolon
 * (read from the header row). A decimal comma is accepted only when the
 * separator is a semicolon, as spreadsheets in many locales write it
 * (common practice). Unquoted fields are trimmed, quoted text is kept
 * exactly, and blank lines (or rows of empty fields) are skipped. Lines
 * above the header row that start with # are comments and are skipped
 * (picksToCsv writes the caution there); below the header a # line is read
 * as a row, since an id may start with #. Limits are in PICK_LIMITS.
 *
 * Every bad row is an InputError naming the data row (1-based, header not
 * counted), its line number in the file, and the column. parsePicksCsv
 * throws the first; checkPicksCsv lists them all (up to a cap).
 */
import { CAUTION } from '../shared/caution';
import { InputError, describeValue } from '../shared/errors';
import { spreadsheetSafeText } from '../shared/spreadsheet-text';
import { MODEL_BOUNDS } from '../dispersion/model';

export type PickKind = 'group' | 'phase';
/** Which surface wave was picked: Love (SH, horizontal transverse geophones) or Rayleigh (P-SV, vertical geophones). */
export type PickWave = 'love' | 'rayleigh';

/** One dispersion pick, in SI units. */
export interface Pick {
  /** Stable id, when the pick came from a store or a file that had one. */
  id?: string;
  /** Frequency, Hz (always set; a pick entered as a period has frequency = 1/period). */
  frequency: number;
  /** The period in s, when the pick was entered as a period (kept so files round-trip exactly). */
  period?: number;
  /** Velocity, m/s. */
  velocity: number;
  /** Which velocity was picked. @default 'group' */
  kind: PickKind;
  /** Mode number, 0 = fundamental. @default 0 */
  mode: number;
  /** Which wave was picked; absent means Love (files written before the column existed). @default 'love' */
  wave?: PickWave;
  /** One standard deviation of the velocity, m/s, when the pick gave one. */
  sd?: number;
  /** Free text. Shown as text, never as markup. */
  note?: string;
  /** When the pick was made, ISO 8601 text, if known. */
  time?: string;
}

/**
 * Standard deviation used when a pick gives none: this fraction of the
 * velocity. Common practice for surface-wave picks (a few per cent); not
 * from a published standard. Every output that used it says so.
 */
export const DEFAULT_SD_FRACTION = 0.03;

/** The pick's wave type: its own, or Love when it gives none. */
export function pickWave(pick: Pick): PickWave {
  return pick.wave ?? 'love';
}

/** The pick's standard deviation in m/s: its own, or the default fraction of its velocity. */
export function effectiveSd(pick: Pick): number {
  return pick.sd !== undefined ? pick.sd : DEFAULT_SD_FRACTION * pick.velocity;
}

/**
 * Limits on picks and pick files. All are common practice (chosen for this
 * tool, no published source):
 * - velocity: the model's shear-speed bounds (shared/PHYSICS.md §9), since a
 *   trapped Love wave travels between the slowest layer and the half-space
 *   (the Airy-phase group velocity dips a little below the layer speed, so
 *   the lower bound is the same loose 30 m/s);
 * - frequency 0.001–1000 Hz (periods 1 ms–1000 s), wider than any
 *   surface-wave survey from engineering to crustal scale;
 * - mode 0–50;
 * - the unit-swap check: a pick slower than 500 m/s (soil speeds) with a
 *   wavelength over 2000 m is not physical (such a slow wave cannot sample
 *   kilometres of ground); it almost always means periods were typed as
 *   frequencies or the other way round;
 * - file size: 100,000 data rows, 50,000,000 characters; a field of at most
 *   1000 characters (note) or 100 characters (every other column).
 */
export const PICK_LIMITS = {
  velocityMin: MODEL_BOUNDS.vsMin,
  velocityMax: MODEL_BOUNDS.vsMax,
  frequencyMin: 0.001,
  frequencyMax: 1000,
  modeMax: 50,
  unitSwapVelocity: 500,
  unitSwapWavelength: 2000,
  maxRows: 100_000,
  maxChars: 50_000_000,
  maxNoteLength: 1000,
  maxFieldLength: 100,
} as const;

/** The column names of the picks file, in the order picksToCsv writes them. */
export const PICK_COLUMNS = [
  'frequency_hz',
  'period_s',
  'velocity_m_s',
  'sd_m_s',
  'kind',
  'mode',
  'wave',
  'id',
  'note',
  'time',
] as const;
export type PickColumn = (typeof PICK_COLUMNS)[number];

/** Plain-words note on the default standard deviation, for outputs that used it. */
export function defaultSdNote(count: number, total: number): string {
  return (
    `${count} of ${total} picks gave no sd_m_s; each uses ${DEFAULT_SD_FRACTION * 100} % of its velocity ` +
    '(common practice for surface-wave picks, not a published standard).'
  );
}

export interface PicksParseResult {
  /** The picks, in file order. */
  picks: Pick[];
  /** How many picks had no sd_m_s and so take DEFAULT_SD_FRACTION of their velocity. */
  defaultedSd: number;
  /** The note to show when defaultedSd > 0 (the default is common practice); empty when none defaulted. */
  sdNote: string;
  /** The separator found in the header row. */
  separator: ',' | ';';
  /** Whether any number used a decimal comma (semicolon files only). */
  decimalComma: boolean;
  /** Which abscissa column the file has: frequency_hz or period_s. */
  unit: 'frequency' | 'period';
}

/** Where a pick sits, for error messages: "row 3 (line 4)" in a file, "pick 3" in a table. */
function fieldName(where: string, column: string): string {
  return `${where}, ${column}`;
}

/** The InputError for one pick's column: "Row 3 (line 4), column velocity_m_s: reason". */
function problem(where: string, column: string, reason: string): InputError {
  const lead = where.charAt(0).toUpperCase() + where.slice(1);
  return new InputError(fieldName(where, column), `${lead}, column ${column}: ${reason}`);
}

function fail(where: string, column: string, reason: string): never {
  throw problem(where, column, reason);
}

// C0 control characters other than tab, line feed and carriage return.
const CONTROL_CHARS = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;

// ISO 8601 calendar date, optionally with a time and a zone.
const ISO_TIME = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?(Z|[+-](\d{2}):?(\d{2}))?)?$/;

/** True when the text is an ISO 8601 date or date-time naming a real calendar day and clock time. */
function isIsoTime(text: string): boolean {
  const m = ISO_TIME.exec(text);
  if (!m) return false;
  const [year, month, day] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (month < 1 || month > 12 || day < 1) return false;
  const leap = (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
  const days = [31, leap ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][month - 1];
  if (day > days) return false;
  if (m[4] !== undefined && (Number(m[4]) > 23 || Number(m[5]) > 59)) return false;
  if (m[6] !== undefined && Number(m[6]) > 59) return false;
  if (m[8] !== undefined && (Number(m[8]) > 14 || Number(m[9]) > 59)) return false;
  return true;
}

function checkText(value: unknown, where: string, column: string, max: number): string | undefined {
  if (value === undefined) return undefined;
  if (typeof value !== 'string') fail(where, column, `must be text, but it is ${describeValue(value)}.`);
  if (value.length > max) {
    fail(where, column, `is ${value.length} characters long; the limit is ${max}.`);
  }
  if (CONTROL_CHARS.test(value)) {
    fail(where, column, 'contains a control character; only printable text, tabs and line breaks are allowed.');
  }
  return value;
}

function checkPositiveFinite(value: unknown, where: string, column: string, unit: string): number {
  if (typeof value !== 'number') fail(where, column, `must be a number, but it is ${describeValue(value)}.`);
  if (Number.isNaN(value)) fail(where, column, 'is NaN (not a number); give a number.');
  if (!Number.isFinite(value)) fail(where, column, `must be a finite number, but it is ${value}.`);
  if (value <= 0) fail(where, column, `must be greater than 0 ${unit}, but it is ${value}.`);
  return value;
}

/**
 * Checks one pick against the rules every pick must meet, wherever it came
 * from (a CSV row or a row typed into the app's table). `where` names the
 * pick in messages, e.g. "row 3 (line 4)" or "pick 3". Throws InputError
 * naming the column; returns a fresh copy holding only the set fields.
 */
export function validatePick(pick: Pick, where: string): Pick {
  if (!pick || typeof pick !== 'object') throw new InputError(where, `${where} must be a pick object.`);
  const abscissa = pick.period !== undefined ? 'period_s' : 'frequency_hz';
  let frequency: number;
  let period: number | undefined;
  if (pick.period !== undefined) {
    period = checkPositiveFinite(pick.period, where, 'period_s', 's');
    if (period < 1 / PICK_LIMITS.frequencyMax || period > 1 / PICK_LIMITS.frequencyMin) {
      fail(
        where,
        'period_s',
        `is ${period} s, outside the ${1 / PICK_LIMITS.frequencyMax}–${1 / PICK_LIMITS.frequencyMin} s range this tool accepts.`,
      );
    }
    frequency = 1 / period;
    if (pick.frequency !== undefined && pick.frequency !== frequency) {
      fail(where, 'period_s', `gives ${frequency} Hz, but the pick's frequency is ${describeValue(pick.frequency)}; they must agree.`);
    }
  } else {
    frequency = checkPositiveFinite(pick.frequency, where, 'frequency_hz', 'Hz');
    if (frequency < PICK_LIMITS.frequencyMin || frequency > PICK_LIMITS.frequencyMax) {
      fail(
        where,
        'frequency_hz',
        `is ${frequency} Hz, outside the ${PICK_LIMITS.frequencyMin}–${PICK_LIMITS.frequencyMax} Hz range this tool accepts.`,
      );
    }
  }

  const velocity = checkPositiveFinite(pick.velocity, where, 'velocity_m_s', 'm/s');
  if (velocity < PICK_LIMITS.velocityMin) {
    const hint =
      velocity <= PICK_LIMITS.velocityMax / 1000
        ? ' It looks like km/s; the velocity must be given in m/s (the value was not converted).'
        : '';
    fail(where, 'velocity_m_s', `is ${velocity} m/s, below the ${PICK_LIMITS.velocityMin} m/s lower bound.${hint}`);
  }
  if (velocity > PICK_LIMITS.velocityMax) {
    fail(where, 'velocity_m_s', `is ${velocity} m/s, above the ${PICK_LIMITS.velocityMax} m/s upper bound.`);
  }

  // Unit-swap check (common practice, see PICK_LIMITS).
  const wavelength = velocity / frequency;
  if (velocity < PICK_LIMITS.unitSwapVelocity && wavelength > PICK_LIMITS.unitSwapWavelength) {
    const other = abscissa === 'period_s' ? 'frequencies (name the column frequency_hz)' : 'periods (name the column period_s)';
    fail(
      where,
      abscissa,
      `with a velocity of ${velocity} m/s gives a wavelength of ${Math.round(wavelength)} m, which a wave slower than ` +
        `${PICK_LIMITS.unitSwapVelocity} m/s cannot have (limit ${PICK_LIMITS.unitSwapWavelength} m, common practice). ` +
        `If the column holds ${other}, fix the header.`,
    );
  }

  let sd: number | undefined;
  if (pick.sd !== undefined) {
    sd = checkPositiveFinite(pick.sd, where, 'sd_m_s', 'm/s');
    if (sd >= velocity) {
      fail(where, 'sd_m_s', `is ${sd} m/s, not smaller than the velocity (${velocity} m/s); check the units and the value.`);
    }
  }

  const kind = pick.kind;
  if (kind !== 'group' && kind !== 'phase') {
    fail(where, 'kind', `must be "group" or "phase", but it is ${describeValue(kind)}.`);
  }
  const mode = pick.mode;
  if (typeof mode !== 'number' || !Number.isInteger(mode) || mode < 0) {
    fail(where, 'mode', `must be a whole number 0 or more (0 = fundamental), but it is ${describeValue(mode)}.`);
  }
  if (mode > PICK_LIMITS.modeMax) {
    fail(where, 'mode', `is ${mode}, above the limit of ${PICK_LIMITS.modeMax}.`);
  }

  const wave = pick.wave;
  if (wave !== undefined && wave !== 'love' && wave !== 'rayleigh') {
    fail(where, 'wave', `must be "love" or "rayleigh", but it is ${describeValue(wave)}.`);
  }

  const id = checkText(pick.id, where, 'id', PICK_LIMITS.maxFieldLength);
  const note = checkText(pick.note, where, 'note', PICK_LIMITS.maxNoteLength);
  const time = checkText(pick.time, where, 'time', PICK_LIMITS.maxFieldLength);
  if (time !== undefined && !isIsoTime(time)) {
    fail(where, 'time', `must be an ISO 8601 date or date-time such as 2026-05-04T10:30:00Z, but it is ${describeValue(time)}.`);
  }

  const out: Pick = { frequency, velocity, kind, mode };
  if (period !== undefined) out.period = period;
  if (sd !== undefined) out.sd = sd;
  if (wave !== undefined) out.wave = wave;
  if (id !== undefined) out.id = id;
  if (note !== undefined) out.note = note;
  if (time !== undefined) out.time = time;
  return out;
}

/**
 * Checks a list of picks together: no two share a frequency with the same
 * kind and mode, and no two share an id. `whereOf(i)` names pick i. Throws
 * the first problem found (in list order) as an InputError.
 */
export function checkPickSet(picks: readonly Pick[], whereOf: (index: number) => string): void {
  for (const found of pickSetProblems(picks, whereOf)) throw found.error;
}

/**
 * The problems of a list of picks taken together, in list order, at most one
 * per pick (a repeated frequency of the same kind and mode first, else a
 * repeated id). Each repeat names the first pick that had the value.
 */
function* pickSetProblems(
  picks: readonly Pick[],
  whereOf: (index: number) => string,
): Generator<{ index: number; error: InputError }> {
  const seen = new Map<string, number>();
  const ids = new Map<string, number>();
  for (let i = 0; i < picks.length; i++) {
    const p = picks[i];
    const key = `${pickWave(p)}|${p.kind}|${p.mode}|${p.frequency}`;
    const prior = seen.get(key);
    if (prior !== undefined) {
      const column = p.period !== undefined ? 'period_s' : 'frequency_hz';
      const value = p.period !== undefined ? `${p.period} s` : `${p.frequency} Hz`;
      yield {
        index: i,
        error: problem(
          whereOf(i),
          column,
          `repeats ${value} for a ${p.wave === 'rayleigh' ? 'Rayleigh ' : ''}${p.kind} pick of mode ${p.mode}, already given in ${whereOf(prior)}; keep one pick per frequency, kind and mode${p.wave === 'rayleigh' ? ' of each wave' : ''}.`,
        ),
      };
    } else {
      seen.set(key, i);
    }
    if (p.id !== undefined && p.id !== '') {
      const priorId = ids.get(p.id);
      if (priorId === undefined) {
        ids.set(p.id, i);
      } else if (prior === undefined) {
        yield {
          index: i,
          error: problem(whereOf(i), 'id', `repeats the id ${describeValue(p.id)} of ${whereOf(priorId)}; ids must be unique.`),
        };
      }
    }
  }
}

// Strict decimal number text: no NaN, Infinity, hex, spaces or thousands separators.
const NUMBER_TEXT = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Options for reading a typed or file row: how numbers are written. */
export interface PickTextOptions {
  /** Accept a decimal comma ("12,5"). Only meaningful with a semicolon separator. @default false */
  decimalComma?: boolean;
}

function parseNumberText(
  text: string,
  where: string,
  column: string,
  decimalComma: boolean,
): { value: number; usedComma: boolean } {
  const t = text.trim();
  if (t === '') fail(where, column, 'is empty; give a number.');
  if (/^[+-]?nan$/i.test(t)) fail(where, column, 'is NaN (not a number); give a number.');
  if (/^[+-]?(inf|infinity|∞)$/i.test(t)) fail(where, column, `must be a finite number, but it is ${describeValue(t)}.`);
  let s = t;
  let usedComma = false;
  if (t.includes(',')) {
    if (!decimalComma) {
      fail(
        where,
        column,
        `is ${describeValue(t)}: a decimal comma is allowed only in files separated by semicolons; write a decimal point.`,
      );
    }
    if (t.includes('.') || t.indexOf(',') !== t.lastIndexOf(',')) {
      fail(where, column, `is ${describeValue(t)}, which mixes separators; write one decimal comma and no thousands separator.`);
    }
    s = t.replace(',', '.');
    usedComma = true;
  }
  if (t.endsWith('%')) {
    fail(where, column, `is ${describeValue(t)}; give an absolute value in the column's unit, not a percentage.`);
  }
  if (!NUMBER_TEXT.test(s)) fail(where, column, `must be a number, but it is ${describeValue(t)}.`);
  return { value: Number(s), usedComma };
}

/** The text cells of one pick row, by column name (as typed or as read from a file). */
export type PickCells = Partial<Record<PickColumn, string>>;

/**
 * Reads one pick from its text cells, the way the CSV parser does, so that a
 * row typed into the app's table meets the same rules. Empty optional cells
 * take their defaults (kind group, mode 0, sd the documented default).
 * Throws InputError naming `where` and the column.
 */
export function pickFromCells(cells: PickCells, where: string, options: PickTextOptions = {}): Pick {
  return pickFromCellsInner(cells, where, options.decimalComma ?? false).pick;
}

function pickFromCellsInner(
  cells: PickCells,
  where: string,
  decimalComma: boolean,
): { pick: Pick; usedComma: boolean } {
  let usedComma = false;
  const num = (column: PickColumn): number | undefined => {
    const text = cells[column];
    if (text === undefined) return undefined;
    const r = parseNumberText(text, where, column, decimalComma);
    usedComma ||= r.usedComma;
    return r.value;
  };
  const hasF = cells.frequency_hz !== undefined;
  const hasT = cells.period_s !== undefined;
  if (hasF === hasT) {
    throw new InputError(
      fieldName(where, 'frequency_hz'),
      `${where.charAt(0).toUpperCase() + where.slice(1)}: give exactly one of frequency_hz and period_s.`,
    );
  }
  const period = hasT ? num('period_s') : undefined;
  const frequency = hasF ? num('frequency_hz') : undefined;
  if (cells.velocity_m_s === undefined || cells.velocity_m_s.trim() === '') {
    fail(where, 'velocity_m_s', 'is empty; give the velocity in m/s.');
  }
  const velocity = num('velocity_m_s');
  const sdText = cells.sd_m_s;
  const sd = sdText === undefined || sdText.trim() === '' ? undefined : num('sd_m_s');

  const kindText = (cells.kind ?? '').trim().toLowerCase();
  if (kindText !== '' && kindText !== 'group' && kindText !== 'phase') {
    fail(where, 'kind', `must be "group" or "phase" (empty means group), but it is ${describeValue(cells.kind)}.`);
  }
  const kind: PickKind = kindText === 'phase' ? 'phase' : 'group';

  const modeText = (cells.mode ?? '').trim();
  if (modeText !== '' && !/^\d+$/.test(modeText)) {
    fail(where, 'mode', `must be a whole number 0 or more (0 = fundamental; empty means 0), but it is ${describeValue(cells.mode)}.`);
  }
  const mode = modeText === '' ? 0 : Number(modeText);

  const waveText = (cells.wave ?? '').trim().toLowerCase();
  if (waveText !== '' && waveText !== 'love' && waveText !== 'rayleigh') {
    fail(where, 'wave', `must be "love" or "rayleigh" (empty means love), but it is ${describeValue(cells.wave)}.`);
  }
  const wave: PickWave | undefined = waveText === '' ? undefined : (waveText as PickWave);

  const text = (column: 'id' | 'note' | 'time'): string | undefined => {
    const v = cells[column];
    return v === undefined || v === '' ? undefined : v;
  };
  const pick = validatePick(
    {
      frequency: frequency as number,
      period,
      velocity: velocity as number,
      kind,
      mode,
      wave,
      sd,
      id: text('id'),
      note: text('note'),
      time: text('time'),
    },
    where,
  );
  return { pick, usedComma };
}

/** One record of the file: its fields, whether each was quoted, and the line it starts on. */
interface CsvRecord {
  fields: string[];
  quoted: boolean[];
  line: number;
}

/**
 * Splits CSV text into records (RFC 4180 §2): fields may be enclosed in
 * double quotes, which may hold separators, line breaks and doubled quotes.
 * CRLF, LF and lone CR all end a record. Stops with an InputError past
 * maxRecords records or on a malformed quote.
 */
function splitRecords(text: string, sep: string, maxRecords: number): CsvRecord[] {
  const records: CsvRecord[] = [];
  let line = 1;
  let i = 0;
  const n = text.length;
  while (i < n) {
    const startLine = line;
    const fields: string[] = [];
    const quoted: boolean[] = [];
    for (;;) {
      // One field.
      if (text.charCodeAt(i) === 34 /* " */) {
        const fieldLine = line;
        i++;
        let value = '';
        let chunk = i;
        for (;;) {
          const q = text.indexOf('"', i);
          if (q < 0) {
            throw new InputError(
              `line ${fieldLine}`,
              `Line ${fieldLine}: a quoted field is never closed; end it with a double quote (write "" for a quote inside it).`,
            );
          }
          for (let k = i; k < q; k++) {
            const ch = text.charCodeAt(k);
            if (ch === 10 || (ch === 13 && text.charCodeAt(k + 1) !== 10)) line++;
          }
          if (text.charCodeAt(q + 1) === 34) {
            value += text.slice(chunk, q + 1);
            i = q + 2;
            chunk = i;
            continue;
          }
          value += text.slice(chunk, q);
          i = q + 1;
          break;
        }
        fields.push(value);
        quoted.push(true);
        if (i < n && text[i] !== sep && text[i] !== '\n' && text[i] !== '\r') {
          throw new InputError(
            `line ${line}`,
            `Line ${line}: text follows a closing quote; put the whole field inside the quotes.`,
          );
        }
      } else {
        let j = i;
        while (j < n) {
          const c = text[j];
          if (c === sep || c === '\n' || c === '\r') break;
          if (c === '"') {
            throw new InputError(
              `line ${line}`,
              `Line ${line}: a double quote appears inside an unquoted field; enclose the field in double quotes and write the quote as "".`,
            );
          }
          j++;
        }
        fields.push(text.slice(i, j));
        quoted.push(false);
        i = j;
      }
      if (i < n && text[i] === sep) {
        i++;
        continue;
      }
      break;
    }
    // End of record.
    if (i < n) {
      if (text[i] === '\r' && text[i + 1] === '\n') i += 2;
      else i += 1;
      line++;
    }
    const record = { fields, quoted, line: startLine };
    if (!isBlank(record)) records.push(record);
    if (records.length > maxRecords) {
      throw new InputError(
        'rows',
        `The picks file has more than ${PICK_LIMITS.maxRows} rows (stopped at line ${startLine}); split it into smaller files.`,
      );
    }
  }
  return records;
}

function isBlank(r: CsvRecord): boolean {
  return r.fields.every((f, k) => !r.quoted[k] && f.trim() === '');
}

// Header names that are not columns but show what was meant.
// A Map, so that a header such as "__proto__" or "constructor" finds no hint.
const HEADER_HINTS: ReadonlyMap<string, string> = new Map(Object.entries({
  frequency: 'give the unit in the name: frequency_hz',
  freq: 'give the unit in the name: frequency_hz',
  f: 'give the unit in the name: frequency_hz',
  frequency_khz: 'frequencies must be in Hz: frequency_hz',
  period: 'give the unit in the name: period_s',
  period_ms: 'periods must be in s: period_s',
  velocity: 'give the unit in the name: velocity_m_s',
  vel: 'give the unit in the name: velocity_m_s',
  velocity_km_s: 'velocities must be in m/s: velocity_m_s (values are not converted)',
  velocity_ft_s: 'velocities must be in m/s: velocity_m_s (values are not converted)',
  sd: 'give the unit in the name: sd_m_s',
  sigma: 'give the unit in the name: sd_m_s',
  sd_km_s: 'standard deviations must be in m/s: sd_m_s',
}));

/** Blank lines and comment lines (# first, after any spaces) at the top of a file, above the header. */
const LEADING_COMMENTS = /^(?:[ \t]*(?:#[^\r\n]*)?(?:\r\n|\n|\r|$))+/;

/** The file's layout, read from its text and header before any row. */
interface PicksFileLayout {
  separator: ',' | ';';
  columns: PickColumn[];
  hasPeriod: boolean;
  dataRecords: CsvRecord[];
}

/**
 * Reads the parts of a picks file that concern the whole file: its size,
 * the CSV records, the separator and the header. Throws an InputError for
 * a problem of the whole file (empty, no header, an unknown, doubled or
 * missing column, too many rows, a broken quote, no picks).
 */
function readPicksLayout(text: string): PicksFileLayout {
  if (typeof text !== 'string') throw new InputError('file', 'The picks file must be text.');
  if (text.length > PICK_LIMITS.maxChars) {
    throw new InputError(
      'file',
      `The picks file has ${text.length} characters, more than the ${PICK_LIMITS.maxChars} limit; split it into smaller files.`,
    );
  }
  // Comment and blank lines above the header are blanked in place, so every line keeps its number.
  const body = (text.charCodeAt(0) === 0xfeff ? text.slice(1) : text).replace(LEADING_COMMENTS, (m) => m.replace(/#[^\r\n]*/g, ''));
  if (body.trim() === '') {
    throw new InputError('file', 'The picks file is empty; it needs a header row (e.g. frequency_hz,velocity_m_s) and at least one pick.');
  }

  // The separator comes from the header row (its first line outside quotes).
  const firstLine = body.replace(/^(?:[ \t]*(?:\r\n|\n|\r))+/, '').split(/\r\n|\n|\r/, 1)[0];
  const missingHeader = (line: number) =>
    new InputError(
      'header',
      `Line ${line}: the first row must be a header naming the columns (e.g. frequency_hz,velocity_m_s), but it holds numbers.`,
    );
  if (firstLine.split(/[,;]/).some((t) => NUMBER_TEXT.test(t.trim().replace(/^"(.*)"$/, '$1')))) {
    throw missingHeader(body.slice(0, body.indexOf(firstLine)).split(/\r\n|\n|\r/).length);
  }
  const commas = (firstLine.match(/,/g) ?? []).length;
  const semis = (firstLine.match(/;/g) ?? []).length;
  if (commas > 0 && semis > 0) {
    throw new InputError(
      'header',
      'The header row mixes commas and semicolons; separate all columns with one of them.',
    );
  }
  const separator: ',' | ';' = semis > 0 ? ';' : ',';

  const records = splitRecords(body, separator, PICK_LIMITS.maxRows + 1);
  if (records.length === 0) {
    throw new InputError('header', 'The picks file has no header row; the first row must name the columns (e.g. frequency_hz,velocity_m_s).');
  }
  const headerRecord = records[0];
  const dataRecords = records.slice(1);
  if (dataRecords.length > PICK_LIMITS.maxRows) {
    throw new InputError(
      'rows',
      `The picks file has more than ${PICK_LIMITS.maxRows} rows; split it into smaller files.`,
    );
  }

  // Header.
  const header = headerRecord.fields.map((h) => h.trim().toLowerCase());
  const headerLine = headerRecord.line;
  if (header.some((h) => NUMBER_TEXT.test(h.replace(',', '.')))) throw missingHeader(headerLine);
  const columns: PickColumn[] = [];
  const seen = new Set<string>();
  header.forEach((h, k) => {
    if (h === '') {
      throw new InputError('header', `Line ${headerLine}: header column ${k + 1} is empty; name every column.`);
    }
    if (!(PICK_COLUMNS as readonly string[]).includes(h)) {
      const hint = HEADER_HINTS.get(h);
      const shown = describeValue(headerRecord.fields[k].trim());
      throw new InputError(
        'header',
        `Line ${headerLine}: unknown column ${shown}` +
          (hint ? `; ${hint}.` : `. Known columns: ${PICK_COLUMNS.join(', ')}.`),
      );
    }
    if (seen.has(h)) throw new InputError('header', `Line ${headerLine}: the column ${h} appears twice.`);
    seen.add(h);
    columns.push(h as PickColumn);
  });
  const hasF = seen.has('frequency_hz');
  const hasT = seen.has('period_s');
  if (hasF && hasT) {
    throw new InputError('header', `Line ${headerLine}: give frequency_hz or period_s, not both.`);
  }
  if (!hasF && !hasT) {
    throw new InputError('header', `Line ${headerLine}: the required column frequency_hz (or period_s) is missing.`);
  }
  if (!seen.has('velocity_m_s')) {
    throw new InputError('header', `Line ${headerLine}: the required column velocity_m_s is missing.`);
  }
  if (dataRecords.length === 0) {
    throw new InputError('rows', 'The picks file has a header but no picks; add at least one row.');
  }
  return { separator, columns, hasPeriod: hasT, dataRecords };
}

/** The good rows of a picks file, with where each came from. */
interface PicksRows {
  picks: Pick[];
  /** "row 3 (line 4)" for each pick. */
  wheres: string[];
  /** The data row (1-based) and the line of each pick. */
  rows: number[];
  lines: number[];
  defaultedSd: number;
  decimalComma: boolean;
}

/**
 * Reads every data row through pickFromCells's rules (validatePick). A bad
 * row is handed to onProblem with its InputError, its 1-based row number,
 * its line and its `where` text, and left out; onProblem may throw to stop.
 */
function readPicksRows(
  layout: PicksFileLayout,
  onProblem: (error: InputError, row: number, line: number, where: string) => void,
): PicksRows {
  const { separator, columns } = layout;
  const out: PicksRows = { picks: [], wheres: [], rows: [], lines: [], defaultedSd: 0, decimalComma: false };
  layout.dataRecords.forEach((rec, r) => {
    const where = `row ${r + 1} (line ${rec.line})`;
    let read: { pick: Pick; usedComma: boolean };
    try {
      read = pickFromRecord(rec, columns, separator, where);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      onProblem(e, r + 1, rec.line, where);
      return;
    }
    out.decimalComma ||= read.usedComma;
    if (read.pick.sd === undefined) out.defaultedSd++;
    out.picks.push(read.pick);
    out.wheres.push(where);
    out.rows.push(r + 1);
    out.lines.push(rec.line);
  });
  return out;
}

/** Reads one data record as a pick: its field count, field lengths, then pickFromCells's rules. */
function pickFromRecord(
  rec: CsvRecord,
  columns: readonly PickColumn[],
  separator: ',' | ';',
  where: string,
): { pick: Pick; usedComma: boolean } {
  const comment = !rec.quoted[0] && rec.fields[0].trimStart().startsWith('#') ? ' A line starting with # is a comment only above the header row.' : '';
  if (rec.fields.length < columns.length) {
    fail(where, columns[rec.fields.length], `is missing: the row has ${rec.fields.length} fields but the header names ${columns.length} columns.${comment}`);
  }
  if (rec.fields.length > columns.length) {
    const hint =
      separator === ',' ? ' If a number uses a decimal comma, separate the columns with semicolons instead.' : '';
    fail(
      where,
      columns[columns.length - 1],
      `is followed by ${rec.fields.length - columns.length} extra field(s); the header names ${columns.length} columns.${hint}${comment}`,
    );
  }
  const cells: PickCells = {};
  columns.forEach((c, k) => {
    const value = rec.fields[k];
    const limit = c === 'note' ? PICK_LIMITS.maxNoteLength : PICK_LIMITS.maxFieldLength;
    if (value.length > limit) fail(where, c, `is ${value.length} characters long; the limit is ${limit}.`);
    // Unquoted text is trimmed; quoted text is kept exactly.
    cells[c] = rec.quoted[k] ? value : value.trim();
  });
  return pickFromCellsInner(cells, where, separator === ';');
}

function parseResult(layout: PicksFileLayout, rows: PicksRows): PicksParseResult {
  return {
    picks: rows.picks,
    defaultedSd: rows.defaultedSd,
    sdNote: rows.defaultedSd > 0 ? defaultSdNote(rows.defaultedSd, rows.picks.length) : '',
    separator: layout.separator,
    decimalComma: rows.decimalComma,
    unit: layout.hasPeriod ? 'period' : 'frequency',
  };
}

/**
 * Reads a picks CSV file (see the file header for the format). Throws an
 * InputError for the first bad row, naming the data row (1-based, header
 * not counted), its line in the file and the column; nothing is returned in
 * part. Picks with no sd_m_s take DEFAULT_SD_FRACTION of their velocity
 * (common practice); the result counts them and carries a note saying so.
 * checkPicksCsv reads the same way and lists every bad row instead.
 */
export function parsePicksCsv(text: string): PicksParseResult {
  const layout = readPicksLayout(text);
  const rows = readPicksRows(layout, (error) => {
    throw error;
  });
  checkPickSet(rows.picks, (i) => rows.wheres[i]);
  return parseResult(layout, rows);
}

/**
 * How many problems checkPicksCsv lists one by one; the rest are counted.
 * Common practice (enough to fix a file in one pass without a wall of text).
 */
export const PICK_PROBLEMS_LISTED = 50;

/** One problem found in a picks file. */
export interface PickProblem {
  /** The data row, 1-based (header not counted); 0 for a problem of the whole file or its header. */
  row: number;
  /** The line of the file the row starts on; for a whole-file problem the line it names, else 0. */
  line: number;
  /** The column at fault, e.g. "velocity_m_s"; '' for a problem of the whole file or its header. */
  column: string;
  /** The field as parsePicksCsv's InputError names it, e.g. "row 2 (line 3), velocity_m_s". */
  field: string;
  /** A full sentence naming the row, its line and the column: parsePicksCsv's message for it. */
  message: string;
}

/** Options of checkPicksCsv. */
export interface PicksCheckOptions {
  /** The most problems to list; further ones are only counted (moreProblems). A whole number ≥ 1. @default PICK_PROBLEMS_LISTED (50) */
  maxProblems?: number;
}

/** What checkPicksCsv found. */
export interface PicksCheck {
  /** The file read in full when it has no problem, exactly as parsePicksCsv reads it; null when it has any (nothing in part). */
  parsed: PicksParseResult | null;
  /**
   * The problems in row order, at most maxProblems, one per bad row: the
   * first rule the row breaks, or the earlier row whose frequency (same kind
   * and mode) or id it repeats. A problem of the whole file comes alone.
   */
  problems: PickProblem[];
  /** How many further bad rows were found beyond those listed (0 when all are listed). */
  moreProblems: number;
}

/**
 * Reads a picks CSV file like parsePicksCsv, but checks every row and
 * reports every bad one instead of stopping at the first: the same rules
 * (pickFromCells, validatePick, the repeated-frequency and id checks) run
 * for each row, and the first problem listed is the one parsePicksCsv
 * throws when no problem comes from repeats. A problem of the whole file
 * (empty, no header, a bad header, a broken quote, too many rows) stops the
 * reading and is the only one listed. Never throws for bad file text.
 */
export function checkPicksCsv(text: string, options: PicksCheckOptions = {}): PicksCheck {
  const max = options.maxProblems ?? PICK_PROBLEMS_LISTED;
  if (!Number.isInteger(max) || max < 1) {
    throw new InputError('maxProblems', `maxProblems must be a whole number 1 or more, but it is ${describeValue(max)}.`);
  }
  let layout: PicksFileLayout;
  try {
    layout = readPicksLayout(text);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const line = /^Line (\d+):/.exec(e.message);
    return {
      parsed: null,
      problems: [{ row: 0, line: line ? Number(line[1]) : 0, column: '', field: e.field, message: e.message }],
      moreProblems: 0,
    };
  }
  const problemOf = (error: InputError, row: number, line: number, where: string): PickProblem => {
    const column = error.field.startsWith(`${where}, `) ? error.field.slice(where.length + 2) : '';
    return { row, line, column, field: error.field, message: error.message };
  };
  let count = 0;
  const rowProblems: PickProblem[] = [];
  const rows = readPicksRows(layout, (error, row, line, where) => {
    count++;
    if (rowProblems.length < max) rowProblems.push(problemOf(error, row, line, where));
  });
  const setProblems: PickProblem[] = [];
  for (const { index, error } of pickSetProblems(rows.picks, (i) => rows.wheres[i])) {
    count++;
    if (setProblems.length < max) setProblems.push(problemOf(error, rows.rows[index], rows.lines[index], rows.wheres[index]));
  }
  if (count === 0) return { parsed: parseResult(layout, rows), problems: [], moreProblems: 0 };
  // Both lists are in row order and each holds its first `max`, so the first `max` of the merge are the first overall.
  const problems = [...rowProblems, ...setProblems].sort((a, b) => a.row - b.row).slice(0, max);
  return { parsed: null, problems, moreProblems: count - problems.length };
}

/** The sentence that ends a capped problem list: "…and 12 more rows have problems." */
export function morePickProblemsNote(count: number): string {
  return count === 1 ? '…and 1 more row has a problem.' : `…and ${count} more rows have problems.`;
}

/** How picksToCsv writes a file. */
export interface PicksCsvOptions {
  /** Column separator. @default ',' */
  separator?: ',' | ';';
  /** Write numbers with a decimal comma (needs separator ';'). @default false */
  decimalComma?: boolean;
  /** Line ending (RFC 4180 uses CRLF). @default '\r\n' */
  lineEnding?: '\r\n' | '\n';
  /**
   * For a spreadsheet, not for reading back: text cells (id, note, time) get
   * an apostrophe wherever they could start a formula
   * (core/shared/spreadsheet-text.ts). @default false
   */
  forSpreadsheet?: boolean;
}

/**
 * Writes picks as a picks CSV file that parsePicksCsv reads back exactly.
 * The first line is the caution as a comment ("# " + CAUTION), which the
 * reader skips. Numbers use JavaScript's shortest round-trip text. The abscissa column is
 * period_s when every pick was entered as a period, else frequency_hz (a
 * pick entered as a period then loses only its period field). id, note and
 * time columns appear when any pick has them; the wave column when any pick
 * states its wave (an empty cell reads back as Love). Text is written as given,
 * quoted when it holds a separator, quote, line break or edge spaces;
 * nothing in it is interpreted. Text starting with = + - @ is not altered
 * (that would break the exact round trip), so a spreadsheet may treat it as
 * a formula; tables meant for spreadsheets should guard such cells.
 */
export function picksToCsv(picks: readonly Pick[], options: PicksCsvOptions = {}): string {
  const separator = options.separator ?? ',';
  const decimalComma = options.decimalComma ?? false;
  const eol = options.lineEnding ?? '\r\n';
  if (decimalComma && separator !== ';') {
    throw new InputError('decimalComma', 'decimalComma needs the semicolon separator; a comma cannot be both.');
  }
  const usePeriod = picks.length > 0 && picks.every((p) => p.period !== undefined);
  const columns: PickColumn[] = [usePeriod ? 'period_s' : 'frequency_hz', 'velocity_m_s', 'sd_m_s', 'kind', 'mode'];
  if (picks.some((p) => p.wave !== undefined)) columns.push('wave');
  for (const c of ['id', 'note', 'time'] as const) {
    if (picks.some((p) => p[c] !== undefined && p[c] !== '')) columns.push(c);
  }
  const num = (x: number | undefined): string => {
    if (x === undefined) return '';
    const s = String(x);
    return decimalComma ? s.replace('.', ',') : s;
  };
  const quote = (s: string | undefined): string => {
    if (s === undefined) return '';
    const needs = s.includes(separator) || /["\r\n]/.test(s) || s !== s.trim() || s === '';
    return needs ? `"${s.replace(/"/g, '""')}"` : s;
  };
  const lines = [`# ${CAUTION}`, columns.join(separator)];
  for (const p of picks) {
    const cells = columns.map((c) => {
      switch (c) {
        case 'frequency_hz':
          return num(p.frequency);
        case 'period_s':
          return num(p.period);
        case 'velocity_m_s':
          return num(p.velocity);
        case 'sd_m_s':
          return num(p.sd);
        case 'kind':
          return p.kind;
        case 'mode':
          return String(p.mode);
        case 'wave':
          return p.wave ?? '';
        default: {
          const text = p[c] === '' ? undefined : p[c];
          return quote(text !== undefined && options.forSpreadsheet ? spreadsheetSafeText(text) : text);
        }
      }
    });
    lines.push(cells.join(separator));
  }
  return lines.join(eol) + eol;
}

/**
 * Reads traces from a CSV text (RFC 4180; comma, semicolon or tab between
 * cells; a cell may be wrapped in double quotes; semicolon files may use a
 * decimal comma, as spreadsheets in many countries write them): the first
 * column is time in seconds,
 * each further column one trace. A first row whose first cell is not a
 * number is a header; its other cells, when all are numbers, are the
 * receivers' offsets in metres (otherwise the offsets are unknown and asked
 * for). Lines starting with # are comments. The times must rise evenly: the
 * sample interval is their mean step, the delay the first time.
 *
 * Every failure is one InputError naming the row and column (rows counted
 * from 1, as a spreadsheet shows them).
 */
import { InputError } from '../shared/errors';
import { MAX_ABS_DELAY_S, withGeometryQuestions, type Recording } from './recording';

/** Most trace columns read (common practice: a seismograph records at most a few hundred channels; keeps per-trace overhead small next to the file). */
export const MAX_CSV_TRACES = 10_000;
/** Relative tolerance on the even spacing of the time column (common practice: times printed to 4–6 digits). */
const STEP_TOLERANCE = 0.01;

function fail(where: string, message: string): never {
  throw new InputError(where, message);
}

/** The bytes as Latin-1 text, without a UTF-8 byte-order mark (numbers are ASCII; other characters only appear in messages). */
export function textOfBytes(bytes: Uint8Array): string {
  let s = '';
  const chunk = 8192;
  for (let i = 0; i < bytes.length; i += chunk) s += String.fromCharCode(...bytes.subarray(i, i + chunk));
  return s.charCodeAt(0) === 0xef && s.charCodeAt(1) === 0xbb && s.charCodeAt(2) === 0xbf ? s.slice(3) : s;
}

/**
 * Whether the first 4 kB look like text: no NUL or control bytes other than
 * tab, CR and LF, and at least 90 % ASCII (numbers and separators are ASCII;
 * a few accented letters in a header are fine).
 */
export function looksLikeText(bytes: Uint8Array): boolean {
  const n = Math.min(bytes.length, 4096);
  if (n === 0) return false;
  let high = 0;
  for (let i = 0; i < n; i++) {
    const b = bytes[i];
    if (b < 0x20 && b !== 0x09 && b !== 0x0a && b !== 0x0d) return false;
    if (b >= 0x7f) high++;
  }
  return high <= 0.1 * n;
}

function delimiterOf(line: string): string {
  if (line.includes('\t')) return '\t';
  if (line.includes(';')) return ';';
  return ',';
}

/** A cell's number: surrounding double quotes are dropped; in semicolon files a decimal comma is read as a point. */
function cellNumber(cell: string, decimalComma = false): number {
  let t = cell.trim();
  if (t.length >= 2 && t.startsWith('"') && t.endsWith('"')) t = t.slice(1, -1).trim();
  if (decimalComma) t = t.replace(',', '.');
  return t === '' ? NaN : Number(t);
}

/** Reads CSV traces. Throws an InputError naming the row and column for a bad cell. */
export function readCsvTraces(text: string, name: string): Recording {
  const lines = text.split(/\r\n|\n|\r/);
  const rows: { line: number; text: string }[] = [];
  lines.forEach((l, i) => {
    if (l.trim() !== '' && !l.trimStart().startsWith('#')) rows.push({ line: i + 1, text: l });
  });
  if (rows.length === 0) fail('file', `"${name}" holds no rows of numbers.`);
  const delimiter = delimiterOf(rows[0].text);
  const decimalComma = delimiter === ';';
  let first = rows[0].text.split(delimiter);
  let offsets: Float64Array | null = null;
  let dataStart = 0;
  const warnings: string[] = [];
  if (!Number.isFinite(cellNumber(first[0], decimalComma))) {
    const timeName = first[0].trim();
    if (/(^|[^a-z])ms([^a-z]|$)|millisec/i.test(timeName)) {
      fail('row 1, column 1', `The time column must be in seconds, but its header says ${JSON.stringify(timeName.slice(0, 40))}.`);
    }
    const heads = first.slice(1).map((c) => cellNumber(c, decimalComma));
    if (heads.length > 0 && heads.every(Number.isFinite)) offsets = Float64Array.from(heads);
    else warnings.push('The header row does not give the offsets as numbers (metres); they are unknown.');
    dataStart = 1;
    if (rows.length < 2) fail('file', `"${name}" has a header row but no rows of numbers.`);
    first = rows[1].text.split(delimiter);
  }
  const columns = first.length;
  const traceCount = columns - 1;
  if (traceCount < 1) fail('row 1', `Row ${rows[dataStart].line} has ${columns} column; a trace file needs a time column and at least one trace column.`);
  if (traceCount > MAX_CSV_TRACES) {
    fail(`row ${rows[dataStart].line}`, `Row ${rows[dataStart].line} has ${traceCount} trace columns; at most ${MAX_CSV_TRACES} are read.`);
  }
  if (offsets && offsets.length !== traceCount) {
    fail('row 1', `The header row gives ${offsets.length} offsets, but row ${rows[dataStart].line} has ${traceCount} trace columns.`);
  }
  const n = rows.length - dataStart;
  if (n < 2) fail('file', `"${name}" has ${n} row of samples; a trace needs at least 2.`);
  const times = new Float64Array(n);
  const traces = Array.from({ length: traceCount }, () => new Float64Array(n));
  for (let r = 0; r < n; r++) {
    const row = rows[dataStart + r];
    const cells = row.text.split(delimiter);
    if (cells.length !== columns) fail(`row ${row.line}`, `Row ${row.line} has ${cells.length} columns, but the rows above have ${columns}.`);
    for (let c = 0; c < columns; c++) {
      const v = cellNumber(cells[c], decimalComma);
      if (!Number.isFinite(v)) {
        const shown = cells[c].trim().slice(0, 40);
        fail(`row ${row.line}, column ${c + 1}`, `Row ${row.line}, column ${c + 1}: ${JSON.stringify(shown)} is not a number.`);
      }
      if (c === 0) times[r] = v;
      else traces[c - 1][r] = v;
    }
  }
  // The mean step, to 12 significant digits: times printed in a CSV carry fewer, and the rounding keeps 0.002 from printing as 0.0020000000000000018.
  const dt = Number(((times[n - 1] - times[0]) / (n - 1)).toPrecision(12));
  if (!(dt > 0)) fail('column 1', `The times in column 1 must rise, but they run from ${times[0]} s to ${times[n - 1]} s.`);
  for (let r = 1; r < n; r++) {
    const step = times[r] - times[r - 1];
    if (Math.abs(step - dt) > STEP_TOLERANCE * dt) {
      fail(`row ${rows[dataStart + r].line}, column 1`, `Row ${rows[dataStart + r].line}: the time steps by ${step} s, but the record's sample interval is ${dt} s; the times must be evenly spaced.`);
    }
  }
  if (!(Math.abs(times[0]) <= MAX_ABS_DELAY_S)) fail('column 1', `The first time is ${times[0]} s; it must lie within ±${MAX_ABS_DELAY_S} s.`);
  return withGeometryQuestions({
    format: 'csv',
    name,
    sampleInterval: dt,
    samples: n,
    delay: times[0],
    traces,
    offsets: offsets ?? new Float64Array(traceCount).fill(NaN),
    component: 'unknown',
    sources: null,
    receivers: null,
    warnings,
  });
}

/** A CSV text of a recording's traces in the form readCsvTraces reads (time in s, a header of offsets in m). */
export function csvOfTraces(rec: Pick<Recording, 'sampleInterval' | 'delay' | 'traces' | 'offsets'>): string {
  const head = ['time_s', ...Array.from(rec.offsets, (o) => (Number.isFinite(o) ? String(o) : 'unknown'))].join(',');
  const lines = [head];
  const n = rec.traces[0]?.length ?? 0;
  for (let i = 0; i < n; i++) {
    const row = [String(rec.delay + i * rec.sampleInterval)];
    for (const t of rec.traces) row.push(String(t[i]));
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}

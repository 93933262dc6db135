/**
 * The one bound every side keeps on a stored record: how deeply its JSON
 * nests and how long its compact JSON is. The office server (push), the
 * tablet (pull and its store), bundle files (reading and writing) and the
 * office store all apply it, so neither end accepts a record the other
 * cannot keep (an IndexedDB write, a structured clone or a recursive
 * JSON.stringify can fail on very deep values, and the maximum depth they
 * manage depends on the process's stack).
 *
 * Depth counts containers: the record object itself is level 1, its
 * `settings` object level 2, `conflicts[0].record.summary` level 5. Real
 * records stay below 10; the bound leaves room to spare. Both checks walk
 * the value without recursion, so a hostile value of any depth is refused
 * with a sentence instead of overflowing the stack.
 *
 * Limits chosen for this tool (common practice: bound every input).
 */
import { InputError } from '../shared/errors';

/** Deepest nesting of arrays and objects in one record (the record itself is level 1). */
export const MAX_RECORD_DEPTH = 32;
/** Longest record, in characters of compact JSON (256 Ki; a pick is about 300, an estimate a few thousand). */
export const MAX_RECORD_CHARS = 256 * 1024;

/**
 * The nesting depth of a JSON value (0 for a number, string, boolean or
 * null; 1 for an empty object or list), but stops counting once `limit` is
 * passed and returns `limit + 1`. No recursion.
 */
export function jsonDepth(value: unknown, limit = Number.MAX_SAFE_INTEGER): number {
  if (value === null || typeof value !== 'object') return 0;
  let deepest = 0;
  const stack: [unknown, number][] = [[value, 1]];
  while (stack.length > 0) {
    const [v, d] = stack.pop()!;
    if (d > deepest) {
      deepest = d;
      if (deepest > limit) return limit + 1;
    }
    const children = Array.isArray(v) ? v : Object.values(v as object);
    for (const c of children) if (c !== null && typeof c === 'object') stack.push([c, d + 1]);
  }
  return deepest;
}

/** How a message names a record: `estimate "abc-1" (records[4])`, `estimate "abc-1"` without `where`, `record records[4]` without an id. */
export function recordLabel(value: unknown, where: string): string {
  const v = value as { type?: unknown; id?: unknown } | null;
  const type = typeof v?.type === 'string' && /^[a-z]{1,20}$/.test(v.type) ? v.type : 'record';
  const id = typeof v?.id === 'string' ? JSON.stringify(v.id.length > 100 ? `${v.id.slice(0, 100)}…` : v.id) : undefined;
  if (id === undefined) return `record ${where || '(no id)'}`;
  return where ? `${type} ${id} (${where})` : `${type} ${id}`;
}

/**
 * Checks one record against the depth and size bounds; `where` names its
 * place in the message (e.g. "records[4]"; '' for none). Throws an InputError whose message names
 * the record (its place, type and id) and the bound. Returns the length of
 * its compact JSON.
 */
export function checkRecordLimits(value: unknown, where: string): number {
  const depth = jsonDepth(value, MAX_RECORD_DEPTH);
  if (depth > MAX_RECORD_DEPTH) {
    throw new InputError(
      where || 'record',
      `The ${recordLabel(value, where)} nests deeper than ${MAX_RECORD_DEPTH} levels of lists and objects, more than Shearfield keeps; it was refused.`,
    );
  }
  const chars = JSON.stringify(value)?.length ?? 0;
  if (chars > MAX_RECORD_CHARS) {
    throw new InputError(
      where || 'record',
      `The ${recordLabel(value, where)} is ${chars} characters of JSON, more than the ${MAX_RECORD_CHARS}-character limit for one record; it was refused.`,
    );
  }
  return chars;
}

/**
 * Checks a whole document (a push body, a bundle) before any recursive step
 * touches it: its depth may exceed a record's by `wrapperLevels` (the body
 * object and its list). Throws an InputError on `field` when it is deeper;
 * the records inside are then checked one by one with checkRecordLimits so
 * the message can name the record.
 */
export function checkDocumentDepth(value: unknown, wrapperLevels: number, field: string, what: string): void {
  const limit = MAX_RECORD_DEPTH + wrapperLevels;
  if (jsonDepth(value, limit) > limit) {
    throw new InputError(field, `${what} nests deeper than ${limit} levels of lists and objects (${MAX_RECORD_DEPTH} for one record); it was refused.`);
  }
}

/** Number formatting for display: units are always written by the caller, beside the number. */

/** A number with `digits` significant figures, no trailing zeros; an en dash when not finite. */
export function num(x: number | undefined, digits = 3): string {
  if (x === undefined || !Number.isFinite(x)) return '–';
  if (Math.abs(x) >= 10 ** digits) return Math.round(x).toString();
  return String(Number(x.toPrecision(digits)));
}

/** "a–b" with shared precision. */
export function span(lo: number, hi: number, digits = 3): string {
  return `${num(lo, digits)}–${num(hi, digits)}`;
}

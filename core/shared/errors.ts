/**
 * Bad input is reported once, from one validation step, as an InputError
 * whose message is a full sentence naming the field and the reason.
 * Out-of-domain maths returns NaN or an empty result instead, and solvers
 * that do not converge return an outcome (see roots.ts), never an error.
 */
export class InputError extends Error {
  /** The field at fault, in the caller's own words, e.g. `layers[1].vs_m_s` or `row 4, velocity_m_s`. */
  readonly field: string;

  constructor(field: string, message: string) {
    super(message);
    this.name = 'InputError';
    this.field = field;
  }
}

/** Describes a value for an error message without echoing huge or hostile text. */
export function describeValue(value: unknown): string {
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') {
    const shown = value.length > 40 ? `${value.slice(0, 40)}…` : value;
    return JSON.stringify(shown);
  }
  if (value === null) return 'null';
  if (value === undefined) return 'nothing';
  if (Array.isArray(value)) return 'a list';
  return `a ${typeof value}`;
}

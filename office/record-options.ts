/**
 * Reading a record file named on the command line, with the geometry the
 * user gives in options (--offsets FIRST:SPACING, --delay S, --component C).
 * Kept outside office/commands/, where office/cli.ts loads every file as a
 * command. Every failure is an InputError naming the file or option.
 */
import { readFileSync } from 'node:fs';
import { readRecording } from '../core/recordings/read';
import { COMPONENTS, type Component, type GeometryOverrides, type Recording } from '../core/recordings/recording';
import { InputError } from '../core/shared/errors';
import { unreadableBecause } from './cli-options';

export const RECORD_OPTIONS = {
  offsets: { type: 'string' },
  delay: { type: 'string' },
  component: { type: 'string' },
} as const;

export const RECORD_OPTIONS_HELP = `  --offsets FIRST:SPACING
                         Offset of the first receiver from the source and the
                         receiver spacing, m, e.g. --offsets 5:2; trace k then
                         lies at FIRST + (k − 1) × SPACING. Replaces the file's.
  --delay S              Time of the first sample after the source fired, s
                         (negative for a pre-trigger record). Replaces the file's.
  --component C          ${COMPONENTS.join(', ')}. Replaces the file's.`;

export interface RecordValues {
  offsets?: string;
  delay?: string;
  component?: string;
}

function number(text: string, field: string, what: string, unit: string): number {
  const t = text.trim();
  const v = t === '' ? NaN : Number(t);
  if (!Number.isFinite(v)) throw new InputError(field, `${field} ${what} must be a number of ${unit}, but it is "${t}".`);
  return v;
}

/** The overrides the options give; a malformed value throws an InputError naming the option. */
export function overridesOf(values: RecordValues): GeometryOverrides {
  const o: GeometryOverrides = {};
  if (values.offsets !== undefined) {
    const parts = values.offsets.split(':');
    if (parts.length !== 2) throw new InputError('--offsets', `--offsets must be FIRST:SPACING in metres, e.g. 5:2, but it is "${values.offsets}".`);
    o.offsets = { first: number(parts[0], '--offsets', 'FIRST', 'metres'), spacing: number(parts[1], '--offsets', 'SPACING', 'metres') };
  }
  if (values.delay !== undefined) o.delay = number(values.delay, '--delay', 'S', 'seconds');
  if (values.component !== undefined) {
    const c = values.component.trim().toLowerCase();
    if (!COMPONENTS.includes(c as Component)) {
      throw new InputError('--component', `--component must be one of ${COMPONENTS.join(', ')}, but it is "${values.component}".`);
    }
    o.component = c as Component;
  }
  return o;
}

/** The one record path among the positional arguments; none or several throw an InputError. */
export function oneRecordFile(positionals: readonly string[], example: string): string {
  if (positionals.length !== 1) {
    throw new InputError(
      'FILE',
      positionals.length === 0 ? `Give one record file (SEG-Y, SEG-2 or CSV traces), e.g. ${example}.` : `Give exactly one record file, but ${positionals.length} were given.`,
    );
  }
  return positionals[0];
}

/**
 * Reads the record file at `path` with the options' overrides applied. An
 * unreadable file, a bad file or a bad option value is an InputError whose
 * message names the file or the option; the override names map to options.
 */
export function readRecordFile(path: string, values: RecordValues): Recording {
  const overrides = overridesOf(values);
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    throw new InputError('FILE', `The record file "${path}" ${unreadableBecause(e)}.`);
  }
  const name = path.split(/[\\/]/).pop() || path;
  try {
    return readRecording(bytes, name, overrides);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const option = { 'offsets.first': '--offsets', 'offsets.spacing': '--offsets', delay: '--delay', component: '--component' }[e.field];
    if (option) throw new InputError(option, `${option}: ${e.message}`);
    throw new InputError(e.field, `The record file "${name}" cannot be read: ${e.message}`);
  }
}

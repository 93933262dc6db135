/** A test helper for bad-input checks. */
import { expect } from 'vitest';
import { InputError } from '../core/shared/errors';

/** Runs fn, expects it to throw an InputError, and returns that error (for checking its field and message). */
export function inputError(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('expected an InputError, but nothing was thrown');
}

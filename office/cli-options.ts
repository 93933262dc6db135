/**
 * Helpers shared by the subcommands in office/commands/: reading the files
 * named on the command line and the live records of the office store, each
 * turning a failure into an InputError that names the field. Kept outside
 * office/commands/, where office/cli.ts loads every file as a command.
 */
import { readFileSync } from 'node:fs';
import { InputError } from '../core/shared/errors';
import { modelFromJson, type LayeredModel } from '../core/dispersion/model';
import type { PickRecord, SiteRecord } from '../core/exchange/records';
import { OfficeStore } from './store';

/** Why a file could not be read, as the end of a sentence: "does not exist", "is a folder, not a file", … */
export function unreadableBecause(e: unknown): string {
  const code = (e as { code?: string }).code;
  return code === 'ENOENT'
    ? 'does not exist'
    : code === 'EISDIR'
      ? 'is a folder, not a file'
      : code === 'EACCES'
        ? 'cannot be read (permission denied)'
        : `cannot be read (${code ?? 'unknown error'})`;
}

/**
 * The text of a file named on the command line. A file that cannot be read
 * throws an InputError on `field`: `The ${what} file "PATH" does not exist.`
 * (or is a folder, or cannot be read, with the reason).
 */
export function readTextFile(path: string, field: string, what: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    throw new InputError(field, `The ${what} file "${path}" ${unreadableBecause(e)}.`);
  }
}

/**
 * A layered model read from a MODEL.json file (core/dispersion/model.ts modelFromJson).
 * Every failure, unreadable file, bad JSON or invalid model, is an
 * InputError that names the file.
 */
export function readModelFile(path: string): LayeredModel {
  const text = readTextFile(path, 'MODEL.json', 'model');
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    const detail = (e as Error).message.split('\n')[0];
    throw new InputError('MODEL.json', `The model file "${path}" is not valid JSON (${detail}).`);
  }
  try {
    return modelFromJson(json);
  } catch (e) {
    if (e instanceof InputError) {
      throw new InputError(e.field, `The model file "${path}" is invalid: ${e.message}`);
    }
    throw e;
  }
}

/**
 * The one MODEL.json path among the positional arguments; none or several
 * throw an InputError, the former showing `example` (a whole command line).
 */
export function oneModelPath(positionals: readonly string[], example: string): string {
  if (positionals.length !== 1) {
    throw new InputError(
      'MODEL.json',
      positionals.length === 0 ? `Give one model file, e.g. ${example}.` : `Give exactly one model file, but ${positionals.length} were given.`,
    );
  }
  return positionals[0];
}

/** The sites and picks of the office store in `dataDir` that are not deleted, in store order. */
export function liveSitesAndPicks(dataDir: string): { sites: SiteRecord[]; picks: PickRecord[] } {
  const store = OfficeStore.open(dataDir);
  let records;
  try {
    records = store.allRecords();
  } finally {
    store.close();
  }
  return {
    sites: records.filter((r): r is SiteRecord => r.type === 'site' && !r.deleted),
    picks: records.filter((r): r is PickRecord => r.type === 'pick' && !r.deleted),
  };
}

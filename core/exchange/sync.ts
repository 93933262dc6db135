/**
 * The merge rules: what happens when a version of a record arrives where
 * another version of it is already stored. One set of rules, used by the
 * office store (sync pushes and bundle imports), the field app (pulls and
 * bundle imports) and the tests. Pure: no I/O, no clock.
 *
 * Identity (core/exchange/revision.ts): every version is named by its revision key
 * `"<rev>-<hash>"` (rev counter + FNV-1a 64 content hash), so two tablets
 * that both make "rev 3 from rev 2" give two different keys. A version's
 * `history` lists the keys it was made from (set by `nextRevision`).
 *
 * The rules, for a stored record S (with any kept conflicts) and an incoming
 * version I of the same id:
 *
 * 1. Nothing stored: **accept** I.
 * 2. I has the same key as S (or as one of S's kept conflicts): **ignore**;
 *    the same push or bundle twice changes nothing (idempotent).
 * 3. I's key is in the history of S (or of a kept conflict): I is older;
 *    **ignore**. A newer revision is never overwritten by an older one.
 * 4. S's key is in I's history: I was made from S; **accept** I.
 * 5. Otherwise I and S were made side by side (typically two devices from
 *    the same base revision): **conflict**. Both are kept. The record shows
 *    one of them, chosen the same way everywhere (higher rev, then later
 *    `updatedAt`, then larger key), and carries the other in `conflicts`
 *    for review. Kept conflicts are only ever removed by a revision that
 *    supersedes them (see `resolveConflict`), so nothing is dropped.
 *
 * Fallback for versions saved without lineage (rev ≥ 2 but no `history`,
 * e.g. written by an older app): such a version supersedes any version with
 * a lower rev, and is superseded by one with a higher rev; equal revs with
 * different content are a conflict. Lineage longer than HISTORY_LIMIT edits
 * made offline in one go can turn a plain update into a kept conflict; that
 * is safe (nothing is lost) and a reviewer clears it.
 *
 * The rules are applied to the set of all versions involved at once (S, S's
 * conflicts, I, I's conflicts): versions superseded by another one drop
 * out, the rest are the record and its conflicts. This makes the result
 * independent of arrival order, so every replica converges on the same
 * record, and merging the result again changes nothing.
 */
import { InputError } from '../shared/errors';
import type { AnyRecord, ConflictVersion } from './records';
import { historyAfter, revisionKey } from './revision';

export type MergeAction = 'accept' | 'ignore' | 'conflict';

/** What merging one incoming version did. */
export interface MergeResult<T extends AnyRecord> {
  action: MergeAction;
  /** Why, in plain words (shown in sync reports and import messages). */
  reason: string;
  /** The record to keep: the stored one when nothing changed. */
  record: T;
  /** True when `record` differs from what was stored and must be written. */
  changed: boolean;
}

/** @see mergeRecord */
export interface MergeOptions {
  /** Where the incoming version came from (a device name, a bundle), kept with a conflict for the reviewer. */
  from?: string;
  /**
   * Keys the store has merged before (the office keeps every version it
   * received). An incoming version already merged is treated as
   * superseded, even when its key has fallen out of every history.
   * @default none
   */
  seen?: (key: string, id: string) => boolean;
  /**
   * Where a stored version came from, when the store keeps that (the office
   * does), so that a stored version set aside as a conflict names its source.
   * @default none
   */
  sourceOf?: (key: string, id: string) => string | undefined;
}

interface Candidate {
  key: string;
  record: Omit<AnyRecord, 'conflicts'>;
  from?: string;
}

function withoutConflicts<T extends AnyRecord>(record: T): Omit<T, 'conflicts'> {
  if (record.conflicts === undefined) return record;
  const { conflicts: _dropped, ...rest } = record;
  return rest;
}

/** Does version `w` supersede version `v`? (rules 3–4, plus the no-lineage fallback) */
function supersedes(w: Candidate, v: Candidate): boolean {
  if (w.key === v.key) return false;
  if (w.record.history?.includes(v.key)) return true;
  const wUntracked = w.record.history === undefined && w.record.rev >= 2;
  const vUntracked = v.record.history === undefined && v.record.rev >= 2;
  if ((wUntracked || vUntracked) && !v.record.history?.includes(w.key)) return w.record.rev > v.record.rev;
  return false;
}

/** The order that picks which of several concurrent versions a record shows: rev, then updatedAt, then key. */
function shownFirst(a: Candidate, b: Candidate): number {
  if (a.record.rev !== b.record.rev) return b.record.rev - a.record.rev;
  if (a.record.updatedAt !== b.record.updatedAt) return a.record.updatedAt < b.record.updatedAt ? 1 : -1;
  return a.key < b.key ? 1 : a.key > b.key ? -1 : 0;
}

function candidatesOf(record: AnyRecord, key: string, from: string | undefined): Candidate[] {
  const out: Candidate[] = [{ key, record: withoutConflicts(record), from }];
  for (const c of record.conflicts ?? []) out.push({ key: c.key, record: c.record, from: c.from });
  return out;
}

function sameKeys(a: readonly string[], b: readonly string[]): boolean {
  if (a.length !== b.length) return false;
  const set = new Set(a);
  return b.every((k) => set.has(k));
}

/**
 * Merges one incoming version into what is stored, by the rules in the
 * module header. Throws InputError only when the two cannot be versions of
 * one record (different id or type).
 */
export function mergeRecord<T extends AnyRecord>(stored: T | undefined, incoming: T, options: MergeOptions = {}): MergeResult<T> {
  return mergeKeyed(stored, incoming, revisionKey(incoming), options);
}

function mergeKeyed<T extends AnyRecord>(stored: T | undefined, incoming: T, incomingKey: string, options: MergeOptions): MergeResult<T> {
  if (stored === undefined) {
    return { action: 'accept', reason: 'new record', record: incoming, changed: true };
  }
  if (stored.id !== incoming.id) {
    throw new InputError('id', `Cannot merge record ${JSON.stringify(incoming.id)} into record ${JSON.stringify(stored.id)}: they are different records.`);
  }
  if (stored.type !== incoming.type) {
    throw new InputError(
      'type',
      `Record ${JSON.stringify(incoming.id)} is a ${incoming.type} here but a ${stored.type} in the store; a record never changes type.`,
    );
  }

  const storedKey = revisionKey(stored);
  const storedCandidates = candidatesOf(stored, storedKey, options.sourceOf?.(storedKey, stored.id));
  const incomingCandidates = candidatesOf(incoming, incomingKey, options.from).filter((c) => !(c.key === incomingKey && options.seen?.(c.key, incoming.id) && c.key !== storedKey));

  // Every version involved, once each (the stored copy wins a tie; a known `from` fills an unknown one).
  const all = new Map<string, Candidate>();
  for (const c of [...storedCandidates, ...incomingCandidates]) {
    const had = all.get(c.key);
    if (!had) all.set(c.key, c);
    else if (had.from === undefined && c.from !== undefined) all.set(c.key, { ...had, from: c.from });
  }
  const versions = [...all.values()];
  const live = versions.filter((v) => !versions.some((w) => supersedes(w, v)));
  live.sort(shownFirst);
  const [shown, ...others] = live;
  others.sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));

  const storedConflictKeys = (stored.conflicts ?? []).map((c) => c.key);
  const otherKeys = others.map((c) => c.key);
  if (shown.key === storedKey && sameKeys(storedConflictKeys, otherKeys)) {
    let reason: string;
    if (incomingKey === storedKey) reason = 'already have this revision';
    else if (storedConflictKeys.includes(incomingKey)) reason = 'already kept as a conflicting version';
    else reason = 'older than the stored revision';
    return { action: 'ignore', reason, record: stored, changed: false };
  }

  const conflicts: ConflictVersion[] = others.map((c) => (c.from === undefined ? { key: c.key, record: c.record } : { key: c.key, from: c.from, record: c.record }));
  const base = shown.record as T;
  const record = (conflicts.length > 0 ? { ...base, conflicts } : base) as T;
  if (conflicts.length === 0) {
    return {
      action: 'accept',
      reason: shown.key === incomingKey ? 'newer revision made from the stored one' : 'resolves the kept conflicts',
      record,
      changed: true,
    };
  }
  const newlyKept = !storedConflictKeys.every((k) => otherKeys.includes(k)) || otherKeys.some((k) => !storedConflictKeys.includes(k));
  return {
    action: 'conflict',
    reason: newlyKept
      ? 'edited in two places from the same revision; both versions are kept for review'
      : 'newer revision of a record that still has conflicts waiting for review',
    record,
    changed: true,
  };
}

/** One incoming version's outcome in a batch, as sync replies and import reports list them. */
export interface MergeOutcome {
  id: string;
  type: AnyRecord['type'];
  /** The incoming version's key. */
  key: string;
  action: MergeAction;
  reason: string;
}

/** What merging a batch would do; nothing is written until the caller writes `writes`, in one transaction. */
export interface MergePlan {
  /** The records to write (one per changed id, its final state). */
  writes: AnyRecord[];
  /** One outcome per incoming version, in input order. */
  outcomes: MergeOutcome[];
  accepted: number;
  ignored: number;
  conflicts: number;
}

/**
 * Merges a batch against a store, without writing: `lookup` reads the
 * stored record of an id. A batch may hold several versions of one id;
 * they are merged in order, each against the result of the ones before.
 * Throws InputError (and plans nothing) if any pair cannot be merged.
 */
export function planMerge(
  incoming: readonly AnyRecord[],
  lookup: (id: string) => AnyRecord | undefined,
  options: MergeOptions = {},
): MergePlan {
  const overlay = new Map<string, AnyRecord>();
  const outcomes: MergeOutcome[] = [];
  let accepted = 0;
  let ignored = 0;
  let conflicts = 0;
  incoming.forEach((rec, i) => {
    const current = overlay.has(rec.id) ? overlay.get(rec.id) : lookup(rec.id);
    const key = revisionKey(rec);
    let result: MergeResult<AnyRecord>;
    try {
      result = mergeKeyed(current, rec, key, options);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(`records[${i}].${e.field}`, `Record ${i + 1}: ${e.message}`);
      throw e;
    }
    if (result.changed) overlay.set(rec.id, result.record);
    if (result.action === 'accept') accepted++;
    else if (result.action === 'ignore') ignored++;
    else conflicts++;
    outcomes.push({ id: rec.id, type: rec.type, key, action: result.action, reason: result.reason });
  });
  return { writes: [...overlay.values()], outcomes, accepted, ignored, conflicts };
}

/** True when the record carries concurrent versions waiting for review. */
export function hasConflicts(record: AnyRecord): boolean {
  return (record.conflicts?.length ?? 0) > 0;
}

/**
 * Resolves a record's kept conflicts: the next revision (rev + 1, as the
 * field store expects of any save) of the shown
 * version with `changes` applied (e.g. the fields taken from the other
 * version), no `conflicts`, and a history that names every kept version, so
 * that they count as superseded everywhere this revision travels.
 */
export function resolveConflict<T extends AnyRecord>(
  record: T,
  changes: Partial<Omit<T, 'id' | 'rev' | 'type' | 'history' | 'conflicts'>>,
  now = new Date(),
): T {
  const extra: string[] = [];
  for (const c of record.conflicts ?? []) extra.push(...(c.record.history ?? []), c.key);
  // The shown version has the highest rev of the set (see the header), so rev + 1 is above every kept one.
  const rev = record.rev + 1;
  const { conflicts: _kept, ...rest } = record;
  return {
    ...rest,
    ...changes,
    id: record.id,
    type: record.type,
    rev,
    updatedAt: now.toISOString(),
    history: historyAfter(record, extra),
  } as T;
}

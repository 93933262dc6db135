import { describe, expect, it } from 'vitest';
import { InputError } from '../../../../core/shared/errors';
import { nextRevision, type PickRecord, type SiteRecord } from '../../../../core/exchange/records';
import { canonicalJson, contentHash, fnv1a64, HISTORY_LIMIT, historyAfter, revisionKey } from '../../../../core/exchange/revision';
import { hasConflicts, mergeRecord, planMerge, resolveConflict } from '../../../../core/exchange/sync';

/** Independent FNV-1a 64 with BigInt, straight from the definition (draft-eastlake-fnv §2). */
function fnv1a64BigInt(text: string): string {
  const bytes = Buffer.from(text, 'utf8');
  let h = 0xcbf29ce484222325n;
  for (const b of bytes) {
    h ^= BigInt(b);
    h = (h * 0x100000001b3n) & 0xffffffffffffffffn;
  }
  return h.toString(16).padStart(16, '0');
}

function site(overrides: Partial<SiteRecord> = {}): SiteRecord {
  return {
    type: 'site',
    id: '7f1c2a9e-0000-4000-8000-000000000001',
    rev: 1,
    updatedAt: '2026-05-04T08:00:00.000Z',
    name: 'Invented site: River Terrace A',
    date: '2026-05-04',
    crew: 'Invented crew',
    notes: '',
    axisUnit: 'hz',
    settings: {},
    ...overrides,
  };
}

const t = (minute: number) => new Date(Date.UTC(2026, 4, 4, 9, minute));

describe('revision identity', () => {
  it('FNV-1a 64 matches the published test vectors (draft-eastlake-fnv; values from memory, verify) and a BigInt reference', () => {
    expect(fnv1a64('')).toBe('cbf29ce484222325');
    expect(fnv1a64('a')).toBe('af63dc4c8601ec8c');
    expect(fnv1a64('foobar')).toBe('85944171f73967e8');
    for (const s of ['', 'a', 'foobar', 'Vs30 ≈ 180 m/s', '😀 emoji', '<script>x</script>', 'é'.repeat(300), '\ud800 lone']) {
      expect(fnv1a64(s), s).toBe(fnv1a64BigInt(s));
    }
  });

  it('canonical JSON sorts keys and leaves out undefined members', () => {
    expect(canonicalJson({ b: 1, a: [1, { d: undefined, c: 'x' }] })).toBe('{"a":[1,{"c":"x"}],"b":1}');
  });

  it('two devices making rev 2 from the same rev 1 get different keys; the same edit gets the same key', () => {
    const base = site();
    const onA = nextRevision(base, { notes: 'wet ground' }, t(1));
    const onB = nextRevision(base, { notes: 'dry ground' }, t(1));
    expect(onA.rev).toBe(2);
    expect(onB.rev).toBe(2);
    expect(revisionKey(onA)).not.toBe(revisionKey(onB));
    expect(revisionKey(nextRevision(base, { notes: 'wet ground' }, t(1)))).toBe(revisionKey(onA));
    expect(onA.history).toEqual([revisionKey(base)]);
  });

  it('the content hash ignores lineage bookkeeping only', () => {
    const a = site();
    expect(contentHash({ ...a, history: ['1-0000000000000000'] })).toBe(contentHash(a));
    expect(contentHash({ ...a, notes: 'x' })).not.toBe(contentHash(a));
  });

  it('history keeps the newest HISTORY_LIMIT keys', () => {
    let r = site();
    for (let i = 0; i < HISTORY_LIMIT + 10; i++) r = nextRevision(r, { notes: `n${i}` }, t(i % 60));
    expect(r.history).toHaveLength(HISTORY_LIMIT);
    expect(historyAfter(r).at(-1)).toBe(revisionKey(r));
  });
});

describe('merge rules', () => {
  it('accepts a record the store does not have', () => {
    const r = site();
    expect(mergeRecord(undefined, r)).toEqual({ action: 'accept', reason: 'new record', record: r, changed: true });
  });

  it('ignores the same revision a second time (idempotent)', () => {
    const r = site();
    const m = mergeRecord(r, structuredClone(r));
    expect(m.action).toBe('ignore');
    expect(m.changed).toBe(false);
    expect(m.reason).toBe('already have this revision');
    expect(m.record).toBe(r);
  });

  it('accepts a revision made from the stored one, and never lets the older one overwrite it', () => {
    const r1 = site();
    const r2 = nextRevision(r1, { name: 'Invented site: River Terrace B' }, t(2));
    const r3 = nextRevision(r2, { crew: 'Second invented crew' }, t(3));
    expect(mergeRecord(r1, r3)).toMatchObject({ action: 'accept', changed: true, record: r3 });
    const back = mergeRecord(r3, r1);
    expect(back).toMatchObject({ action: 'ignore', reason: 'older than the stored revision', changed: false });
    expect(back.record).toBe(r3);
    expect(mergeRecord(r3, r2).action).toBe('ignore');
  });

  it('keeps both versions of two edits from the same base revision and flags the conflict', () => {
    const base = site();
    const onA = nextRevision(base, { notes: 'wet ground' }, t(1));
    const onB = nextRevision(base, { notes: 'dry ground' }, t(2));
    const atOffice = mergeRecord(mergeRecord(base, onA).record, onB, { from: 'tablet-b' });
    expect(atOffice.action).toBe('conflict');
    expect(atOffice.reason).toBe('edited in two places from the same revision; both versions are kept for review');
    expect(hasConflicts(atOffice.record)).toBe(true);
    // Shown: same rev, later updatedAt wins; the other is kept whole.
    expect(atOffice.record.notes).toBe('dry ground');
    expect(atOffice.record.conflicts).toEqual([{ key: revisionKey(onA), record: onA }]);
  });

  it('converges on the same record whatever order the versions arrive in, and a second merge changes nothing', () => {
    const base = site();
    const onA = nextRevision(base, { notes: 'wet ground' }, t(1));
    const onA2 = nextRevision(onA, { crew: 'A crew' }, t(5));
    const onB = nextRevision(base, { notes: 'dry ground' }, t(2));
    const orders = [
      [base, onA, onA2, onB],
      [onB, base, onA2, onA],
      [onA2, onB, onA, base],
      [onA, onB, base, onA2],
    ];
    const results = orders.map((order) => order.reduce<SiteRecord | undefined>((s, r) => mergeRecord(s, r).record, undefined)!);
    for (const r of results) {
      expect(canonicalJson(r)).toBe(canonicalJson(results[0]));
      for (const v of [base, onA, onA2, onB]) expect(mergeRecord(r, v).changed).toBe(false);
      expect(mergeRecord(r, structuredClone(r)).changed).toBe(false);
    }
    // A2 (rev 3) is shown, B (rev 2) kept; A (rev 2) is superseded by A2.
    expect(results[0].rev).toBe(3);
    expect(results[0].conflicts?.map((c) => c.key)).toEqual([revisionKey(onB)]);
  });

  it('an edit of a conflicted record keeps the conflict; resolving clears it everywhere, and replays stay resolved', () => {
    const base = site();
    const onA = nextRevision(base, { notes: 'wet ground' }, t(1));
    const onB = nextRevision(base, { notes: 'dry ground' }, t(2));
    const conflicted = mergeRecord(onA, onB).record;
    const edited = nextRevision(conflicted, { crew: 'edited while conflicted' }, t(3));
    const m1 = mergeRecord(conflicted, edited);
    expect(m1.action).toBe('conflict');
    expect(m1.reason).toBe('newer revision of a record that still has conflicts waiting for review');
    const resolved = resolveConflict(m1.record, { notes: 'wet then dry ground' }, t(4));
    expect(resolved.conflicts).toBeUndefined();
    expect(resolved.rev).toBe(4);
    const m2 = mergeRecord(m1.record, resolved);
    expect(m2).toMatchObject({ action: 'accept', reason: 'newer revision made from the stored one' });
    expect(hasConflicts(m2.record)).toBe(false);
    for (const old of [base, onA, onB, conflicted, edited]) expect(mergeRecord(m2.record, old).action, old.notes).toBe('ignore');
  });

  it('falls back to the revision counter for versions saved without lineage', () => {
    const r1 = site();
    const untracked3: SiteRecord = { ...r1, rev: 3, notes: 'saved by an old app', updatedAt: t(3).toISOString() };
    const untracked2: SiteRecord = { ...r1, rev: 2, notes: 'older', updatedAt: t(2).toISOString() };
    expect(mergeRecord(untracked2, untracked3).action).toBe('accept');
    expect(mergeRecord(untracked3, untracked2).action).toBe('ignore');
    const sameRevOther: SiteRecord = { ...untracked3, notes: 'other' };
    expect(mergeRecord(untracked3, sameRevOther).action).toBe('conflict');
  });

  it('honours the seen set: a version merged before is not revived after its key left every history', () => {
    const r1 = site();
    const onB = nextRevision(r1, { notes: 'B' }, t(1));
    let onA = r1;
    for (let i = 0; i < HISTORY_LIMIT + 2; i++) onA = nextRevision(onA, { notes: `A${i}` }, t(i % 60));
    expect(mergeRecord(onA, r1, { seen: (k) => k === revisionKey(r1) }).action).toBe('ignore');
    // Without the seen set, the long chain is a kept conflict: safe, nothing lost.
    expect(mergeRecord(onA, r1).action).toBe('conflict');
    expect(mergeRecord(onA, onB).action).toBe('conflict');
  });

  it('refuses to merge a record into one of another type, naming both', () => {
    const s = site();
    const p = { ...s, type: 'pick' } as unknown as SiteRecord;
    expect(() => mergeRecord(s, p)).toThrow(InputError);
    expect(() => mergeRecord(s, p)).toThrow(`Record "${s.id}" is a pick here but a site in the store; a record never changes type.`);
  });
});

describe('planMerge', () => {
  const pick = (i: number, rev = 1): PickRecord => ({
    type: 'pick',
    id: `pick-${i}`,
    rev,
    updatedAt: t(0).toISOString(),
    siteId: site().id,
    order: i,
    frequency: 5 + i,
    velocity: 200 + i,
    kind: 'group',
    mode: 0,
  });

  it('plans one write per changed id, counts outcomes and changes nothing on a replay', () => {
    const store = new Map<string, PickRecord | SiteRecord>();
    const batch = [site(), pick(1), pick(2), pick(1)];
    const plan = planMerge(batch, (id) => store.get(id));
    expect(plan.writes).toHaveLength(3);
    expect([plan.accepted, plan.ignored, plan.conflicts]).toEqual([3, 1, 0]);
    expect(plan.outcomes[3]).toMatchObject({ id: 'pick-1', action: 'ignore', reason: 'already have this revision' });
    for (const w of plan.writes) store.set(w.id, w as PickRecord);
    const again = planMerge(batch, (id) => store.get(id));
    expect(again.writes).toHaveLength(0);
    expect(again.ignored).toBe(4);
  });

  it('names the position of a record that cannot be merged, and plans nothing', () => {
    const s = site();
    const bad = { ...pick(9), id: s.id };
    expect(() => planMerge([pick(1), bad], (id) => (id === s.id ? s : undefined))).toThrow(
      `Record 2: Record "${s.id}" is a pick here but a site in the store; a record never changes type.`,
    );
  });
});

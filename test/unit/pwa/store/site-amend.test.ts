/**
 * Site revisions saved with `amendUnsent` (pwa/store/field-store.ts): a
 * long run of edits between syncs folds into the site's unsent revision, so
 * its history stays one step from what the office holds (the history keeps
 * at most 64 ancestors, core/exchange/revision.ts); a revision that a push
 * or a bundle export has read is never folded away, so a receiver that
 * holds it sees the next one as made from it, never as a conflict.
 * Real field store over fake-indexeddb; the merge rules of core/exchange/sync.ts.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { nextRevision, type SiteLayeredModel, type SiteRecord } from '../../../../core/exchange/records';
import { HISTORY_LIMIT, revisionKey } from '../../../../core/exchange/revision';
import { mergeRecord } from '../../../../core/exchange/sync';
import { newSite, openFieldStore, type FieldStore } from '../../../../pwa/store';
import { exportBundle } from '../../../../pwa/sync/bundle-io';

const stores: FieldStore[] = [];
afterEach(() => {
  for (const s of stores.splice(0)) s.close();
});

async function tablet(): Promise<FieldStore> {
  const s = await openFieldStore(`amend-${crypto.randomUUID()}`);
  stores.push(s);
  return s;
}

/** An invented one-layer model, `h` m thick. */
function model(h: number): SiteLayeredModel {
  return {
    model: { layers: [{ thickness_m: h, vs_m_s: 190, density_kg_m3: 1800 }], halfspace: { vs_m_s: 560, density_kg_m3: 2100 } },
    pInput: 'vp',
    waves: { love: true, rayleigh: false },
    modes: 2,
  };
}

/** A site saved and then sent (its outbox acknowledged, as a push does). */
async function sentSite(store: FieldStore): Promise<SiteRecord> {
  const site = await store.saveSite(newSite({ name: 'Invented amend site', date: '2026-05-04' }));
  await store.whileSending(async () => store.ackOutbox((await store.outbox()).map((e) => e.seq)));
  return site;
}

async function edit(store: FieldStore, h: number, amendUnsent = true): Promise<SiteRecord> {
  const site = (await store.getSite((await store.listSites())[0].id))!;
  return store.saveSite(nextRevision(site, { layeredModel: model(h) }), { amendUnsent });
}

describe('site revisions that fold into the unsent one', () => {
  it('100 model edits after a sync stay one step from the synced revision: the office would accept the last as made from its own', async () => {
    const store = await tablet();
    const base = await sentSite(store);
    let last = base;
    for (let i = 1; i <= 100; i++) last = await edit(store, 2 + i * 0.1);
    expect(last.rev).toBe(101); // every saved change still counts
    expect(last.history).toEqual([revisionKey(base)]);
    expect(last.layeredModel!.model.layers[0].thickness_m).toBeCloseTo(12, 12);
    // One entry waits for the site, not 100.
    expect((await store.outbox()).map((e) => [e.recordId, e.rev])).toEqual([[base.id, 101]]);
    // The merge rules at the office (core/exchange/sync.ts rule 4): made from the stored revision, accepted.
    expect(mergeRecord(base, last).action).toBe('accept');
  });

  it('without the option, revisions stack as before, and past 64 edits the synced revision falls out of the history (the case the option is for)', async () => {
    const store = await tablet();
    const base = await sentSite(store);
    let last = base;
    for (let i = 1; i <= HISTORY_LIMIT + 1; i++) last = await edit(store, 2 + i * 0.1, false);
    expect(last.history).toHaveLength(HISTORY_LIMIT);
    expect(last.history).not.toContain(revisionKey(base));
    expect(mergeRecord(base, last).action).toBe('conflict');
  });

  it('a site created on the tablet and never sent folds its first revision too', async () => {
    const store = await tablet();
    const first = await store.saveSite(newSite({ name: 'Invented new site', date: '2026-05-04' }));
    let last = first;
    for (let i = 1; i <= 70; i++) last = await edit(store, 3 + i * 0.1);
    expect(last.rev).toBe(71);
    expect(last.history).toEqual([]);
    expect((await store.outbox()).map((e) => e.rev)).toEqual([71]);
    expect(mergeRecord(undefined, last).action).toBe('accept');
  });

  it('a revision read by a push is never folded away, whether the push succeeded or not: the next edit is made from it', async () => {
    const store = await tablet();
    await sentSite(store);
    const read = await edit(store, 4);
    // A push reads the revision and fails before the office answers (nothing acknowledged).
    await expect(store.whileSending(async () => Promise.reject(new Error('no network')))).rejects.toThrow('no network');
    const after = await edit(store, 5);
    expect(after.history!.at(-1)).toBe(revisionKey(read));
    expect(mergeRecord(read, after).action).toBe('accept');
    // Edits after that fold into `after` (which no send has read).
    const later = await edit(store, 6);
    expect(later.history).toEqual(after.history);
  });

  it('no revision is folded while a send is under way', async () => {
    const store = await tablet();
    await sentSite(store);
    const before = await edit(store, 4);
    let during!: SiteRecord;
    let during2!: SiteRecord;
    await store.whileSending(async () => {
      during = await edit(store, 5);
      during2 = await edit(store, 6);
    });
    expect(during.history!.at(-1)).toBe(revisionKey(before));
    expect(during2.history!.at(-1)).toBe(revisionKey(during));
    // After the send, a revision saved during it is not folded either (the send may have read it).
    const after = await edit(store, 7);
    expect(after.history!.at(-1)).toBe(revisionKey(during2));
  });

  it('a version that arrived from elsewhere is never folded away, even at the revision number of the unsent one it replaced', async () => {
    const store = await tablet();
    const base = await sentSite(store);
    const mine = await edit(store, 4);
    // Another tablet's edit of the same base arrives by a pull (same rev): both are kept, one shown.
    const theirs = nextRevision(base, { notes: 'Invented note from the other tablet' }, new Date(Date.parse(mine.updatedAt) + 60_000));
    expect(theirs.rev).toBe(mine.rev);
    const merged = mergeRecord(mine, theirs);
    expect(merged.action).toBe('conflict');
    await store.putIncoming([merged.record], { expectedRevs: new Map([[base.id, mine.rev]]) });
    const stored = (await store.getSite(base.id))!;
    expect(stored.notes).toBe(theirs.notes); // the later save is shown
    const after = await edit(store, 5);
    expect(after.history!.at(-1)).toBe(revisionKey(stored));
    expect(after.conflicts).toEqual(stored.conflicts); // still waiting for review
    expect(mergeRecord(merged.record, after).action).toBe('conflict'); // a newer revision of a record with conflicts waiting
    expect(mergeRecord(merged.record, after).reason).toBe('newer revision of a record that still has conflicts waiting for review');
  });

  it('a revision that left in a bundle is never folded away: a tablet that imported the bundle takes the next one as made from it', async () => {
    const store = await tablet();
    await sentSite(store);
    const exported = await edit(store, 4);
    const file = await exportBundle(store);
    expect(file.text).toContain('"thickness_m":4,');
    const after = await edit(store, 5);
    expect(after.history!.at(-1)).toBe(revisionKey(exported));
    expect(mergeRecord(exported, after).action).toBe('accept');
  });
});

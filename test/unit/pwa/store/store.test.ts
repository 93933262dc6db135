/**
 * The field store (pwa/store) on fake-indexeddb: migrations from an older
 * schema, revisions, the outbox, atomic batches, failed writes and the
 * round-trip of every record type.
 */
import 'fake-indexeddb/auto';
import { openDB } from 'idb';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { CAUTION } from '../../../../core/shared/caution';
import { nextRevision, type EstimateRecord, type PickRecord, type SiteRecord } from '../../../../core/exchange/records';
import {
  newPick,
  newSite,
  openFieldStore,
  requestPersistentStorage,
  SCHEMA_VERSION,
  StoreError,
  type FieldDB,
  type FieldDBv1,
  type FieldStore,
} from '../../../../pwa/store';
import { upgradeTo } from '../../../../pwa/store/schema';

const open: FieldStore[] = [];
async function freshStore(): Promise<{ store: FieldStore; name: string }> {
  const name = `test-${crypto.randomUUID()}`;
  const store = await openFieldStore(name);
  open.push(store);
  return { store, name };
}
afterEach(() => {
  vi.restoreAllMocks();
  while (open.length) open.pop()!.close();
});

/** Expects a StoreError and returns it for message checks. */
async function rejection(p: Promise<unknown>): Promise<StoreError> {
  const e = await p.then(
    () => undefined,
    (err: unknown) => err,
  );
  expect(e).toBeInstanceOf(StoreError);
  return e as StoreError;
}

const invented = { name: 'Invented site: river terrace A', date: '2026-05-04', crew: 'Crew 2 (invented)', notes: 'Gravel track <b>wet</b>' };

function estimateFor(site: SiteRecord, computedAt: string): EstimateRecord {
  return {
    id: crypto.randomUUID(),
    rev: 1,
    updatedAt: computedAt,
    type: 'estimate',
    siteId: site.id,
    settings: { vs2: 600 },
    summary: { thickness_m: { best: 12.5, low68: 11, high68: 14, low95: 9.8, high95: 15.6 }, caution: CAUTION },
    computedAt,
  };
}

describe('round trip of every record type', () => {
  it('stores a site, picks (frequency and period), an estimate and settings exactly as given', async () => {
    const { store } = await freshStore();
    const site = newSite({ ...invented, location: { lat: -41.29, lon: 174.78, accuracy_m: 8, source: 'device' }, settings: { vs1: 180, vs1Range: [100, 300] } });
    expect(site.rev).toBe(1);
    expect(site.id).toMatch(/^[0-9a-f-]{36}$/);
    expect(await store.saveSite(site)).toEqual(site);
    expect(await store.getSite(site.id)).toEqual(site);

    const byFreq = newPick(site.id, { frequency: 12.5, velocity: 210, sd: 6, kind: 'phase', mode: 1, note: '<script>x</script>', time: '2026-05-04T10:30:00Z' }, 0);
    const byPeriod = newPick(site.id, { period: 0.25, velocity: 190 }, 1);
    expect(byPeriod.frequency).toBe(4);
    await store.savePick(byPeriod);
    await store.savePick(byFreq);
    expect(await store.listPicks(site.id)).toEqual([byFreq, byPeriod]);

    const est = estimateFor(site, '2026-05-04T11:00:00.000Z');
    await store.saveEstimate(est);
    expect(await store.latestEstimate(site.id)).toEqual(est);

    await store.putSetting('theme', { contrast: 'high' });
    expect(await store.getSetting('theme')).toEqual({ contrast: 'high' });
    expect(await store.getSetting('missing')).toBeUndefined();

    const all = await store.allRecords();
    expect(all).toHaveLength(4);
    expect(all).toEqual(expect.arrayContaining([site, byFreq, byPeriod, est]));
  });

  it('latestEstimate returns the most recently computed live estimate', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    const older = estimateFor(site, '2026-05-04T11:00:00.000Z');
    const newer = estimateFor(site, '2026-05-04T12:00:00.000Z');
    await store.saveEstimate(newer);
    await store.saveEstimate(older);
    expect((await store.latestEstimate(site.id))?.id).toBe(newer.id);
    expect(await store.latestEstimate('no-such-site')).toBeUndefined();
  });

  it('lists live sites, most recently changed first', async () => {
    const { store } = await freshStore();
    const a = newSite({ ...invented, name: 'A' }, new Date('2026-05-01T00:00:00Z'));
    const b = newSite({ ...invented, name: 'B' }, new Date('2026-05-02T00:00:00Z'));
    await store.saveSite(a);
    await store.saveSite(b);
    expect((await store.listSites()).map((s) => s.name)).toEqual(['B', 'A']);
    await store.saveSite(nextRevision(a, { notes: 'edited' }, new Date('2026-05-03T00:00:00Z')));
    expect((await store.listSites()).map((s) => s.name)).toEqual(['A', 'B']);
  });
});

describe('migration from schema version 1', () => {
  it('keeps every v1 record, adds the v2 stores and indexes, and queues the old records for sync', async () => {
    expect(SCHEMA_VERSION).toBe(3);
    const name = `test-${crypto.randomUUID()}`;
    // Build a real v1 database, as an older app version left it.
    const v1 = await openDB<FieldDBv1>(name, 1, { upgrade: upgradeTo(1) as never });
    expect([...v1.objectStoreNames].sort()).toEqual(['estimates', 'picks', 'settings', 'sites']);
    const site = newSite(invented);
    const p2 = newPick(site.id, { frequency: 8, velocity: 230 }, 2);
    const p1 = newPick(site.id, { frequency: 20, velocity: 180 }, 1);
    const est = estimateFor(site, '2026-05-04T11:00:00.000Z');
    await v1.put('sites', site);
    await v1.put('picks', p2);
    await v1.put('picks', p1);
    await v1.put('estimates', est);
    await v1.put('settings', 'hz', 'defaultUnit');
    v1.close();

    const store = await openFieldStore(name);
    open.push(store);
    expect(await store.listSites()).toEqual([site]);
    expect(await store.listPicks(site.id)).toEqual([p1, p2]); // by order, through the new v2 index
    expect(await store.latestEstimate(site.id)).toEqual(est);
    expect(await store.getSetting('defaultUnit')).toBe('hz');
    const queued = await store.outbox();
    expect(queued.map((q) => q.recordId).sort()).toEqual([site.id, p1.id, p2.id, est.id].sort());
    expect(queued.every((q) => q.rev === 1 && typeof q.seq === 'number')).toBe(true);

    // The v2 shape on disk (and the v3 recording stores beside it).
    const raw = await openDB<FieldDB>(name, SCHEMA_VERSION);
    expect([...raw.objectStoreNames].sort()).toEqual(['estimates', 'outbox', 'picks', 'recordingBytes', 'recordings', 'settings', 'sites']);
    const tx = raw.transaction(['picks', 'estimates', 'outbox']);
    expect([...tx.objectStore('picks').indexNames].sort()).toEqual(['by-site', 'by-site-order']);
    expect([...tx.objectStore('estimates').indexNames].sort()).toEqual(['by-site', 'by-site-computed']);
    expect([...tx.objectStore('outbox').indexNames]).toEqual(['by-record']);
    raw.close();
  });

  it('opening an existing v2 database again runs no migration and queues nothing twice', async () => {
    const { store, name } = await freshStore();
    await store.saveSite(newSite(invented));
    store.close();
    const again = await openFieldStore(name);
    open.push(again);
    expect(await again.outbox()).toHaveLength(1);
  });
});

describe('revisions', () => {
  it('accepts rev + 1 and refuses a stale edit, an existing rev 1 and an unknown record, changing nothing', async () => {
    const { store } = await freshStore();
    const v1 = newSite(invented);
    await store.saveSite(v1);
    const v2 = nextRevision(v1, { name: 'Renamed on this tablet' });
    await store.saveSite(v2);

    const stale = nextRevision(v1, { name: 'Renamed from an old screen' });
    const e1 = await rejection(store.saveSite(stale));
    expect(e1.field).toBe('rev');
    expect(e1.message).toBe(
      'This site was changed elsewhere since this edit began (stored revision 2, this edit follows revision 1), so the edit was not saved. Reload it and make the change again.',
    );

    const e2 = await rejection(store.saveSite({ ...v1, name: 'again' }));
    expect(e2.message).toMatch(/^This site already exists \(revision 2\)/);

    const ghost = { ...newSite(invented), rev: 3 };
    const e3 = await rejection(store.saveSite(ghost));
    expect(e3.message).toBe('This site is not in the store, so revision 3 of it cannot be saved.');

    expect(await store.getSite(v1.id)).toEqual(v2);
    expect(await store.getSite(ghost.id)).toBeUndefined();
    expect(await store.outbox()).toHaveLength(2);
  });
});

describe('the outbox', () => {
  it('queues one entry per saved revision, in order, and forgets only acknowledged entries', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    const a = newPick(site.id, { frequency: 10, velocity: 200 }, 0);
    const b = newPick(site.id, { frequency: 5, velocity: 260 }, 1);
    await store.savePicks([a, b]);
    const a2 = nextRevision(a, { velocity: 205 });
    expect(a2.history).toHaveLength(1);
    expect(await store.savePick(a2)).toEqual(a2); // lineage (history) is kept
    await store.deletePick(b.id);

    const q = await store.outbox();
    expect(q.map((e) => [e.recordId, e.type, e.rev])).toEqual([
      [site.id, 'site', 1],
      [a.id, 'pick', 1],
      [b.id, 'pick', 1],
      [a.id, 'pick', 2],
      [b.id, 'pick', 2],
    ]);
    expect(q.every((e, i) => i === 0 || e.seq > q[i - 1].seq)).toBe(true);
    expect(q.every((e) => !Number.isNaN(Date.parse(e.queuedAt)))).toBe(true);

    await store.ackOutbox([q[0].seq, q[1].seq]);
    expect((await store.outbox()).map((e) => e.seq)).toEqual(q.slice(2).map((e) => e.seq));
    await store.ackOutbox([q[0].seq]); // acknowledging twice is harmless
    expect(await store.outbox()).toHaveLength(3);
    await expect(store.ackOutbox([1.5])).rejects.toThrow('The outbox entries to acknowledge must be a list of whole sequence numbers.');
  });

  it('putIncoming writes records from sync without queueing them, and checks them first', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    const pick = newPick(site.id, { frequency: 10, velocity: 200 }, 0);
    await store.putIncoming([site, pick]);
    expect(await store.listPicks(site.id)).toEqual([pick]);
    expect(await store.outbox()).toEqual([]);

    const bad = { ...newPick(site.id, { frequency: 12, velocity: 200 }, 1), mode: -1 };
    const e = await rejection(store.putIncoming([nextRevision(site, { name: 'changed' }), bad]));
    expect(e.field).toBe('record 2, pick, mode');
    expect(e.message).toBe('Incoming record 2: Pick, column mode: must be a whole number 0 or more (0 = fundamental), but it is -1.');
    expect((await store.getSite(site.id))?.name).toBe(invented.name);
  });
});

describe('putIncoming options (used by pwa/sync)', () => {
  it('skips a record edited since the merge looked (expectedRevs) and returns its id; queue puts the rest in the outbox', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    await store.saveSite(nextRevision(site, { notes: 'edited on the tablet meanwhile' }));
    const fresh = newSite({ ...invented, name: 'Invented site from the office' });
    const incomingSite = nextRevision(site, { notes: 'from the office' });
    const skipped = await store.putIncoming([incomingSite, fresh], {
      expectedRevs: new Map([
        [site.id, 1], // the merge saw rev 1, but rev 2 is stored now
        [fresh.id, 0], // absent when the merge looked, still absent
      ]),
      queue: true,
    });
    expect(skipped).toEqual([site.id]);
    expect((await store.getSite(site.id))?.notes).toBe('edited on the tablet meanwhile');
    expect(await store.getSite(fresh.id)).toEqual(fresh);
    expect((await store.outbox()).map((e) => e.recordId)).toEqual([site.id, site.id, fresh.id]);
  });
});

describe('deleting', () => {
  it('deleteSite leaves tombstones for the site, its picks and its estimates, and queues each', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    const other = newSite({ ...invented, name: 'Other invented site' });
    await store.saveSite(site);
    await store.saveSite(other);
    const p = newPick(site.id, { frequency: 10, velocity: 200 }, 0);
    const keep = newPick(other.id, { frequency: 10, velocity: 200 }, 0);
    await store.savePicks([p, keep]);
    const est = estimateFor(site, '2026-05-04T11:00:00.000Z');
    await store.saveEstimate(est);
    // This device's per-site settings go with the site; others' stay.
    await store.putSetting(`survey.depth.${site.id}`, '20');
    await store.putSetting(`layered.model.${site.id}`, { layers: [] });
    await store.putSetting(`survey.depth.${other.id}`, '30');
    await store.putSetting('ui.theme', 'sun');
    const before = (await store.outbox()).length;

    await store.deleteSite(site.id);
    expect(await store.getSetting(`survey.depth.${site.id}`)).toBeUndefined();
    expect(await store.getSetting(`layered.model.${site.id}`)).toBeUndefined();
    expect(await store.getSetting(`survey.depth.${other.id}`)).toBe('30');
    expect(await store.getSetting('ui.theme')).toBe('sun');
    expect((await store.listSites()).map((s) => s.id)).toEqual([other.id]);
    expect(await store.listPicks(site.id)).toEqual([]);
    expect(await store.latestEstimate(site.id)).toBeUndefined();
    expect(await store.listPicks(other.id)).toEqual([keep]);
    const tombs = (await store.allRecords()).filter((r) => r.deleted);
    expect(tombs.map((r) => [r.id, r.rev]).sort()).toEqual([[site.id, 2], [p.id, 2], [est.id, 2]].sort());
    expect((await store.outbox()).length).toBe(before + 3);

    const e = await rejection(store.savePick(newPick(site.id, { frequency: 3, velocity: 300 }, 1)));
    expect(e.message).toBe('This pick belongs to a site that is deleted, so it was not saved.');
    await expect(store.deleteSite('no-such-id')).rejects.toThrow('This site is not in the store, so it cannot be deleted.');
  });
});

describe('bad input is refused, naming the field, and changes nothing', () => {
  it('a site with a blank name, a bad date, a km/s speed or a latitude out of range', async () => {
    const { store } = await freshStore();
    const cases: [Partial<SiteRecord>, string, string][] = [
      [{ name: '   ' }, 'name', 'name is empty; it must not be blank.'],
      [{ date: '2026-02-30' }, 'date', 'date must be a calendar date written YYYY-MM-DD, but it is "2026-02-30".'],
      [{ settings: { vs1: 0.2 } }, 'settings.vs1', 'settings.vs1 is 0.2 m/s, below the 30 m/s lower bound for shear speed. It looks like km/s; enter the speed in m/s.'],
      [{ location: { lat: 95, lon: 0, source: 'typed' } }, 'location.lat', 'location.lat is 95 °, outside the range -90 to 90 °.'],
      [{ settings: { vs1: 300, vs2: 200 } }, 'settings.vs2', 'settings.vs2 is 200 m/s, but it must be faster than settings.vs1 (300 m/s) for Love waves to be trapped.'],
    ];
    for (const [change, field, message] of cases) {
      const e = await rejection(store.saveSite(newSite({ ...invented, ...change })));
      expect(e.field).toBe(field);
      expect(e.message).toBe(message);
    }
    expect(await store.allRecords()).toEqual([]);
    expect(await store.outbox()).toEqual([]);
  });

  it('a pick goes through the core pick rules; the field is the column', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    const e = await rejection(store.savePick(newPick(site.id, { frequency: 10, velocity: 0.25 }, 0)));
    expect(e.field).toBe('velocity_m_s');
    expect(e.message).toBe(
      'This pick, column velocity_m_s: is 0.25 m/s, below the 30 m/s lower bound. It looks like km/s; the velocity must be given in m/s (the value was not converted).',
    );
    await store.savePick(newPick(site.id, { frequency: 10, velocity: 250 }, 0));
    const dup = await rejection(store.savePick(newPick(site.id, { frequency: 10, velocity: 260 }, 1)));
    expect(dup.field).toBe('this pick, frequency_hz');
    expect(dup.message).toMatch(/^This pick, column frequency_hz: repeats 10 Hz for a group pick of mode 0, already given in the stored pick in row 1/);
    expect(await store.listPicks(site.id)).toHaveLength(1);
    const orphan = await rejection(store.savePick(newPick('no-such-site', { frequency: 3, velocity: 300 }, 0)));
    expect(orphan.field).toBe('siteId');
  });
});

describe('savePicks is all or nothing', () => {
  it('one bad pick in a batch stores none of them', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    const batch = [
      newPick(site.id, { frequency: 20, velocity: 180 }, 0),
      newPick(site.id, { frequency: 10, velocity: 210 }, 1),
      newPick(site.id, { frequency: 5, velocity: 0.3 }, 2),
    ];
    const e = await rejection(store.savePicks(batch));
    expect(e.field).toBe('pick 3, velocity_m_s');
    expect(e.message).toMatch(/^Pick 3, column velocity_m_s: is 0.3 m\/s, below the 30 m\/s lower bound/);
    expect(await store.listPicks(site.id)).toEqual([]);
    expect(await store.outbox()).toHaveLength(1);
  });

  it('a batch that clashes with a stored pick stores none of them (checked inside the transaction)', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    const stored = newPick(site.id, { frequency: 7, velocity: 240 }, 0);
    await store.savePick(stored);
    const batch = [newPick(site.id, { frequency: 20, velocity: 180 }, 1), newPick(site.id, { frequency: 7, velocity: 250 }, 2)];
    const e = await rejection(store.savePicks(batch));
    expect(e.message).toMatch(/^Pick 2, column frequency_hz: repeats 7 Hz/);
    expect(await store.listPicks(site.id)).toEqual([stored]);
    expect(await store.outbox()).toHaveLength(2);
  });
});

describe('failed writes', () => {
  function quotaError(): DOMException {
    return new DOMException('The quota has been exceeded.', 'QuotaExceededError');
  }

  it('a full disk while queueing the outbox entry rolls back the record too, and says so plainly', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    const spy = vi.spyOn(IDBObjectStore.prototype, 'add').mockImplementation(() => {
      throw quotaError();
    });
    const e = await rejection(store.saveSite(nextRevision(site, { notes: 'typed just before the disk filled' })));
    expect(spy).toHaveBeenCalled();
    expect(e.message).toBe(
      "The device's storage is full, so the site was not saved. Nothing was changed; free some space (for example delete old sites after exporting them) and try again.",
    );
    expect(e.field).toBeUndefined();
    spy.mockRestore();
    expect(await store.getSite(site.id)).toEqual(site);
    expect(await store.outbox()).toHaveLength(1);
    // The store still works afterwards.
    await store.saveSite(nextRevision(site, { notes: 'saved after space was freed' }));
    expect((await store.getSite(site.id))?.rev).toBe(2);
  });

  it('a batch aborted half-way leaves no pick behind', async () => {
    const { store } = await freshStore();
    const site = newSite(invented);
    await store.saveSite(site);
    const realPut = IDBObjectStore.prototype.put;
    let puts = 0;
    vi.spyOn(IDBObjectStore.prototype, 'put').mockImplementation(function (this: IDBObjectStore, ...args) {
      puts++;
      if (puts === 3) this.transaction.abort();
      return realPut.apply(this, args);
    });
    const batch = [10, 12, 14, 16].map((f, i) => newPick(site.id, { frequency: f, velocity: 200 + i }, i));
    const e = await rejection(store.savePicks(batch));
    expect(e.message).toBe('The database stopped the write, so the 4 picks were not saved. Nothing was changed; try again.');
    vi.restoreAllMocks();
    expect(await store.listPicks(site.id)).toEqual([]);
    expect(await store.outbox()).toHaveLength(1);
  });

  it('a closed database refuses writes and reads with advice to reload', async () => {
    const { store } = await freshStore();
    store.close();
    const e = await rejection(store.saveSite(newSite(invented)));
    expect(e.message).toBe(
      'The database is closed (the app may have been updated in another tab), so the site was not saved. Reload the page to keep working.',
    );
    const r = await rejection(store.listSites());
    expect(r.message).toBe(
      'The database is closed (the app may have been updated in another tab), so the site list could not be read. Reload the page to keep working.',
    );
  });
});

describe('persistent storage', () => {
  it('reports unsupported where the browser has no StorageManager, and the browser answer otherwise', async () => {
    vi.stubGlobal('navigator', {});
    expect(await requestPersistentStorage()).toBe('unsupported');
    const persist = vi.fn(async () => false);
    vi.stubGlobal('navigator', { storage: { persist, persisted: async () => false } });
    expect(await requestPersistentStorage()).toBe('denied');
    vi.stubGlobal('navigator', { storage: { persist: async () => true, persisted: async () => false } });
    expect(await requestPersistentStorage()).toBe('granted');
    vi.stubGlobal('navigator', { storage: { persist, persisted: async () => true } });
    expect(await requestPersistentStorage()).toBe('granted');
    expect(persist).toHaveBeenCalledTimes(1);
    vi.unstubAllGlobals();
  });
});

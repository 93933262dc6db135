/**
 * Seismograph files kept with their site (pwa/store, schema v3) on
 * fake-indexeddb: the record and the raw bytes round-trip, the SHA-256 is
 * right, the site's choice whether raw files travel, deletion, the storage
 * check before saving (a refusal changes nothing), bad input named by field,
 * and the v2 → v3 migration that keeps everything held.
 *
 * The files are invented: a short SEG-2 record written by the core's own
 * writer (core/recordings/seg2-write.ts) and read back by its reader.
 */
import 'fake-indexeddb/auto';
import { createHash } from 'node:crypto';
import { openDB } from 'idb';
import { afterEach, describe, expect, it } from 'vitest';
import { geometrySummary } from '../../../../core/recordings/recording';
import { readRecording } from '../../../../core/recordings/read';
import { writeSeg2 } from '../../../../core/recordings/seg2-write';
import type { RecordingGeometryJson } from '../../../../core/exchange/records';
import {
  newPick,
  newSite,
  openFieldStore,
  STORAGE_RESERVE_BYTES,
  StoreError,
  type FieldDB,
  type FieldStore,
  type StorageEstimate,
} from '../../../../pwa/store';
import { sha256Hex, sizeText } from '../../../../pwa/store/recordings';
import { upgradeTo } from '../../../../pwa/store/schema';

const open: FieldStore[] = [];
afterEach(() => {
  while (open.length) open.pop()!.close();
});

let estimate: StorageEstimate = {};
async function freshStore(): Promise<{ store: FieldStore; name: string }> {
  const name = `rec-${crypto.randomUUID()}`;
  const store = await openFieldStore(name, { storageEstimate: async () => estimate });
  open.push(store);
  estimate = {};
  return { store, name };
}

/** An invented 4-trace SEG-2 record: offsets 2, 4, 6, 8 m, 1 ms sampling, 64 samples. */
function invented(): { bytes: Uint8Array; geometry: RecordingGeometryJson } {
  const traces = [0, 1, 2, 3].map((k) => Array.from({ length: 64 }, (_, i) => Math.sin((i - 8 * k) / 3) * Math.exp(-(((i - 8 * k - 16) / 10) ** 2))));
  const bytes = writeSeg2({ sampleInterval: 0.001, delay: 0, traces, offsets: [2, 4, 6, 8] });
  return { bytes, geometry: geometrySummary(readRecording(bytes, 'shot-01.sg2')) };
}

async function rejection(p: Promise<unknown>): Promise<StoreError> {
  const e = await p.then(
    () => undefined,
    (err: unknown) => err,
  );
  expect(e).toBeInstanceOf(StoreError);
  return e as StoreError;
}

describe('keeping a recording with its site', () => {
  it('stores the record and the raw bytes apart, with the SHA-256 of the bytes, and queues the record once', async () => {
    const { store } = await freshStore();
    const site = await store.saveSite(newSite({ name: 'Invented site: quarry road' }));
    const { bytes, geometry } = invented();
    expect(geometry).toMatchObject({ format: 'seg2', traces: 4, samples: 64, sample_interval_s: 0.001, offsets_m: [2, 4, 6, 8] });
    const before = (await store.outbox()).length;
    const rec = await store.saveRecording({ siteId: site.id, name: 'shot-01.sg2', bytes, geometry, overrides: { component: 'transverse' } });
    expect(rec).toMatchObject({ type: 'recording', rev: 1, siteId: site.id, name: 'shot-01.sg2', format: 'seg2', byteLength: bytes.byteLength, attach: false });
    expect(rec.overrides).toEqual({ component: 'transverse' });
    // Node's own SHA-256 (a general-purpose reference implementation) gives the same digest.
    expect(rec.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect(await store.listRecordings(site.id)).toEqual([rec]);
    expect(await store.recordingBytes(rec.id)).toEqual(bytes);
    const queued = (await store.outbox()).slice(before);
    expect(queued.map((q) => [q.recordId, q.type, q.rev])).toEqual([[rec.id, 'recording', 1]]);
    // Recordings are not in the record list; they sync by their own call (pwa/sync/recording-sync.ts).
    expect((await store.allRecords()).some((r) => r.id === rec.id)).toBe(false);
  });

  it('hashes by FIPS 180-4: SHA-256("abc") is the standard\'s example digest', async () => {
    // FIPS 180-4 examples (NIST, "SHA256.pdf" in the CSRC examples): one-block message "abc".
    expect(await sha256Hex(new TextEncoder().encode('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it("keeps the site's choice whether raw files travel: every recording follows it, and a new one takes it", async () => {
    const { store } = await freshStore();
    const site = await store.saveSite(newSite({ name: 'Invented site: quarry road' }));
    const { bytes, geometry } = invented();
    const a = await store.saveRecording({ siteId: site.id, name: 'a.sg2', bytes, geometry });
    const b = await store.saveRecording({ siteId: site.id, name: 'b.sg2', bytes, geometry });
    expect(await store.setRecordingAttach(site.id, true)).toBe(2);
    expect((await store.listRecordings(site.id)).map((r) => [r.name, r.attach, r.rev])).toEqual([
      ['a.sg2', true, 2],
      ['b.sg2', true, 2],
    ]);
    expect(await store.setRecordingAttach(site.id, true)).toBe(0); // nothing to change, no new revision
    const c = await store.saveRecording({ siteId: site.id, name: 'c.sg2', bytes, geometry });
    expect(c.attach).toBe(true);
    const outboxIds = (await store.outbox()).map((q) => q.recordId);
    expect(outboxIds.filter((id) => id === a.id)).toHaveLength(2);
    expect(outboxIds.filter((id) => id === b.id)).toHaveLength(2);
  });

  it('deletes a recording as a tombstone and drops its bytes; deleting the site does the same for all of them', async () => {
    const { store } = await freshStore();
    const site = await store.saveSite(newSite({ name: 'Invented site: quarry road' }));
    const { bytes, geometry } = invented();
    const a = await store.saveRecording({ siteId: site.id, name: 'a.sg2', bytes, geometry });
    const b = await store.saveRecording({ siteId: site.id, name: 'b.sg2', bytes, geometry });
    await store.deleteRecording(a.id);
    expect((await store.listRecordings(site.id)).map((r) => r.id)).toEqual([b.id]);
    expect(await store.recordingBytes(a.id)).toBeUndefined();
    expect((await store.outbox()).filter((q) => q.recordId === a.id).map((q) => q.rev)).toEqual([1, 2]);
    await store.deleteSite(site.id);
    expect(await store.listRecordings(site.id)).toEqual([]);
    expect(await store.recordingBytes(b.id)).toBeUndefined();
    expect((await store.outbox()).filter((q) => q.recordId === b.id).map((q) => q.rev)).toEqual([1, 2]);
  });
});

describe('the storage check before saving', () => {
  it('names sizes in bytes, kB and MB (binary units)', () => {
    expect([sizeText(512), sizeText(1536), sizeText(5 * 1048576)]).toEqual(['512 bytes', '1.5 kB', '5.0 MB']);
  });

  it('refuses a file the device has no room for, with the room in MB, and changes nothing', async () => {
    const { store } = await freshStore();
    const site = await store.saveSite(newSite({ name: 'Invented site: quarry road' }));
    const { bytes, geometry } = invented();
    const outbox = await store.outbox();
    // 5 MB left: less than the file plus the reserve kept for picks and estimates.
    estimate = { quota: 100 * 1024 * 1024, usage: 95 * 1024 * 1024 };
    const e = await rejection(store.saveRecording({ siteId: site.id, name: 'shot-01.sg2', bytes, geometry }));
    expect(e.message).toBe(
      `The device has 5.0 MB of storage left for this app, too little for this ${(bytes.byteLength / 1024).toFixed(1)} kB file and the ${(STORAGE_RESERVE_BYTES / 1048576).toFixed(1)} MB kept free for picks and estimates; free some space (for example delete recordings or old sites after exporting them). The file "shot-01.sg2" was not saved; nothing was changed.`,
    );
    expect(e.field).toBe('bytes');
    expect(await store.listRecordings(site.id)).toEqual([]);
    expect(await store.outbox()).toEqual(outbox);
    // With room again, the same file is kept.
    estimate = { quota: 100 * 1024 * 1024, usage: 10 * 1024 * 1024 };
    await store.saveRecording({ siteId: site.id, name: 'shot-01.sg2', bytes, geometry });
    expect(await store.listRecordings(site.id)).toHaveLength(1);
  });
});

describe('bad input is refused, naming the field, and changes nothing', () => {
  it('a blank name, no bytes, a geometry that does not add up, hostile overrides and an unknown site', async () => {
    const { store } = await freshStore();
    const site = await store.saveSite(newSite({ name: 'Invented site: quarry road' }));
    const { bytes, geometry } = invented();
    const outbox = await store.outbox();
    const cases: [Parameters<FieldStore['saveRecording']>[0], string, string][] = [
      [{ siteId: site.id, name: '  ', bytes, geometry }, 'name', "name is empty; give the file's name."],
      [{ siteId: site.id, name: 'a.sg2', bytes: new Uint8Array(0), geometry }, 'bytes', 'The file "a.sg2" is empty; there is nothing to keep.'],
      [{ siteId: site.id, name: 'a.sg2', bytes: [1, 2] as unknown as Uint8Array, geometry }, 'bytes', "bytes must be the file's raw bytes (a Uint8Array), but it is a list."],
      [
        { siteId: site.id, name: 'a.sg2', bytes, geometry: { ...geometry, offsets_m: [2, 4, 6] } },
        'geometry.offsets_m',
        'geometry.offsets_m has 3 offsets for 4 traces; give one per trace (null where unknown).',
      ],
      [
        { siteId: site.id, name: 'a.sg2', bytes, geometry: { ...geometry, delay_s: Number.NaN } },
        'geometry.delay_s',
        'geometry.delay_s must be a finite number in s, but it is NaN.',
      ],
      [
        { siteId: site.id, name: 'a.sg2', bytes, geometry: { ...geometry, component: '<b>up</b>' as never } },
        'geometry.component',
        'geometry.component must be one of vertical, inline, crossline, transverse, unknown, but it is "<b>up</b>".',
      ],
      [
        { siteId: site.id, name: 'a.sg2', bytes, geometry, overrides: { offsets: { first: 2, spacing: 0 } } },
        'overrides.offsets.spacing',
        'The receiver spacing must not be 0 m for a record of 4 traces.',
      ],
      [
        { siteId: site.id, name: 'a.sg2', bytes, geometry, overrides: { gain: 3 } as never },
        'overrides.gain',
        'overrides has an unknown field "gain".',
      ],
      [{ siteId: 'no-such-site', name: 'a.sg2', bytes, geometry }, 'siteId', 'This recording belongs to a site that is not in the store, so it was not saved.'],
    ];
    for (const [input, field, message] of cases) {
      const e = await rejection(store.saveRecording(input));
      expect([e.field, e.message]).toEqual([field, message]);
    }
    expect(await store.listRecordings(site.id)).toEqual([]);
    expect(await store.outbox()).toEqual(outbox);
    const e = await rejection(store.deleteRecording('no-such-recording'));
    expect(e.message).toBe('This recording is not in the store, so it cannot be deleted.');
    const f = await rejection(store.setRecordingAttach('no-such-site', true));
    expect(f.message).toBe('This site is not in the store, so its choice for raw files was not saved.');
  });
});

describe('migration from schema version 2', () => {
  it('keeps every v2 record, setting and outbox entry, and adds the two recording stores', async () => {
    const name = `rec-${crypto.randomUUID()}`;
    // A real v2 database, as the previous app version left it.
    const v2 = await openDB<FieldDB>(name, 2, { upgrade: upgradeTo(2) as never });
    const site = newSite({ name: 'Invented site: quarry road' });
    const pick = newPick(site.id, { frequency: 12, velocity: 180 }, 0);
    await v2.put('sites', site);
    await v2.put('picks', pick);
    await v2.put('settings', 'sun', 'theme');
    await v2.add('outbox', { recordId: site.id, type: 'site', rev: 1, queuedAt: site.updatedAt } as never);
    await v2.add('outbox', { recordId: pick.id, type: 'pick', rev: 1, queuedAt: pick.updatedAt } as never);
    const outboxBefore = await v2.getAll('outbox');
    v2.close();

    const store = await openFieldStore(name);
    open.push(store);
    expect(await store.listSites()).toEqual([site]);
    expect(await store.listPicks(site.id)).toEqual([pick]);
    expect(await store.getSetting('theme')).toBe('sun');
    expect(await store.outbox()).toEqual(outboxBefore);
    expect(await store.listRecordings(site.id)).toEqual([]);
    const raw = await openDB<FieldDB>(name, 3);
    expect([...raw.objectStoreNames].sort()).toEqual(['estimates', 'outbox', 'picks', 'recordingBytes', 'recordings', 'settings', 'sites']);
    expect([...raw.transaction('recordings').store.indexNames]).toEqual(['by-site']);
    raw.close();
  });
});

/**
 * Office sync with real parts: the office server as its own process on a
 * free port of 127.0.0.1, its SQLite file in a temporary folder, and
 * tablets that run the app's own sync client (pwa/sync/client.ts) on the
 * app's own store (pwa/store) over fake-indexeddb. The browser flows (the
 * same client inside Chromium) are in office-sync-browser.test.ts.
 *
 * Issue 5 §4 items 1–6 at the protocol level; item 7 (fuzz) is in
 * test/unit/core/exchange/importer-fuzz.test.ts.
 */
import 'fake-indexeddb/auto';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parsePicksCsv } from '../../core/picks/picks';
import { nextRevision, type AnyRecord, type PickRecord, type SiteRecord } from '../../core/exchange/records';
import { canonicalJson, revisionKey } from '../../core/exchange/revision';
import { resolveConflict } from '../../core/exchange/sync';
import { MAX_PUSH_BYTES } from '../../core/exchange/sync-protocol';
import { newPick, newSite, openFieldStore, type FieldStore } from '../../pwa/store';
import { exportBundle, importBundleText } from '../../pwa/sync/bundle-io';
import { SyncClient, type SyncClientOptions } from '../../pwa/sync/client';
import { addDevice, cli, query, removeTempDataDirs, snapshot, startOffice, tempDataDir, type OfficeProcess } from './office-harness';

const stores: FieldStore[] = [];
const offices: OfficeProcess[] = [];

async function tablet(): Promise<FieldStore> {
  const s = await openFieldStore(`tablet-${crypto.randomUUID()}`);
  stores.push(s);
  return s;
}

function clientFor(store: FieldStore, extra: SyncClientOptions = {}): SyncClient {
  return new SyncClient(store, { isOnline: () => true, events: new EventTarget(), requestTimeoutMs: 15_000, ...extra });
}

async function office(dataDir: string, port = 0): Promise<OfficeProcess> {
  const o = await startOffice(dataDir, port);
  offices.push(o);
  return o;
}

/** An invented survey: `n` sites of `picksPer` picks each, saved on the tablet (offline: no server involved). */
async function survey(store: FieldStore, n: number, picksPer: number, tag = 'Invented'): Promise<{ sites: SiteRecord[]; picks: PickRecord[] }> {
  const sites: SiteRecord[] = [];
  const picks: PickRecord[] = [];
  for (let i = 0; i < n; i++) {
    const site = await store.saveSite(
      newSite({ name: `${tag} site ${i + 1}`, date: '2026-05-04', crew: 'Invented crew', notes: i === 0 ? '<script>alert(1)</script> stays text' : '', location: { lat: 51 + i / 100, lon: -1 - i / 100, source: 'typed' } }),
    );
    const mine = Array.from({ length: picksPer }, (_, k) => newPick(site.id, { frequency: 4 + k * 0.25, velocity: 320 - (k % 60) * 3, sd: 8, note: k === 0 ? 'a, "quoted" note' : undefined }, k));
    for (const p of mine) if (p.note === undefined) delete p.note;
    await store.savePicks(mine);
    sites.push(site);
    picks.push(...mine);
  }
  return { sites, picks };
}

function byId(records: AnyRecord[]): Map<string, string> {
  return new Map(records.map((r) => [r.id, canonicalJson(r)]));
}

async function post(url: string, token: string, body: string): Promise<{ status: number; json: Record<string, unknown> }> {
  const res = await fetch(`${url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body });
  return { status: res.status, json: (await res.json()) as Record<string, unknown> };
}

afterAll(async () => {
  for (const o of offices) await o.kill();
  for (const s of stores) s.close();
  removeTempDataDirs();
});

describe('office sync, one tablet', () => {
  let data: string;
  let token: string;
  let srv: OfficeProcess;
  let store: FieldStore;
  let made: { sites: SiteRecord[]; picks: PickRecord[] };

  beforeAll(async () => {
    data = tempDataDir();
    token = await addDevice(data, 'tablet-one');
    store = await tablet();
    made = await survey(store, 3, 12);
  });

  it('1. sites and picks made offline wait in the outbox, then reach the SQLite store and the CSV export once the server runs', async () => {
    // Offline: nothing listens on this port.
    const c = clientFor(store);
    await c.configure('http://127.0.0.1:9', token, false);
    const failed = await c.syncNow();
    expect(failed.ok).toBe(false);
    expect(failed.message).toBe(
      'The office server at http://127.0.0.1:9 could not be reached (no network, or the server is not running). Changes stay queued on this tablet; sync will try again.',
    );
    expect((await c.refresh()).pending).toBe(3 + 36);
    expect((await c.refresh()).lastError).toContain('could not be reached');

    srv = await office(data);
    expect(await c.configure(srv.url, token)).toBe('tablet-one');
    const report = await c.syncNow();
    expect(report).toMatchObject({ ok: true, pushed: 39, conflicts: 0 });
    const status = await c.refresh();
    expect(status.pending).toBe(0);
    expect(status.lastError).toBeUndefined();
    expect(status.lastSuccess).toBeDefined();

    const rows = query<{ type: string; n: number }>(data, 'SELECT type, COUNT(*) AS n FROM records GROUP BY type ORDER BY type');
    expect(rows).toEqual([
      { type: 'pick', n: 36 },
      { type: 'site', n: 3 },
    ]);
    const stored = query<{ id: string; body: string }>(data, 'SELECT id, body FROM records');
    const local = byId(await store.allRecords());
    for (const r of stored) expect(canonicalJson(JSON.parse(r.body)), r.id).toBe(local.get(r.id));

    const out = join(data, 'export');
    const exp = await cli(['sites-export', out, '--data', data, '--no-estimate']);
    expect(exp.code, exp.err).toBe(0);
    const sitesCsv = readFileSync(join(out, 'sites.csv'), 'utf8');
    for (const s of made.sites) expect(sitesCsv).toContain(`${s.id},${s.name},2026-05-04,Invented crew`);
    expect(sitesCsv).toContain('<script>alert(1)</script> stays text');
    const first = made.sites[0];
    const parsed = parsePicksCsv(readFileSync(join(out, 'picks', `${first.id}.csv`), 'utf8')).picks;
    expect(parsed.map((p) => [p.id, p.frequency, p.velocity, p.sd, p.note])).toEqual(
      made.picks.filter((p) => p.siteId === first.id).map((p) => [p.id, p.frequency, p.velocity, p.sd, p.note]),
    );
    const geo = JSON.parse(readFileSync(join(out, 'sites.geojson'), 'utf8'));
    expect(geo.features.map((f: { geometry: unknown }) => f.geometry)).toContainEqual({ type: 'Point', coordinates: [-1, 51] });
  });

  it('2. the same push replayed twice changes nothing the second time', async () => {
    const site = nextRevision(made.sites[1], { notes: 'replayed edit' }, new Date('2026-05-05T10:00:00Z'));
    const body = JSON.stringify({ batchId: 'replay-test-1', records: [site, ...made.picks.slice(0, 5)] });
    const first = await post(srv.url, token, body);
    expect(first.status).toBe(200);
    expect(first.json).toMatchObject({ replay: false, accepted: 1, ignored: 5, conflicts: 0 });
    const before = snapshot(data);
    const second = await post(srv.url, token, body);
    expect(second.status).toBe(200);
    expect(second.json).toMatchObject({ replay: true, accepted: 0, ignored: 6, conflicts: 0 });
    expect(snapshot(data)).toBe(before);
    // The same records under a new batch id: still no duplicates, no change.
    const third = await post(srv.url, token, body.replace('replay-test-1', 'replay-test-2'));
    expect(third.json).toMatchObject({ accepted: 0, ignored: 6 });
    expect(query(data, 'SELECT COUNT(*) AS n FROM records')).toEqual([{ n: 39 }]);
    // The tablet pulls the edit; pulling again changes nothing.
    const c = clientFor(store);
    expect((await c.syncNow()).ok).toBe(true);
    expect((await store.getSite(site.id))?.notes).toBe('replayed edit');
    const local = canonicalJson(await store.allRecords());
    expect((await c.syncNow()).ok).toBe(true);
    expect(canonicalJson(await store.allRecords())).toBe(local);
  });

  it('5. a bad token gets 401, an oversized body 413, malformed JSON or records 400, and none of them changes the store', async () => {
    const before = snapshot(data);
    const good = JSON.stringify({ batchId: 'never', records: [nextRevision(made.sites[2], { notes: 'must not land' })] });

    const none = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', body: good });
    expect(none.status).toBe(401);
    expect(await none.json()).toEqual({ error: 'This request needs a device token: send the header "Authorization: Bearer TOKEN".' });
    const bad = await post(srv.url, 'x'.repeat(43), good);
    expect(bad).toEqual({ status: 401, json: { error: 'The device token is not valid or has been revoked; ask the office for a new one.' } });
    const pullBad = await fetch(`${srv.url}/api/v1/pull?since=0`, { headers: { Authorization: 'Bearer nope' } });
    expect(pullBad.status).toBe(401);

    const big = JSON.stringify({ batchId: 'big', records: [], pad: 'x'.repeat(MAX_PUSH_BYTES) });
    const huge = await post(srv.url, token, big);
    expect(huge.status).toBe(413);
    expect(huge.json.error).toBe('The request body is larger than the 16777216-byte limit (16 MiB); send the changes in smaller batches. Nothing was saved.');

    const broken = await post(srv.url, token, good.slice(0, -10));
    expect(broken).toEqual({ status: 400, json: { error: 'The request body is not valid JSON; nothing was saved.' } });

    // One bad record spoils the whole batch: the good one before it is not written either (atomic).
    const mixed = JSON.stringify({ batchId: 'mixed', records: [nextRevision(made.sites[2], { notes: 'must not land' }), { ...made.picks[0], velocity: 'fast' }] });
    const rejected = await post(srv.url, token, mixed);
    expect(rejected.status).toBe(400);
    expect(rejected.json.error).toBe('The record is not valid: records[1].velocity must be a number. Nothing was saved.');
    expect(rejected.json.field).toBe('records[1].velocity');

    const leak = await post(srv.url, token, '{"batchId": 5}');
    expect(leak.status).toBe(400);
    expect(JSON.stringify(leak.json)).not.toMatch(/at .*\.ts:\d+|node_modules|Error:/);

    // The app's client says the same in plain words, and keeps nothing it was not sure of.
    const other = await tablet();
    const c = clientFor(other);
    await expect(c.configure(srv.url, 'Q'.repeat(43))).rejects.toThrow(
      "The office did not accept this tablet's token (unknown or revoked). Ask the office for a new one (shearfield device add) and enter it in the sync settings.",
    );
    await expect(c.configure('ftp://office', token)).rejects.toThrow('The office address must start with http:// or https://.');
    await expect(c.configure(srv.url, 'short')).rejects.toThrow('The device token is the line of letters, digits, - and _ that "shearfield device add" printed; paste it whole.');
    expect((await c.refresh()).state).toBe('not-set-up');

    expect(snapshot(data)).toBe(before);
  });

  it('6. a bundle exported on the tablet imports into a fresh tablet and into a fresh office store as identical records; bad bundles change nothing', async () => {
    const file = await exportBundle(store, undefined, 'tablet-one');
    expect(file.sites).toBe(3);

    const fresh = await tablet();
    const outcome = await importBundleText(fresh, file.text);
    expect(outcome).toEqual({ ok: true, message: 'Read 3 sites, 36 picks and 0 estimates: 39 new or newer, 0 already here or older.' });
    expect(byId(await fresh.allRecords())).toEqual(byId(await store.allRecords()));
    expect((await fresh.outbox()).length).toBe(39);
    expect(await importBundleText(fresh, file.text)).toEqual({ ok: true, message: 'Read 3 sites, 36 picks and 0 estimates: 0 new or newer, 39 already here or older.' });

    const officeData = tempDataDir();
    const path = join(officeData, file.name);
    writeFileSync(path, file.text);
    const imported = await cli(['bundle-import', path, '--data', officeData]);
    expect(imported.code, imported.err).toBe(0);
    expect(imported.out).toBe(`${file.name}: Read 3 sites, 36 picks and 0 estimates: 39 new or newer, 0 already here or older.\n`);
    const officeRecords = query<{ body: string }>(officeData, 'SELECT body FROM records').map((r) => JSON.parse(r.body) as AnyRecord);
    expect(byId(officeRecords)).toEqual(byId(await store.allRecords()));

    // Bad bundles: nothing changes on either side, and the message says why.
    const beforeTablet = canonicalJson(await fresh.allRecords());
    const beforeOffice = snapshot(officeData);
    const hostile = JSON.parse(file.text);
    hostile.sites[0].notes = '<img src=x onerror=alert(1)>';
    hostile.picks[0].velocity = '<b>310</b>';
    const future = { ...JSON.parse(file.text), version: 2 };
    const cases: [string, string][] = [
      [file.text.slice(0, Math.floor(file.text.length / 2)), 'Nothing was imported. The bundle file ends too early: it looks cut short (truncated). Export it again and copy the whole file.'],
      [JSON.stringify(hostile), 'Nothing was imported. The bundle is not valid: picks[0].velocity must be a number.'],
      [JSON.stringify(future), 'Nothing was imported. The bundle uses format version 2, newer than version 1 that this copy of Shearfield reads; update Shearfield to import it.'],
    ];
    for (const [text, message] of cases) {
      expect(await importBundleText(fresh, text)).toEqual({ ok: false, message });
      const bad = join(officeData, 'bad.json');
      writeFileSync(bad, text);
      const r = await cli(['bundle-import', bad, '--data', officeData]);
      expect(r.code).toBe(1);
      expect(r.err).toBe(`shearfield bundle-import: bad.json: ${message.replace('Nothing was imported. ', '')} Nothing was imported from it.\n`);
    }
    expect(canonicalJson(await fresh.allRecords())).toBe(beforeTablet);
    expect(snapshot(officeData)).toBe(beforeOffice);

    // Markup alone is just text: it imports, and stays the same characters.
    const markupOnly = JSON.parse(file.text);
    markupOnly.sites[0] = nextRevision(markupOnly.sites[0], { notes: '<img src=x onerror=alert(1)>' });
    expect((await importBundleText(fresh, JSON.stringify(markupOnly))).ok).toBe(true);
    expect((await fresh.getSite(markupOnly.sites[0].id))?.notes).toBe('<img src=x onerror=alert(1)>');
  });
});

/** Two tablets registered with one office, tablet A's one invented site (two picks) synced to both. */
async function twoTabletsSharingOneSite() {
  const data = tempDataDir();
  const tA = await addDevice(data, 'tablet-a');
  const tB = await addDevice(data, 'tablet-b');
  const srv = await office(data);
  const [a, b] = [await tablet(), await tablet()];
  const [ca, cb] = [clientFor(a), clientFor(b)];
  await ca.configure(srv.url, tA);
  await cb.configure(srv.url, tB);
  const { sites } = await survey(a, 1, 2);
  expect((await ca.syncNow()).ok).toBe(true);
  expect((await cb.syncNow()).ok).toBe(true);
  return { data, a, b, ca, cb, sites };
}

/** An invented layer-builder model: one layer h metres thick over a half-space. */
const oneLayerModel = (h: number) => ({
  model: { layers: [{ thickness_m: h, vs_m_s: 190, density_kg_m3: 1800 }], halfspace: { vs_m_s: 560, density_kg_m3: 2100 } },
  pInput: 'vp' as const,
  waves: { love: true, rayleigh: false },
  modes: 2,
});

describe('office sync, two tablets and a crash', () => {
  it('3. two tablets editing one site from the same revision: both versions are kept, the conflict is flagged in the office and shown on both tablets', async () => {
    const data = tempDataDir();
    const tA = await addDevice(data, 'tablet-a');
    const tB = await addDevice(data, 'tablet-b');
    const srv = await office(data);
    const a = await tablet();
    const b = await tablet();
    const ca = clientFor(a);
    const cb = clientFor(b);
    await ca.configure(srv.url, tA);
    await cb.configure(srv.url, tB);
    const { sites } = await survey(a, 1, 4);
    expect((await ca.syncNow()).ok).toBe(true);
    expect((await cb.syncNow()).pulled).toBe(5);
    const base = (await b.getSite(sites[0].id))!;
    expect(canonicalJson(base)).toBe(canonicalJson(sites[0]));

    const onA = await a.saveSite(nextRevision(sites[0], { notes: 'A: groundwater at 2 m' }, new Date('2026-05-05T09:00:00Z')));
    const onB = await b.saveSite(nextRevision(base, { notes: 'B: dry to 4 m', crew: 'Second invented crew' }, new Date('2026-05-05T09:05:00Z')));
    expect(onA.rev).toBe(onB.rev);
    expect((await ca.syncNow()).conflicts).toBe(0);
    const rb = await cb.syncNow();
    expect(rb.ok).toBe(true);
    expect(rb.conflicts).toBe(1);

    const [row] = query<{ body: string; conflicts: number }>(data, 'SELECT body, conflicts FROM records WHERE id = ?', sites[0].id);
    expect(row.conflicts).toBe(1);
    const merged = JSON.parse(row.body) as SiteRecord;
    expect(merged.notes).toBe('B: dry to 4 m');
    expect(merged.conflicts).toEqual([{ key: revisionKey(onA), from: 'tablet-a', record: onA }]);
    expect(query(data, 'SELECT COUNT(*) AS n FROM versions WHERE record_id = ?', sites[0].id)).toEqual([{ n: 3 }]);

    const listed = await cli(['conflicts', '--data', data]);
    expect(listed.out).toContain(`site "Invented site 1" (id ${sites[0].id})`);
    expect(listed.out).toContain(`kept:   rev 2, saved 2026-05-05T09:00:00.000Z, key ${revisionKey(onA)}, from tablet-a; differs in crew, notes`);

    expect((await ca.syncNow()).ok).toBe(true);
    for (const [s, c] of [
      [a, ca],
      [b, cb],
    ] as const) {
      const local = (await s.getSite(sites[0].id))!;
      expect(canonicalJson(local)).toBe(canonicalJson(merged));
      expect((await c.refresh()).conflicts).toBe(1);
    }
  });

  it('3b. two tablets changing the layer builder model of one site from the same revision: both models are kept for review; keeping one after review converges everywhere', async () => {
    const { data, a, b, ca, cb, sites } = await twoTabletsSharingOneSite();
    // Invented models: the same layer, 5 m on tablet A and 8 m on tablet B.
    const onA = await a.saveSite(nextRevision(sites[0], { layeredModel: oneLayerModel(5) }, new Date('2026-05-05T09:00:00Z')));
    await b.saveSite(nextRevision((await b.getSite(sites[0].id))!, { layeredModel: oneLayerModel(8) }, new Date('2026-05-05T09:05:00Z')));
    expect((await ca.syncNow()).conflicts).toBe(0);
    expect((await cb.syncNow()).conflicts).toBe(1);
    expect((await cli(['conflicts', '--data', data])).out).toContain(`from tablet-a; differs in layeredModel`);
    expect((await ca.syncNow()).ok).toBe(true);
    const shown = (await a.getSite(sites[0].id))!;
    expect(shown.layeredModel!.model.layers[0].thickness_m).toBe(8);
    expect(shown.conflicts![0].record).toEqual(onA);

    // Tablet A keeps its own model after review: a revision that supersedes both, which reaches the office and tablet B.
    await a.saveSite(resolveConflict(shown, { layeredModel: oneLayerModel(5) }));
    expect((await ca.syncNow()).ok).toBe(true);
    expect((await cb.syncNow()).ok).toBe(true);
    const [row] = query<{ body: string; conflicts: number }>(data, 'SELECT body, conflicts FROM records WHERE id = ?', sites[0].id);
    expect(row.conflicts).toBe(0);
    for (const s of [a, b]) expect(canonicalJson(await s.getSite(sites[0].id))).toBe(canonicalJson(JSON.parse(row.body)));
    expect((await b.getSite(sites[0].id))!.layeredModel!.model.layers[0].thickness_m).toBe(5);
  });

  it('3c. 100 layer builder edits on one tablet offline between syncs: no conflict, the office and the other tablet hold the last model', async () => {
    const { data, a, b, ca, cb, sites } = await twoTabletsSharingOneSite();
    // Invented models: 100 saved cell edits, as the layer builder saves them (pwa/ui/controllers/layered-work.ts).
    for (let i = 1; i <= 100; i++) {
      const site = (await a.getSite(sites[0].id))!;
      await a.saveSite(nextRevision(site, { layeredModel: oneLayerModel(2 + i / 10) }), { amendUnsent: true });
    }
    const ra = await ca.syncNow();
    expect(ra.ok).toBe(true);
    expect(ra.conflicts).toBe(0);
    const [row] = query<{ body: string; conflicts: number }>(data, 'SELECT body, conflicts FROM records WHERE id = ?', sites[0].id);
    expect(row.conflicts).toBe(0);
    expect((JSON.parse(row.body) as SiteRecord).layeredModel!.model.layers[0].thickness_m).toBe(12);
    const rb = await cb.syncNow();
    expect(rb.conflicts).toBe(0);
    expect(canonicalJson(await b.getSite(sites[0].id))).toBe(canonicalJson(JSON.parse(row.body)));
    expect((await cb.refresh()).conflicts).toBe(0);
  });

  it('4. the server SIGKILLed in the middle of a sync: the client retries after the restart, and everything converges with nothing lost or duplicated', async () => {
    const data = tempDataDir();
    const token = await addDevice(data, 'tablet-crash');
    let srv = await office(data);
    const port = srv.port;
    const store = await tablet();
    await survey(store, 4, 500);
    let pushes = 0;
    let killed: Promise<void> | undefined;
    const killingFetch: typeof fetch = async (input, init) => {
      if (String(input).endsWith('/api/v1/push') && ++pushes === 3) {
        // The third batch is on its way when the server dies.
        const sent = fetch(input, init);
        killed = new Promise((r) => setTimeout(r, 15)).then(() => srv.kill());
        return sent;
      }
      return fetch(input, init);
    };
    const c = clientFor(store, { fetch: killingFetch, batchRecords: 400 });
    await c.configure(srv.url, token);
    const failed = await c.syncNow();
    await killed;
    expect(failed.ok).toBe(false);
    expect(failed.message).toMatch(/could not be reached|did not answer/);
    const pendingAfterCrash = (await c.refresh()).pending;
    expect(pendingAfterCrash).toBeGreaterThan(0);
    expect(pendingAfterCrash).toBeLessThanOrEqual(2004 - 800);

    srv = await office(data, port);
    const ok = await c.syncNow();
    expect(ok.ok, ok.message).toBe(true);
    expect((await c.refresh()).pending).toBe(0);
    const local = await store.allRecords();
    const stored = query<{ id: string; body: string }>(data, 'SELECT id, body FROM records');
    expect(stored).toHaveLength(local.length);
    expect(new Set(stored.map((r) => r.id)).size).toBe(2004);
    const want = byId(local);
    for (const r of stored) expect(canonicalJson(JSON.parse(r.body))).toBe(want.get(r.id));
    // One more sync changes nothing anywhere.
    const before = snapshot(data);
    expect((await c.syncNow()).pushed).toBe(0);
    expect(snapshot(data)).toBe(before);
  });

  it('syncs when connectivity returns, and backs off while the office cannot be reached', async () => {
    const store = await tablet();
    await survey(store, 1, 2);
    const events = new EventTarget();
    let online = false;
    const calls: number[] = [];
    const t0 = Date.now();
    const failing: typeof fetch = async () => {
      calls.push(Date.now() - t0);
      throw new TypeError('fetch failed');
    };
    const c = new SyncClient(store, { fetch: failing, events, isOnline: () => online, firstBackoffMs: 40, maxBackoffMs: 160, intervalMs: 60_000 });
    await c.configure('http://127.0.0.1:9', 'a'.repeat(43), false);
    c.start();
    await new Promise((r) => setTimeout(r, 400));
    // Offline: the first try fails, and the timer does not hammer the network while offline.
    expect(calls.length).toBe(1);
    expect(c.getStatus().state).toBe('offline');
    online = true;
    events.dispatchEvent(new Event('online'));
    await new Promise((r) => setTimeout(r, 1200));
    c.stop();
    // Back online: an immediate try, then retries 40, 80, 160, 160 … ms apart.
    const gaps = calls.slice(1).map((t, i, a) => (i === 0 ? 0 : t - a[i - 1])).slice(1);
    expect(calls.length).toBeGreaterThanOrEqual(4);
    expect(gaps[0]).toBeGreaterThanOrEqual(35);
    expect(gaps[1]).toBeGreaterThanOrEqual(70);
    // Capped at 160 ms (plus timer slack on a busy machine).
    expect(Math.max(...gaps)).toBeLessThan(1000);
    expect((await c.refresh()).pending).toBe(3);
  });
});

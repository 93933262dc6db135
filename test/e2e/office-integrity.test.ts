/**
 * Office integrity (issue 11, items 1–6 and 10), with real parts: the office
 * server as its own process on a free port of 127.0.0.1, its SQLite file in
 * a temporary folder, the shearfield command line as its own process where
 * two writers must overlap, and tablets running the app's own sync client on
 * the app's own store over fake-indexeddb. The tablet in Chromium (item 1)
 * is in office-integrity-browser.test.ts.
 */
import 'fake-indexeddb/auto';
import Database from 'better-sqlite3';
import { spawn } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { bundleToJson, makeBundle } from '../../core/exchange/bundle';
import { MAX_RECORD_DEPTH } from '../../core/exchange/record-limits';
import { nextRevision, type AnyRecord, type EstimateRecord, type PickRecord, type SiteRecord } from '../../core/exchange/records';
import { revisionKey } from '../../core/exchange/revision';
import { DB_FILE_NAME, OfficeStore } from '../../office/store';
import { openFieldStore, type FieldStore } from '../../pwa/store';
import { SyncClient, SYNC_KEYS } from '../../pwa/sync/client';
import { addDevice, cli, query, REPO_ROOT, removeTempDataDirs, snapshot, startOffice, tempDataDir, type OfficeProcess } from './office-harness';

const T = '2026-05-07T08:00:00.000Z';
const offices: OfficeProcess[] = [];
const stores: FieldStore[] = [];

afterAll(async () => {
  for (const o of offices) await o.kill();
  for (const s of stores) s.close();
  removeTempDataDirs();
});

async function office(dataDir: string): Promise<OfficeProcess> {
  const o = await startOffice(dataDir);
  offices.push(o);
  return o;
}

function site(id: string, extra: Partial<SiteRecord> = {}): SiteRecord {
  return { type: 'site', id, rev: 1, updatedAt: T, name: `Invented integrity site ${id}`, date: '2026-05-07', crew: 'Invented crew', notes: '', axisUnit: 'hz', settings: {}, ...extra };
}

function pick(id: string, siteId: string, k: number): PickRecord {
  return { type: 'pick', id, rev: 1, updatedAt: T, siteId, order: k, frequency: 3 + k * 0.25, velocity: 300 - (k % 50), sd: 6, kind: 'group', mode: 0 };
}

/** An object nested `depth` levels deep: {"d":{"d":…{}}}. */
function nested(depth: number): Record<string, unknown> {
  let v: Record<string, unknown> = {};
  for (let i = 1; i < depth; i++) v = { d: v };
  return v;
}

/** An estimate whose summary nests `levels` deep (the whole record then nests levels + 1). */
function deepEstimate(id: string, siteId: string, levels: number): EstimateRecord {
  return { type: 'estimate', id, rev: 1, updatedAt: T, siteId, settings: {}, summary: nested(levels), computedAt: T };
}

/** The same as JSON text, built without recursion (JSON.stringify itself overflows the stack on 20,000 levels). */
function deepEstimateJson(id: string, siteId: string, levels: number): string {
  const summary = '{"d":'.repeat(levels - 1) + '{}' + '}'.repeat(levels - 1);
  return `{"type":"estimate","id":${JSON.stringify(id)},"rev":1,"updatedAt":"${T}","siteId":${JSON.stringify(siteId)},"settings":{},"summary":${summary},"computedAt":"${T}"}`;
}

async function post(url: string, token: string, body: unknown): Promise<{ status: number; json: Record<string, unknown>; headers: Headers }> {
  const res = await fetch(`${url}/api/v1/push`, {
    method: 'POST',
    headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
    body: typeof body === 'string' ? body : JSON.stringify(body),
  });
  return { status: res.status, json: (await res.json()) as Record<string, unknown>, headers: res.headers };
}

async function tablet(): Promise<FieldStore> {
  const s = await openFieldStore(`integrity-${crypto.randomUUID()}`);
  stores.push(s);
  return s;
}

/** Runs `node bin/shearfield.mjs ARGS` as its own process. */
function cliProcess(args: string[]): Promise<{ code: number | null; out: string; err: string }> {
  return new Promise((ok) => {
    const child = spawn(process.execPath, ['bin/shearfield.mjs', ...args], { cwd: REPO_ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    let err = '';
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.stderr.on('data', (d: Buffer) => (err += d.toString()));
    child.on('exit', (code) => ok({ code, out, err }));
  });
}

/** Writes a record straight into the SQLite file, as a store written before the shared bound existed could hold it. */
function plantRecord(dataDir: string, rec: AnyRecord): number {
  const db = new Database(join(dataDir, DB_FILE_NAME));
  try {
    db.pragma('busy_timeout = 5000');
    const seq = (db.prepare('SELECT COALESCE(MAX(seq), 0) + 1 AS s FROM records').get() as { s: number }).s;
    db.prepare(
      'INSERT INTO records (id, type, site_id, rev, rev_key, updated_at, deleted, conflicts, seq, body) VALUES (?, ?, ?, ?, ?, ?, 0, 0, ?, ?)',
    ).run(rec.id, rec.type, rec.type === 'site' ? rec.id : rec.siteId, rec.rev, `${rec.rev}-planted`, rec.updatedAt, seq, JSON.stringify(rec));
    return seq;
  } finally {
    db.close();
  }
}

describe('1 and 10. one bound on nesting depth and record size, at both ends', () => {
  it('the office answers a push holding a record nested too deep with 400 naming the record, at 3,000 and at 20,000 levels, and stores nothing', async () => {
    const data = tempDataDir();
    const token = await addDevice(data, 'deep-tablet');
    const srv = await office(data);
    const before = snapshot(data);
    for (const levels of [3_000, 20_000]) {
      const r = await post(srv.url, token, `{"batchId":"deep-${levels}","records":[${JSON.stringify(site('deep-site'))},${deepEstimateJson('deep-est', 'deep-site', levels)}]}`);
      expect(r.status, `depth ${levels}`).toBe(400);
      expect(snapshot(data)).toBe(before);
      expect(r.json.error).toBe(
        `The estimate "deep-est" (records[1]) nests deeper than ${MAX_RECORD_DEPTH} levels of lists and objects, more than Shearfield keeps; it was refused. Nothing was saved.`,
      );
    }
    // At the bound itself the record is kept: the summary is the record's level 2.
    const atBound = await post(srv.url, token, { batchId: 'at-bound', records: [site('deep-site'), deepEstimate('ok-est', 'deep-site', MAX_RECORD_DEPTH - 1)] });
    expect(atBound.status).toBe(200);
    expect(query(data, 'SELECT id FROM records ORDER BY id')).toEqual([{ id: 'deep-site' }, { id: 'ok-est' }]);
    expect(srv.output()).not.toMatch(/internal error|Maximum call stack/);
  });

  it('bundle-import of a bundle nested 4,000 levels deep exits 1 with one sentence naming the file and the record', async () => {
    const data = tempDataDir();
    await addDevice(data, 'anyone');
    const before = snapshot(data);
    const file = join(data, 'deep.json');
    writeFileSync(file, bundleToJson(makeBundle([site('bundle-site'), deepEstimate('bundle-est', 'bundle-site', 4_000)])));
    const r = await cli(['bundle-import', file, '--data', data]);
    expect(r).toEqual({
      code: 1,
      out: '',
      err: `shearfield bundle-import: deep.json: The estimate "bundle-est" (estimates[0]) nests deeper than ${MAX_RECORD_DEPTH} levels of lists and objects, more than Shearfield keeps; it was refused. Nothing was imported from it.\n`,
    });
    expect(snapshot(data)).toBe(before);
  });

  it('a tablet never moves its pull cursor past a record it could not store, says which one, and that retrying will not help', async () => {
    const data = tempDataDir();
    const token = await addDevice(data, 'cursor-tablet');
    const srv = await office(data);
    const first = await post(srv.url, token, { batchId: 'before', records: [site('c-site'), pick('c-p0', 'c-site', 0)] });
    expect(first.status).toBe(200);
    // A record an older office accepted: written straight into its file.
    const deepSeq = plantRecord(data, deepEstimate('c-deep', 'c-site', 3_000));
    const after = await post(srv.url, token, { batchId: 'after', records: [pick('c-p1', 'c-site', 1)] });
    expect(after.status).toBe(200);

    const store = await tablet();
    const client = new SyncClient(store, { isOnline: () => true, events: new EventTarget() });
    await client.configure(srv.url, token);
    const message = `This tablet cannot store the estimate "c-deep" from the office: The estimate "c-deep" nests deeper than ${MAX_RECORD_DEPTH} levels of lists and objects, more than Shearfield keeps; it was refused. Retrying will not help: the office must correct or delete that record. Sync stops at it, so nothing after it is skipped.`;
    for (let attempt = 0; attempt < 2; attempt++) {
      const report = await client.syncNow();
      expect(report.ok, `attempt ${attempt + 1}`).toBe(false);
      expect(report.message).toBe(message);
      const cursor = Number(await store.getSetting<string>(SYNC_KEYS.cursor));
      expect(cursor).toBeLessThan(deepSeq);
      expect(cursor).toBe(deepSeq - 1);
    }
    // What came before it is stored, and so is what could be stored after it.
    expect((await store.allRecords()).map((r) => r.id).sort()).toEqual(['c-p0', 'c-p1', 'c-site']);

    // Once the office replaces the record with one it can keep, the same tablet takes it.
    const fixed: EstimateRecord = { ...deepEstimate('c-deep', 'c-site', 3), rev: 2, history: [`1-planted`] };
    const db = new Database(join(data, DB_FILE_NAME));
    db.prepare('UPDATE records SET body = ?, rev = 2, seq = (SELECT MAX(seq) + 1 FROM records) WHERE id = ?').run(JSON.stringify(fixed), 'c-deep');
    db.close();
    const report = await client.syncNow();
    expect(report.ok, report.message).toBe(true);
    expect((await store.allRecords()).map((r) => r.id).sort()).toEqual(['c-deep', 'c-p0', 'c-p1', 'c-site']);
  });

  it('the tablet store refuses a record over the bound with a sentence naming it and keeps nothing of it', async () => {
    const store = await tablet();
    await expect(store.putIncoming([site('t-site'), deepEstimate('t-deep', 't-site', 40)])).rejects.toThrow(
      `The estimate "t-deep" nests deeper than ${MAX_RECORD_DEPTH} levels of lists and objects, more than Shearfield keeps; it was refused.`,
    );
    expect(await store.allRecords()).toEqual([]);
  });
});

describe('2. writers wait for each other', () => {
  it('a long bundle import (its own process) and a push every 0.2 s at the same time both finish, and every record is stored', async () => {
    const data = tempDataDir();
    const token = await addDevice(data, 'busy-tablet');
    const srv = await office(data);
    const bundleRecords: AnyRecord[] = [];
    for (let s = 0; s < 10; s++) {
      bundleRecords.push(site(`imp-site-${s}`));
      for (let k = 0; k < 1000; k++) bundleRecords.push(pick(`imp-${s}-${k}`, `imp-site-${s}`, k));
    }
    const file = join(data, 'big.json');
    writeFileSync(file, bundleToJson(makeBundle(bundleRecords, { now: new Date(T) })));
    const seeded = await post(srv.url, token, { batchId: 'seed', records: [site('push-site')] });
    expect(seeded.status).toBe(200);

    let importing = true;
    const imported = cliProcess(['bundle-import', file, '--data', data]).finally(() => (importing = false));
    const statuses: number[] = [];
    let n = 0;
    // Pushes every 0.2 s while the import runs (and at least 10), each a new pick. A push that waited
    // longer than the server's write wait gets 503 with Retry-After and is sent again then, as the tablet does.
    while ((importing || n < 10) && n < 400) {
      const body = { batchId: `loop-${n}`, records: [pick(`loop-${n}`, 'push-site', n)] };
      let r = await post(srv.url, token, body);
      for (let retry = 0; r.status === 503 && retry < 10; retry++) {
        expect(r.headers.get('retry-after')).toMatch(/^\d+$/);
        await new Promise((ok) => setTimeout(ok, Number(r.headers.get('retry-after')) * 1000));
        r = await post(srv.url, token, body);
      }
      statuses.push(r.status);
      n++;
      await new Promise((ok) => setTimeout(ok, 200));
    }
    const result = await imported;
    expect(result.err).toBe('');
    expect(result.code).toBe(0);
    expect(result.out).toMatch(/^big\.json: Read 10 sites, 10000 picks and 0 estimates: 10010 new or newer, 0 already here or older\.\n$/);
    expect(statuses.filter((s) => s !== 200)).toEqual([]);
    const [{ count }] = query<{ count: number }>(data, 'SELECT COUNT(*) AS count FROM records');
    expect(count).toBe(bundleRecords.length + 1 + n);
    expect(srv.output()).not.toMatch(/internal error|database is locked/);
  }, 240_000);

  it('a command that finds the store locked past its wait prints one sentence and exits 1, changing nothing', async () => {
    const data = tempDataDir();
    await addDevice(data, 'lock-holder');
    const before = snapshot(data);
    const file = join(data, 'one.json');
    writeFileSync(file, bundleToJson(makeBundle([site('lock-site')], { now: new Date(T) })));
    // Another program holds the write lock for longer than the command waits.
    const holder = new Database(join(data, DB_FILE_NAME));
    holder.exec('BEGIN IMMEDIATE');
    const store = OfficeStore.open(data, { busyTimeoutMs: 200 });
    try {
      expect(() => store.applyBatch([site('lock-site')], { batchId: 'x', source: 'test' })).toThrow(expect.objectContaining({ code: 'SQLITE_BUSY' }));
    } finally {
      store.close();
    }
    const r = await cliProcess(['bundle-import', file, '--data', data, '--wait', '1']);
    holder.exec('ROLLBACK');
    holder.close();
    expect(r).toEqual({
      code: 1,
      out: '',
      err: 'shearfield bundle-import: one.json: The office store stayed busy with another writer (the office server or another shearfield command) for 1 s, so this step saved nothing; try again. Nothing was imported from it.\n',
    });
    expect(snapshot(data)).toBe(before);
  }, 60_000);
});

describe('3. a pushed record cannot forge another device\'s history', () => {
  it('versions a push passes on in its conflicts list are stamped with the device that sent them and kept in the trail', async () => {
    const data = tempDataDir();
    const t1 = await addDevice(data, 'tablet-1');
    const t2 = await addDevice(data, 'tablet-2');
    const srv = await office(data);
    const base = site('forge-site');
    expect((await post(srv.url, t1, { batchId: 'one', records: [base] })).status).toBe(200);
    const own = nextRevision(base, { notes: 'tablet 2 edit' }, new Date('2026-05-07T09:00:00Z'));
    const forged = nextRevision(base, { notes: 'never sent by tablet 1' }, new Date('2026-05-07T23:00:00Z'));
    const claim = { ...own, conflicts: [{ key: revisionKey(forged), from: 'tablet-1', record: forged }] };
    const r = await post(srv.url, t2, { batchId: 'two', records: [claim] });
    expect(r.status).toBe(200);

    const trail = query<{ rev_key: string; source: string }>(data, 'SELECT rev_key, source FROM versions WHERE record_id = ? ORDER BY received_at, rev_key', 'forge-site');
    expect(trail).toEqual(
      expect.arrayContaining([
        { rev_key: revisionKey(base), source: 'tablet-1' },
        { rev_key: revisionKey(own), source: 'tablet-2' },
        { rev_key: revisionKey(forged), source: 'passed on by tablet-2' },
      ]),
    );
    expect(trail).toHaveLength(3);
    const stored = JSON.parse(query<{ body: string }>(data, 'SELECT body FROM records WHERE id = ?', 'forge-site')[0].body) as SiteRecord;
    // Whatever the record shows, no kept version is credited to a device that did not send it, and each is in the trail.
    const keys = new Set(trail.map((t) => t.rev_key));
    for (const c of stored.conflicts ?? []) {
      expect(c.from).not.toBe('tablet-1');
      expect(keys.has(c.key)).toBe(true);
    }
    expect(keys.has(revisionKey(stored))).toBe(true);
    const listed = await cli(['conflicts', '--data', data]);
    expect(listed.out).not.toMatch(/from tablet-1;/);
  });
});

describe('4. one validation path for push and bundle', () => {
  it('a push with a pick of a site neither in the push nor in the store gets 400 naming it; with the site stored first it is kept', async () => {
    const data = tempDataDir();
    const token = await addDevice(data, 'ref-tablet');
    const srv = await office(data);
    const before = snapshot(data);
    const r = await post(srv.url, token, { batchId: 'orphan', records: [site('ref-site'), pick('orphan-pick', 'no-such-site', 0)] });
    expect(r.status).toBe(400);
    expect(r.json.error).toBe(
      'The record records[1] (pick "orphan-pick") belongs to site "no-such-site", which is neither in this batch nor in the office store; send the site with it. Nothing was saved.',
    );
    expect(snapshot(data)).toBe(before);
    expect((await post(srv.url, token, { batchId: 'site-first', records: [site('ref-site')] })).status).toBe(200);
    expect((await post(srv.url, token, { batchId: 'pick-later', records: [pick('late-pick', 'ref-site', 0)] })).status).toBe(200);
    const exp = await cli(['bundle-export', join(data, 'all.json'), '--data', data]);
    expect(exp.out).toBe(`Wrote 1 sites, 1 picks and 0 estimates to ${join(data, 'all.json')}.\n`);
  });
});

describe('5. batch ids are scoped by device', () => {
  it('a second device reusing a batch id is not a replay; only an identical batch from the same device is, and every batch is in the trail', async () => {
    const data = tempDataDir();
    const a = await addDevice(data, 'batch-a');
    const b = await addDevice(data, 'batch-b');
    const srv = await office(data);
    const fromA = { batchId: 'shared-id', records: [site('batch-site-a')] };
    const fromB = { batchId: 'shared-id', records: [site('batch-site-b')] };
    expect((await post(srv.url, a, fromA)).json).toMatchObject({ replay: false, accepted: 1 });
    expect((await post(srv.url, b, fromB)).json).toMatchObject({ replay: false, accepted: 1 });
    expect((await post(srv.url, a, fromA)).json).toMatchObject({ replay: true, accepted: 0, ignored: 1 });
    // The same device reusing its id with other records: a batch of its own.
    expect((await post(srv.url, a, { batchId: 'shared-id', records: [site('batch-site-c')] })).json).toMatchObject({ replay: false, accepted: 1 });
    const rows = query<{ source: string; accepted: number }>(data, "SELECT source, accepted FROM batches WHERE batch_id = 'shared-id' ORDER BY received_at, source");
    expect(rows).toEqual([
      { source: 'batch-a', accepted: 1 },
      { source: 'batch-b', accepted: 1 },
      { source: 'batch-a', accepted: 1 },
    ]);
    expect(query(data, 'SELECT id FROM records ORDER BY id')).toEqual([{ id: 'batch-site-a' }, { id: 'batch-site-b' }, { id: 'batch-site-c' }]);
  });

  it('a store of schema version 1 keeps its batch trail when it is opened by this version', () => {
    const data = tempDataDir();
    const db = new Database(join(data, DB_FILE_NAME));
    db.exec(`CREATE TABLE devices (id INTEGER PRIMARY KEY AUTOINCREMENT, name TEXT NOT NULL UNIQUE, token_sha256 TEXT NOT NULL UNIQUE, created_at TEXT NOT NULL, revoked_at TEXT);
      CREATE TABLE records (id TEXT PRIMARY KEY, type TEXT NOT NULL CHECK (type IN ('site', 'pick', 'estimate')), site_id TEXT, rev INTEGER NOT NULL, rev_key TEXT NOT NULL, updated_at TEXT NOT NULL, deleted INTEGER NOT NULL DEFAULT 0, conflicts INTEGER NOT NULL DEFAULT 0, seq INTEGER NOT NULL UNIQUE, body TEXT NOT NULL);
      CREATE TABLE versions (record_id TEXT NOT NULL, rev_key TEXT NOT NULL, source TEXT NOT NULL, received_at TEXT NOT NULL, body TEXT NOT NULL, PRIMARY KEY (record_id, rev_key)) WITHOUT ROWID;
      CREATE TABLE batches (batch_id TEXT PRIMARY KEY, device_id INTEGER REFERENCES devices (id), source TEXT NOT NULL, received_at TEXT NOT NULL, records INTEGER NOT NULL, accepted INTEGER NOT NULL, ignored INTEGER NOT NULL, conflicts INTEGER NOT NULL);
      INSERT INTO devices (name, token_sha256, created_at) VALUES ('old-tablet', 'x', '${T}');
      INSERT INTO batches VALUES ('old-batch', 1, 'old-tablet', '${T}', 3, 3, 0, 0), ('bundle-1', NULL, 'bundle a.json', '${T}', 2, 2, 0, 0);
      PRAGMA user_version = 1;`);
    db.close();
    const store = OfficeStore.open(data);
    store.close();
    expect(query(data, 'SELECT scope, batch_id, device_id, source FROM batches ORDER BY batch_id')).toEqual([
      { scope: 'import', batch_id: 'bundle-1', device_id: null, source: 'bundle a.json' },
      { scope: 'device:1', batch_id: 'old-batch', device_id: 1, source: 'old-tablet' },
    ]);
  });
});

describe('6. durability', () => {
  it('the store runs WAL with synchronous = FULL, so an acknowledged push survives a power cut', () => {
    const data = tempDataDir();
    const store = OfficeStore.open(data, { create: true });
    try {
      expect(store.db.pragma('journal_mode', { simple: true })).toBe('wal');
      // SQLite: 0 OFF, 1 NORMAL, 2 FULL, 3 EXTRA (sqlite.org, PRAGMA synchronous).
      expect(store.db.pragma('synchronous', { simple: true })).toBe(2);
    } finally {
      store.close();
    }
  });
});

/**
 * The office store, its device commands and the server's edges, with a real
 * SQLite file in a temporary folder and the real server code on a free port
 * of 127.0.0.1 (in this process).
 */
import Database from 'better-sqlite3';
import { spawn } from 'node:child_process';
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CAUTION } from '../../../core/shared/caution';
import { demoPicks } from '../../../core/exchange/demo';
import type { PickRecord, SiteRecord } from '../../../core/exchange/records';
import { SUMMARY_CSV_COLUMNS } from '../../../core/exchange/office-tables';
import { cli, officeScratch } from './office-harness';
import { startOfficeServer } from '../../../office/server';
import { DB_FILE_NAME, OfficeStore, STORE_SCHEMA_VERSION, tokenHash } from '../../../office/store';

const T = '2026-05-04T08:00:00.000Z';
const { dir, running } = officeScratch('shearfield-office-unit-');

describe('devices', () => {
  it('add prints the token once and the store keeps only its SHA-256; list and revoke complete the set', async () => {
    const d = dir();
    const added = await cli(['device', 'add', 'Tablet 7', '--data', d]);
    expect(added.code).toBe(0);
    const token = added.out.split('\n')[3].trim();
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(added.out).toContain('Token (shown once; the office keeps only its SHA-256):');
    const db = new Database(join(d, DB_FILE_NAME), { readonly: true });
    expect(db.prepare('SELECT token_sha256 FROM devices').all()).toEqual([{ token_sha256: tokenHash(token) }]);
    db.close();
    for (const f of readdirSync(d)) expect(readFileSync(join(d, f)).includes(Buffer.from(token)), f).toBe(false);

    const again = await cli(['device', 'add', 'Tablet 7', '--data', d]);
    expect(again).toMatchObject({ code: 1, err: 'shearfield device: A device named "Tablet 7" already exists; choose another name.\n' });
    const badName = await cli(['device', 'add', '<script>', '--data', d]);
    expect(badName.err).toBe(
      'shearfield device: The device name "<script>" is not usable: use 1–60 letters, digits, spaces, dots, dashes or underscores, starting with a letter or digit.\n',
    );

    const listed = await cli(['device', 'list', '--data', d]);
    expect(listed.out.split('\n')[0]).toBe('id  name      added                     last batch  state');
    expect(listed.out).toMatch(/^1 +Tablet 7 {2}\S+ {2}- +active$/m);

    const srv = await startOfficeServer({ port: 0, dataDir: d, distDir: join(d, 'none') });
    running.push(srv);
    const status = () => fetch(`${srv.url}/api/v1/status`, { headers: { Authorization: `Bearer ${token}` } });
    expect((await status()).status).toBe(200);
    const revoked = await cli(['device', 'revoke', 'Tablet 7', '--data', d]);
    expect(revoked.out).toMatch(/^Revoked device 1: Tablet 7 \(added .+, last batch none, revoked .+\)\. Its token no longer works\.\n$/);
    const after = await status();
    expect(after.status).toBe(401);
    expect(await after.json()).toEqual({ error: 'The device token is not valid or has been revoked; ask the office for a new one.' });
    expect(await cli(['device', 'add', 'Tablet 7', '--data', d])).toMatchObject({
      code: 1,
      err: 'shearfield device: A device named "Tablet 7" was revoked and its name stays on record; add the device under a new name.\n',
    });
    expect((await cli(['device', 'add', 'Tablet 7b', '--data', d])).code).toBe(0);
    expect((await cli(['device', 'revoke', 'nobody', '--data', d])).err).toBe('shearfield device: No device is named or numbered "nobody"; see shearfield device list.\n');
    expect((await cli(['device', 'list', '--data', join(d, 'missing')])).err).toContain('There is no office store in');
  });
});

describe('store schema', () => {
  it('refuses a store file that is not an SQLite database with one line naming it, and leaves the file as it was', async () => {
    const d = dir();
    const file = join(d, DB_FILE_NAME);
    writeFileSync(file, 'not a database, just text that is long enough to be read as a header');
    const before = readFileSync(file);
    expect(await cli(['device', 'list', '--data', d])).toMatchObject({
      code: 1,
      err: `shearfield device: The file ${file} is not an office store (not an SQLite database); move it away or choose another --data folder.\n`,
    });
    expect(readFileSync(file).equals(before)).toBe(true);
  });

  it('migrates a fresh file to the current version in WAL mode, keeps data on reopening, and refuses a newer file', () => {
    const d = dir();
    const s = OfficeStore.open(d, { create: true });
    expect(s.db.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(s.db.pragma('user_version', { simple: true })).toBe(STORE_SCHEMA_VERSION);
    s.addDevice('keep-me');
    s.close();
    const again = OfficeStore.open(d);
    expect(again.listDevices().map((x) => x.name)).toEqual(['keep-me']);
    again.db.pragma(`user_version = ${STORE_SCHEMA_VERSION + 1}`);
    again.close();
    expect(() => OfficeStore.open(d)).toThrow(`has schema version ${STORE_SCHEMA_VERSION + 1}, newer than this Shearfield (${STORE_SCHEMA_VERSION}); update Shearfield.`);
  });
});

describe('server edges', () => {
  it('npm run office with a --data path that is a file exits 1 with one line naming the path', async () => {
    const d = dir();
    const aFile = join(d, 'a-file');
    writeFileSync(aFile, 'x');
    const child = spawn(process.execPath, ['--import', 'tsx', 'office/server.ts', '--port', '0', '--data', aFile], { cwd: process.cwd() });
    let err = '';
    child.stderr.on('data', (b: Buffer) => (err += b.toString()));
    const code = await new Promise<number | null>((res) => child.on('close', res));
    expect(code).toBe(1);
    expect(err).toBe(`office: could not start: "${aFile}" cannot be used (EEXIST); check --data and --dist.\n`);
    expect(readFileSync(aFile, 'utf8')).toBe('x');
  }, 30_000);

  it('serves the built app with an app-route fallback, refuses paths outside it, says how to build when it is missing, and answers unknown API paths in JSON', async () => {
    const d = dir();
    const dist = join(d, 'dist');
    mkdirSync(join(dist, 'assets'), { recursive: true });
    writeFileSync(join(dist, 'index.html'), '<!doctype html><title>app</title>');
    writeFileSync(join(dist, 'assets', 'a.js'), 'export {};');
    writeFileSync(join(d, 'secret.txt'), 'secret');
    const store = OfficeStore.open(d, { create: true });
    const { token } = store.addDevice('t');
    store.close();
    const srv = await startOfficeServer({ port: 0, dataDir: d, distDir: dist });
    running.push(srv);
    const js = await fetch(`${srv.url}/assets/a.js`);
    expect(js.headers.get('content-type')).toBe('text/javascript; charset=utf-8');
    expect(js.headers.get('cache-control')).toContain('immutable');
    expect(await (await fetch(`${srv.url}/sites/123`)).text()).toContain('<title>app</title>');
    expect((await fetch(`${srv.url}/..%2Fsecret.txt`)).status).toBe(404);
    expect((await fetch(`${srv.url}/%2e%2e/secret.txt`)).status).toBe(404);
    const unknown = await fetch(`${srv.url}/api/v1/nothing`, { headers: { Authorization: `Bearer ${token}` } });
    expect(unknown.status).toBe(404);
    expect(await unknown.json()).toEqual({ error: 'There is no API at /api/v1/nothing; the sync API has /api/v1/status, /api/v1/push and /api/v1/pull.' });
    const wrong = await fetch(`${srv.url}/api/v1/push`, { headers: { Authorization: `Bearer ${token}` } });
    expect(wrong.status).toBe(405);
    // CORS answers only the office's own origin (and --allow-origin ones).
    const pre = await fetch(`${srv.url}/api/v1/push`, { method: 'OPTIONS', headers: { Origin: srv.url } });
    expect(pre.status).toBe(204);
    expect(pre.headers.get('access-control-allow-origin')).toBe(srv.url);
    expect(pre.headers.get('access-control-allow-headers')).toBe('Authorization, Content-Type');
    const badCursor = await fetch(`${srv.url}/api/v1/pull?since=abc`, { headers: { Authorization: `Bearer ${token}` } });
    expect(badCursor.status).toBe(400);
    expect((await badCursor.json()).error).toBe('since must be a cursor returned by the server (a whole number), but it is "abc". Nothing was saved.');

    const bare = await startOfficeServer({ port: 0, dataDir: d, distDir: join(d, 'not-built') });
    running.push(bare);
    const page = await fetch(bare.url);
    expect(page.status).toBe(503);
    expect(await page.text()).toContain('run <code>npm run build</code> in the Shearfield folder, then restart the server.');
  });
});

describe('office analysis commands', () => {
  it('sites-summary re-runs the estimate for every site into one CSV with classes, warnings and the caution', async () => {
    const d = dir();
    const store = OfficeStore.open(d, { create: true });
    const site = (id: string, name: string): SiteRecord => ({ type: 'site', id, rev: 1, updatedAt: T, name, date: '2026-05-04', crew: '', notes: '', axisUnit: 'hz', settings: {} });
    const picks: PickRecord[] = demoPicks().map((p, k) => ({ ...p, type: 'pick', id: `p${k}`, rev: 1, updatedAt: T, siteId: 's1', order: k }));
    store.applyBatch([site('s1', 'Invented A'), site('s2', 'Invented B, no picks'), ...picks], { batchId: 'x', source: 'test' });
    store.close();
    const r = await cli(['sites-summary', '-', '--data', d]);
    expect(r.code, r.err).toBe(0);
    const lines = r.out.trimEnd().split('\r\n');
    expect(lines[0]).toBe(SUMMARY_CSV_COLUMNS.join(','));
    expect(lines).toHaveLength(3);
    const a = lines.find((l) => l.startsWith('s1,'))!;
    // The verdict sits next to the thickness it judges (the invented demo is resolved).
    expect(a).toMatch(/^s1,Invented A,2026-05-04,23,estimated,resolved,"Layer thickness resolved: 7\.\d+ m, 95 % range [\d.]+–[\d.]+ m\.",7\.\d+,/);
    expect(a.endsWith(CAUTION)).toBe(true);
    expect(lines.find((l) => l.startsWith('s2,'))).toContain('no-picks');
  });

  it('an output path that cannot be written is bad input (exit 1, one line naming the path), not an internal error', async () => {
    const d = dir();
    OfficeStore.open(d, { create: true }).close();
    const aFile = join(d, 'a-file');
    writeFileSync(aFile, 'x');
    const missing = join(d, 'no-such-folder', 'out.csv');
    expect(await cli(['sites-summary', missing, '--data', d])).toMatchObject({
      code: 1,
      err: `shearfield sites-summary: Could not open the file "${missing}": it, or a folder above it, does not exist.\n`,
    });
    expect(await cli(['sites-export', aFile, '--data', d])).toMatchObject({
      code: 1,
      err: `shearfield sites-export: Could not create the folder "${join(aFile, 'picks')}": a part of that path is a file, not a folder.\n`,
    });
    expect(readFileSync(aFile, 'utf8')).toBe('x');
    const bundleOut = join(d, 'no-such-folder', 'b.json');
    expect((await cli(['bundle-export', bundleOut, '--data', d])).code).toBe(1);
  });
});

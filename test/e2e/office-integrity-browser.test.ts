/**
 * Issue 11 item 1 with the real app in Chromium: a record the office holds
 * but a tablet cannot keep (written into the office file before the shared
 * depth bound existed) must not be skipped. The tablet stores what it can,
 * keeps its pull cursor before that record on every "Sync now", and says
 * which record it is and that retrying will not help. Once the office
 * replaces the record, the same tablet takes it.
 *
 * Real parts: the office server process serving the built app and the sync
 * API on a free port of 127.0.0.1 with a real SQLite file; the tablet is a
 * Chromium profile that installs the app from the office.
 */
import Database from 'better-sqlite3';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, describe, expect, it } from 'vitest';
import { MAX_RECORD_DEPTH } from '../../core/exchange/record-limits';
import type { EstimateRecord, PickRecord, SiteRecord } from '../../core/exchange/records';
import { DB_FILE_NAME } from '../../office/store';
import { launchBrowser, VIEWPORTS, waitForServiceWorkerControl, type BrowserSession } from './harness';
import { addDevice, removeTempDataDirs, REPO_ROOT, startOffice, tempDataDir, type OfficeProcess } from './office-harness';

const DIST = process.env.SHEARFIELD_E2E_DIST ?? join(REPO_ROOT, 'dist');
const T = '2026-05-08T08:00:00.000Z';
const browsers: BrowserSession[] = [];
let office: OfficeProcess | undefined;

afterAll(async () => {
  for (const b of browsers) await b.close();
  await office?.kill();
  removeTempDataDirs();
});

function insert(db: Database.Database, rec: SiteRecord | PickRecord | EstimateRecord, revKey: string): number {
  const seq = (db.prepare('SELECT COALESCE(MAX(seq), 0) + 1 AS s FROM records').get() as { s: number }).s;
  db.prepare('INSERT INTO records (id, type, site_id, rev, rev_key, updated_at, deleted, conflicts, seq, body) VALUES (?, ?, ?, ?, ?, ?, 0, 0, ?, ?)').run(
    rec.id,
    rec.type,
    rec.type === 'site' ? rec.id : rec.siteId,
    rec.rev,
    revKey,
    rec.updatedAt,
    seq,
    JSON.stringify(rec),
  );
  return seq;
}

function summary(levels: number): Record<string, unknown> {
  let v: Record<string, unknown> = {};
  for (let i = 1; i < levels; i++) v = { d: v };
  return v;
}

async function waitText(page: Page, testId: string, want: RegExp, timeout = 30_000): Promise<void> {
  await page.waitForFunction(
    ([id, src, flags]) => new RegExp(src, flags).test(document.querySelector(`[data-testid="${id}"]`)?.textContent ?? ''),
    [testId, want.source, want.flags] as const,
    { timeout },
  );
}

async function idb<T>(page: Page, store: string, key?: string): Promise<T> {
  return page.evaluate(
    async ([name, k]) => {
      const db = await new Promise<IDBDatabase>((ok, fail) => {
        const r = indexedDB.open('shearfield');
        r.onsuccess = () => ok(r.result);
        r.onerror = () => fail(r.error);
      });
      const q = k === null ? db.transaction(name).objectStore(name).getAllKeys() : db.transaction(name).objectStore(name).get(k);
      const out = await new Promise((ok, fail) => {
        q.onsuccess = () => ok(q.result);
        q.onerror = () => fail(q.error);
      });
      db.close();
      return out;
    },
    [store, key ?? null] as const,
  ) as Promise<T>;
}

describe('a record the tablet cannot keep is never skipped (Chromium)', () => {
  it('the pull cursor stays before it on every sync, the tablet names it and says retrying will not help, and takes it once the office fixes it', async () => {
    const data = tempDataDir();
    const token = await addDevice(data, 'browser-tablet');
    office = await startOffice(data, 0, DIST);
    const db = new Database(join(data, DB_FILE_NAME));
    db.pragma('busy_timeout = 5000');
    const site: SiteRecord = { type: 'site', id: 'bd-site', rev: 1, updatedAt: T, name: 'Invented bound site', date: '2026-05-08', crew: '', notes: '', axisUnit: 'hz', settings: {} };
    const pick = (k: number): PickRecord => ({ type: 'pick', id: `bd-p${k}`, rev: 1, updatedAt: T, siteId: 'bd-site', order: k, frequency: 4 + k, velocity: 280 - k, sd: 6, kind: 'group', mode: 0 });
    insert(db, site, '1-a');
    insert(db, pick(0), '1-b');
    // About 18 kB, 3,000 levels: what an office without the bound once accepted.
    const deepSeq = insert(db, { type: 'estimate', id: 'bd-deep', rev: 1, updatedAt: T, siteId: 'bd-site', settings: {}, summary: summary(3_000), computedAt: T }, '1-c');
    insert(db, pick(1), '1-d');

    const b = await launchBrowser(VIEWPORTS.tabletLandscape);
    browsers.push(b);
    const page = b.context.pages()[0] ?? (await b.context.newPage());
    // The app runs under the office's Content-Security-Policy (issue 11 item 15): nothing it does may be refused.
    const refusals: string[] = [];
    page.on('console', (m) => {
      if (/Content Security Policy|Refused to/i.test(m.text())) refusals.push(m.text());
    });
    await page.goto(office.url, { waitUntil: 'load' });
    await page.getByRole('heading', { name: 'Field sites' }).waitFor();
    await waitForServiceWorkerControl(page);
    await page.getByLabel('Office server address').fill(office.url);
    await page.getByLabel(/^Device token/).fill(token);
    await page.getByRole('button', { name: 'Save and connect' }).click();

    const refused = new RegExp(
      `This tablet cannot store the estimate "bd-deep" from the office: The estimate "bd-deep" nests deeper than ${MAX_RECORD_DEPTH} levels .*Retrying will not help: the office must correct or delete that record\\.`,
    );
    await waitText(page, 'sync-last-error', refused, 60_000);
    expect(Number(await idb<string>(page, 'settings', 'sync.cursor'))).toBe(deepSeq - 1);
    for (let again = 0; again < 2; again++) {
      await page.getByRole('button', { name: 'Sync now' }).click();
      await waitText(page, 'sync-message', refused);
      expect(Number(await idb<string>(page, 'settings', 'sync.cursor'))).toBe(deepSeq - 1);
    }
    expect(await page.getByText(/Synced: \d+ sent, 0 received/).count()).toBe(0);
    expect((await idb<string[]>(page, 'picks')).sort()).toEqual(['bd-p0', 'bd-p1']);
    expect(await idb<string[]>(page, 'estimates')).toEqual([]);

    // The office replaces the record with one it can keep (a new revision, a new change number).
    const fixed: EstimateRecord = { type: 'estimate', id: 'bd-deep', rev: 2, updatedAt: T, siteId: 'bd-site', settings: {}, summary: summary(3), computedAt: T, history: ['1-c'] };
    db.prepare('UPDATE records SET body = ?, rev = 2, rev_key = ?, seq = (SELECT MAX(seq) + 1 FROM records) WHERE id = ?').run(JSON.stringify(fixed), '2-e', 'bd-deep');
    db.close();
    await page.getByRole('button', { name: 'Sync now' }).click();
    await waitText(page, 'sync-message', /^Synced: 0 sent, \d+ received/);
    expect(await idb<string[]>(page, 'estimates')).toEqual(['bd-deep']);
    // The site opens with its picks and estimate under the policy too.
    await page.getByRole('button', { name: /Invented bound site/ }).first().click();
    await page.getByRole('heading', { name: 'Invented bound site' }).waitFor();
    expect(refusals).toEqual([]);
  }, 180_000);
});

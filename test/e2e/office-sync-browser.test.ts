/**
 * Office sync in real Chromium (issue 5 §4 items 1, 3 and 6 with the real
 * app): the office server process serves the built app and the sync API on
 * a free port of 127.0.0.1 with a real SQLite file; tablets are separate
 * Chromium profiles that install the app from the office.
 *
 *  1. Tablet A installs the app and saves the office settings, then works
 *     OFFLINE with the office down: creates a site and types picks; a reload
 *     keeps them queued. The office starts again, connectivity returns, the
 *     tablet syncs by itself: the rows are in SQLite and in the CSV export.
 *  3. Tablets A and B edit the site's notes from the same revision: both
 *     versions are kept, the office flags the conflict, and both tablets
 *     show it.
 *  6. A bundle exported on tablet A (a download) imports into a fresh
 *     tablet and into a fresh office store as identical records; a truncated
 *     or hostile bundle changes nothing and the tablet says why.
 *  4. A tablet holding 6,012 records (two push batches) syncs; the office
 *     commits the first batch and is SIGKILLed before its answer reaches
 *     the tablet. After the restart the tablet syncs again: the committed
 *     batch is recognised (no duplicates), the rest arrives, nothing is lost.
 *
 * Items 2, 5 and 7 are protocol-level and run without a browser
 * (office-sync.test.ts, importer-fuzz.test.ts).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bundleToJson, makeBundle } from '../../core/exchange/bundle';
import { parsePicksCsv } from '../../core/picks/picks';
import type { AnyRecord, PickRecord, SiteRecord } from '../../core/exchange/records';
import { canonicalJson } from '../../core/exchange/revision';
import { launchBrowser, reload, setOffline, VIEWPORTS, waitForServiceWorkerControl, type BrowserSession } from './harness';
import { addDevice, cli, query, removeTempDataDirs, REPO_ROOT, startOffice, tempDataDir, type OfficeProcess } from './office-harness';

const DIST = process.env.SHEARFIELD_E2E_DIST ?? join(REPO_ROOT, 'dist');
const SITE = 'Office sync terrace (invented)';
const PICKS = [
  { f: 5, v: 262.4 },
  { f: 8, v: 228.1 },
  { f: 12, v: 214.9 },
];

let data: string;
let office: OfficeProcess;
let port: number;
let tokenA: string;
let tokenB: string;
let tokenD: string;
const browsers: BrowserSession[] = [];
const pageErrors: string[] = [];

async function tabletPage(): Promise<Page> {
  const b = await launchBrowser(VIEWPORTS.tabletLandscape);
  browsers.push(b);
  const page = b.context.pages()[0] ?? (await b.context.newPage());
  page.on('pageerror', (e) => pageErrors.push(e.message));
  await page.goto(office.url, { waitUntil: 'load' });
  await page.getByRole('heading', { name: 'Field sites' }).waitFor();
  await waitForServiceWorkerControl(page);
  return page;
}

async function configure(page: Page, token: string): Promise<void> {
  await page.getByLabel('Office server address').fill(office.url);
  await page.getByLabel(/^Device token/).fill(token);
  await page.getByRole('button', { name: 'Save and connect' }).click();
}

async function waitText(page: Page, testId: string, want: string | RegExp, timeout = 30_000): Promise<void> {
  await page.waitForFunction(
    ([id, src, flags]) => {
      const t = document.querySelector(`[data-testid="${id}"]`)?.textContent ?? '';
      return flags === null ? t === src : new RegExp(src, flags).test(t);
    },
    [testId, typeof want === 'string' ? want : want.source, typeof want === 'string' ? null : want.flags] as const,
    { timeout },
  );
}

/** Every record in the tablet's IndexedDB, read with the raw IndexedDB API. */
async function tabletRecords(page: Page): Promise<AnyRecord[]> {
  return page.evaluate(async () => {
    const db = await new Promise<IDBDatabase>((ok, fail) => {
      const r = indexedDB.open('shearfield');
      r.onsuccess = () => ok(r.result);
      r.onerror = () => fail(r.error);
    });
    const out: unknown[] = [];
    for (const name of ['sites', 'picks', 'estimates']) {
      out.push(
        ...(await new Promise<unknown[]>((ok, fail) => {
          const q = db.transaction(name).objectStore(name).getAll();
          q.onsuccess = () => ok(q.result);
          q.onerror = () => fail(q.error);
        })),
      );
    }
    db.close();
    return out as AnyRecord[];
  });
}

function byId(records: AnyRecord[]): Map<string, string> {
  return new Map(records.map((r) => [r.id, canonicalJson(r)]));
}

async function allSites(page: Page): Promise<void> {
  const back = page.getByRole('button', { name: '← All sites' });
  if (await back.count()) await back.click();
  await page.getByRole('heading', { name: 'Field sites' }).waitFor();
}

beforeAll(async () => {
  data = tempDataDir();
  tokenA = await addDevice(data, 'tablet-a');
  tokenB = await addDevice(data, 'tablet-b');
  tokenD = await addDevice(data, 'tablet-d');
  office = await startOffice(data, 0, DIST);
  port = office.port;
});

afterAll(async () => {
  for (const b of browsers) await b.close();
  await office?.kill();
  removeTempDataDirs();
});

describe('office sync in Chromium', () => {
  let a: Page;
  let b: Page;

  it('1. a tablet works offline with the office down, then syncs by itself when both are back: rows in SQLite and in the CSV export', async () => {
    a = await tabletPage();
    await configure(a, tokenA);
    await waitText(a, 'sync-message', /Synced: 0 sent, 0 received/);

    await setOffline(a.context(), true);
    await office.kill();
    await a.getByLabel('Site name').fill(SITE);
    await a.getByRole('button', { name: 'Create site' }).click();
    await a.getByRole('heading', { name: SITE }).waitFor();
    await a.getByRole('button', { name: 'Picks & plot' }).click();
    for (const p of PICKS) {
      await a.getByLabel('New pick, frequency (Hz)').fill(String(p.f));
      await a.getByLabel('New pick, velocity (m/s)').fill(String(p.v));
      await a.getByLabel('New pick, velocity (m/s)').press('Enter');
    }
    await a.getByRole('heading', { name: `Picks (${PICKS.length})`, exact: true }).waitFor();
    // The finished estimate is kept with the site as one more record to sync.
    await a.getByText(/^Best fit: H |^Best-fit curve for reference only/).waitFor({ timeout: 30_000 });
    await allSites(a);
    await waitText(a, 'sync-pending', String(2 + PICKS.length));

    // Offline reload: served by the service worker, and the queue is intact.
    const res = await reload(a);
    expect(res.fromServiceWorker()).toBe(true);
    await waitText(a, 'sync-pending', String(2 + PICKS.length));
    // Offline, "Sync now" is refused with the reason, and nothing claims to be up to date.
    await waitText(a, 'sync-now-why', 'This device is offline; sync starts by itself when the connection returns.');
    expect(await a.getByRole('button', { name: 'Sync now' }).isDisabled()).toBe(true);
    expect(await a.getByTestId('sync-state').textContent()).toMatch(/^Offline: \d+ changes wait on this tablet/);

    // The office starts; connectivity returns; the tablet syncs without being asked.
    office = await startOffice(data, port, DIST);
    await setOffline(a.context(), false);
    await waitText(a, 'sync-pending', '0', 30_000);
    await a.waitForFunction(() => document.querySelector('[data-testid="sync-last-error"]') === null);

    const sites = query<{ id: string; body: string }>(data, "SELECT id, body FROM records WHERE type = 'site'");
    expect(sites.map((s) => JSON.parse(s.body).name)).toEqual([SITE]);
    const picks = query<{ body: string }>(data, "SELECT body FROM records WHERE type = 'pick' ORDER BY json_extract(body, '$.order')");
    expect(picks.map((p) => JSON.parse(p.body).velocity)).toEqual(PICKS.map((p) => p.v));
    const local = byId(await tabletRecords(a));
    for (const r of query<{ id: string; body: string }>(data, 'SELECT id, body FROM records')) expect(canonicalJson(JSON.parse(r.body))).toBe(local.get(r.id));

    const out = join(data, 'export-1');
    expect((await cli(['sites-export', out, '--data', data, '--no-estimate'])).code).toBe(0);
    expect(readFileSync(join(out, 'sites.csv'), 'utf8')).toContain(`,${SITE},`);
    const csv = readFileSync(join(out, 'picks', `${sites[0].id}.csv`), 'utf8');
    expect(parsePicksCsv(csv).picks.map((p) => [p.frequency, p.velocity])).toEqual(PICKS.map((p) => [p.f, p.v]));
  }, 120_000);

  it('3. two tablets edit the site from the same revision: both versions kept, flagged in the office, shown on both tablets', async () => {
    b = await tabletPage();
    await configure(b, tokenB);
    await waitText(b, 'sync-message', /Synced: 0 sent, 5 received/);
    // The pulled site shows in the list at once.
    await b.getByRole('button', { name: new RegExp(`^${SITE.replace(/[()]/g, '\\$&')}`) }).waitFor();

    for (const [page, notes] of [
      [a, 'Tablet A: water table at 2 m (invented)'],
      [b, 'Tablet B: <b>dry</b> to 4 m (invented)'],
    ] as const) {
      await page.getByRole('button', { name: new RegExp(`^${SITE.replace(/[()]/g, '\\$&')}`) }).click();
      await page.getByRole('button', { name: 'Site details' }).click();
      await page.getByLabel('Notes (kept as plain text)').fill(notes);
      await page.getByLabel('Crew').click();
      await page.waitForTimeout(300);
      await allSites(page);
      await waitText(page, 'sync-pending', '1');
    }
    for (const page of [a, b, a]) {
      await page.getByRole('button', { name: 'Sync now' }).click();
      await waitText(page, 'sync-message', /^Synced:/);
    }
    for (const page of [a, b]) {
      await waitText(page, 'sync-conflicts', '1');
      const item = page.getByTestId('sync-conflict');
      await item.waitFor();
      const text = (await item.textContent()) ?? '';
      expect(text).toContain('Tablet A: water table at 2 m (invented)');
      expect(text).toContain('Tablet B: <b>dry</b> to 4 m (invented)');
      expect(await item.locator('b').count()).toBe(0);
    }
    const [row] = query<{ conflicts: number }>(data, "SELECT conflicts FROM records WHERE type = 'site'");
    expect(row.conflicts).toBe(1);
    const listed = await cli(['conflicts', '--data', data]);
    expect(listed.out).toContain(`site "${SITE}"`);
    expect(listed.out).toMatch(/from tablet-(a|b); differs in notes/);

    // Tablet A keeps the shown version; after syncs everyone agrees and nothing is flagged.
    await a.getByRole('button', { name: 'Keep the shown version' }).click();
    await waitText(a, 'sync-conflicts', '0');
    for (const page of [a, b]) {
      await page.getByRole('button', { name: 'Sync now' }).click();
      await waitText(page, 'sync-message', /^Synced:/);
      await waitText(page, 'sync-conflicts', '0');
    }
    expect(query(data, 'SELECT COUNT(*) AS n FROM records WHERE conflicts > 0')).toEqual([{ n: 0 }]);
  }, 120_000);

  it('6. a bundle exported on a tablet imports into a fresh tablet and a fresh office store as identical records; bad bundles change nothing', async () => {
    await allSites(a);
    const [download] = await Promise.all([a.waitForEvent('download'), a.getByRole('button', { name: 'Export all sites as a bundle file' }).click()]);
    const name = download.suggestedFilename();
    expect(name).toMatch(/^shearfield-office-sync-terrace-invented-\d{4}-\d{2}-\d{2}\.json$/);
    const text = readFileSync((await download.path())!, 'utf8');
    const sourceRecords = await tabletRecords(a);

    const c = await tabletPage();
    const input = c.getByLabel('Import a bundle file');
    await input.setInputFiles({ name, mimeType: 'application/json', buffer: Buffer.from(text) });
    await waitText(c, 'sync-message', `${name}: Read 1 site, 3 picks and 1 estimate: 5 new or newer, 0 already here or older.`);
    expect(byId(await tabletRecords(c))).toEqual(byId(sourceRecords));

    const officeData = tempDataDir();
    const file = join(officeData, name);
    writeFileSync(file, text);
    expect((await cli(['bundle-import', file, '--data', officeData])).code).toBe(0);
    expect(byId(query<{ body: string }>(officeData, 'SELECT body FROM records').map((r) => JSON.parse(r.body)))).toEqual(byId(sourceRecords));

    const hostile = JSON.parse(text);
    hostile.sites[0].notes = '<img src=x onerror="document.title=\'pwned\'">';
    hostile.picks[0].mode = '<script>1</script>';
    const cases: [string, string][] = [
      ['cut.json', text.slice(0, 400)],
      ['hostile.json', JSON.stringify(hostile)],
      ['future.json', JSON.stringify({ ...JSON.parse(text), version: 3 })],
    ];
    const expected = [
      'cut.json: Nothing was imported. The bundle file ends too early: it looks cut short (truncated). Export it again and copy the whole file.',
      'hostile.json: Nothing was imported. The bundle is not valid: picks[0].mode must be a whole number.',
      'future.json: Nothing was imported. The bundle uses format version 3, newer than version 1 that this copy of Shearfield reads; update Shearfield to import it.',
    ];
    const before = canonicalJson(await tabletRecords(c));
    for (const [i, [fileName, body]] of cases.entries()) {
      await input.setInputFiles({ name: fileName, mimeType: 'application/json', buffer: Buffer.from(body) });
      await waitText(c, 'sync-message', expected[i]);
    }
    expect(canonicalJson(await tabletRecords(c))).toBe(before);
    expect(await c.title()).not.toBe('pwned');
    expect(pageErrors).toEqual([]);
  }, 120_000);

  it('4. the office is SIGKILLed after committing a batch but before answering: the tablet retries after the restart and everything converges, nothing lost or duplicated', async () => {
    const T = '2026-05-06T08:00:00.000Z';
    const records: (SiteRecord | PickRecord)[] = [];
    for (let i = 0; i < 12; i++) {
      const id = `crash-site-${i}`;
      records.push({ type: 'site', id, rev: 1, updatedAt: T, name: `Invented crash site ${i + 1}`, date: '2026-05-06', crew: '', notes: '', axisUnit: 'hz', settings: {} });
      for (let k = 0; k < 500; k++) {
        records.push({ type: 'pick', id: `${id}-p${k}`, rev: 1, updatedAt: T, siteId: id, order: k, frequency: 1 + k * 0.1, velocity: 200 + (k % 50), sd: 5, kind: 'group', mode: 0 });
      }
    }
    const before = query<{ n: number }>(data, 'SELECT COUNT(*) AS n FROM records')[0].n;
    const d = await tabletPage();
    await d.getByLabel('Import a bundle file').setInputFiles({ name: 'crash.json', mimeType: 'application/json', buffer: Buffer.from(bundleToJson(makeBundle(records))) });
    await waitText(d, 'sync-message', /^crash\.json: Read 12 sites, 6000 picks/, 60_000);
    await waitText(d, 'sync-pending', '6012');

    let pushes = 0;
    let crashed: Promise<void> | undefined;
    await d.route('**/api/v1/push', async (route) => {
      pushes++;
      if (pushes === 1) {
        const answer = await route.fetch(); // the office commits this batch and answers …
        expect(answer.status()).toBe(200);
        crashed = office.kill(); // … but dies before the answer reaches the tablet.
        await crashed;
        await route.abort('connectionreset');
        return;
      }
      await route.continue();
    });
    await configure(d, tokenD);
    await waitText(d, 'sync-last-error', /could not be reached|did not answer/, 60_000);
    await crashed;
    const committed = query<{ n: number }>(data, 'SELECT COUNT(*) AS n FROM records')[0].n;
    expect(committed - before).toBe(5000);
    await waitText(d, 'sync-pending', '6012');

    office = await startOffice(data, port, DIST);
    await d.getByRole('button', { name: 'Sync now' }).click();
    await waitText(d, 'sync-message', /^Synced: 6012 sent/, 60_000);
    await waitText(d, 'sync-pending', '0');
    expect(query<{ n: number }>(data, 'SELECT COUNT(*) AS n FROM records')[0].n - before).toBe(6012);
    const ids = query<{ id: string }>(data, "SELECT id FROM records WHERE id LIKE 'crash-site-%'").map((r) => r.id);
    expect(new Set(ids)).toEqual(new Set(records.map((r) => r.id)));
    const [batches] = query<{ accepted: number; ignored: number }>(data, "SELECT SUM(accepted) AS accepted, SUM(ignored) AS ignored FROM batches WHERE device_id = (SELECT id FROM devices WHERE name = 'tablet-d')");
    expect(batches).toEqual({ accepted: 6012, ignored: 5000 });
  }, 180_000);
});

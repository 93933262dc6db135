/**
 * The field app end to end, in real Chromium against the built app (dist/,
 * which `npm test` builds first), through the platform harness:
 *
 *  1. open the app;
 *  2. load the invented demo site;
 *  3. create a site and type picks into the table;
 *  4. get an estimate whose thickness matches core/estimate/estimate.ts run here on
 *     the same picks;
 *  5. go offline and reload: served by the service worker, back at the site
 *     and view that were open, every site and pick still there;
 *  6. edit offline, reload again: nothing lost;
 *  7. import a malformed CSV: a clear error naming the row and column, and
 *     nothing changes;
 *  8. a note holding markup shows as text (and the location comes from the
 *     device on request);
 *  9. screenshots at tablet (both ways) and phone size in test-results/e2e/,
 *     and the tablet one with the demo site copied to docs/screenshot-tablet.png
 *     for the README.
 *
 * The typed picks are group velocities of an invented layer over a
 * half-space (H = 6 m, β1 = 210 m/s, β2 = 480 m/s), computed with the
 * core's closed forms (Aki & Richards, Quantitative Seismology, 2nd ed.
 * 2002, §7.2–7.3) and rounded to 0.1 m/s as a crew would type them.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { estimateLayer } from '../../core/estimate/estimate';
import { loveVelocities } from '../../core/dispersion/love-layer';
import type { Pick } from '../../core/picks/picks';
import {
  ARTIFACT_DIR,
  nextPaint,
  openApp,
  reload,
  REPO_ROOT,
  screenshot,
  setOffline,
  VIEWPORTS,
  waitForServiceWorkerControl,
  type AppSession,
} from './harness';

const SITE = 'E2E terrace (invented)';
const MODEL = { h: 6, vs1: 210, vs2: 480, rho1: 1800, rho2: 2100 };
const FREQS = [4, 5, 6, 8, 10, 13, 17, 22, 28];
const SD = 6;
const TYPED: Pick[] = FREQS.map((f) => ({
  frequency: f,
  velocity: Number(loveVelocities(MODEL, f, 0).group.toFixed(1)),
  sd: SD,
  kind: 'group',
  mode: 0,
}));

let app: AppSession;
let page: Page;
const pageErrors: string[] = [];
const consoleLines: string[] = [];

beforeAll(async () => {
  app = await openApp(VIEWPORTS.tabletLandscape);
  page = app.page;
  page.on('pageerror', (e) => pageErrors.push(e.message));
  page.on('console', (m) => consoleLines.push(`${m.type()}: ${m.text()}`));
});
afterAll(async () => {
  await app?.close();
});
// A failed step leaves a picture of the screen for the reader.
afterEach(async (ctx) => {
  if (ctx.task.result?.state === 'fail' && page) {
    await screenshot(page, `failed-${ctx.task.name.slice(0, 2).replace(/\W/g, '')}`).catch(() => undefined);
    console.log(`page console before the failure:\n${consoleLines.slice(-30).join('\n')}`);
  }
});

const picksHeading = () => page.getByRole('heading', { name: /^Picks \(\d+\)$/ });
async function pickCount(): Promise<number> {
  const text = (await picksHeading().textContent()) ?? '';
  return Number(/\((\d+)\)/.exec(text)?.[1] ?? NaN);
}
async function expectPickCount(n: number): Promise<void> {
  await page.getByRole('heading', { name: `Picks (${n})`, exact: true }).waitFor({ timeout: 10_000 });
}
/** A reload returns to the open site and view; this goes back to the list. */
async function toSiteList(): Promise<void> {
  const back = page.getByRole('button', { name: '← All sites' });
  await page.locator('.site-head, #site-list-h').first().waitFor();
  if (await back.count()) await back.click();
  await page.getByRole('heading', { name: /^Sites \(\d+\)$/ }).waitFor();
}
async function openSite(name: string): Promise<void> {
  await page.getByRole('button', { name: new RegExp(`^${name.replace(/[()]/g, '\\$&')}`) }).click();
}
async function cellValue(row: number, what: string): Promise<string> {
  return page.getByLabel(`Pick ${row}, ${what}`, { exact: true }).inputValue();
}

describe('the field app in Chromium', () => {
  it('1. opens on the site list', async () => {
    expect(app.response.ok()).toBe(true);
    await page.getByRole('heading', { name: 'Field sites' }).waitFor();
    await page.getByRole('button', { name: 'Load demo site (invented)' }).waitFor({ timeout: 10_000 });
    await page.getByText('No sites yet.', { exact: false }).waitFor();
  });

  it('2. loads the invented demo site with its picks, plot and best-fit curves; tablet screenshot for the README', async () => {
    await page.getByRole('button', { name: 'Load demo site (invented)' }).click();
    await page.getByRole('heading', { name: /^Invented demo:/ }).waitFor();
    await expectPickCount(23);
    await page.getByText(/^Best fit: H = /).waitFor({ timeout: 30_000 });
    expect(await page.locator('.plot-host canvas').count()).toBeGreaterThan(0);
    // a clean picture: dismiss the notice
    const dismiss = page.getByRole('button', { name: 'Dismiss this message' });
    if (await dismiss.count()) await dismiss.first().click();
    await nextPaint(page);
    mkdirSync(ARTIFACT_DIR, { recursive: true });
    const tablet = join(ARTIFACT_DIR, 'app-tablet-landscape.png');
    await page.screenshot({ path: tablet });
    mkdirSync(join(REPO_ROOT, 'docs'), { recursive: true });
    copyFileSync(tablet, join(REPO_ROOT, 'docs', 'screenshot-tablet.png'));
    await screenshot(page, 'app-tablet-landscape-full');
    await page.setViewportSize(VIEWPORTS.tabletPortrait);
    await nextPaint(page);
    await page.screenshot({ path: join(ARTIFACT_DIR, 'app-tablet-portrait.png') });
    await page.setViewportSize(VIEWPORTS.phone);
    await nextPaint(page);
    await page.screenshot({ path: join(ARTIFACT_DIR, 'app-phone.png') });
    await screenshot(page, 'app-phone-full');
    await page.setViewportSize(VIEWPORTS.tabletLandscape);
  });

  it('3. creates a site and takes typed picks, row by row with Enter', async () => {
    await page.getByRole('button', { name: '← All sites' }).click();
    await page.getByLabel('Site name').fill(SITE);
    await page.getByRole('button', { name: 'Create site' }).click();
    await page.getByRole('heading', { name: SITE }).waitFor();
    await page.getByRole('button', { name: 'Picks & plot' }).click();
    await expectPickCount(0);
    for (const [i, p] of TYPED.entries()) {
      await page.getByLabel('New pick, frequency (Hz)').fill(String(p.frequency));
      await page.getByLabel('New pick, velocity (m/s)').fill(String(p.velocity));
      await page.getByLabel('New pick, standard deviation (m/s)').fill(String(p.sd));
      await page.getByLabel('New pick, standard deviation (m/s)').press('Enter');
      await expectPickCount(i + 1);
    }
    // Enter left the cursor in the first cell of the fresh row, ready for the next pick
    const focused = await page.evaluate(() => document.activeElement?.getAttribute('aria-label'));
    expect(focused).toBe('New pick, frequency (Hz)');
    expect(await cellValue(3, 'velocity (m/s)')).toBe(String(TYPED[2].velocity));
  });

  it("4. estimates a thickness equal to the core's answer for the same picks", async () => {
    await page.getByRole('button', { name: 'Estimate', exact: true }).click();
    const headline = page.getByTestId('thickness');
    await page.getByText('Up to date with the picks and settings.').waitFor({ timeout: 30_000 });
    const shown = Number(await headline.getAttribute('data-value'));
    const core = estimateLayer(TYPED).thickness.best; // core/estimate/estimate.ts, here in Node
    const tol = 1e-6 * core;
    expect(Math.abs(shown - core), `app ${shown} m, core ${core} m, tolerance ${tol} m`).toBeLessThanOrEqual(tol);
    expect(await headline.textContent()).toContain(`${Number(core.toPrecision(3))} m`);
    await page.getByText(/Screening estimate only/).first().waitFor();
    // the recovered thickness is near the invented model's (exact picks, rounded to 0.1 m/s)
    expect(Math.abs(core - MODEL.h)).toBeLessThan(0.3);
  });

  it('5. goes offline and reloads from the service worker with every site and pick', async () => {
    await waitForServiceWorkerControl(page);
    await setOffline(app.browser.context, true);
    const res = await reload(page);
    expect(res.fromServiceWorker()).toBe(true);
    // Back where the crew was: the estimate of the typed site.
    await page.getByRole('heading', { name: SITE }).waitFor();
    expect(await page.getByRole('button', { name: 'Estimate', exact: true }).getAttribute('aria-current')).toBe('page');
    await toSiteList();
    await page.getByRole('heading', { name: 'Sites (2)' }).waitFor();
    await openSite(SITE);
    await expectPickCount(TYPED.length);
    for (const [i, p] of TYPED.entries()) expect(await cellValue(i + 1, 'velocity (m/s)')).toBe(String(p.velocity));
    await page.getByRole('button', { name: '← All sites' }).click();
    await openSite('Invented demo');
    await expectPickCount(23);
  });

  it('6. edits offline, reloads again, and nothing is lost', async () => {
    await page.getByRole('button', { name: '← All sites' }).click();
    await openSite(SITE);
    await expectPickCount(TYPED.length);
    const cell = page.getByLabel('Pick 2, velocity (m/s)', { exact: true });
    await cell.fill('333.3');
    await cell.press('Enter');
    await page.getByRole('button', { name: 'Undo the change to pick 2' }).waitFor();
    // a new pick typed offline too
    await page.getByLabel('New pick, frequency (Hz)').fill('35');
    await page.getByLabel('New pick, velocity (m/s)').fill('215.5');
    await page.getByLabel('New pick, velocity (m/s)').press('Enter');
    await expectPickCount(TYPED.length + 1);
    const res = await reload(page);
    expect(res.fromServiceWorker()).toBe(true);
    await toSiteList();
    await openSite(SITE);
    await expectPickCount(TYPED.length + 1);
    expect(await cellValue(2, 'velocity (m/s)')).toBe('333.3');
    expect(await cellValue(TYPED.length + 1, 'frequency (Hz)')).toBe('35');
    await setOffline(app.browser.context, false);
  });

  it('7. refuses a malformed CSV with a message naming the row and column, and changes nothing', async () => {
    const before = await pickCount();
    const velocities = await Promise.all(Array.from({ length: before }, (_, i) => cellValue(i + 1, 'velocity (m/s)')));
    const pasted = 'frequency_hz,velocity_m_s\n12,190\n14,abc\n16,-5\n';
    await page.getByLabel('CSV text').fill(pasted);
    await page.getByLabel('Replace the current picks').check();
    await page.getByRole('button', { name: 'Import pasted text' }).click();
    const error = page.locator('#import-err');
    await error.waitFor();
    expect(await error.getAttribute('role')).toBe('alert');
    const text = (await error.textContent()) ?? '';
    expect(text).toContain('Nothing was imported from the pasted text. 2 rows have problems; fix them and import again.');
    // both bad rows are named, each in its own list item, and the text stays on screen to be fixed
    expect(await error.locator('li').allTextContents()).toEqual([
      'Row 2 (line 3), column velocity_m_s: must be a number, but it is "abc".',
      'Row 3 (line 4), column velocity_m_s: must be greater than 0 m/s, but it is -5.',
    ]);
    expect(await page.getByLabel('CSV text').inputValue()).toBe(pasted);
    expect(await pickCount()).toBe(before);
    const after = await Promise.all(Array.from({ length: before }, (_, i) => cellValue(i + 1, 'velocity (m/s)')));
    expect(after).toEqual(velocities);
    // the same through the file picker: a file whose header is not a header
    await page.locator('input[type="file"]').setInputFiles({
      name: 'bad-picks.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from('12,190\n14,200\n'),
    });
    await expect.poll(() => error.textContent(), { timeout: 10_000 }).toContain('Nothing was imported from the file bad-picks.csv.');
    expect(await error.textContent()).toContain(
      'Line 1: the first row must be a header naming the columns (e.g. frequency_hz,velocity_m_s), but it holds numbers.',
    );
    expect(await pickCount()).toBe(before);
    // still nothing after a reload: the store was not touched
    await reload(page);
    await toSiteList();
    await openSite(SITE);
    await expectPickCount(before);
  });

  it('8. shows a note holding markup as text, never as HTML', async () => {
    const hostile = '<img src=x onerror="window.__sfPwned=1"><b id="sf-bold">bold</b> & <script>window.__sfPwned=2</script>';
    await page.getByRole('button', { name: 'Site details' }).click();
    const notes = page.getByLabel('Notes (kept as plain text)');
    await notes.fill(hostile);
    await page.getByLabel('Crew').click(); // leave the field: it saves
    // the location from the device, on request (an invented position)
    await app.browser.context.grantPermissions(['geolocation'], { origin: app.server.url });
    await app.browser.context.setGeolocation({ latitude: 47.123456, longitude: 8.654321, accuracy: 12 });
    await page.getByRole('button', { name: "Use this device's position" }).click();
    await page.getByText('Stored: 47.123456°, 8.654321° (from the device, ±12 m).').waitFor();
    await reload(page);
    await toSiteList();
    const card = page.locator('.site-card', { hasText: SITE });
    await card.waitFor();
    expect(await card.locator('.site-notes').textContent()).toBe(hostile);
    expect(await page.locator('#sf-bold').count()).toBe(0);
    expect(await page.locator('.site-card img').count()).toBe(0);
    expect(await page.evaluate(() => (window as { __sfPwned?: number }).__sfPwned)).toBeUndefined();
    await screenshot(page, 'app-sites-tablet');
    expect(pageErrors).toEqual([]);
  });
});

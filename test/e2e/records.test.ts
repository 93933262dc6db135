/**
 * From seismograph records to an estimate, in real Chromium against the
 * built app, with the network off (one session, kept lean):
 *
 *  1. create a site, let the service worker take control, go offline;
 *  2. import a synthetic SEG-Y gather from "the device", tap its
 *     phase-shift image once on the fundamental ridge, add the picks;
 *  3. import a synthetic SEG-2 single-trace record, tap its multiple-filter
 *     image once, add the picks;
 *  4. the estimate's 95 % interval holds the true thickness; the picks on
 *     the image have the picks plot's shapes, named in its key; the image
 *     view is photographed for the README (docs/screenshot-records.png);
 *  5. at phone size, with the image and the ridge's points open, nothing
 *     scrolls sideways.
 *
 * The records are invented: test/signal-fixtures.ts makes them from the
 * core's own modal solution of the invented soft site (H = 12 m), and the
 * project's byte-by-byte writers (core/recordings) turn them into files.
 * The tap points are the site's own velocities at the tapped frequency
 * (core/dispersion/love-layer.ts); the picker finds the ridge from there.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { loveVelocities } from '../../core/dispersion/love-layer';
import { writeSeg2 } from '../../core/recordings/seg2-write';
import { writeSegy } from '../../core/recordings/segy-write';
import { INVENTED_SOFT_SITE } from '../fixtures';
import { softSiteGather, softSiteTrace } from '../signal-fixtures';
import { ARTIFACT_DIR, openApp, REPO_ROOT, screenshot, setOffline, VIEWPORTS, waitForServiceWorkerControl, type AppSession } from './harness';

const SITE = 'E2E records (invented)';
let app: AppSession;
let page: Page;
const consoleLines: string[] = [];

beforeAll(async () => {
  app = await openApp(VIEWPORTS.tabletLandscape);
  page = app.page;
  page.on('console', (m) => consoleLines.push(`${m.type()}: ${m.text()}`));
  page.on('pageerror', (e) => consoleLines.push(`pageerror: ${e.message}`));
});
afterAll(async () => {
  await app?.close();
});
afterEach(async (ctx) => {
  if (ctx.task.result?.state === 'fail' && page) {
    await screenshot(page, `records-failed-${ctx.task.name.slice(0, 2).replace(/\W/g, '')}`).catch(() => undefined);
    console.log(`page console before the failure:\n${consoleLines.slice(-30).join('\n')}`);
  }
});

interface Frame {
  left: number;
  top: number;
  width: number;
  height: number;
  axis: 'frequency' | 'period';
  xLog: boolean;
  yLog: boolean;
  xMin: number;
  xMax: number;
  vMin: number;
  vMax: number;
}

/** Taps the image at (f Hz, v m/s), from the frame the canvas publishes. */
async function tapImage(f: number, v: number): Promise<void> {
  const canvas = page.locator('canvas.dispersion-image');
  await canvas.waitFor({ timeout: 60_000 });
  await page.waitForFunction(() => (document.querySelector('canvas.dispersion-image') as HTMLCanvasElement | null)?.dataset.frame);
  const fr = JSON.parse((await canvas.getAttribute('data-frame')) ?? '{}') as Frame;
  const t = (q: number, log: boolean) => (log ? Math.log(q) : q);
  const q = fr.axis === 'frequency' ? f : 1 / f;
  const x = fr.left + ((t(q, fr.xLog) - t(fr.xMin, fr.xLog)) / (t(fr.xMax, fr.xLog) - t(fr.xMin, fr.xLog))) * fr.width;
  const y = fr.top + fr.height - ((t(v, fr.yLog) - t(fr.vMin, fr.yLog)) / (t(fr.vMax, fr.yLog) - t(fr.vMin, fr.yLog))) * fr.height;
  await canvas.scrollIntoViewIfNeeded();
  await canvas.click({ position: { x, y } });
}

async function addRidge(): Promise<number> {
  await page.getByRole('button', { name: 'Add to picks' }).waitFor({ timeout: 60_000 });
  const rows = await page.locator('table.ridge-points tbody tr').count();
  expect(rows).toBeGreaterThan(5);
  await page.getByRole('button', { name: 'Add to picks' }).click();
  await page.getByText(/^Added \d+ pick\(s\) to the table\.$/).waitFor({ timeout: 20_000 });
  return rows;
}

describe('records to picks to an estimate, offline', () => {
  it('1. creates a site and goes offline under the service worker', async () => {
    await waitForServiceWorkerControl(page);
    await page.getByLabel('Site name').fill(SITE);
    await page.getByRole('button', { name: 'Create site' }).click();
    await page.getByRole('heading', { name: SITE }).waitFor();
    await setOffline(app.browser.context, true);
    await page.getByRole('button', { name: 'Records', exact: true }).click();
  }, 180_000);

  it('2. imports a SEG-Y gather, follows the phase-velocity ridge from one tap and adds the picks', async () => {
    const g = softSiteGather();
    const bytes = writeSegy({ sampleInterval: g.sampleInterval, delay: g.startTime, traces: [...g.traces], offsets: g.offsets, component: 'transverse' });
    await page.getByLabel('Import a record from this device').setInputFiles({ name: 'invented-gather.sgy', mimeType: 'application/octet-stream', buffer: Buffer.from(bytes) });
    await page.getByRole('button', { name: 'Phase velocity (all traces)', pressed: true }).waitFor({ timeout: 30_000 });
    await tapImage(20, loveVelocities(INVENTED_SOFT_SITE, 20, 0).phase);
    const added = await addRidge();
    await page.getByText(new RegExp(`^Added ${added} pick\\(s\\) from invented-gather\\.sgy`)).waitFor();
  }, 180_000);

  it('3. imports a SEG-2 single trace, follows the group-velocity ridge from one tap and adds the picks', async () => {
    const t = softSiteTrace();
    const bytes = writeSeg2({ sampleInterval: t.sampleInterval, delay: t.startTime, traces: [...t.traces], offsets: t.offsets });
    await page.getByLabel('Import a record from this device').setInputFiles({ name: 'invented-trace.sg2', mimeType: 'application/octet-stream', buffer: Buffer.from(bytes) });
    await page.getByRole('button', { name: 'Group velocity (one trace)', pressed: true }).waitFor({ timeout: 30_000 });
    await tapImage(14, loveVelocities(INVENTED_SOFT_SITE, 14, 0).group);
    await addRidge();
  }, 180_000);

  it('4. shows an estimate whose 95 % interval holds the true thickness, with the caution; photographs the image view', async () => {
    const fit = page.getByTestId('record-fit');
    await fit.waitFor({ timeout: 60_000 });
    await page.getByText(/Screening estimate only/).first().waitFor();
    // the estimate of both records' picks (it reruns after the second addition)
    await page.getByRole('button', { name: 'Estimate', exact: true }).click();
    await page.getByText('Up to date with the picks and settings.').waitFor({ timeout: 60_000 });
    await page.getByRole('button', { name: 'Records', exact: true }).click();
    const low = Number(await fit.getAttribute('data-low95'));
    const high = Number(await fit.getAttribute('data-high95'));
    expect(low, `95 % interval ${low}–${high} m`).toBeLessThanOrEqual(INVENTED_SOFT_SITE.h);
    expect(high, `95 % interval ${low}–${high} m`).toBeGreaterThanOrEqual(INVENTED_SOFT_SITE.h);
    // the picks table holds both kinds
    await page.getByRole('button', { name: 'Picks & plot' }).click();
    const heading = await page.getByRole('heading', { name: /^Picks \(\d+\)$/ }).textContent();
    expect(Number(/\((\d+)\)/.exec(heading ?? '')?.[1])).toBeGreaterThan(20);
    // a picture of the image view (the gather, with a ridge) for the README
    await page.getByRole('button', { name: 'Records', exact: true }).click();
    await page.getByRole('button', { name: 'invented-gather.sgy' }).click();
    await page.getByRole('button', { name: 'Phase velocity (all traces)', pressed: true }).waitFor({ timeout: 30_000 });
    await tapImage(20, loveVelocities(INVENTED_SOFT_SITE, 20, 0).phase);
    await page.getByRole('button', { name: 'Add to picks' }).waitFor({ timeout: 60_000 });
    // The site's Love phase picks drawn in the picks plot's shape for them (open diamonds), as the image's key says.
    const shapes = ((await page.locator('canvas.dispersion-image').getAttribute('data-picks')) ?? '').split(' ').filter(Boolean);
    expect(shapes.length).toBeGreaterThan(5);
    expect(new Set(shapes)).toEqual(new Set(['diamond']));
    expect(await page.getByTestId('record-pick-key').textContent()).toBe("The site's phase picks: ◇ Love, △ Rayleigh.");
    const dismiss = page.getByRole('button', { name: 'Dismiss this message' });
    while (await dismiss.count()) await dismiss.first().click();
    mkdirSync(ARTIFACT_DIR, { recursive: true });
    const shot = join(ARTIFACT_DIR, 'records-tablet.png');
    await page.locator('figure.image-figure').scrollIntoViewIfNeeded();
    await page.locator('figure.image-figure').screenshot({ path: shot });
    copyFileSync(shot, join(REPO_ROOT, 'docs', 'screenshot-records.png'));
  }, 180_000);

  it('5. fits a phone with the image and the ridge points open: nothing scrolls sideways', async () => {
    await page.setViewportSize(VIEWPORTS.phone);
    await page.locator('canvas.dispersion-image').waitFor();
    await page.getByRole('button', { name: 'Add to picks' }).waitFor();
    await page.waitForTimeout(300);
    const [scroll, inner] = await page.evaluate(() => [document.documentElement.scrollWidth, window.innerWidth]);
    expect(scroll, `page ${scroll} px wide in a ${inner} px window`).toBeLessThanOrEqual(inner);
    await page.setViewportSize(VIEWPORTS.tabletLandscape);
  }, 180_000);
});

/**
 * The layered profile end to end, offline, in real Chromium against the
 * built app (dist/): load the app, let the service worker take control, go
 * offline and reload; create a site, paste 12 Rayleigh picks, choose two
 * layers and Poisson's ratio 0.3, run the layered estimate in the worker
 * (progress bar, then the result) and see the profile band, the depth of
 * investigation, Vs30 with its range and the caution. The tablet screenshot
 * of the profile view goes to docs/screenshot-profile.png for the README.
 *
 * Picks: phase and group velocities of an invented two-layer site
 * (test/fixtures.ts) from the core's forward step (the compound-matrix
 * Rayleigh solver, Dunkin 1965), P speeds from ν = 0.3, rounded to 0.1 m/s
 * as a crew would type them.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { typedRayleighPicksCsv } from '../fixtures';
import { ARTIFACT_DIR, openApp, reload, REPO_ROOT, setOffline, VIEWPORTS, waitForServiceWorkerControl, type AppSession } from './harness';

const SITE = 'E2E layered terrace (invented)';
const CSV = typedRayleighPicksCsv(12, 3, 50);

let app: AppSession;
let page: Page;
const pageErrors: string[] = [];

beforeAll(async () => {
  app = await openApp(VIEWPORTS.tabletLandscape);
  page = app.page;
  page.on('pageerror', (e) => pageErrors.push(e.message));
});
afterAll(async () => {
  await app?.close();
});

describe('the layered profile in Chromium, offline', () => {
  it('runs a two-layer Rayleigh estimate from pasted picks to the profile band with the caution', async () => {
    await page.getByRole('heading', { name: 'Field sites' }).waitFor();
    await waitForServiceWorkerControl(page);
    await setOffline(app.browser.context, true);
    const r = await reload(page);
    expect(r.fromServiceWorker()).toBe(true);

    await page.getByLabel('Site name').fill(SITE);
    await page.getByRole('button', { name: 'Create site' }).click();
    await page.getByRole('heading', { name: SITE }).waitFor();
    await page.getByRole('button', { name: 'Picks & plot' }).click();
    await page.getByLabel('CSV text').fill(CSV);
    await page.getByRole('button', { name: 'Import pasted text' }).click();
    await page.getByRole('heading', { name: 'Picks (12)', exact: true }).waitFor({ timeout: 10_000 });
    expect(await page.getByLabel('Pick 1, wave', { exact: true }).inputValue()).toBe('rayleigh');
    await page.getByText('Rayleigh group-velocity pick ± 1 sd').waitFor();

    await page.getByRole('button', { name: 'Layered profile' }).click();
    await page.getByLabel('Number of layers').selectOption('2');
    await page.getByLabel("Poisson's ratio").fill('0.3');
    await page.getByRole('button', { name: 'Estimate the profile' }).click();
    await page.getByTestId('profile-progress').waitFor({ timeout: 10_000 });
    await page.getByTestId('profile-chart').waitFor({ timeout: 180_000 });

    await page.locator('.caution').filter({ hasText: 'Screening estimate only.' }).first().waitFor();
    const vs30 = (await page.getByTestId('profile-vs30').textContent()) ?? '';
    expect(vs30).toMatch(/^Vs30 \d+ m\/s \(68 %: \d+–\d+; 95 %: \d+–\d+\)$/);
    expect(await page.getByText(/depth of investigation ≈ \d+/).count()).toBeGreaterThan(0);
    expect(await page.locator('.profile-chart polygon.band95').count()).toBe(1);
    const level = await page.getByTestId('profile-verdict').getAttribute('data-level');
    expect(['resolved', 'rough', 'unresolved']).toContain(level);
    expect(pageErrors).toEqual([]);

    mkdirSync(ARTIFACT_DIR, { recursive: true });
    const shot = join(ARTIFACT_DIR, 'profile-tablet.png');
    // The result itself (verdict, caution, band, Vs30, layers), as the README shows it.
    await page.getByTestId('profile-result').screenshot({ path: shot });
    copyFileSync(shot, join(REPO_ROOT, 'docs', 'screenshot-profile.png'));

    // The Records view's image overlays the layered best fit (its Rayleigh curves by line style), with the verdict's words and the caution.
    await page.getByRole('button', { name: 'Records', exact: true }).click();
    await page.getByRole('button', { name: 'Try the invented demo record' }).click();
    await page.locator('canvas.dispersion-image').waitFor({ timeout: 60_000 });
    const fit = page.getByTestId('record-layered-fit');
    await fit.waitFor({ timeout: 30_000 });
    const words = (await fit.textContent()) ?? '';
    expect(words).toContain('Rayleigh: its own colour, dash-dot for phase velocity');
    expect(words).toContain('Screening estimate only.');
    expect(words.includes('for reference only')).toBe(level === 'unresolved');
    expect(await fit.getAttribute('data-unsupported')).toBe(String(level === 'unresolved'));
    expect(await page.getByTestId('record-fit').count()).toBe(0);
    // The Rayleigh picks of the image's kind in the picks plot's shapes (squares for group, triangles for phase), as the key names them.
    const kind = (await page.getByTestId('record-pick-key').textContent())?.includes('phase picks') ? 'phase' : 'group';
    const shapes = new Set(((await page.locator('canvas.dispersion-image').getAttribute('data-picks')) ?? '').split(' ').filter(Boolean));
    expect(shapes).toEqual(new Set([kind === 'phase' ? 'triangle' : 'square']));
    expect(await page.getByTestId('record-pick-key').textContent()).toContain(kind === 'phase' ? '△ Rayleigh' : '■ Rayleigh');
    await page.locator('figure.image-figure').screenshot({ path: join(ARTIFACT_DIR, 'records-layered-fit.png') });
    expect(pageErrors).toEqual([]);
  }, 300_000);
});

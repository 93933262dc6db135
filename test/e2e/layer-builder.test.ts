/**
 * The layer builder end to end, offline, in real Chromium against the built
 * app (dist/): with the network cut, create a site, paste 8 Rayleigh picks,
 * open What-if → Layer builder, type a two-layer model with Poisson's
 * ratios, and see its Rayleigh curves drawn against the picks in the
 * worker, the misfit in plain words, Vs30 and the caution (after a
 * three-layer profile, whose best-fit Rayleigh curves the picks plot draws,
 * faint when not resolved, and whose model the builder can start from); a
 * P speed below
 * √(4/3) times the shear speed gets its sentence and the kept model stays;
 * a reload brings the kept model back. The builder's tablet screenshot goes
 * to docs/screenshot-builder.png for the README.
 *
 * Picks: phase velocities of the invented two-layer site of
 * test/fixtures.ts from the core's forward step (compound-matrix Rayleigh
 * solver, Dunkin 1965), P speeds from ν = 0.3, rounded as a crew would
 * type them; the model typed is the same site, so the curves must pass
 * within the picks' errors.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { INVENTED_TWO_LAYER_SITE, typedRayleighPicksCsv } from '../fixtures';
import { ARTIFACT_DIR, nextPaint, openApp, reload, REPO_ROOT, setOffline, VIEWPORTS, waitForServiceWorkerControl, type AppSession } from './harness';

const SITE = 'E2E builder terrace (invented)';
const M = INVENTED_TWO_LAYER_SITE;
const CSV = typedRayleighPicksCsv(8, 4, 40);

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

/** Types a value into a builder box and leaves it (the change commits). */
async function type(label: string, value: string): Promise<void> {
  const box = page.getByLabel(label, { exact: true });
  await box.fill(value);
  await box.press('Tab');
}

describe('the layer builder in Chromium, offline', () => {
  it('draws a layered estimate’s best-fit Rayleigh curves (faint when not resolved), then a typed two-layer model’s, refuses a bad P speed in a sentence and keeps the model through a reload', async () => {
    await page.getByRole('heading', { name: 'Field sites' }).waitFor();
    await waitForServiceWorkerControl(page);
    await setOffline(app.browser.context, true);
    expect((await reload(page)).fromServiceWorker()).toBe(true);

    await page.getByLabel('Site name').fill(SITE);
    await page.getByRole('button', { name: 'Create site' }).click();
    await page.getByRole('heading', { name: SITE }).waitFor();
    await page.getByRole('button', { name: 'Picks & plot' }).click();
    await page.getByLabel('CSV text').fill(CSV);
    await page.getByRole('button', { name: 'Import pasted text' }).click();
    await page.getByRole('heading', { name: 'Picks (8)', exact: true }).waitFor({ timeout: 10_000 });

    // Three layers from 8 picks of a narrow band (a few seconds in the worker): the picks plot then draws the
    // best-fit Rayleigh curves with the verdict, faint and "for reference only" when the layers are not resolved.
    await page.getByRole('button', { name: 'Layered profile' }).click();
    await page.getByLabel('Number of layers').selectOption('3');
    await page.getByRole('button', { name: 'Estimate the profile' }).click();
    await page.getByTestId('profile-chart').waitFor({ timeout: 60_000 });
    const level = await page.getByTestId('profile-verdict').getAttribute('data-level');
    await page.getByRole('button', { name: 'Picks & plot' }).click();
    const key = page.getByText('layered best fit Rayleigh curves, dash-dot (phase; group: dash-dot-dot)');
    await key.waitFor({ timeout: 15_000 });
    const caption = (await page.locator('.plot-panel .caption').textContent()) ?? '';
    expect(caption).toMatch(/^Layered best.* \(3 layers.*Screening estimate only\./);
    expect(caption.includes('for reference only')).toBe(level === 'unresolved');
    expect((await key.textContent())!.includes('thin and faint: not resolved, for reference only')).toBe(level === 'unresolved');
    // Rayleigh picks are drawn in their own colour: the key says so and shows no Love mode colours.
    const keyText = (await page.getByRole('list', { name: 'Plot key' }).textContent()) ?? '';
    expect(keyText).toContain('Rayleigh, mode 0');
    expect(keyText).not.toMatch(/Love mode|^mode 0/);

    await page.getByRole('button', { name: 'What-if', exact: true }).click();
    await page.getByRole('button', { name: 'Layer builder' }).click();
    await page.getByRole('heading', { name: 'Layer builder' }).waitFor();
    await page.getByRole('button', { name: 'From the layered estimate' }).click();
    expect(Number(await page.getByLabel('Layer 1 shear speed (m/s)', { exact: true }).inputValue())).toBeGreaterThan(30);
    await page.getByTestId('builder-misfit').waitFor({ timeout: 15_000 });
    await page.getByText('layered best fit, for comparison (thin, grey, dotted)').waitFor();
    await page.getByRole('button', { name: 'Blank' }).click();
    await page.getByRole('button', { name: "Poisson's ratio" }).click();
    await page.getByRole('button', { name: 'Add a layer' }).click();
    const rows: [string, number | undefined, number, number][] = [
      ['Layer 1', M.layers[0].thickness, M.layers[0].vs, M.layers[0].density],
      ['Layer 2', M.layers[1].thickness, M.layers[1].vs, M.layers[1].density],
      ['Half-space', undefined, M.halfspace.vs, M.halfspace.density],
    ];
    for (const [name, h, vs, rho] of rows) {
      if (h !== undefined) await type(`${name} thickness (m)`, String(h));
      await type(`${name} shear speed (m/s)`, String(vs));
      await type(`${name} Poisson's ratio`, '0.3');
      await type(`${name} density (kg/m³)`, String(rho));
    }
    // The picks are Rayleigh picks, so the builder draws Rayleigh curves, told apart by line style in the key.
    expect(await page.getByLabel('Rayleigh curves').isChecked()).toBe(true);
    await page.getByText('layer builder Rayleigh curves, dash-dot (phase; group: dash-dot-dot)').waitFor({ timeout: 15_000 });
    const misfit = page.getByTestId('builder-misfit');
    await misfit.waitFor({ timeout: 15_000 });
    expect(await misfit.textContent()).toMatch(/^The curves pass within the picks’ errors: on average [\d.]+ sd from a pick .* over 8 picks\)\.$/);
    expect(await page.getByTestId('builder-vs30').textContent()).toMatch(/^\d+ m\/s$/);
    await page.locator('[data-testid="builder-readout"] .caution').filter({ hasText: 'Screening estimate only.' }).waitFor();
    // The P speed derived beside the typed ratio: vp = vs·√((2 − 2ν)/(1 − 2ν)) = 320·√(1.4/0.4) = 598.7 m/s (closed form).
    await page.getByTestId('builder-row-1').getByText('P speed 598.7 m/s').waitFor();

    mkdirSync(ARTIFACT_DIR, { recursive: true });
    const shot = join(ARTIFACT_DIR, 'builder-tablet.png');
    // From the top of the page, as the crew first sees it (the plot is sticky: scrolled down, it would be drawn where the scroll left it).
    await page.evaluate(() => window.scrollTo(0, 0));
    await nextPaint(page);
    await page.locator('main').screenshot({ path: shot });
    copyFileSync(shot, join(REPO_ROOT, 'docs', 'screenshot-builder.png'));

    // Switch to typing P speeds: the ratios become speeds. A P speed below √(4/3)·vs is refused in one sentence.
    await page.getByRole('button', { name: 'P speed', exact: true }).click();
    expect(await page.getByLabel('Layer 2 P speed (m/s)', { exact: true }).inputValue()).toBe('598.7');
    // The speeds rounded to 4 figures make a model of their own: wait for its curves before typing on.
    await page.locator('[data-testid="builder-readout"][data-status="done"]').waitFor({ timeout: 15_000 });
    const before = await misfit.textContent();
    await type('Layer 2 P speed (m/s)', '330');
    await page
      .getByText(
        'Layer 2 P speed is 330 m/s, but it must be more than √(4/3) ≈ 1.155 times Layer 2 shear speed (320 m/s), since no stable elastic solid has a lower P/S speed ratio.',
      )
      .waitFor();
    expect(await misfit.textContent()).toBe(before); // the kept model's curves stay

    // A reload (still offline) returns to the layer builder with the kept model, not the refused value.
    expect((await reload(page)).fromServiceWorker()).toBe(true);
    await page.getByRole('heading', { name: 'Layer builder' }).waitFor();
    const vp2 = page.getByLabel('Layer 2 P speed (m/s)', { exact: true });
    await vp2.waitFor();
    await page.waitForFunction(() => (document.getElementById('lb-1-p') as HTMLInputElement | null)?.value === '598.7', undefined, { timeout: 10_000 });
    await page.getByTestId('builder-misfit').waitFor({ timeout: 15_000 });
    expect(await page.getByTestId('builder-errors').count()).toBe(0);

    // Tablets, landscape and portrait: with a long form (five layers), the plot sits at the top of its column (landscape)
    // or above the form (portrait), and stays wholly in view while the last rows are edited.
    for (let i = 0; i < 3; i++) await page.getByRole('button', { name: 'Add a layer' }).click();
    await page.getByTestId('builder-row-5').waitFor();
    for (const size of [{ width: 1280, height: 800 }, { width: 800, height: 1280 }]) {
      await page.setViewportSize(size);
      await page.evaluate(() => window.scrollTo(0, 0));
      await nextPaint(page);
      const at = () =>
        page.evaluate(() => {
          const plot = document.querySelector('.split > .plot-panel')!.getBoundingClientRect();
          const form = document.querySelector('.split > .panel.builder')!.getBoundingClientRect();
          return { plotTop: plot.top, plotBottom: plot.bottom, plotLeft: plot.left, formTop: form.top, formBottom: form.bottom, formRight: form.right, vh: innerHeight };
        });
      const top = await at();
      const where = `${size.width}×${size.height}`;
      if (size.width > size.height) {
        expect(top.plotLeft, `${where}: the plot beside the form`).toBeGreaterThanOrEqual(top.formRight);
        expect(Math.abs(top.plotTop - top.formTop), `${where}: the plot at the top of its column`).toBeLessThanOrEqual(2);
      } else {
        expect(top.plotBottom, `${where}: the plot above the form`).toBeLessThanOrEqual(top.formTop);
      }
      await page.getByLabel('Half-space density (kg/m³)', { exact: true }).scrollIntoViewIfNeeded();
      await page.getByLabel('Half-space density (kg/m³)', { exact: true }).focus();
      await nextPaint(page);
      const editing = await at();
      expect(editing.formTop, `${where}: the form scrolled`).toBeLessThan(0);
      expect(editing.plotTop, `${where}: the plot in view while editing`).toBeGreaterThanOrEqual(0);
      expect(editing.plotBottom, `${where}: the plot in view while editing`).toBeLessThanOrEqual(editing.vh);
    }
    expect(pageErrors).toEqual([]);
  }, 60_000);
});

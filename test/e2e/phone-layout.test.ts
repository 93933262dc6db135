/**
 * Phones: at 390×844 with phone emulation (touch, device scale 2), every
 * view of a site with picks, in both themes, fits the screen's width: the
 * page never scrolls sideways. The yardstick is
 * `document.scrollingElement.scrollWidth <= document.documentElement.clientWidth`
 * (in mobile emulation `window.innerWidth` grows with an overflowing page,
 * so it cannot be the yardstick). The picks table fits too, and the plot
 * stays in view above it while a pick is typed. Screenshots of every view
 * go to docs/screens/ (the README shows some). One browser session.
 *
 * Sites: the invented demo site (core/exchange/demo.ts) and an INVENTED ~6 m
 * layer picked only at 20–40 Hz (the core's closed-form group velocities,
 * love-layer.ts; Aki & Richards, 2nd ed. 2002, §7.2–7.3), not resolved.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { loveVelocities } from '../../core/dispersion/love-layer';
import { openApp, REPO_ROOT, screenshot, VIEWPORTS, waitForView, type AppSession } from './harness';

const LAYER = { h: 6, vs1: 180, vs2: 450, rho1: 1800, rho2: 2100 };
const CSV =
  'frequency_hz,velocity_m_s,sd_m_s\n' +
  [20, 22, 25, 28, 32, 36, 40]
    .map((f) => {
      const u = loveVelocities(LAYER, f, 0).group;
      return `${f},${u.toFixed(1)},${(0.03 * u).toFixed(1)}`;
    })
    .join('\n');
const VIEWS = ['Picks & plot', 'Records', 'Estimate', 'Site figures', 'What-if', 'Survey plan', 'Site details'];
const SHOTS = join(REPO_ROOT, 'docs', 'screens');

let app: AppSession;
let page: Page;
const pageErrors: string[] = [];

beforeAll(async () => {
  app = await openApp(VIEWPORTS.phone, { mobile: true });
  page = app.page;
  page.on('pageerror', (e) => pageErrors.push(e.message));
});
afterAll(async () => {
  await app?.close();
});
afterEach(async (ctx) => {
  if (ctx.task.result?.state === 'fail' && page) await screenshot(page, `failed-phone-${ctx.task.name.slice(0, 2).replace(/\W/g, '')}`).catch(() => undefined);
});

/** The page's scroll width against the layout width (and what sticks out, to name it on failure). */
async function sideways(): Promise<{ scrollWidth: number; clientWidth: number; outside: string[] }> {
  return page.evaluate(() => {
    const scrollWidth = document.scrollingElement!.scrollWidth;
    const clientWidth = document.documentElement.clientWidth;
    const outside: string[] = [];
    if (scrollWidth > clientWidth) {
      for (const el of Array.from(document.querySelectorAll('body *'))) {
        const r = el.getBoundingClientRect();
        if (r.width > 0 && r.right > clientWidth + 0.5) outside.push(`${el.tagName.toLowerCase()}.${(el as HTMLElement).className} → ${Math.round(r.right)} px`);
      }
    }
    return { scrollWidth, clientWidth, outside: outside.slice(0, 6) };
  });
}

async function openView(name: string): Promise<void> {
  await page.getByRole('button', { name, exact: true }).click();
  await waitForView(page, name);
}

/** Opens a site from its card and waits until its estimate (run again on opening) is back. */
async function openSite(text: string): Promise<void> {
  await page.locator('.site-card', { hasText: text }).click();
  await openView('Picks & plot');
  await page.getByText(/^Best fit: H = |^Best-fit curve for reference only/).waitFor({ timeout: 30_000 });
}

describe('phones: 390×844, touch, device scale 2', () => {
  it('1. no view of a site with picks scrolls sideways, in either theme', async () => {
    await page.getByRole('button', { name: 'Load demo site (invented)' }).click();
    await page.getByRole('heading', { name: /^Invented demo:/ }).waitFor();
    await page.getByRole('heading', { name: 'Picks (23)', exact: true }).waitFor();
    await page.getByRole('button', { name: '← All sites' }).click();
    await page.getByLabel('Site name').fill('Invented: 6 m layer, 20–40 Hz only');
    await page.getByRole('button', { name: 'Create site' }).click();
    await openView('Picks & plot');
    await page.getByLabel('CSV text').fill(CSV);
    await page.getByRole('button', { name: 'Import pasted text' }).click();
    await page.getByRole('heading', { name: 'Picks (7)', exact: true }).waitFor();
    await page.getByText(/^Best-fit curve for reference only/).waitFor({ timeout: 30_000 });

    for (const site of ['Invented: 6 m layer', 'Invented demo:']) {
      if (site.startsWith('Invented demo')) {
        await page.getByRole('button', { name: '← All sites' }).click();
        await openSite(site);
      }
      for (const theme of ['standard', 'sun'] as const) {
        const pressed = (await page.getByRole('button', { name: 'Sunlight contrast' }).getAttribute('aria-pressed')) === 'true';
        if (pressed !== (theme === 'sun')) await page.getByRole('button', { name: 'Sunlight contrast' }).click();
        for (const v of VIEWS) {
          await openView(v);
          const w = await sideways();
          expect(w.scrollWidth, `${site} / ${v} / ${theme}: ${w.outside.join('; ')}`).toBeLessThanOrEqual(w.clientWidth);
          // No table hides a column behind a sideways swipe either.
          const tables = await page.evaluate(() =>
            Array.from(document.querySelectorAll('.table-wrap')).map((t) => [t.scrollWidth, t.clientWidth, t.querySelector('table')?.className ?? '']),
          );
          for (const [sw, cw, name] of tables) expect(Number(sw), `${site} / ${v} / ${theme}: table ${name}`).toBeLessThanOrEqual(Number(cw));
        }
        // The layer builder (What-if's second tab), started from the site's estimate.
        await openView('What-if');
        await page.getByRole('button', { name: 'Layer builder' }).click();
        await page.getByRole('heading', { name: 'Layer builder' }).waitFor();
        const b = await sideways();
        expect(b.scrollWidth, `${site} / layer builder / ${theme}: ${b.outside.join('; ')}`).toBeLessThanOrEqual(b.clientWidth);
        await page.getByRole('button', { name: 'One layer (sliders)' }).click();
      }
    }
    // The site list and the sync panel, too.
    await page.getByRole('button', { name: '← All sites' }).click();
    const w = await sideways();
    expect(w.scrollWidth, `sites: ${w.outside.join('; ')}`).toBeLessThanOrEqual(w.clientWidth);
    await page.getByRole('button', { name: 'Sunlight contrast' }).click();
  }, 120_000);

  it('2. the picks table fits without a sideways swipe, and the plot stays in view while a pick is typed', async () => {
    await openSite('Invented demo:');
    const wrap = await page.evaluate(() => {
      const w = document.querySelector('table.picks')!.closest('.table-wrap') as HTMLElement;
      return { scroll: w.scrollWidth, client: w.clientWidth };
    });
    expect(wrap.scroll).toBeLessThanOrEqual(wrap.client);
    const cell = page.getByLabel('New pick, frequency (Hz)');
    await cell.scrollIntoViewIfNeeded();
    await cell.focus();
    const box = await page.locator('.plot-host').boundingBox();
    expect(box, 'the plot is laid out').not.toBeNull();
    // The plot is on screen (sticky above the table) with the new row in view below it.
    expect(box!.y).toBeGreaterThanOrEqual(-1);
    expect(box!.y + box!.height).toBeLessThanOrEqual(844);
    const cellBox = await cell.boundingBox();
    expect(cellBox!.y).toBeGreaterThan(box!.y + box!.height - 1);
  });

  it('3. screenshots of every view for docs/ (the README shows the phone ones)', async () => {
    mkdirSync(SHOTS, { recursive: true });
    await page.getByRole('button', { name: '← All sites' }).click();
    await openSite('Invented: 6 m layer');
    for (const v of VIEWS) {
      await openView(v);
      await page.evaluate(() => window.scrollTo(0, 0));
      await page.screenshot({ path: join(SHOTS, `${v.toLowerCase().replace(/\W+/g, '-')}-phone.png`), scale: 'css' });
    }
    await page.getByRole('button', { name: '← All sites' }).click();
    await openSite('Invented demo:');
    await page.evaluate(() => window.scrollTo(0, 0));
    const phone = join(SHOTS, 'demo-picks-phone.png');
    await page.screenshot({ path: phone, scale: 'css' });
    copyFileSync(phone, join(REPO_ROOT, 'docs', 'screenshot-phone.png'));
    expect(pageErrors).toEqual([]);
  });
});

/**
 * The built app as an installable offline app, in real Chromium: the
 * service worker installs and takes control, the manifest and its icons are
 * served, and the app shell (page, scripts, compute worker) is served by the
 * service worker after going offline and after the server is gone.
 *
 * Runs against dist/ (npm test builds it before vitest).
 */
import { appendFileSync, cpSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  freePort,
  openApp,
  openTab,
  reload,
  REPO_ROOT,
  setOffline,
  startPreview,
  waitForServiceWorkerControl,
  type AppSession,
} from './harness';

let app: AppSession;

beforeAll(async () => {
  app = await openApp();
});
afterAll(async () => {
  await app?.close();
});

/** Fetches `path` in the page and reports status, type and (for PNGs) the IHDR size. */
function probe(path: string) {
  return app.page.evaluate(async (p) => {
    const res = await fetch(p, { cache: 'no-store' });
    const buf = new Uint8Array(await res.arrayBuffer());
    const view = new DataView(buf.buffer);
    const png = buf.length > 24 && buf[1] === 0x50 && buf[2] === 0x4e && buf[3] === 0x47;
    return {
      status: res.status,
      type: res.headers.get('content-type') ?? '',
      size: png ? `${view.getUint32(16)}x${view.getUint32(20)}` : '',
      text: png ? '' : new TextDecoder().decode(buf),
    };
  }, path);
}

describe('the installable app shell', () => {
  it('installs its service worker, which takes control and precaches the versioned shell', async () => {
    expect(app.response.ok()).toBe(true);
    await waitForServiceWorkerControl(app.page);
    const caches = await app.page.evaluate(async () => {
      await navigator.serviceWorker.ready;
      const names = await self.caches.keys();
      const entries = names.includes('shearfield-precache-v1')
        ? (await (await self.caches.open('shearfield-precache-v1')).keys()).map((r) => new URL(r.url).pathname)
        : [];
      return { names, entries };
    });
    expect(caches.names).toContain('shearfield-precache-v1');
    expect(caches.entries).toEqual(expect.arrayContaining(['/index.html', '/manifest.webmanifest', '/icon-192.png']));
    const workerFile = readdirSync(join(REPO_ROOT, 'dist', 'assets')).find((f) => f.startsWith('compute.worker'));
    expect(workerFile).toBeDefined();
    expect(caches.entries).toContain(`/assets/${workerFile}`);
  });

  it('links and serves the manifest with the 192, 512 and maskable 512 icons', async () => {
    const href = await app.page.evaluate(() => document.querySelector('link[rel="manifest"]')?.getAttribute('href'));
    expect(href).toBe('/manifest.webmanifest');
    const m = await probe('/manifest.webmanifest');
    expect(m.status).toBe(200);
    const manifest = JSON.parse(m.text) as {
      name: string;
      short_name: string;
      display: string;
      start_url: string;
      theme_color: string;
      background_color: string;
      icons: { src: string; sizes: string; purpose?: string }[];
    };
    expect(manifest).toMatchObject({ name: 'Shearfield', short_name: 'Shearfield', display: 'standalone', start_url: '/' });
    expect(manifest.theme_color).toMatch(/^#[0-9a-f]{6}$/i);
    expect(manifest.background_color).toMatch(/^#[0-9a-f]{6}$/i);
    expect(manifest.icons.map((i) => `${i.sizes} ${i.purpose ?? 'any'}`).sort()).toEqual(
      ['192x192 any', '512x512 any', '512x512 maskable'].sort(),
    );
    for (const icon of manifest.icons) {
      const got = await probe(icon.src);
      expect(got.status, icon.src).toBe(200);
      expect(got.type, icon.src).toBe('image/png');
      expect(got.size, icon.src).toBe(icon.sizes);
    }
    const meta = await app.page.evaluate(() => ({
      lang: document.documentElement.lang,
      theme: document.querySelector('meta[name="theme-color"]')?.getAttribute('content'),
      viewport: document.querySelector('meta[name="viewport"]')?.getAttribute('content'),
    }));
    expect(meta.lang).toBe('en');
    expect(meta.theme).toBe(manifest.theme_color);
    expect(meta.viewport).toMatch(/width=device-width/);
  });

  it('survives an offline reload: the page and every script come from the service worker', async () => {
    await waitForServiceWorkerControl(app.page);
    const fromNetwork: string[] = [];
    const onResponse = (r: import('playwright-core').Response) => {
      if (!r.fromServiceWorker() && r.url().startsWith(app.server.url)) fromNetwork.push(r.url());
    };
    app.page.on('response', onResponse);
    await setOffline(app.browser.context, true);
    try {
      const res = await reload(app.page);
      expect(res.fromServiceWorker()).toBe(true);
      expect(res.status()).toBe(200);
      expect(await app.page.title()).toBe('Shearfield');
      await waitForServiceWorkerControl(app.page);
      const online = await app.page.evaluate(() => navigator.onLine);
      expect(online).toBe(false);
      // The compute worker's script is served offline too.
      const workerFile = readdirSync(join(REPO_ROOT, 'dist', 'assets')).find((f) => f.startsWith('compute.worker'));
      const w = await probe(`/assets/${workerFile}`);
      expect(w.status).toBe(200);
      expect(fromNetwork).toEqual([]);
    } finally {
      app.page.off('response', onResponse);
      await setOffline(app.browser.context, false);
    }
  });

  it('opens in a new tab with the server stopped, deep links included (navigation fallback)', async () => {
    await app.stopServer();
    const { page, response } = await openTab(app.browser.context, `${app.server.url}/`);
    expect(response.fromServiceWorker()).toBe(true);
    expect(await page.title()).toBe('Shearfield');
    const deep = await page.goto(`${app.server.url}/some/deep/link`, { waitUntil: 'load' });
    expect(deep?.fromServiceWorker()).toBe(true);
    expect(await page.title()).toBe('Shearfield');
    expect(await page.locator('#app').count()).toBe(1);
    await page.close();
  });
});

describe('updates wait for the user', () => {
  it('a newer build installs and waits; it takes over only when the page sends SKIP_WAITING', async () => {
    // An origin of its own (a port the app above never used, so no service worker is registered
    // for it yet), opened in a new tab of the same browser rather than a second browser.
    let port = await freePort();
    while (port === app.server.port) port = await freePort();
    const v1 = await startPreview(port);
    const page = await app.browser.context.newPage();
    // The "newer build": the same app with a service worker that differs by one comment.
    const newer = mkdtempSync(join(tmpdir(), 'shearfield-newer-'));
    let v2: Awaited<ReturnType<typeof startPreview>> | undefined;
    try {
      await page.goto(v1.url, { waitUntil: 'load' });
      await waitForServiceWorkerControl(page);
      await v1.stop();
      cpSync(join(REPO_ROOT, 'dist'), newer, { recursive: true });
      appendFileSync(join(newer, 'sw.js'), '\n// a newer build\n');
      v2 = await startPreview(port, newer);

      const waiting = await page.evaluate(async () => {
        const reg = (await navigator.serviceWorker.getRegistration())!;
        await reg.update();
        // reg.waiting is set a moment before its state reads 'installed' (two steps of the install), so wait for both;
        // up to 30 s, as precaching the newer build on a loaded machine can take a while.
        for (let i = 0; i < 600 && reg.waiting?.state !== 'installed'; i++) await new Promise((r) => setTimeout(r, 50));
        return {
          waiting: reg.waiting?.state ?? null,
          controllerIsOld: navigator.serviceWorker.controller !== null && reg.active !== reg.waiting,
        };
      });
      expect(waiting).toEqual({ waiting: 'installed', controllerIsOld: true });

      const tookOver = await page.evaluate(async () => {
        const reg = (await navigator.serviceWorker.getRegistration())!;
        const changed = new Promise<boolean>((r) => navigator.serviceWorker.addEventListener('controllerchange', () => r(true), { once: true }));
        reg.waiting!.postMessage({ type: 'SKIP_WAITING' });
        await changed;
        return { waiting: reg.waiting, active: reg.active?.state };
      });
      expect(tookOver.waiting).toBeNull();
      expect(['activating', 'activated']).toContain(tookOver.active);
    } finally {
      await page.close();
      await v1.stop();
      await v2?.stop();
      rmSync(newer, { recursive: true, force: true });
    }
  }, 90_000);
});

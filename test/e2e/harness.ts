/**
 * Browser-test harness: serves the built app (dist/) with `vite preview`
 * and drives Debian's Chromium through playwright-core.
 *
 * - Chromium: /usr/bin/chromium (scripts/ensure-env.sh installs it; never
 *   `playwright install`). A clear error says so when it is missing.
 * - The server is `./node_modules/.bin/vite preview` on a free port of
 *   127.0.0.1, started detached in its own process group and killed as a
 *   group, so that it never keeps the port. It starts with the bare
 *   test/e2e/preview.config.mjs, not the app's build settings and plugins.
 * - Each browser is a persistent context in a fresh temporary profile
 *   (launchPersistentContext; `--user-data-dir` must not be passed in args).
 * - Helpers cover the offline pattern: wait until the service worker
 *   controls the page, go offline, reload, stop the server and open a new tab.
 * - Screenshots and other artefacts go to test-results/e2e/.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page, type Response } from 'playwright-core';

/** The repository root. */
export const REPO_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
/** Where e2e artefacts (screenshots) are written. */
export const ARTIFACT_DIR = join(REPO_ROOT, 'test-results', 'e2e');
export const CHROMIUM_PATH = '/usr/bin/chromium';
export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];
/** A bare config for `vite preview` (see the file): it starts faster than the app's vite.config.ts. */
const PREVIEW_CONFIG = join(REPO_ROOT, 'test', 'e2e', 'preview.config.mjs');
/** Screen sizes the app must work at (issue 4: tablet both ways, phone). */
export const VIEWPORTS = {
  tabletLandscape: { width: 1024, height: 768 },
  tabletPortrait: { width: 768, height: 1024 },
  phone: { width: 390, height: 844 },
} as const;

/** Throws a clear error unless Debian's Chromium and the built app are in place. */
export function checkPrerequisites(): void {
  if (!existsSync(CHROMIUM_PATH)) {
    throw new Error(
      `Chromium is missing at ${CHROMIUM_PATH}. Run "bash scripts/ensure-env.sh" (npm test does) to install ` +
        "Debian's chromium; do not run playwright install.",
    );
  }
  if (!existsSync(join(REPO_ROOT, 'dist', 'index.html'))) {
    throw new Error('The built app is missing (dist/index.html). Run "npm run build" first (npm test does).');
  }
}

/** A free TCP port on 127.0.0.1. */
export function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const srv = createServer();
    srv.unref();
    srv.on('error', fail);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => ok(port));
    });
  });
}

export interface PreviewServer {
  url: string;
  port: number;
  /** Stops the server (its whole process group); safe to call twice. */
  stop(): Promise<void>;
}

/**
 * Serves dist/ (or `outDir`, an absolute path to another build) with
 * `vite preview` on `port` (default: a free one); resolves when it answers.
 * With no port given, a port taken between the look-up and vite's start
 * (test files run side by side) is given up for another free one.
 */
export async function startPreview(port?: number, outDir?: string): Promise<PreviewServer> {
  checkPrerequisites();
  for (let attempt = 1; ; attempt++) {
    try {
      return await startPreviewOn(port ?? (await freePort()), outDir);
    } catch (e) {
      if (port !== undefined || attempt >= 3 || !(e instanceof PortTaken)) throw e;
    }
  }
}

class PortTaken extends Error {}

async function startPreviewOn(p: number, outDir?: string): Promise<PreviewServer> {
  const url = `http://127.0.0.1:${p}`;
  const child: ChildProcess = spawn(
    join(REPO_ROOT, 'node_modules', '.bin', 'vite'),
    ['preview', '--config', PREVIEW_CONFIG, '--outDir', outDir ?? join(REPO_ROOT, 'dist'), '--host', '127.0.0.1', '--port', String(p), '--strictPort'],
    { cwd: REPO_ROOT, detached: true, stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, NO_COLOR: '1' } },
  );
  let output = '';
  child.stdout?.on('data', (d: Buffer) => (output += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (output += d.toString()));
  let exited = false;
  const exit = new Promise<void>((ok) => child.once('exit', () => ((exited = true), ok())));

  const stop = async (): Promise<void> => {
    if (exited || child.pid === undefined) return;
    try {
      process.kill(-child.pid, 'SIGTERM');
    } catch {
      /* already gone */
    }
    const timer = setTimeout(() => {
      try {
        if (!exited) process.kill(-child.pid!, 'SIGKILL');
      } catch {
        /* already gone */
      }
    }, 3000);
    await exit;
    clearTimeout(timer);
  };

  const deadline = Date.now() + 30_000;
  for (;;) {
    if (exited) {
      const why = `vite preview exited before serving ${url}:\n${output}`;
      throw /already in use/i.test(output) ? new PortTaken(why) : new Error(why);
    }
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(1000) });
      if (res.ok) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline) {
      await stop();
      throw new Error(`vite preview did not answer on ${url} within 30 s:\n${output}`);
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  return { url, port: p, stop };
}

export interface BrowserSession {
  context: BrowserContext;
  /** The fresh profile folder (removed on close). */
  userDataDir: string;
  /** Closes the browser and removes the profile; safe to call twice. */
  close(): Promise<void>;
}

export interface LaunchOptions {
  /** Reuse this profile folder (a "cold start" of an installed app) instead of a fresh one. */
  userDataDir?: string;
  /** Keep the profile folder on close (to launch again on it). @default false */
  keepProfile?: boolean;
  /** Phone emulation: touch, device scale 2, mobile viewport rules. @default false */
  mobile?: boolean;
}

/** Launches headless Chromium in a fresh (or the given) persistent profile. */
export async function launchBrowser(
  viewport: { width: number; height: number } = VIEWPORTS.tabletLandscape,
  options: LaunchOptions = {},
): Promise<BrowserSession> {
  checkPrerequisites();
  const userDataDir = options.userDataDir ?? mkdtempSync(join(tmpdir(), 'shearfield-e2e-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport,
    serviceWorkers: 'allow',
    ...(options.mobile ? { isMobile: true, hasTouch: true, deviceScaleFactor: 2 } : {}),
  });
  let closed = false;
  return {
    context,
    userDataDir,
    async close() {
      if (closed) return;
      closed = true;
      await context.close().catch(() => undefined);
      if (!options.keepProfile) rmSync(userDataDir, { recursive: true, force: true });
    },
  };
}

/** Waits until a service worker controls `page` (after the first install, clients.claim()). */
export async function waitForServiceWorkerControl(page: Page, timeoutMs = 30_000): Promise<void> {
  await page.waitForFunction(() => navigator.serviceWorker?.controller != null, undefined, { timeout: timeoutMs });
}

/** Resolves after the page has painted two more frames (layout, resize observers and redraws done). */
export async function nextPaint(page: Page): Promise<void> {
  await page.evaluate(() => new Promise<void>((ok) => requestAnimationFrame(() => requestAnimationFrame(() => ok()))));
}

/**
 * Waits until the site view labelled `name` is open and drawn: its tab is
 * the current one, the lazily loaded views have arrived, every plot with
 * something to draw has its canvas, and two frames have been painted since.
 */
export async function waitForView(page: Page, name: string, timeoutMs = 10_000): Promise<void> {
  await page.waitForFunction(
    (label) => {
      const tab = Array.from(document.querySelectorAll('nav.views button')).find((b) => b.getAttribute('aria-label') === label);
      if (tab?.getAttribute('aria-current') !== 'page') return false;
      if (Array.from(document.querySelectorAll('[role="status"]')).some((e) => e.textContent === 'Loading the view…')) return false;
      return Array.from(document.querySelectorAll('.plot-host:not(.is-empty)')).every((h) => h.querySelector('canvas') !== null);
    },
    name,
    { timeout: timeoutMs },
  );
  await nextPaint(page);
}

/** Cuts (or restores) the network for every page of the context. */
export async function setOffline(context: BrowserContext, offline = true): Promise<void> {
  await context.setOffline(offline);
}

/** Reloads and returns the navigation response (check `fromServiceWorker()`). */
export async function reload(page: Page): Promise<Response> {
  const res = await page.reload({ waitUntil: 'load' });
  if (!res) throw new Error('The reload produced no response.');
  return res;
}

/** Opens `url` in a new tab of the context and returns the tab and its navigation response. */
export async function openTab(context: BrowserContext, url: string): Promise<{ page: Page; response: Response }> {
  const page = await context.newPage();
  const response = await page.goto(url, { waitUntil: 'load' });
  if (!response) throw new Error(`Opening ${url} produced no response.`);
  return { page, response };
}

/** Saves a full-page screenshot under test-results/e2e/ and returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(ARTIFACT_DIR, { recursive: true });
  const path = join(ARTIFACT_DIR, `${name}.png`);
  await page.screenshot({ path, fullPage: true });
  return path;
}

/** Everything a test needs: the server, a browser, a first page at the app. */
export interface AppSession {
  server: PreviewServer;
  browser: BrowserSession;
  page: Page;
  /** The first navigation's response. */
  response: Response;
  /** Stops the server (the browser stays), for the "server gone" check. */
  stopServer(): Promise<void>;
  /** Stops everything; call in afterAll. */
  close(): Promise<void>;
}

/** Starts the server and a browser, and opens the app. */
export async function openApp(viewport?: { width: number; height: number }, options: LaunchOptions = {}): Promise<AppSession> {
  const server = await startPreview();
  let browser: BrowserSession | undefined;
  try {
    browser = await launchBrowser(viewport, options);
    const page = browser.context.pages()[0] ?? (await browser.context.newPage());
    const response = await page.goto(server.url, { waitUntil: 'load' });
    if (!response) throw new Error(`Opening ${server.url} produced no response.`);
    const b = browser;
    return {
      server,
      browser: b,
      page,
      response,
      stopServer: () => server.stop(),
      async close() {
        await b.close();
        await server.stop();
      },
    };
  } catch (e) {
    await browser?.close();
    await server.stop();
    throw e;
  }
}

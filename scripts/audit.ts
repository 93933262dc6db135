/**
 * `npm run audit`: builds the app, serves dist/ with vite preview on a free
 * port, and runs Lighthouse 12.2.3 (mobile form factor, its default
 * simulated throttling) on Debian's Chromium. Prints the performance,
 * accessibility and best-practices scores and the first-contentful-paint
 * and time-to-interactive figures, and exits non-zero when any score is
 * below 95. Not part of `npm test` (it takes ~15 s and measures, not checks
 * behaviour). The full report is saved to test-results/audit/lighthouse.json.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { launchBrowser, REPO_ROOT, startPreview, VIEWPORTS, waitForServiceWorkerControl } from '../test/e2e/harness';

/** Cold offline start budget, ms (issue 4 §5). */
const OFFLINE_START_BUDGET_MS = 1000;
const OFFLINE_START_RUNS = 3;

/**
 * Cold offline start, measured for real (Lighthouse cannot run offline):
 * install the app once online, close the browser, stop the server, then
 * launch a new browser on the same profile with the network cut and open
 * the app. Figures per run, from the page's own clock (navigation start = 0):
 * first contentful paint, and the first screen = #app holds rendered content.
 */
async function offlineStart(url: string, stopServer: () => Promise<void>): Promise<{ fcp: number[]; firstScreen: number[] }> {
  const first = await launchBrowser(VIEWPORTS.tabletLandscape, { keepProfile: true });
  const dir = first.userDataDir;
  const fcp: number[] = [];
  const firstScreen: number[] = [];
  try {
    const page = first.context.pages()[0] ?? (await first.context.newPage());
    await page.goto(`${url}/`, { waitUntil: 'load' });
    await waitForServiceWorkerControl(page);
    await first.close();
    await stopServer();
    for (let i = 0; i < OFFLINE_START_RUNS; i++) {
      const b = await launchBrowser(VIEWPORTS.tabletLandscape, { userDataDir: dir, keepProfile: true });
      try {
        await b.context.setOffline(true);
        const p = b.context.pages()[0] ?? (await b.context.newPage());
        const res = await p.goto(`${url}/`, { waitUntil: 'commit' });
        if (!res?.fromServiceWorker()) throw new Error('The offline start was not served by the service worker.');
        await p.waitForFunction(() => (document.querySelector('#app')?.childElementCount ?? 0) > 0, undefined, {
          polling: 'raf',
          timeout: 15_000,
        });
        firstScreen.push(await p.evaluate(() => performance.now()));
        fcp.push(
          await p.evaluate(() => performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? NaN),
        );
      } finally {
        await b.close();
      }
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return { fcp, firstScreen };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/** The lowest acceptable score, 0–100 (issue 4 §4). */
const MIN_SCORE = 95;
const CATEGORIES = ['performance', 'accessibility', 'best-practices'] as const;
const CHROME_FLAGS =
  '--headless=new --no-sandbox --disable-gpu --disable-quic --no-first-run --disable-background-networking --disable-component-update --disable-sync';

interface LighthouseReport {
  lighthouseVersion: string;
  categories: Record<string, { title: string; score: number | null; auditRefs: { id: string; weight: number }[] }>;
  audits: Record<string, { title: string; score: number | null; numericValue?: number; displayValue?: string }>;
  runWarnings?: string[];
}

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env): void {
  const r = spawnSync(cmd, args, { cwd: REPO_ROOT, stdio: 'inherit', env });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed (exit ${r.status}).`);
}

async function main(): Promise<number> {
  console.log('[audit] building the app');
  run(join(REPO_ROOT, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'warn']);
  const server = await startPreview();
  const outDir = join(REPO_ROOT, 'test-results', 'audit');
  mkdirSync(outDir, { recursive: true });
  const reportPath = join(outDir, 'lighthouse.json');
  try {
    console.log(`[audit] Lighthouse on ${server.url}/ (mobile)`);
    run(
      join(REPO_ROOT, 'node_modules', '.bin', 'lighthouse'),
      [
        `${server.url}/`,
        `--only-categories=${CATEGORIES.join(',')}`,
        '--form-factor=mobile',
        `--chrome-flags=${CHROME_FLAGS}`,
        '--output=json',
        `--output-path=${reportPath}`,
        '--quiet',
      ],
      { ...process.env, CHROME_PATH: '/usr/bin/chromium' },
    );
  } catch (e) {
    await server.stop();
    throw e;
  }
  console.log('[audit] cold offline start (installed app, network cut, server stopped)');
  const start = await offlineStart(server.url, () => server.stop()).finally(() => server.stop());

  const report = JSON.parse(readFileSync(reportPath, 'utf8')) as LighthouseReport;
  const ms = (id: string) => report.audits[id]?.numericValue;
  console.log(`\nLighthouse ${report.lighthouseVersion}, mobile form factor (simulated throttling)`);
  let failed = false;
  for (const id of CATEGORIES) {
    const cat = report.categories[id];
    const score = cat?.score == null ? NaN : Math.round(cat.score * 100);
    const ok = score >= MIN_SCORE;
    failed ||= !ok;
    console.log(`  ${(cat?.title ?? id).padEnd(16)} ${String(score).padStart(3)}  ${ok ? 'ok' : `BELOW ${MIN_SCORE}`}`);
    if (!ok && cat) {
      for (const ref of cat.auditRefs) {
        const a = report.audits[ref.id];
        if (a && a.score !== null && a.score < 1 && ref.weight > 0) {
          console.log(`      - ${a.title}${a.displayValue ? ` (${a.displayValue})` : ''}`);
        }
      }
    }
  }
  const figures: [string, string][] = [
    ['first-contentful-paint', 'First contentful paint'],
    ['largest-contentful-paint', 'Largest contentful paint'],
    ['interactive', 'Time to interactive'],
    ['total-blocking-time', 'Total blocking time'],
  ];
  for (const [id, label] of figures) {
    const v = ms(id);
    console.log(`  ${label.padEnd(26)} ${v === undefined ? 'n/a' : `${Math.round(v)} ms`}`);
  }
  const cls = report.audits['cumulative-layout-shift']?.numericValue;
  console.log(`  ${'Cumulative layout shift'.padEnd(26)} ${cls === undefined ? 'n/a' : cls.toFixed(3)}`);
  const startMedian = median(start.firstScreen);
  console.log(
    `  Cold offline start, first screen (median of ${start.firstScreen.length}, no throttling) ${Math.round(startMedian)} ms ` +
      `(${start.firstScreen.map(Math.round).join(', ')} ms; budget ${OFFLINE_START_BUDGET_MS} ms ${startMedian <= OFFLINE_START_BUDGET_MS ? 'met' : 'MISSED'})`,
  );
  console.log(`  Cold offline start, first contentful paint (median) ${Math.round(median(start.fcp))} ms`);
  for (const w of report.runWarnings ?? []) console.log(`  warning: ${w}`);
  console.log(`  report: ${reportPath}`);
  console.log(failed ? `\n[audit] FAILED: a score is below ${MIN_SCORE}.` : `\n[audit] passed: every score is ${MIN_SCORE} or more.`);
  return failed ? 1 : 0;
}

main().then(
  (code) => process.exit(code),
  (e: unknown) => {
    console.error(`[audit] ${e instanceof Error ? e.message : String(e)}`);
    process.exit(2);
  },
);

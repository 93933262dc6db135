/**
 * Office figures (issue 11):
 * - the cost of `synchronous = FULL` (the store's setting: an acknowledged
 *   batch survives a power cut) against NORMAL, per committed batch, for a
 *   one-record push and a 1,000-pick push, on a real SQLite file in the
 *   temporary folder (its disk decides the fsync time);
 * - start-up of the command line: `node bin/shearfield.mjs --help` as a
 *   new process, as `npx shearfield --help` runs it (target: well under
 *   300 ms).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { AnyRecord } from '../../core/exchange/records';
import { startOfficeServer } from '../../office/server';
import { OfficeStore } from '../../office/store';
import { bench, type BenchResult } from './harness';

const T = '2026-05-04T08:00:00.000Z';
const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');

function picks(tag: string, n: number): AnyRecord[] {
  return Array.from({ length: n }, (_, k) => ({ type: 'pick', id: `${tag}-${k}`, rev: 1, updatedAt: T, siteId: 'bench-site', order: k, frequency: 2 + (k % 400) * 0.1, velocity: 180 + (k % 97), sd: 6, kind: 'group', mode: 0 }) as AnyRecord);
}

export default async function (): Promise<BenchResult[]> {
  const results: BenchResult[] = [];

  for (const size of [1, 1000]) {
    for (const mode of ['FULL', 'NORMAL'] as const) {
      const dir = mkdtempSync(join(tmpdir(), 'shearfield-bench-sync-'));
      const store = OfficeStore.open(dir, { create: true });
      store.db.pragma(`synchronous = ${mode}`);
      store.applyBatch([{ type: 'site', id: 'bench-site', rev: 1, updatedAt: T, name: 'Invented bench site', date: '2026-05-04', crew: '', notes: '', axisUnit: 'hz', settings: {} }], { batchId: 'site', source: 'bench' });
      let n = 0;
      const r = await bench(
        `office commit, ${size === 1 ? 'one-record push' : '1,000-pick push'}, synchronous = ${mode}`,
        () => {
          n++;
          store.applyBatch(picks(`${mode}-${size}-${n}`, size), { batchId: `b${n}`, source: 'bench' });
        },
        { samples: size === 1 ? 41 : 15, warmup: 3, note: mode === 'FULL' ? 'the store\'s setting: one more fsync per commit' : 'for comparison only' },
      );
      results.push(r);
      store.close();
      rmSync(dir, { recursive: true, force: true });
    }
  }

  // Other requests during a big push: status answers while one push of 40,000 picks (about 10 MiB) is received, checked (worker thread) and written.
  {
    const dir = mkdtempSync(join(tmpdir(), 'shearfield-bench-big-'));
    const store = OfficeStore.open(dir, { create: true });
    const { token } = store.addDevice('bench-tablet');
    store.close();
    const srv = await startOfficeServer({ port: 0, dataDir: dir, distDir: join(dir, 'no-app') });
    const site = { type: 'site', id: 'bench-site', rev: 1, updatedAt: T, name: 'Invented bench site', date: '2026-05-04', crew: '', notes: '', axisUnit: 'hz', settings: {} };
    const body = JSON.stringify({ batchId: 'big', records: [site, ...picks('big', 40_000)] });
    const waits: number[] = [];
    let pushing = true;
    const push = fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}` }, body }).then(async (r) => {
      await r.arrayBuffer();
      pushing = false;
      if (r.status !== 200) throw new Error(`push answered ${r.status}`);
    });
    const t0 = performance.now();
    let resets = 0;
    while (pushing) {
      const t = performance.now();
      try {
        await (await fetch(`${srv.url}/api/v1/status`, { headers: { Authorization: `Bearer ${token}` } })).arrayBuffer();
        waits.push(performance.now() - t);
      } catch {
        // A kept-alive connection closed by the server as the request went out: counted, and asked again.
        resets++;
      }
      await new Promise((ok) => setTimeout(ok, 10));
    }
    await push;
    const total = performance.now() - t0;
    await srv.close();
    rmSync(dir, { recursive: true, force: true });
    waits.sort((a, b) => a - b);
    const q = (p: number) => waits[Math.min(waits.length - 1, Math.floor(p * (waits.length - 1)))];
    results.push({
      name: 'status answers during one 40,000-pick push (about 10 MiB)',
      median_ms: q(0.5),
      p10_ms: q(0.1),
      p90_ms: q(0.9),
      samples: waits.length,
      note: `longest wait ${waits[waits.length - 1].toFixed(0)} ms, ${resets} connection resets; the push took ${total.toFixed(0)} ms; parsing and checks run in a worker thread, the merge and SQLite write on the main thread`,
    });
  }

  // CLI start-up: a new process each time, as `npx shearfield --help` runs it.
  const build = spawnSync(process.execPath, ['scripts/build-office.mjs'], { cwd: ROOT, encoding: 'utf8' });
  if (build.status !== 0) throw new Error(`scripts/build-office.mjs failed: ${build.stderr}`);
  const run = (args: string[], env: NodeJS.ProcessEnv = process.env) => () => {
    const r = spawnSync(process.execPath, args, { cwd: ROOT, env, encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  };
  results.push(
    await bench('CLI start-up: shearfield --help (built JavaScript)', run(['bin/shearfield.mjs', '--help']), {
      samples: 15,
      warmup: 2,
      target_ms: 300,
      note: 'node bin/shearfield.mjs --help, a new process per call; build/office/ from npm ci / npm run build',
    }),
  );
  results.push(
    await bench('CLI start-up: node -e 0 (for comparison)', run(['-e', '0']), { samples: 15, warmup: 2, note: 'the bare Node start on this machine now: the floor of the figure above' }),
  );
  results.push(
    await bench('CLI start-up: shearfield --help from the TypeScript sources (tsx)', run(['bin/shearfield.mjs', '--help'], { ...process.env, SHEARFIELD_FROM_SOURCE: '1' }), {
      samples: 7,
      warmup: 1,
      note: 'SHEARFIELD_FROM_SOURCE=1, as while developing (for comparison)',
    }),
  );

  return results;
}

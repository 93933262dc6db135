/**
 * Sync and office figures (issue 5 §5), with the real parts: the office
 * server code (office/server.ts, in this process) over HTTP on 127.0.0.1
 * with its SQLite file in a temporary folder, and the app's sync client
 * (pwa/sync/client.ts) on the app's store over fake-indexeddb (Node; a
 * browser's IndexedDB has other speeds).
 *
 * - push of one batch of 10,000 picks (HTTP + checks + merge + one SQLite
 *   transaction), as picks per second;
 * - a tablet holding 100 invented sites (20 picks each) syncing from
 *   scratch: push everything, pull the echo;
 * - a fresh tablet pulling those 100 sites;
 * - the office summary (`shearfield sites-summary`) of 1,000 sites: the
 *   estimate re-run per site (12 picks each), one sample (it takes tens of
 *   seconds).
 */
import 'fake-indexeddb/auto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { demoPicks } from '../../core/exchange/demo';
import type { PickRecord, SiteRecord } from '../../core/exchange/records';
import { main as cli } from '../../office/cli';
import { startOfficeServer, type RunningOffice } from '../../office/server';
import { OfficeStore } from '../../office/store';
import { newPick, newSite, openFieldStore, type FieldStore } from '../../pwa/store';
import { SyncClient } from '../../pwa/sync/client';
import { bench, type BenchResult } from './harness';

const T = '2026-05-04T08:00:00.000Z';

function tempDir(): string {
  return mkdtempSync(join(tmpdir(), 'shearfield-bench-'));
}

async function office(): Promise<{ srv: RunningOffice; token: string; dir: string }> {
  const dir = tempDir();
  const store = OfficeStore.open(dir, { create: true });
  const { token } = store.addDevice('bench-tablet');
  store.close();
  const srv = await startOfficeServer({ port: 0, dataDir: dir, distDir: join(dir, 'no-app') });
  return { srv, token, dir };
}

function pickBatch(tag: string, n: number): PickRecord[] {
  const out: PickRecord[] = [];
  for (let k = 0; k < n; k++) {
    out.push({ type: 'pick', id: `${tag}-${k}`, rev: 1, updatedAt: T, siteId: `${tag}-site-${k % 500}`, order: k, frequency: 2 + (k % 400) * 0.1, velocity: 180 + (k % 97), sd: 6, kind: 'group', mode: 0 });
  }
  return out;
}

async function tabletWithSites(sites: number, picksPer: number): Promise<FieldStore> {
  const store = await openFieldStore(`bench-${crypto.randomUUID()}`);
  const base = demoPicks();
  for (let i = 0; i < sites; i++) {
    const site: SiteRecord = await store.saveSite(newSite({ name: `Invented bench site ${i + 1}`, date: '2026-05-04', location: { lat: 50 + i / 1000, lon: -2, source: 'typed' } }));
    await store.savePicks(base.slice(0, picksPer).map((p, k) => newPick(site.id, { frequency: p.frequency, velocity: p.velocity, sd: p.sd, kind: p.kind, mode: p.mode }, k)));
  }
  return store;
}

export default async function (): Promise<BenchResult[]> {
  const results: BenchResult[] = [];

  // 1. One push of 10,000 picks.
  {
    const { srv, token, dir } = await office();
    const bodies = Array.from({ length: 7 }, (_, s) => JSON.stringify({ batchId: `bench-${s}`, records: pickBatch(`b${s}`, 10_000) }));
    let next = 0;
    const r = await bench(
      'sync push: one batch of 10,000 picks',
      async () => {
        const res = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body: bodies[next++] });
        if (res.status !== 200) throw new Error(`push answered ${res.status}`);
        await res.arrayBuffer();
      },
      { samples: 5, warmup: 2 },
    );
    r.note = `${Math.round(10_000 / (r.median_ms / 1000))} picks/s (HTTP + checks + merge + one SQLite transaction, ${Math.round(bodies[0].length / 1024)} KiB body)`;
    results.push(r);
    await srv.close();
    rmSync(dir, { recursive: true, force: true });
  }

  // 2. A tablet with 100 sites syncing from scratch, and a fresh tablet pulling them.
  {
    const tablets: FieldStore[] = [];
    for (let s = 0; s < 4; s++) tablets.push(await tabletWithSites(100, 20));
    const servers = await Promise.all(tablets.map(() => office()));
    let next = 0;
    const push = await bench(
      'tablet with 100 sites (2,000 picks) syncs from scratch',
      async () => {
        const i = next++;
        const { srv, token } = servers[i];
        const c = new SyncClient(tablets[i], { isOnline: () => true, events: new EventTarget() });
        await c.configure(srv.url, token, false);
        const report = await c.syncNow();
        if (!report.ok || report.pushed !== 2100) throw new Error(report.message);
      },
      { samples: 3, warmup: 1 },
    );
    push.note = 'app sync client on fake-indexeddb (Node) → office over HTTP: push 2,100 records, pull the echo';
    results.push(push);

    const fresh: FieldStore[] = [];
    for (let s = 0; s < 4; s++) fresh.push(await openFieldStore(`bench-fresh-${crypto.randomUUID()}`));
    next = 0;
    const pull = await bench(
      'fresh tablet pulls 100 sites (2,000 picks)',
      async () => {
        const i = next++;
        const c = new SyncClient(fresh[i], { isOnline: () => true, events: new EventTarget() });
        await c.configure(servers[0].srv.url, servers[0].token, false);
        const report = await c.syncNow();
        if (!report.ok || report.pulled !== 2100) throw new Error(report.message);
      },
      { samples: 3, warmup: 1 },
    );
    pull.note = 'app sync client on fake-indexeddb (Node): paged pull and local merge';
    results.push(pull);
    for (const t of [...tablets, ...fresh]) t.close();
    for (const o of servers) {
      await o.srv.close();
      rmSync(o.dir, { recursive: true, force: true });
    }
  }

  // 3. The office summary of 1,000 sites.
  {
    const dir = tempDir();
    const store = OfficeStore.open(dir, { create: true });
    const base = demoPicks().filter((_, i) => i % 2 === 0);
    const records: (SiteRecord | PickRecord)[] = [];
    for (let i = 0; i < 1000; i++) {
      const id = `site-${i}`;
      records.push({ type: 'site', id, rev: 1, updatedAt: T, name: `Invented bench site ${i + 1}`, date: '2026-05-04', crew: '', notes: '', axisUnit: 'hz', settings: {} });
      base.forEach((p, k) => records.push({ type: 'pick', id: `${id}-p${k}`, rev: 1, updatedAt: T, siteId: id, order: k, frequency: p.frequency, velocity: p.velocity * (1 + ((i % 7) - 3) * 0.01), sd: p.sd, kind: p.kind, mode: p.mode }));
    }
    store.applyBatch(records, { batchId: 'bench-summary', source: 'bench' });
    store.close();
    const out = join(dir, 'summary.csv');
    const silent = { out: () => undefined, err: (t: string) => process.stderr.write(t) };
    const r = await bench(
      'office summary (sites-summary) of 1,000 sites',
      async () => {
        const code = await cli(['sites-summary', out, '--data', dir], silent);
        if (code !== 0) throw new Error(`sites-summary exited ${code}`);
      },
      { samples: 1, warmup: 0 },
    );
    r.note = `${(r.median_ms / 1000).toFixed(1)} s in all, ${(r.median_ms / 1000).toFixed(1)} ms per site (${base.length} picks each; one sample)`;
    results.push(r);
    rmSync(dir, { recursive: true, force: true });
  }
  return results;
}

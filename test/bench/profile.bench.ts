/**
 * Layered-estimate benchmarks (issue 13): 3 layers from 40 picks with the
 * ensemble bands, target ≤ 2 s in the app's compute worker. Every run is a
 * complete estimateProfile call: the search for 1, 2 and 3 layers (model
 * choice), refinement, the ensemble, band, Vs30 and classes. Rayleigh picks
 * are timed too (3 layers from 40 picks, and 2 layers from 12 picks as in
 * the app's browser test), with the forward work per call (models
 * predicted, roots solved in full) in the note: those counts do not depend
 * on how busy the machine is, the times do. The cases: profile-cases.ts.
 *
 * Where it runs: the app's worker runs the core bundled as ES modules (by
 * vite), so each case is timed the same way, in a Node worker thread
 * (profile-worker.ts) running the core bundled as ES modules by esbuild.
 * The benches themselves run under tsx, whose CommonJS transform makes
 * every use of an imported binding a property read; the same estimate
 * timed there is slower (`PROFILE_BENCH_TSX=1` times it there as well, for
 * comparison).
 *
 * Also the coverage: 200 seeded trials per case
 * (test/reference/profile-coverage-trials.ts) at the default effort,
 * reported as rates in the note (a rate, not a time; median_ms is the time
 * per trial). `PROFILE_BENCH_TIMING_ONLY=1 npm run bench -- profile` runs the timings only.
 */
import { build } from 'esbuild';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { estimateProfile } from '../../core/profile/profile-estimate';
import { forwardWork } from '../../core/profile/profile-forward';
import { COVERAGE_CASES, runCoverage } from '../reference/profile-coverage-trials';
import { bench, summary, type BenchResult } from './harness';
import { PROFILE_CASES, workPerCall, type ProfileCase } from './profile-cases';

const here = dirname(fileURLToPath(import.meta.url));

function workNote(c: ProfileCase, work: Record<string, number>, where: string): string {
  return (
    `${where}; NA search for N = 1…${c.options.layers}, LM refinement, ensemble, band, Vs30; ` +
    `per call ${work.models} models (${work.screenedModels} screened), ${work.fullSolves} roots solved in full, ${work.warmSolves - work.warmMisses} tracked or warm`
  );
}

/** Times every case in its own worker thread, from one ES-module bundle of profile-worker.ts. */
async function inWorkers(): Promise<BenchResult[]> {
  const dir = mkdtempSync(join(tmpdir(), 'shearfield-profile-bench-'));
  try {
    const file = join(dir, 'profile-worker.mjs');
    await build({ entryPoints: [join(here, 'profile-worker.ts')], outfile: file, bundle: true, format: 'esm', platform: 'node', target: 'node20', logLevel: 'warning' });
    const out: BenchResult[] = [];
    for (let index = 0; index < PROFILE_CASES.length; index++) {
      const c = PROFILE_CASES[index];
      const { times, work } = await new Promise<{ times: number[]; work: Record<string, number> }>((resolve, reject) => {
        const w = new Worker(file, { workerData: { index } });
        w.once('message', resolve);
        w.once('error', reject);
        w.once('exit', (code) => code !== 0 && reject(new Error(`profile bench worker exited with ${code}`)));
      });
      out.push(summary(c.name, times, { target_ms: c.target_ms, note: workNote(c, work, 'in a worker thread, core bundled as ES modules as the app ships it') }));
    }
    return out;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** The same cases in this process, under tsx (for comparison only: no target). */
async function underTsx(): Promise<BenchResult[]> {
  const out: BenchResult[] = [];
  for (const c of PROFILE_CASES) {
    const picks = c.picks();
    const before = { ...forwardWork };
    let calls = 0;
    const r = await bench(
      `${c.name} (under tsx)`,
      () => {
        calls++;
        return estimateProfile(picks, c.options);
      },
      { samples: c.samples, warmup: 1 },
    );
    r.note = workNote(c, workPerCall(before, calls), 'Node, this process, under tsx');
    out.push(r);
  }
  return out;
}

export default async function (): Promise<BenchResult[]> {
  const out = await inWorkers();
  if (process.env.PROFILE_BENCH_TSX) out.push(...(await underTsx()));
  if (process.env.PROFILE_BENCH_TIMING_ONLY) return out;
  for (const c of COVERAGE_CASES) {
    const t0 = performance.now();
    const r = runCoverage({ ...c, trials: 200 });
    console.error(JSON.stringify(r));
    const perTrial = (performance.now() - t0) / r.trials;
    const rates = r.rates.map((x) => `${x.parameter} ${x.rate68.toFixed(3)}/${x.rate95.toFixed(3)}`).join(', ');
    out.push({
      name: `layered coverage: ${c.name} (${r.trials} trials)`,
      median_ms: perTrial,
      p10_ms: perTrial,
      p90_ms: perTrial,
      samples: r.trials,
      note: `68 %/95 % coverage: ${rates}; pooled ${r.pooled68.toFixed(3)}/${r.pooled95.toFixed(3)} (nominal 0.683/0.950); ${r.poorFits} trials fitted worse than the pick errors allow, in ${r.searchMisses} the truth fitted better than the best fit found; time is the mean per trial`,
    });
  }
  return out;
}

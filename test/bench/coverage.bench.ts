/**
 * Coverage of the estimate's intervals, measured well enough to trust
 * (issue 9 §4): at least 1,000 seeded trials per case, thickness only on
 * three invented one-layer sites and the joint fit of H, β1 and β2, each
 * with picks carrying 3 % Gaussian noise stated correctly as their sd.
 * Prints the 68 % and 95 % coverage rates with their binomial standard
 * errors √(p(1 − p)/N) and how many standard errors each lies from the
 * nominal level (68.27 % = erf(1/√2) for Δχ² = 1, and 95 % for Δχ² = 3.84;
 * Wilks 1938, Ann. Math. Stat. 9:60; Press et al., *Numerical Recipes*,
 * 3rd ed. 2007, §15.6). A benchmark never asserts: the figures are for a
 * person to read (the seeded test in test/reference/estimate-coverage.test.ts
 * asserts a smaller run). The timing column is the median time per trial.
 *
 * Sites (invented, marked so): the soft site of test/fixtures.ts (12 m,
 * 200 over 500 m/s), a thin stiff-contrast site (6 m, 150 over 600 m/s)
 * and a thick one (25 m, 300 over 900 m/s); picks log-spaced 3–40 Hz, every
 * third a phase pick.
 */
import type { TwoLayer } from '../../core/dispersion/love-layer';
import { estimateLayer, type ParameterEstimate } from '../../core/estimate/estimate';
import type { Pick } from '../../core/picks/picks';
import { mulberry32 } from '../../core/shared/random';
import { INVENTED_SOFT_SITE, oneLayerPicks } from '../fixtures';
import type { BenchResult } from './harness';

const P68 = 0.6826894921370859;
const P95 = 0.95;
const TRIALS = 1000;

const picksOf = (site: TwoLayer, count: number, rand: () => number): Pick[] => oneLayerPicks(site, count, rand);

interface Case {
  name: string;
  site: TwoLayer;
  picks: number;
  joint: boolean;
  seed: number;
}

const CASES: Case[] = [
  { name: 'thickness only, soft site 12 m 200/500 m/s, 12 picks', site: INVENTED_SOFT_SITE, picks: 12, joint: false, seed: 1101 },
  { name: 'thickness only, thin site 6 m 150/600 m/s, 12 picks', site: { h: 6, vs1: 150, vs2: 600, rho1: 1800, rho2: 2100 }, picks: 12, joint: false, seed: 1102 },
  { name: 'thickness only, thick site 25 m 300/900 m/s, 12 picks', site: { h: 25, vs1: 300, vs2: 900, rho1: 1900, rho2: 2200 }, picks: 12, joint: false, seed: 1103 },
  { name: 'joint H, β1, β2, soft site, 20 picks', site: INVENTED_SOFT_SITE, picks: 20, joint: true, seed: 1104 },
];

const covers = (e: ParameterEstimate, truth: number, level: 68 | 95) =>
  level === 68 ? e.low68 <= truth && truth <= e.high68 : e.low95 <= truth && truth <= e.high95;

function rateText(hits: number, n: number, p: number): string {
  const rate = hits / n;
  const se = Math.sqrt((p * (1 - p)) / n);
  const z = (rate - p) / se;
  return `${(100 * rate).toFixed(1)} % ± ${(100 * se).toFixed(1)} (${z >= 0 ? '+' : ''}${z.toFixed(1)} SE)`;
}

export default async function coverageBench(): Promise<BenchResult[]> {
  const results: BenchResult[] = [];
  const table: string[] = ['case | parameter | 68 % covered | 95 % covered'];
  for (const c of CASES) {
    const rand = mulberry32(c.seed);
    const params = c.joint ? (['thickness', 'vs1', 'vs2'] as const) : (['thickness'] as const);
    const truth = { thickness: c.site.h, vs1: c.site.vs1, vs2: c.site.vs2 };
    const hits = new Map<string, [number, number]>(params.map((p) => [p, [0, 0]]));
    const times: number[] = [];
    for (let t = 0; t < TRIALS; t++) {
      const picks = picksOf(c.site, c.picks, rand);
      const t0 = performance.now();
      const r = c.joint ? estimateLayer(picks) : estimateLayer(picks, { vs1: c.site.vs1, vs2: c.site.vs2 });
      times.push(performance.now() - t0);
      for (const p of params) {
        const h = hits.get(p)!;
        if (covers(r[p], truth[p], 68)) h[0]++;
        if (covers(r[p], truth[p], 95)) h[1]++;
      }
    }
    times.sort((a, b) => a - b);
    const notes: string[] = [];
    for (const p of params) {
      const [h68, h95] = hits.get(p)!;
      table.push(`${c.name} | ${p} | ${rateText(h68, TRIALS, P68)} | ${rateText(h95, TRIALS, P95)}`);
      notes.push(`${p} 68 % ${(100 * h68 / TRIALS).toFixed(1)} %, 95 % ${(100 * h95 / TRIALS).toFixed(1)} %`);
    }
    results.push({
      name: `coverage: ${c.name}`,
      median_ms: times[Math.floor(times.length / 2)],
      p10_ms: times[Math.floor(0.1 * times.length)],
      p90_ms: times[Math.floor(0.9 * times.length)],
      samples: TRIALS,
      note: `${TRIALS} seeded trials, time per trial; ${notes.join('; ')} (nominal 68.3 % / 95 %; SE 1.5 / 0.7 points)`,
    });
  }
  console.log(`Coverage of the 68 % and 95 % intervals, ${TRIALS} trials per case (binomial standard error, distance from nominal in SE):`);
  for (const line of table) console.log(`  ${line}`);
  console.log();
  return results;
}

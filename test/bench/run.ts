/**
 * `npm run bench`: runs every `*.bench.ts` in this folder (or those named on
 * the command line), prints a table of medians and then the same as JSON.
 */
import { readdirSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { BenchResult, BenchSuite } from './harness';

const here = dirname(fileURLToPath(import.meta.url));
const wanted = process.argv.slice(2);
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => wanted.length === 0 || wanted.some((w) => f.includes(w)))
  .sort();

function fmt(ms: number | undefined): string {
  if (ms === undefined) return '';
  if (ms < 0.01) return `${(ms * 1000).toFixed(3)} µs`;
  if (ms < 1) return `${(ms * 1000).toFixed(1)} µs`;
  return `${ms.toFixed(2)} ms`;
}

const all: BenchResult[] = [];
for (const f of files) {
  const mod = (await import(pathToFileURL(join(here, f)).href)) as { default: BenchSuite };
  const results = await mod.default();
  all.push(...results);
}

const rows = all.map((r) =>
  r.size_kB !== undefined
    ? [
        r.name,
        `${r.size_kB.toFixed(1)} kB`,
        '',
        r.budget_kB === undefined ? '' : `${r.budget_kB} kB ${r.size_kB <= r.budget_kB ? 'met' : 'MISSED'}`,
        r.note ?? '',
      ]
    : [
        r.name,
        fmt(r.median_ms),
        `${fmt(r.p10_ms)} – ${fmt(r.p90_ms)}`,
        r.target_ms === undefined ? '' : `${fmt(r.target_ms)} ${r.median_ms <= r.target_ms ? 'met' : 'MISSED'}`,
        r.note ?? '',
      ],
);
const head = ['benchmark', 'median', 'p10 – p90', 'target', 'note'];
const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(' | ');
console.log(line(head));
console.log(widths.map((w) => '-'.repeat(w)).join('-|-'));
for (const r of rows) console.log(line(r));
console.log();
console.log(JSON.stringify({ machine: { cpus: availableParallelism(), node: process.version }, results: all }, null, 2));
process.exit(0);

/**
 * The field app's download size: the gzip size of the JavaScript a first
 * visit must load before the app can run (the entry script of dist/index.html
 * and everything it imports statically or modulepreloads), against the
 * 60 kB budget of issue 4; and, separately, each chunk loaded later (the
 * compute worker, the charts).
 *
 * Builds the app first (vite build), so the figure is for the current
 * source. gzip at level 9 (node:zlib), as a web server would send it.
 */
import { spawnSync } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, posix, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import type { BenchResult } from './harness';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const DIST = join(ROOT, 'dist');
/** Initial JS budget, kB gzip (issue 4 §5). */
export const INITIAL_JS_BUDGET_KB = 60;

function gzipKB(file: string): number {
  return gzipSync(readFileSync(join(DIST, file)), { level: 9 }).length / 1000;
}

/** Paths (relative to dist/, no leading slash) of the JS the page loads up front. */
export function initialScripts(html: string): string[] {
  const found = new Set<string>();
  const local = (url: string) => url.replace(/^\//, '');
  for (const m of html.matchAll(/<script\b[^>]*\btype="module"[^>]*\bsrc="([^"]+)"/g)) found.add(local(m[1]));
  for (const m of html.matchAll(/<link\b[^>]*\brel="modulepreload"[^>]*\bhref="([^"]+)"/g)) found.add(local(m[1]));
  // Static imports, followed transitively (dynamic import() is lazy and not counted).
  const queue = [...found];
  while (queue.length) {
    const file = queue.pop()!;
    const code = readFileSync(join(DIST, file), 'utf8');
    for (const m of code.matchAll(/(?:^|[;\n}])\s*(?:import|export)\s*(?:[\w*${}\s,]+from\s*)?["'](\.{1,2}\/[^"']+\.js)["']/g)) {
      const dep = posix.normalize(posix.join(posix.dirname(file), m[1]));
      if (!found.has(dep)) {
        found.add(dep);
        queue.push(dep);
      }
    }
  }
  return [...found].sort();
}

function sizeResult(name: string, kB: number, note: string, budget?: number): BenchResult {
  return { name, median_ms: 0, p10_ms: 0, p90_ms: 0, samples: 1, size_kB: kB, budget_kB: budget, note };
}

export default async function appBench(): Promise<BenchResult[]> {
  const build = spawnSync(join(ROOT, 'node_modules', '.bin', 'vite'), ['build'], { cwd: ROOT, encoding: 'utf8' });
  if (build.status !== 0) throw new Error(`vite build failed, so the app size cannot be measured:\n${build.stdout}\n${build.stderr}`);
  const html = readFileSync(join(DIST, 'index.html'), 'utf8');
  const initial = initialScripts(html);
  const initialKB = initial.reduce((s, f) => s + gzipKB(f), 0);
  const results = [
    sizeResult('app: initial JS (gzip)', initialKB, initial.join(' + '), INITIAL_JS_BUDGET_KB),
  ];
  const css = [...html.matchAll(/<link\b[^>]*\brel="stylesheet"[^>]*\bhref="\/?([^"]+)"/g)].map((m) => m[1]);
  if (css.length) results.push(sizeResult('app: initial CSS (gzip)', css.reduce((s, f) => s + gzipKB(f), 0), css.join(' + ')));
  const lazy = readdirSync(join(DIST, 'assets'))
    .map((f) => `assets/${f}`)
    .filter((f) => f.endsWith('.js') && !initial.includes(f))
    .sort();
  for (const f of lazy) {
    const code = readFileSync(join(DIST, f), 'utf8');
    const what = f.includes('worker') ? 'compute worker' : /uPlot|uplot/.test(code) ? 'charts' : 'lazy chunk';
    results.push(sizeResult(`app: ${what} (gzip, lazy)`, gzipKB(f), f));
  }
  return results;
}

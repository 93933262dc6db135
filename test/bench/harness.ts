/**
 * A small benchmark harness: runs a function many times, reports the median
 * (and spread) of the wall time per call. Benchmarks never assert; they print
 * figures so that a person can compare them with the targets.
 */

export interface BenchResult {
  /** What was measured. */
  name: string;
  /** Median time per call, in milliseconds. */
  median_ms: number;
  /** 10th and 90th percentiles per call, in milliseconds. */
  p10_ms: number;
  p90_ms: number;
  /** Number of timed samples. */
  samples: number;
  /** The target, in milliseconds, if the issue states one. */
  target_ms?: number;
  /** Free text: units, sizes, anything needed to read the figure. */
  note?: string;
  /** For a size figure instead of a time (median_ms etc. are then 0): the size in kB. */
  size_kB?: number;
  /** The size budget in kB, if the issue states one. */
  budget_kB?: number;
}

export interface BenchOptions {
  /** Calls per timed sample (use > 1 for sub-microsecond work). @default 1 */
  inner?: number;
  /** Timed samples. @default 51 */
  samples?: number;
  /** Untimed warm-up calls. @default 10 */
  warmup?: number;
  target_ms?: number;
  note?: string;
}

function quantile(sorted: number[], q: number): number {
  const i = (sorted.length - 1) * q;
  const lo = Math.floor(i);
  const hi = Math.ceil(i);
  return sorted[lo] + (sorted[hi] - sorted[lo]) * (i - lo);
}

/** Time `fn`; the figure is the median over `samples` samples of `inner` calls each. */
export async function bench(name: string, fn: () => unknown, options: BenchOptions = {}): Promise<BenchResult> {
  const inner = options.inner ?? 1;
  const samples = options.samples ?? 51;
  const warmup = options.warmup ?? 10;
  let sink: unknown;
  for (let i = 0; i < warmup; i++) sink = await fn();
  const times: number[] = [];
  for (let s = 0; s < samples; s++) {
    const t0 = performance.now();
    for (let i = 0; i < inner; i++) sink = await fn();
    times.push((performance.now() - t0) / inner);
  }
  if (sink === Symbol.for('never')) console.log(sink);
  return summary(name, times, options);
}

/** The result of times measured elsewhere (e.g. in a worker thread): median and 10th/90th percentiles. */
export function summary(name: string, times: readonly number[], options: Pick<BenchOptions, 'target_ms' | 'note'> = {}): BenchResult {
  const sorted = [...times].sort((a, b) => a - b);
  return {
    name,
    median_ms: quantile(sorted, 0.5),
    p10_ms: quantile(sorted, 0.1),
    p90_ms: quantile(sorted, 0.9),
    samples: sorted.length,
    target_ms: options.target_ms,
    note: options.note,
  };
}

/** A bench module default-exports a function returning its results. */
export type BenchSuite = () => Promise<BenchResult[]>;

/**
 * Dispersion-image benchmarks (issue 12, Speed). Targets on the 2-core
 * machine, medians: a 48-trace × 2048-sample gather to a 200 × 200
 * phase-shift image ≤ 150 ms; one 4096-sample trace to a 100-filter
 * multiple-filter image ≤ 50 ms; following a ridge after a tap ≤ 16 ms.
 * Measured in Node on the same core code the app's worker runs. The records
 * are invented (synthetic, test/signal-fixtures.ts's soft site).
 */
import { linearAxis } from '../../core/signal/image';
import { multipleFilterImage } from '../../core/signal/multiple-filter';
import { phaseShiftImage } from '../../core/signal/phase-shift';
import { followRidge, strongestRidgeSeed } from '../../core/signal/ridge';
import { syntheticLoveGather } from '../../core/signal/synthetic-love';
import { SOFT_SITE_MODEL } from '../signal-fixtures';
import { bench, type BenchResult } from './harness';

/** CPU time per call (user + system), ms, over `n` calls: on a shared, loaded machine it shows the work itself. */
function cpuPerCall(fn: () => unknown, n: number): string {
  const t = process.cpuUsage();
  for (let i = 0; i < n; i++) fn();
  const d = process.cpuUsage(t);
  return `CPU ${((d.user + d.system) / 1000 / n).toFixed(1)} ms/call`;
}

export default async function signalBench(): Promise<BenchResult[]> {
  const gather = syntheticLoveGather(SOFT_SITE_MODEL, {
    offsets: Array.from({ length: 48 }, (_, j) => 10 + 2 * j),
    sampleInterval: 0.0005,
    samples: 2048,
    startTime: -0.1,
    peakHz: 20,
    modes: [
      { mode: 0, amplitude: 1 },
      { mode: 1, amplitude: 0.2 },
    ],
    noise: { level: 0.05, seed: 1 },
  });
  const trace = syntheticLoveGather(SOFT_SITE_MODEL, { offsets: [150], sampleInterval: 0.0005, samples: 4096, startTime: -0.1, peakHz: 12, noise: { level: 0.05, seed: 2 } });
  const frequencies = linearAxis(3, 80, 200, 'frequency', 'Hz');
  const velocities = linearAxis(80, 800, 200, 'velocity', 'm/s');
  const results: BenchResult[] = [];
  const ps = () => phaseShiftImage(gather, { frequencies, velocities });
  results.push(
    await bench('phase-shift image, 48 traces × 2048 samples → 200 × 200', ps, {
      target_ms: 150,
      samples: 21,
      warmup: 3,
      note: `one fft.js transform per trace, rotation recurrence on the regular line; ${cpuPerCall(ps, 5)}`,
    }),
  );
  const filters = linearAxis(3, 80, 100, 'frequency', 'Hz');
  const mf = () => multipleFilterImage(trace, { frequencies: filters, velocities });
  results.push(
    await bench('multiple-filter image, 4096 samples → 100 filters × 200', mf, {
      target_ms: 50,
      samples: 31,
      warmup: 5,
      note: `each band shifted down and inverse-transformed on a short fft.js transform; ${cpuPerCall(mf, 5)}`,
    }),
  );
  const image = phaseShiftImage(gather, { frequencies, velocities });
  const seed = strongestRidgeSeed(image)!;
  const ridge = () => followRidge(image, seed);
  results.push(
    await bench('ridge following after a tap, 200 × 200 image', ridge, {
      target_ms: 16,
      samples: 101,
      note: `both directions from the tap, parabolic refinement and half-power widths; ${cpuPerCall(ridge, 20)}`,
    }),
  );
  return results;
}

/**
 * Reading records (issue 12 target: a 10 MB SEG-Y file ≤ 100 ms). The files
 * are invented synthetic gathers (96 traces, decaying sine bursts) written
 * by core/recordings/segy-write.ts and seg2-write.ts; reading means
 * readRecording from bytes in memory to a Recording with Float64 traces.
 */
import { readRecording } from '../../core/recordings/read';
import { writeSeg2 } from '../../core/recordings/seg2-write';
import { writeSegy } from '../../core/recordings/segy-write';
import { bench, type BenchResult } from './harness';

const TRACES = 96;
const SAMPLES = 26_000; // 96 × (240 + 26 000 × 4) bytes ≈ 10.0 MB

function gather(): { sampleInterval: number; delay: number; traces: Float64Array[]; offsets: number[] } {
  const traces = Array.from({ length: TRACES }, (_, k) => {
    const t = new Float64Array(SAMPLES);
    for (let i = 0; i < SAMPLES; i++) t[i] = Math.round(1e4 * Math.exp(-i / 4000) * Math.sin(0.05 * i - 0.3 * k));
    return t;
  });
  return { sampleInterval: 0.000125, delay: 0, traces, offsets: Array.from({ length: TRACES }, (_, k) => 2 + k) };
}

export default async function (): Promise<BenchResult[]> {
  const g = gather();
  const ibm = writeSegy({ ...g, component: 'transverse' }, { format: 1 });
  const ieeeLittle = writeSegy({ ...g, component: 'transverse' }, { format: 5, littleEndian: true, revision: 2 });
  const int16 = writeSegy({ ...g, component: 'transverse' }, { format: 3 });
  const seg2 = writeSeg2(g, { format: 4 });
  const mb = (b: Uint8Array) => `${(b.length / 1e6).toFixed(1)} MB`;
  const opts = { samples: 21, warmup: 3 };
  return [
    await bench(`readRecording, SEG-Y ${mb(ibm)}, IBM float, big-endian`, () => readRecording(ibm, 'bench.sgy'), {
      ...opts,
      target_ms: 100,
      note: `${TRACES} traces × ${SAMPLES} samples`,
    }),
    await bench(`readRecording, SEG-Y ${mb(ieeeLittle)}, IEEE float, little-endian rev 2`, () => readRecording(ieeeLittle, 'bench.sgy'), {
      ...opts,
      target_ms: 100,
    }),
    await bench(`readRecording, SEG-Y ${mb(int16)}, int16`, () => readRecording(int16, 'bench.sgy'), opts),
    await bench(`readRecording, SEG-2 ${mb(seg2)}, float32`, () => readRecording(seg2, 'bench.sg2'), opts),
  ];
}

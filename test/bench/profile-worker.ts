/**
 * Runs in a worker thread: times one case of PROFILE_CASES (index in
 * workerData) with the core bundled as ES modules, as the app's compute
 * worker runs it (profile.bench.ts bundles this file with esbuild first).
 * Posts the time of each call after one untimed warm-up call, and the
 * forward work per call.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { estimateProfile } from '../../core/profile/profile-estimate';
import { forwardWork } from '../../core/profile/profile-forward';
import { PROFILE_CASES, workPerCall } from './profile-cases';

const c = PROFILE_CASES[(workerData as { index: number }).index];
const picks = c.picks();
estimateProfile(picks, c.options);
const before = { ...forwardWork };
const times: number[] = [];
for (let s = 0; s < c.samples; s++) {
  const t0 = performance.now();
  estimateProfile(picks, c.options);
  times.push(performance.now() - t0);
}
parentPort!.postMessage({ times, work: workPerCall(before, c.samples) });

/**
 * The compute worker: exposes the core's computations (compute-api.ts) to
 * the page through comlink, transferring typed arrays back instead of
 * copying them. Built with the WebWorker libs only (pwa/worker/tsconfig.json):
 * a DOM call here does not compile.
 */
import { expose, transfer } from 'comlink';
import { computeApi, type ComputeApi, type ComputeOutcome } from './compute-api';

type Exposed = {
  [K in keyof ComputeApi]: (...args: Parameters<ComputeApi[K]>) => ComputeOutcome<ReturnType<ComputeApi[K]>['outcome'] extends ComputeOutcome<infer T> ? T : never>;
};

function exposed(): Exposed {
  const out: Record<string, (...args: unknown[]) => unknown> = {};
  for (const name of Object.keys(computeApi) as (keyof ComputeApi)[]) {
    const fn = computeApi[name] as (...args: unknown[]) => { outcome: unknown; transfer: ArrayBuffer[] };
    out[name] = (...args: unknown[]) => {
      const { outcome, transfer: buffers } = fn(...args);
      return transfer(outcome, buffers);
    };
  }
  return out as Exposed;
}

export type WorkerApi = Exposed;

expose(exposed());

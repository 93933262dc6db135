/**
 * The compute bridge (pwa/worker/bridge.ts): lazy start, queueing, abort
 * (a queued call is dropped; a running call terminates the worker and the
 * next call gets a fresh one), errors carried across, crash recovery. The
 * worker is a fake speaking comlink over a MessageChannel, so the real
 * comlink path is exercised; the API behind it is the real compute API
 * plus a "hold" method that finishes only when the test says so.
 */
import { expose, proxy } from 'comlink';
import { afterEach, describe, expect, it } from 'vitest';
import { InputError } from '../../../../core/shared/errors';
import type { LayeredModel } from '../../../../core/dispersion/model';
import { computeApi, type ComputeApi } from '../../../../pwa/worker/compute-api';
import { ComputeBridge, isAbortError, LatestOnly, type WorkerLike } from '../../../../pwa/worker/bridge';

const model: LayeredModel = {
  layers: [{ thickness: 10, vs: 200, density: 1800 }],
  halfspace: { vs: 500, density: 2000 },
};

/** A stand-in Worker: comlink on one end of a MessageChannel, our API on the other. */
class FakeWorker implements WorkerLike {
  terminated = false;
  private readonly channel = new MessageChannel();
  private readonly errorListeners = new Set<(e: Event) => void>();

  constructor(api: object) {
    expose(api, this.channel.port2 as never);
  }
  postMessage(message: unknown, transfer?: Transferable[]): void {
    if (!this.terminated) this.channel.port1.postMessage(message, transfer ?? []);
  }
  addEventListener(type: string, listener: EventListenerOrEventListenerObject): void {
    if (type === 'message') this.channel.port1.addEventListener('message', listener as never);
    else this.errorListeners.add(listener as (e: Event) => void);
  }
  removeEventListener(type: string, listener: EventListenerOrEventListenerObject): void {
    if (type === 'message') this.channel.port1.removeEventListener('message', listener as never);
    else this.errorListeners.delete(listener as (e: Event) => void);
  }
  start(): void {
    this.channel.port1.start();
  }
  terminate(): void {
    this.terminated = true;
    this.channel.port1.close();
    this.channel.port2.close();
  }
  crash(message: string): void {
    const event = Object.assign(new Event('error'), { message });
    for (const l of this.errorListeners) l(event);
  }
}

/** The real compute API, with `siteFigures` held until released (a long computation). */
function harness() {
  const workers: FakeWorker[] = [];
  const held: (() => void)[] = [];
  const log: string[] = [];
  const api = {
    curves: (...args: Parameters<ComputeApi['curves']>) => {
      log.push('curves');
      const { outcome, transfer } = computeApi.curves(...args);
      if (outcome.ok) expect(transfer.length).toBeGreaterThan(0); // typed arrays are listed for transfer
      return outcome;
    },
    siteFigures: (...args: Parameters<ComputeApi['siteFigures']>) => {
      log.push('siteFigures');
      return new Promise((resolve) => held.push(() => resolve(computeApi.siteFigures(...args).outcome)));
    },
    siteFiguresForRanges: (...args: Parameters<ComputeApi['siteFiguresForRanges']>) => computeApi.siteFiguresForRanges(...args).outcome,
    estimate: (...args: Parameters<ComputeApi['estimate']>) => computeApi.estimate(...args).outcome,
    profile: (...args: Parameters<ComputeApi['profile']>) => {
      log.push('profile');
      return computeApi.profile(...args).outcome;
    },
  };
  const bridge = new ComputeBridge(() => {
    const w = new FakeWorker(api);
    workers.push(w);
    return w;
  });
  return { bridge, workers, held, log };
}

let cleanup: (() => void)[] = [];
afterEach(() => {
  for (const c of cleanup) c();
  cleanup = [];
});

async function until(cond: () => boolean): Promise<void> {
  for (let i = 0; i < 200 && !cond(); i++) await new Promise((r) => setTimeout(r, 2));
  expect(cond()).toBe(true);
}

describe('the compute bridge', () => {
  it('starts no worker until the first call, then reuses one worker for successive calls', async () => {
    const { bridge, workers } = harness();
    cleanup.push(() => bridge.terminate());
    expect(workers).toHaveLength(0);
    const a = await bridge.call('curves', [model, Float64Array.of(2, 5, 20), { modes: 2 }]);
    const b = await bridge.call('curves', [model, [1, 3], {}]);
    expect(workers).toHaveLength(1);
    expect(bridge.workersStarted).toBe(1);
    // Same numbers as calling the core here (the bridge adds nothing of its own).
    const direct = computeApi.curves(model, Float64Array.of(2, 5, 20), { modes: 2 }).outcome;
    expect(a).toEqual(direct.ok ? direct.value : undefined);
    expect(a.modes[0].frequency).toBeInstanceOf(Float64Array);
    expect(a.cutoffs[1]).toBeCloseTo((1 * 200 * 500) / (2 * 10 * Math.sqrt(500 ** 2 - 200 ** 2)), 9);
    expect(b.modes[0].frequency).toEqual(Float64Array.of(1, 3));
  });

  it('runs queued calls in order, one at a time', async () => {
    const { bridge, held, log } = harness();
    cleanup.push(() => bridge.terminate());
    const first = bridge.call('siteFigures', [model]);
    const second = bridge.call('curves', [model, [4], {}]);
    await until(() => held.length === 1);
    expect(log).toEqual(['siteFigures']);
    expect(bridge.pending).toBe(1);
    held[0]();
    expect((await first).vs30.best).toBeGreaterThan(0);
    await second;
    expect(log).toEqual(['siteFigures', 'curves']);
  });

  it('aborting a queued call drops it without touching the running worker', async () => {
    const { bridge, workers, held, log } = harness();
    cleanup.push(() => bridge.terminate());
    const first = bridge.call('siteFigures', [model]);
    const ctl = new AbortController();
    const queued = bridge.call('curves', [model, [4], {}], ctl.signal);
    ctl.abort();
    await expect(queued).rejects.toMatchObject({ name: 'AbortError' });
    await until(() => held.length === 1);
    held[0]();
    await first;
    expect(workers).toHaveLength(1);
    expect(workers[0].terminated).toBe(false);
    expect(log).toEqual(['siteFigures']);
  });

  it('aborting the running call terminates its worker, rejects with AbortError, and the next call gets a fresh worker', async () => {
    const { bridge, workers, held } = harness();
    cleanup.push(() => bridge.terminate());
    const ctl = new AbortController();
    const running = bridge.call('siteFigures', [model], ctl.signal);
    const next = bridge.call('curves', [model, [4], {}]);
    await until(() => held.length === 1);
    ctl.abort();
    const e = await running.then(
      () => undefined,
      (err: unknown) => err,
    );
    expect(isAbortError(e)).toBe(true);
    expect((e as Error).message).toBe('The computation was cancelled because its input changed.');
    expect(workers[0].terminated).toBe(true);
    const curves = await next;
    expect(curves.modes[0].frequency).toEqual(Float64Array.of(4));
    expect(workers).toHaveLength(2);
    expect(workers[1].terminated).toBe(false);
    held[0](); // the old worker's late answer goes nowhere
  });

  it('an already-aborted signal rejects at once and starts nothing', async () => {
    const { bridge, workers } = harness();
    const ctl = new AbortController();
    ctl.abort();
    await expect(bridge.call('curves', [model, [4], {}], ctl.signal)).rejects.toMatchObject({ name: 'AbortError' });
    expect(workers).toHaveLength(0);
  });

  it('bad input comes back as an InputError with its field', async () => {
    const { bridge } = harness();
    cleanup.push(() => bridge.terminate());
    const e = await bridge.call('curves', [model, [4, -1], {}]).then(
      () => undefined,
      (err: unknown) => err,
    );
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).field).toBe('frequencies[1]');
    expect((e as InputError).message).toBe('frequencies[1] must be a finite frequency above 0 Hz, but it is -1.');
  });

  it('a crashed worker rejects its call in plain words and is replaced', async () => {
    const { bridge, workers, held } = harness();
    cleanup.push(() => bridge.terminate());
    const running = bridge.call('siteFigures', [model]);
    await until(() => held.length === 1);
    workers[0].crash('out of memory');
    await expect(running).rejects.toThrow(
      'The compute worker stopped unexpectedly (out of memory), so the computation did not finish. Try again.',
    );
    await bridge.call('curves', [model, [4], {}]);
    expect(workers).toHaveLength(2);
  });

  it('the estimate crosses with its columns, and bad picks are named by the labels given', async () => {
    const { bridge } = harness();
    cleanup.push(() => bridge.terminate());
    // Exact synthetic group picks of the model above, from the core's own curves (a consistency check, not a reference).
    const f = [3, 4, 6, 8, 12, 16, 24];
    const curves = computeApi.curves(model, f, {}).outcome;
    if (!curves.ok) throw new Error('curves failed');
    const picks = f.map((fr, i) => ({ frequency: fr, velocity: curves.value.modes[0].group[i], kind: 'group' as const, mode: 0, sd: 3 }));
    const options = { vs1: 200, vs2: 500, density1: 1800, density2: 2000 };
    const result = await bridge.call('estimate', [picks, options]);
    const direct = computeApi.estimate(picks, options).outcome;
    expect(result).toEqual(direct.ok ? direct.value : undefined); // the bridge changes nothing
    expect(result.thickness.best).toBeCloseTo(10, 3);
    expect(result.misfitMap.chi2).toBeInstanceOf(Float64Array);
    expect(result.caution).toMatch(/^Screening estimate only\./);
    const bad = [...picks.slice(0, 2), { ...picks[2], velocity: 0.2 }];
    const e = await bridge.call('estimate', [bad, { vs1: 200, vs2: 500, pickLabels: ['row 1', 'row 2', 'row 3'] }]).then(
      () => undefined,
      (err: unknown) => err,
    );
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).field).toBe('row 3, velocity_m_s');
  });

  it('the layered estimate crosses with its band, reports progress to the page through a comlink proxy, and can be cancelled', async () => {
    const { bridge, workers } = harness();
    cleanup.push(() => bridge.terminate());
    const f = [3, 4, 5, 6, 8, 10, 12, 16, 20, 24];
    const curves = computeApi.curves(model, f, {}).outcome;
    if (!curves.ok) throw new Error('curves failed');
    const picks = f.map((fr, i) => ({ frequency: fr, velocity: curves.value.modes[0].group[i], kind: 'group' as const, mode: 0, sd: 3 }));
    const options = { layers: 1, seed: 3, effort: { chainSteps: 200, burnIn: 100 } };
    const seen: number[] = [];
    const result = await bridge.call('profile', [picks, options, proxy((x: number) => void seen.push(x))]);
    const direct = computeApi.profile(picks, options).outcome;
    expect(result).toEqual(direct.ok ? direct.value : undefined); // the bridge changes nothing
    expect(result.band.depth).toBeInstanceOf(Float64Array);
    expect(result.caution).toMatch(/^Screening estimate only\./);
    await until(() => seen.includes(1));
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    // Cancel a running estimate: the worker is stopped and the call rejects with an AbortError.
    const controller = new AbortController();
    const running = bridge.call('profile', [picks, { ...options, layers: 1, effort: { chainSteps: 5000 } }], controller.signal);
    controller.abort();
    const e = await running.then(() => undefined, (err: unknown) => err);
    expect(isAbortError(e)).toBe(true);
    expect(workers.some((w) => w.terminated)).toBe(true);
  });

  it('LatestOnly aborts the previous signal when a new input arrives', () => {
    const latest = new LatestOnly();
    const a = latest.next();
    const b = latest.next();
    expect(a.aborted).toBe(true);
    expect(b.aborted).toBe(false);
    latest.cancel();
    expect(b.aborted).toBe(true);
  });
});

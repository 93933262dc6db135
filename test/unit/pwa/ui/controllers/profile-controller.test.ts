/**
 * The wave type in the picks table and the layered-estimate controller
 * (pwa/ui/controllers/profile-controller.ts), on the real field store over
 * fake-indexeddb: a Rayleigh pick is saved with its wave; the layered
 * estimate runs on request with progress, can be cancelled, refuses a bad
 * setting in one sentence while keeping the typed text, and forgets its
 * result when another site opens.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { estimateProfile, type ProfileResult } from '../../../../../core/profile/profile-estimate';
import { openFieldStore, type FieldStore } from '../../../../../pwa/store';
import { AppController } from '../../../../../pwa/ui/controllers/app-controller';
import { NEW_ROW } from '../../../../../pwa/ui/controllers/app-state';
import type { ProfileRunner } from '../../../../../pwa/ui/controllers/profile-controller';
import { INVENTED_TWO_LAYER_SITE, layeredPicks } from '../../../../fixtures';

// Whole estimates (search, refinement, ensemble) run here: generous time on a busy 2-core machine; speed is measured by the bench, not here.
vi.setConfig({ testTimeout: 180_000 });

let dbCount = 0;
let store: FieldStore;
afterEach(() => store?.close());

/** Runs the core in-process, reporting progress as the worker would. */
const inProcess: ProfileRunner = async (picks, options, onProgress) =>
  estimateProfile(picks, { ...options, effort: { chainSteps: 200, burnIn: 100 }, onProgress, whereOf: (i) => options.pickLabels?.[i] ?? `pick ${i + 1}` });

/** Never answers by itself; rejects with an AbortError on abort. */
const pending: ProfileRunner = (_p, _o, onProgress, signal) => {
  onProgress(0.25);
  return new Promise<ProfileResult>((_ok, fail) => signal.addEventListener('abort', () => fail(new DOMException('aborted', 'AbortError'))));
};

async function started(runner: ProfileRunner): Promise<AppController> {
  const c = new AppController(undefined, undefined, undefined, runner);
  await c.start(async () => (store = await openFieldStore(`profile-test-${++dbCount}`)));
  await c.sites.createSite('Test site (invented)');
  return c;
}

async function addPicks(c: AppController, count: number): Promise<void> {
  for (const p of layeredPicks(INVENTED_TWO_LAYER_SITE, 'love', count, 3, 50)) {
    c.picks.editCell(NEW_ROW, 'frequency_hz', String(p.frequency));
    c.picks.editCell(NEW_ROW, 'velocity_m_s', String(p.velocity));
    c.picks.editCell(NEW_ROW, 'sd_m_s', String(p.sd));
    if (p.kind === 'phase') await c.picks.setKind(NEW_ROW, 'phase');
    await c.picks.commitRow(NEW_ROW, true);
  }
}

describe('the wave type of a pick', () => {
  it('saves a Rayleigh pick with its wave, and changes a stored pick back to Love', async () => {
    const c = await started(inProcess);
    c.picks.editCell(NEW_ROW, 'frequency_hz', '12');
    c.picks.editCell(NEW_ROW, 'velocity_m_s', '180');
    await c.picks.setWave(NEW_ROW, 'rayleigh');
    await c.picks.commitRow(NEW_ROW, true);
    const [p] = c.current.picks;
    expect(p.wave).toBe('rayleigh');
    expect((await store.listPicks(c.current.openSiteId!))[0].wave).toBe('rayleigh');
    await c.picks.setWave(p.id, 'love');
    expect(c.current.picks[0].wave).toBe('love');
    expect((await store.listPicks(c.current.openSiteId!))[0].wave).toBe('love');
  });
});

describe('the layered estimate in the app', () => {
  it('runs on request with progress and shows the band, verdict and caution of the core result', async () => {
    const c = await started(inProcess);
    await addPicks(c, 12);
    c.profiles.setSettings({ layers: 1 });
    await c.profiles.run();
    const p = c.current.profile;
    expect(p.status).toBe('done');
    expect(p.progress).toBe(1);
    expect(p.result?.layers).toBe(1);
    expect(p.result?.caution).toMatch(/^Screening estimate only\./);
  });

  it('refuses a Poisson ratio of 0.7 in one sentence, keeps the typed text, and starts nothing', async () => {
    const c = await started(inProcess);
    await addPicks(c, 8);
    c.profiles.setSettings({ poissonText: '0.7' });
    await c.profiles.run();
    const p = c.current.profile;
    expect(p.status).toBe('idle');
    expect(p.poissonText).toBe('0.7');
    expect(p.error).toBe("Poisson's ratio is 0.7, outside the range −1 to 0.5 (exclusive) of a stable elastic solid; soils are about 0.25–0.49.");
  });

  it('cancel stops the run (its signal aborts) and says so; opening another site forgets the result', async () => {
    let seen: AbortSignal | undefined;
    const c = await started((p, o, on, signal) => {
      seen = signal;
      return pending(p, o, on, signal);
    });
    await addPicks(c, 8);
    const run = c.profiles.run();
    await Promise.resolve();
    expect(c.current.profile.status).toBe('running');
    expect(c.current.profile.progress).toBe(0.25);
    c.profiles.cancel();
    await run;
    expect(seen?.aborted).toBe(true);
    expect(c.current.profile.status).toBe('idle');
    expect(c.current.profile.error).toBe('The layered estimate was cancelled.');
    await c.sites.createSite('Another site (invented)');
    expect(c.current.profile.result).toBeUndefined();
  });
});

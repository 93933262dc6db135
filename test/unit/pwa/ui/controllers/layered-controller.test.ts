/**
 * The layer builder's controller (pwa/ui/controllers/layered-controller.ts)
 * on the real field store over fake-indexeddb, with the model trial run
 * in-process (pwa/worker/model-trial.ts) in place of the worker: a model
 * that passes is kept with the site and drawn; a bad P speed is named in
 * one sentence and the kept model stays; a fresh app on the same store
 * gets the model back; the latest edit wins; layers are added and removed;
 * a layered estimate's best fit is drawn for its waves with its verdict.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { LayeredModel } from '../../../../../core/dispersion/model';
import type { ProfileResult } from '../../../../../core/profile/profile-types';
import { newSite, openFieldStore, type FieldStore } from '../../../../../pwa/store';
import { AppController } from '../../../../../pwa/ui/controllers/app-controller';
import type { TrialRunner } from '../../../../../pwa/ui/controllers/layered-controller';
import { bestFitCaption } from '../../../../../pwa/ui/controllers/layered-work';
import { builderKey } from '../../../../../pwa/ui/controllers/layered-form';
import { nextRevision } from '../../../../../core/exchange/records';
import { revisionKey } from '../../../../../core/exchange/revision';
import { pSpeedFromPoisson } from '../../../../../core/dispersion/model';
import type { ProfileRunner } from '../../../../../pwa/ui/controllers/profile-controller';
import { trialModel, type TrialRequest, type TrialResult } from '../../../../../pwa/worker/model-trial';

let dbCount = 0;
const stores: FieldStore[] = [];
afterEach(() => {
  for (const s of stores.splice(0)) s.close();
});

const inProcess: TrialRunner = async (model, request) => trialModel(model, request);

async function started(name: string, trial: TrialRunner = inProcess, profile?: ProfileRunner): Promise<AppController> {
  const c = new AppController(undefined, undefined, undefined, profile, trial);
  await c.start(async () => {
    const s = await openFieldStore(name);
    stores.push(s);
    return s;
  });
  return c;
}

/** Types an invented two-layer model with P speeds and commits it. */
async function typeTwoLayers(c: AppController): Promise<void> {
  await c.layered.addLayer();
  const cells: [number, 'thickness' | 'vs' | 'p' | 'density', string][] = [
    [0, 'thickness', '4'], [0, 'vs', '180'], [0, 'p', '340'], [0, 'density', '1800'],
    [1, 'thickness', '10'], [1, 'vs', '300'], [1, 'p', '1550'], [1, 'density', '1900'],
    [2, 'vs', '600'], [2, 'p', '1900'], [2, 'density', '2100'],
  ];
  for (const [r, f, t] of cells) c.layered.editCell(r, f, t);
  await c.layered.setWaves({ rayleigh: true });
}

describe('the layer builder', () => {
  it('keeps a model that passes with the site, draws its Rayleigh curves, and keeps it when a bad P speed is typed', async () => {
    const name = `layered-test-${++dbCount}`;
    const c = await started(name);
    await c.sites.createSite('Builder site (invented)');
    await typeTwoLayers(c);
    await vi.waitFor(() => expect(c.current.layered.trial.status).toBe('done'));
    const t = c.current.layered.trial;
    expect(t.result!.curves.map((x) => x.wave)).toEqual(['love', 'rayleigh']);
    expect(t.result!.curves[1].modes[0].phase.length).toBeGreaterThan(0);
    const id = c.current.openSiteId!;
    c.layered.setTab('layers');
    await vi.waitFor(async () => expect((await stores[0].getSite(id))!.layeredModel?.model.halfspace.vp_m_s).toBe(1900));
    const kept = (await stores[0].getSite(id))!.layeredModel!;
    expect(kept).toEqual({
      model: {
        layers: [
          { thickness_m: 4, vs_m_s: 180, density_kg_m3: 1800, vp_m_s: 340 },
          { thickness_m: 10, vs_m_s: 300, density_kg_m3: 1900, vp_m_s: 1550 },
        ],
        halfspace: { vs_m_s: 600, density_kg_m3: 2100, vp_m_s: 1900 },
      },
      pInput: 'vp',
      waves: { love: true, rayleigh: true },
      modes: 3,
    });
    // The model goes with the site to the office: its revision waits in the outbox.
    expect((await stores[0].outbox()).some((e) => e.recordId === id && e.rev === (c.current.sites.find((x) => x.id === id)!.rev))).toBe(true);

    c.layered.editCell(1, 'p', '330');
    await c.layered.commit();
    expect(c.current.layered.errors[0]).toBe(
      'Layer 2 P speed is 330 m/s, but it must be more than √(4/3) ≈ 1.155 times Layer 2 shear speed (300 m/s), since no stable elastic solid has a lower P/S speed ratio.',
    );
    expect(c.current.layered.rows[1].p).toBe('330'); // the typed text stays on screen
    expect(c.current.layered.trial.model!.layers[1].vp).toBe(1550); // the curves stay those of the kept model
    await new Promise((r) => setTimeout(r, 20));
    expect((await stores[0].getSite(id))!.layeredModel!.model.layers[1].vp_m_s).toBe(1550);

    // A fresh app on the same store (a reload) opens the site with the kept model, and computes it.
    const again = await started(name);
    again.sites.openSite(id, 'whatif');
    await vi.waitFor(() => expect(again.current.layered.trial.status).toBe('done'));
    expect(again.current.layered.rows.map((r) => r.p)).toEqual(['340', '1550', '1900']);
    expect(again.current.layered.waves).toEqual({ love: true, rayleigh: true });
    expect(again.current.layered.tab).toBe('layers'); // the What-if view returns to the builder
  });

  it('saves no new site revision for a model that did not change, and takes a newer model that arrives with the site', async () => {
    const c = await started(`layered-test-${++dbCount}`);
    await c.sites.createSite('Builder sync site (invented)');
    await typeTwoLayers(c);
    const id = c.current.openSiteId!;
    await vi.waitFor(async () => expect((await stores[0].getSite(id))!.layeredModel?.waves.rayleigh).toBe(true));
    await new Promise((r) => setTimeout(r, 20));
    const rev = (await stores[0].getSite(id))!.rev;
    await c.layered.commit(); // the same rows again
    await new Promise((r) => setTimeout(r, 20));
    expect((await stores[0].getSite(id))!.rev).toBe(rev);

    // Another tablet's newer model arrives (a sync pull or a bundle import): the rows follow it, typed as Poisson's ratios.
    const site = (await stores[0].getSite(id))!;
    const theirs = nextRevision(site, {
      layeredModel: {
        model: {
          layers: [{ thickness_m: 6.5, vs_m_s: 200, density_kg_m3: 1850, vp_m_s: pSpeedFromPoisson(200, 0.3) }],
          halfspace: { vs_m_s: 550, density_kg_m3: 2050, vp_m_s: pSpeedFromPoisson(550, 0.25) },
        },
        pInput: 'poisson',
        waves: { love: false, rayleigh: true },
        modes: 2,
      },
    });
    await stores[0].putIncoming([theirs]);
    await c.sync.recordsChanged();
    await vi.waitFor(() => expect(c.current.layered.rows.map((r) => r.p)).toEqual(['0.3', '0.25']));
    expect(c.current.layered.rows.map((r) => r.thickness)).toEqual(['6.5', '']);
    expect(c.current.layered.pInput).toBe('poisson');
    expect(c.current.layered.modes).toBe(2);
    await vi.waitFor(() => expect(c.current.layered.trial.model?.layers[0].thickness).toBe(6.5));
    await new Promise((r) => setTimeout(r, 20));
    expect((await stores[0].getSite(id))!.rev).toBe(theirs.rev); // taking it saves nothing new
  });

  it('folds a run of 80 cell edits between syncs into one unsent site revision made from the synced one, and a reload right after the last edit has it', async () => {
    const name = `layered-test-${++dbCount}`;
    const idle: TrialRunner = () => new Promise<TrialResult>(() => undefined); // the curves are not looked at here
    const c = await started(name, idle);
    await c.sites.createSite('Builder edit run site (invented)');
    await typeTwoLayers(c);
    const id = c.current.openSiteId!;
    const store = stores[0];
    await vi.waitFor(async () => expect((await store.getSite(id))!.layeredModel?.waves.rayleigh).toBe(true), { timeout: 10_000 });
    // A sync sends the site: its outbox is acknowledged inside a send, as the sync client does.
    await store.whileSending(async () => store.ackOutbox((await store.outbox()).map((e) => e.seq)));
    const synced = (await store.getSite(id))!;
    for (let i = 1; i <= 80; i++) {
      c.layered.editCell(0, 'thickness', String(4 + i / 10));
      await c.layered.commit();
    }
    // The 80 saves run one after another after the loop (the store's transactions): wait for the last, however busy the machine.
    await vi.waitFor(async () => expect((await store.getSite(id))!.layeredModel!.model.layers[0].thickness_m).toBe(12), { timeout: 30_000 });
    const last = (await store.getSite(id))!;
    expect(last.rev).toBe(synced.rev + 80);
    expect(last.history).toEqual([...(synced.history ?? []), revisionKey(synced)]);
    expect((await store.outbox()).filter((e) => e.recordId === id).map((e) => e.rev)).toEqual([last.rev]);
    // A fresh app on the same store (a reload right after the last edit) has the last model.
    const again = await started(name, idle);
    again.sites.openSite(id, 'whatif');
    await vi.waitFor(() => expect(again.current.layered.rows[0].thickness).toBe('12'), { timeout: 10_000 });
  });

  it('moves a model an earlier version kept on this device only to the site when the site opens', async () => {
    const name = `layered-test-${++dbCount}`;
    const old = await openFieldStore(name);
    stores.push(old);
    const site = await old.saveSite(newSite({ name: 'Builder old site (invented)' }));
    const rows = [
      { thickness: '5', vs: '190', p: '', density: '1800' },
      { thickness: '', vs: '560', p: '', density: '2100' },
    ];
    await old.putSetting(builderKey(site.id), { v: 1, pInput: 'vp', rows, waves: { love: true, rayleigh: false }, modes: 2 });
    const c = await started(name);
    c.sites.openSite(site.id, 'whatif');
    await vi.waitFor(() => expect(c.current.layered.rows).toEqual(rows));
    await vi.waitFor(async () =>
      expect((await old.getSite(site.id))!.layeredModel).toEqual({
        model: { layers: [{ thickness_m: 5, vs_m_s: 190, density_kg_m3: 1800 }], halfspace: { vs_m_s: 560, density_kg_m3: 2100 } },
        pInput: 'vp',
        waves: { love: true, rayleigh: false },
        modes: 2,
      }),
    );
    expect((await old.getSite(site.id))!.rev).toBe(2);
  });

  it('lets the latest edit win: a stale computation is aborted and its answer never shows', async () => {
    const calls: { model: LayeredModel; signal: AbortSignal; done: (r: TrialResult) => void }[] = [];
    const held: TrialRunner = (model, _req, signal) => new Promise((done) => calls.push({ model, signal, done }));
    const c = await started(`layered-test-${++dbCount}`, held);
    await c.sites.createSite('Latest site (invented)');
    await typeTwoLayers(c);
    await vi.waitFor(() => expect(calls.length).toBeGreaterThan(0));
    c.layered.editCell(0, 'vs', '190');
    await c.layered.commit();
    await vi.waitFor(() => expect(calls.some((x) => x.model.layers[0].vs === 190)).toBe(true));
    const [first, last] = [calls[0], calls[calls.length - 1]];
    expect(calls.slice(0, -1).every((x) => x.signal.aborted)).toBe(true);
    expect(last.signal.aborted).toBe(false);
    expect(last.model.layers[0].vs).toBe(190);
    const answer = (m: LayeredModel) => trialModel(m, { band: Float64Array.of(5, 10), waves: [{ wave: 'love', modes: 1 }], picks: [], figures: false });
    first.done(answer(first.model));
    last.done(answer(last.model));
    await vi.waitFor(() => expect(c.current.layered.trial.status).toBe('done'));
    expect(c.current.layered.trial.model!.layers[0].vs).toBe(190);
  });

  it('adds a layer as a copy of the one above the half-space, and removes layers but never the half-space or the last layer', async () => {
    const c = await started(`layered-test-${++dbCount}`);
    await c.sites.createSite('Rows site (invented)');
    await typeTwoLayers(c);
    await c.layered.addLayer();
    expect(c.current.layered.rows.map((r) => r.vs)).toEqual(['180', '300', '300', '600']);
    await c.layered.removeLayer(3); // the half-space: refused
    await c.layered.removeLayer(0);
    await c.layered.removeLayer(0);
    await c.layered.removeLayer(0); // the last layer: refused
    expect(c.current.layered.rows.map((r) => r.vs)).toEqual(['300', '600']);
    await c.layered.startFrom('blank');
    expect(c.current.layered.empty).toBe(7);
  });

  it('draws a layered estimate’s best fit for the waves it used, with its verdict', async () => {
    const result = {
      layers: 1,
      waves: { love: 0, rayleigh: 12 },
      profile: {
        layers: [
          {
            thickness: { best: 6, low68: 5.8, high68: 6.2, low95: 5.6, high95: 6.4, range: [1, 40], resolved: true },
            vs: { best: 180, low68: 170, high68: 190, low95: 160, high95: 200, range: [80, 400], resolved: true },
            vp: 337,
            density: 1800,
          },
        ],
        halfspace: { vs: { best: 450, low68: 420, high68: 480, low95: 400, high95: 500, range: [100, 1600], resolved: true }, vp: 842, density: 2100 },
      },
      choice: { tried: [], recommended: 1, criterion: '' },
      intervalScale: 1,
      alternatives: [],
      depthOfInvestigation: 20,
    } as unknown as ProfileResult;
    const profile: ProfileRunner = async () => result;
    const seen: TrialRequest[] = [];
    const trial: TrialRunner = async (m, req) => {
      seen.push(req);
      return trialModel(m, req);
    };
    const c = await started(`layered-test-${++dbCount}`, trial, profile);
    await c.sites.createSite('Best-fit site (invented)');
    await c.profiles.run();
    await vi.waitFor(() => expect(c.current.layered.best.status).toBe('done'));
    const best = c.current.layered.best;
    expect(best.result!.curves.map((x) => x.wave)).toEqual(['rayleigh']);
    expect(best.verdict!.level).toBe('resolved');
    expect(best.caption).toMatch(/^Layered best fit \(1 layer, resolved\): /);
    expect(seen.at(-1)!.figures).toBe(false);
    expect(best.model!.halfspace.vp).toBe(842);
  });
});

describe('the caption of a layered best fit', () => {
  it('says an unresolved estimate’s curves are for reference only, as the one-layer caption does', () => {
    expect(bestFitCaption({ level: 'unresolved', text: 'The 3 layers are not resolved: …' }, 3)).toBe(
      'Layered best-fit curves (3 layers) for reference only: The 3 layers are not resolved: …',
    );
    expect(bestFitCaption({ level: 'rough', text: 'A rough profile of 2 layers: …' }, 2)).toMatch(/^Layered best fit \(2 layers\), only roughly known: /);
  });
});

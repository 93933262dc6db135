/**
 * The app controller (pwa/ui/controllers/) on the real field store over
 * fake-indexeddb: typed rows save at once and are checked by the core's
 * pick rules; a refused or failed write keeps the typed text on screen with
 * its message; undo takes back the last change; CSV import is all or
 * nothing; the update waits for unsaved input; a new estimate aborts the
 * stale one.
 */
import 'fake-indexeddb/auto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { estimateLayer, type EstimateResult } from '../../../../../core/estimate/estimate';
import { CAUTION } from '../../../../../core/shared/caution';
import { loveVelocities } from '../../../../../core/dispersion/love-layer';
import { openFieldStore, StoreError, type FieldStore } from '../../../../../pwa/store';
import { AppController } from '../../../../../pwa/ui/controllers/app-controller';
import type { EstimateRunner, SliceRunner } from '../../../../../pwa/ui/controllers/estimate-controller';
import type { MisfitSlice } from '../../../../../core/estimate/misfit-slice';
import { NEW_ROW } from '../../../../../pwa/ui/controllers/app-state';
import { picksToCsv, type Pick } from '../../../../../core/picks/picks';

let dbCount = 0;
let store: FieldStore;
let failPickWrites = false;
/** When set, each pick write waits until this promise settles (a slow device). */
let slowPickWrites: Promise<void> | undefined;
const signals: AbortSignal[] = [];

/** A runner that never answers by itself; it records each call's signal. */
const pendingRunner: EstimateRunner = (_picks, _settings, signal) => {
  signals.push(signal);
  return new Promise<EstimateResult>((_ok, fail) => signal.addEventListener('abort', () => fail(new DOMException('aborted', 'AbortError'))));
};

async function started(estimate: EstimateRunner = pendingRunner, slice?: SliceRunner): Promise<AppController> {
  const c = new AppController(estimate, slice);
  await c.start(async () => {
    const real = await openFieldStore(`controller-test-${++dbCount}`);
    store = real;
    // The same store, with pick writes that can be made to fail like a full disk.
    return new Proxy(real, {
      get(target, prop, receiver) {
        if ((prop === 'savePick' || prop === 'savePicks') && failPickWrites) {
          return () => Promise.reject(new StoreError('The device storage is full, so the pick was not saved. Nothing was changed.'));
        }
        if (prop === 'savePick' && slowPickWrites) {
          const gate = slowPickWrites;
          return async (...args: Parameters<FieldStore['savePick']>) => {
            await gate;
            return target.savePick(...args);
          };
        }
        const v = Reflect.get(target, prop, receiver);
        return typeof v === 'function' ? v.bind(target) : v;
      },
    });
  });
  await c.sites.createSite('Test site (invented)');
  return c;
}

async function typeRow(c: AppController, f: string, v: string, sd?: string): Promise<void> {
  c.picks.editCell(NEW_ROW, 'frequency_hz', f);
  c.picks.editCell(NEW_ROW, 'velocity_m_s', v);
  if (sd !== undefined) c.picks.editCell(NEW_ROW, 'sd_m_s', sd);
  await c.picks.commitRow(NEW_ROW, true);
}

beforeEach(() => {
  failPickWrites = false;
  slowPickWrites = undefined;
  signals.length = 0;
});
afterEach(() => store?.close());

describe('typed picks', () => {
  it('saves a typed row at once and clears its draft; undo removes it again', async () => {
    const c = await started();
    await typeRow(c, '12', '180', '5');
    expect(c.current.picks.map((p) => [p.frequency, p.velocity, p.sd])).toEqual([[12, 180, 5]]);
    expect(c.current.drafts[NEW_ROW]).toBeUndefined();
    expect((await store.listPicks(c.current.openSiteId!)).length).toBe(1);
    expect(c.current.undo?.label).toBe('adding pick 1');
    await c.picks.undo();
    expect(c.current.picks).toEqual([]);
    expect(await store.listPicks(c.current.openSiteId!)).toEqual([]);
  });

  it('keeps a pick typed into the new row while the previous one is still saving, and saves it next', async () => {
    const c = await started();
    let open!: () => void;
    slowPickWrites = new Promise<void>((resolve) => (open = resolve));
    c.picks.editCell(NEW_ROW, 'frequency_hz', '12');
    c.picks.editCell(NEW_ROW, 'velocity_m_s', '180');
    c.picks.editCell(NEW_ROW, 'sd_m_s', '5');
    const first = c.picks.commitRow(NEW_ROW, true);
    // The crew types the next pick and presses Enter before the first write ends.
    c.picks.editCell(NEW_ROW, 'frequency_hz', '15');
    c.picks.editCell(NEW_ROW, 'velocity_m_s', '170');
    await c.picks.commitRow(NEW_ROW, true);
    expect(c.current.drafts[NEW_ROW]?.cells).toEqual({ frequency_hz: '15', velocity_m_s: '170' });
    open();
    await first;
    expect(c.current.picks.map((p) => [p.frequency, p.velocity, p.sd])).toEqual([
      [12, 180, 5],
      [15, 170, undefined],
    ]);
    expect(c.current.drafts[NEW_ROW]).toBeUndefined();
    expect((await store.listPicks(c.current.openSiteId!)).map((p) => p.frequency)).toEqual([12, 15]);
  });

  it('refuses a velocity that looks like km/s with the core message and keeps the text on screen', async () => {
    const c = await started();
    await typeRow(c, '12', '0.2');
    const d = c.current.drafts[NEW_ROW];
    expect(d.error).toBe(
      // Hand entry names the column by its heading's word, not the CSV name (velocity_m_s).
      'Pick 1, velocity: is 0.2 m/s, below the 30 m/s lower bound. It looks like km/s; the velocity must be given in m/s (the value was not converted).',
    );
    expect(d.errorColumn).toBe('velocity_m_s');
    expect(d.cells.velocity_m_s).toBe('0.2');
    expect(await store.listPicks(c.current.openSiteId!)).toEqual([]);
  });

  it('refuses a repeated frequency of the same kind and mode, naming both picks', async () => {
    const c = await started();
    await typeRow(c, '12', '180');
    await typeRow(c, '12', '190');
    expect(c.current.drafts[NEW_ROW].error).toBe(
      'Pick 2, frequency: repeats 12 Hz for a group pick of mode 0, already given in pick 1; keep one pick per frequency, kind and mode.',
    );
    expect(c.current.picks.length).toBe(1);
  });

  it('tells the crew when a write fails and keeps the typed text', async () => {
    const c = await started();
    await typeRow(c, '12', '180');
    failPickWrites = true;
    c.picks.editCell(c.current.picks[0].id, 'velocity_m_s', '222');
    await c.picks.commitRow(c.current.picks[0].id);
    const d = c.current.drafts[c.current.picks[0].id];
    expect(d.cells.velocity_m_s).toBe('222');
    expect(d.error).toBe('The device storage is full, so the pick was not saved. Nothing was changed. Your input is kept on screen.');
    expect(c.current.notices.at(-1)?.text).toBe(
      'Pick 1 was not saved: The device storage is full, so the pick was not saved. Nothing was changed.',
    );
    expect((await store.listPicks(c.current.openSiteId!))[0].velocity).toBe(180);
    // once the storage works again, the same text saves
    failPickWrites = false;
    await c.picks.commitRow(c.current.picks[0].id);
    expect((await store.listPicks(c.current.openSiteId!))[0].velocity).toBe(222);
  });

  it('undoes an edit and a deletion', async () => {
    const c = await started();
    await typeRow(c, '12', '180');
    const id = c.current.picks[0].id;
    c.picks.editCell(id, 'velocity_m_s', '200');
    await c.picks.commitRow(id);
    await c.picks.undo();
    expect((await store.listPicks(c.current.openSiteId!))[0].velocity).toBe(180);
    await c.picks.deletePick(id);
    expect(await store.listPicks(c.current.openSiteId!)).toEqual([]);
    await c.picks.undo();
    expect((await store.listPicks(c.current.openSiteId!)).map((p) => p.velocity)).toEqual([180]);
  });

  it('shows periods when the site is switched to seconds and takes a typed period', async () => {
    const c = await started();
    await c.settings.setAxisUnit('s');
    c.picks.editCell(NEW_ROW, 'period_s', '0.25');
    c.picks.editCell(NEW_ROW, 'velocity_m_s', '300');
    await c.picks.commitRow(NEW_ROW, true);
    expect(c.current.picks[0].period).toBe(0.25);
    expect(c.current.picks[0].frequency).toBe(4);
    expect(c.current.plot.axis).toBe('period');
    // the site keeps its choice: reopened, the plot shows periods again
    const id = c.current.openSiteId!;
    c.sites.closeSite();
    c.settings.setPlot({ axis: 'frequency' });
    c.sites.openSite(id);
    expect(c.current.plot.axis).toBe('period');
  });
});

describe('CSV import', () => {
  it('imports nothing from a file with a bad row, and says which row and column', async () => {
    const c = await started();
    await typeRow(c, '12', '180');
    c.imports.setImportReplace(true);
    await c.imports.importCsv('frequency_hz,velocity_m_s\n5,300\n6,-4\n');
    expect(c.current.importState.error).toBe(
      'Nothing was imported from the pasted text. Row 2 (line 3), column velocity_m_s: must be greater than 0 m/s, but it is -4.',
    );
    expect((await store.listPicks(c.current.openSiteId!)).map((p) => p.velocity)).toEqual([180]);
  });

  it('writes a good file in one go (replacing when asked) and undo brings the old table back', async () => {
    const c = await started();
    await typeRow(c, '12', '180');
    c.imports.setImportReplace(true);
    await c.imports.importCsv('frequency_hz,velocity_m_s,sd_m_s\n5,300,9\n6,280,\n');
    expect((await store.listPicks(c.current.openSiteId!)).map((p) => p.velocity)).toEqual([300, 280]);
    expect(c.current.importState.info).toBe(
      'Imported 2 pick(s) from the pasted text, replacing 1. 1 of 2 picks gave no sd_m_s; each uses 3 % of its velocity (common practice for surface-wave picks, not a published standard).',
    );
    await c.picks.undo();
    expect((await store.listPicks(c.current.openSiteId!)).map((p) => p.velocity)).toEqual([180]);
  });

  it('reads back an exported picks file exactly: the caution comment line above the header is skipped', async () => {
    const c = await started();
    const picks: Pick[] = [
      { frequency: 5, velocity: 300, sd: 9, kind: 'phase', mode: 1, note: '# not a comment, "quoted"' },
      { frequency: 7.25, velocity: 281.5, kind: 'group', mode: 0 },
    ];
    const text = picksToCsv(picks);
    expect(text.startsWith(`# ${CAUTION}\r\n`)).toBe(true);
    await c.imports.importCsv(text);
    expect(c.current.importState.error).toBeFalsy();
    const stored = await store.listPicks(c.current.openSiteId!);
    expect(stored.map(({ frequency, velocity, sd, kind, mode, note }) => ({ frequency, velocity, sd, kind, mode, note }))).toEqual([
      picks[0],
      { ...picks[1], sd: undefined, note: undefined },
    ]);
  });

  it('leaves the table unchanged when the write itself fails', async () => {
    const c = await started();
    failPickWrites = true;
    await c.imports.importCsv('frequency_hz,velocity_m_s\n5,300\n');
    expect(c.current.importState.error).toBe(
      'Nothing was imported from the pasted text. The device storage is full, so the pick was not saved. Nothing was changed.',
    );
    expect(c.current.importState.text).toBe('frequency_hz,velocity_m_s\n5,300\n');
    expect(c.current.picks).toEqual([]);
  });
});

describe('sites, demo, update and estimate', () => {
  it('keeps a note holding markup exactly as typed', async () => {
    const c = await started();
    const note = '<img src=x onerror=alert(1)><b>x</b>';
    c.sites.editSiteField('notes', note);
    await c.sites.commitSiteField('notes');
    expect((await store.listSites())[0].notes).toBe(note);
  });

  it('refuses a latitude out of range with a sentence naming it, and keeps the text', async () => {
    const c = await started();
    c.sites.editSiteField('lat', '95');
    c.sites.editSiteField('lon', '10');
    await c.sites.commitSiteField('lon');
    expect(c.current.siteError).toEqual({ field: 'lat', text: 'Latitude must be a number of degrees from -90 to 90, but it is "95".' });
    expect(c.current.siteDraft.lat).toBe('95');
    expect((await store.listSites())[0].location).toBeUndefined();
  });

  it('after a reload, returns to the site and view left open, the layered profile included', async () => {
    const name = `controller-test-place-${++dbCount}`;
    const first = new AppController(pendingRunner);
    await first.start(() => openFieldStore(name));
    await first.sites.createSite('Place test (invented)');
    const id = first.current.openSiteId!;
    first.sites.setView('profile');
    // The place is written in the background; wait until it is kept.
    const kept = await openFieldStore(name);
    await expect.poll(() => kept.getSetting<{ view?: string }>('ui.place').then((p) => p?.view)).toBe('profile');
    const second = new AppController(pendingRunner);
    await second.start(() => openFieldStore(name));
    expect(second.current.openSiteId).toBe(id);
    expect(second.current.view).toBe('profile');
  });

  it('installs the invented demo site with its 23 picks', async () => {
    const c = await started();
    await c.sites.loadDemo();
    const demo = c.current.sites.find((s) => s.name.startsWith('Invented demo'))!;
    expect(demo.notes).toMatch(/INVENTED SCENARIO/);
    expect((await store.listPicks(demo.id)).length).toBe(23);
  });

  it('holds the update back while a typed row is not saved, then applies it', async () => {
    const c = await started();
    let applied = 0;
    c.settings.offerUpdate(() => applied++);
    c.picks.editCell(NEW_ROW, 'frequency_hz', '10');
    c.picks.editCell(NEW_ROW, 'velocity_m_s', 'abc');
    await c.settings.applyUpdate();
    expect(applied).toBe(0);
    expect(c.current.drafts[NEW_ROW].cells.velocity_m_s).toBe('abc');
    expect(c.current.notices.at(-1)?.text).toMatch(/^The update waits: 1 typed value\(s\) are not saved yet\./);
    c.picks.editCell(NEW_ROW, 'velocity_m_s', '150');
    await c.settings.applyUpdate();
    expect(applied).toBe(1);
    expect((await store.listPicks(c.current.openSiteId!)).length).toBe(1);
  });

  it('aborts the stale estimate when a new one starts', async () => {
    const c = await started();
    await typeRow(c, '12', '180');
    void c.estimates.estimateNow();
    void c.estimates.estimateNow();
    expect(signals.length).toBeGreaterThanOrEqual(2);
    expect(signals.at(-2)!.aborted).toBe(true);
    expect(signals.at(-1)!.aborted).toBe(false);
    expect(c.current.estimate.status).toBe('running');
  });

  it('keeps a finished estimate with its site as one estimate record, revised only when the result changes', async () => {
    const c = await started(async (picks) => estimateLayer(picks, { vs1: 180, vs2: 650 }));
    // Exact group picks of an invented model (H 12 m, β1 180 m/s, β2 650 m/s) from the closed forms.
    const model = { h: 12, vs1: 180, vs2: 650, rho1: 1800, rho2: 2100 };
    for (const f of [4, 6, 9, 14, 20]) await typeRow(c, String(f), String(loveVelocities(model, f, 0).group.toFixed(3)));
    const siteId = c.current.openSiteId!;
    const kept = async () => {
      for (let i = 0; i < 200; i++) {
        const e = await store.latestEstimate(siteId);
        if (e) return e;
        await new Promise((r) => setTimeout(r, 10));
      }
      return undefined;
    };
    await c.estimates.estimateNow();
    const first = await kept();
    expect(first?.rev).toBe(1);
    expect(first?.summary.caution).toBe(CAUTION);
    expect((first?.summary.thickness_m as { best: number }).best).toBeCloseTo(c.current.estimate.result!.thickness.best, 12);
    await c.estimates.estimateNow(); // the same picks give the same result: no new revision
    await new Promise((r) => setTimeout(r, 50));
    expect((await store.latestEstimate(siteId))?.rev).toBe(1);
    const outboxIds = (await store.outbox()).map((e) => e.recordId);
    expect(outboxIds.filter((id) => id === first!.id)).toHaveLength(1);
  });

  it('marks the shown estimate stale as soon as the picks change, then asks for the close-up misfit picture', async () => {
    const fake = { thickness: { best: 7 } } as unknown as EstimateResult;
    const picture = { rows: 1, cols: 1 } as unknown as MisfitSlice;
    const asked: unknown[] = [];
    const c = await started(
      async () => fake,
      async (_picks, _settings, result, signal) => {
        asked.push(result, signal.aborted);
        return picture;
      },
    );
    await typeRow(c, '12', '180');
    expect(c.current.estimate.status).toBe('running');
    await c.estimates.estimateNow();
    expect(c.current.estimate).toEqual({ status: 'done', result: fake, slice: picture });
    expect(asked).toEqual([fake, false]);
    c.picks.editCell(c.current.picks[0].id, 'velocity_m_s', '190');
    await c.picks.commitRow(c.current.picks[0].id);
    expect(c.current.estimate.status).toBe('running');
    expect(c.current.estimate.result).toBe(fake);
  });
});

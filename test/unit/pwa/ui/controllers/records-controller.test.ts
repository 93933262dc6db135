/**
 * The Records view's controllers (pwa/ui/controllers/records-controller.ts
 * for the files, ridge-controller.ts for the image and ridge) on the real field store over fake-indexeddb, with the compute API run in-process:
 * a bad file is named and nothing is added; missing offsets are asked for
 * and the typed geometry is used; the ridge from one tap goes into the
 * picks table in one step and undo takes it all back; a clash with a pick
 * already in the table, or a bad mode, is named and nothing is saved.
 * The records are invented (test/signal-fixtures.ts) and written with the
 * project's own SEG-Y writer.
 */
import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import type { EstimateResult } from '../../../../../core/estimate/estimate';
import { loveVelocities } from '../../../../../core/dispersion/love-layer';
import { writeSegy } from '../../../../../core/recordings/segy-write';
import { DEMO_MODEL } from '../../../../../core/exchange/demo';
import { DEMO_RECORD_MODEL } from '../../../../../core/signal/demo-record';
import { openFieldStore, type FieldStore } from '../../../../../pwa/store';
import { AppController } from '../../../../../pwa/ui/controllers/app-controller';
import type { RecordsCompute } from '../../../../../pwa/ui/controllers/records-controller';
import { computeApi } from '../../../../../pwa/worker/compute-api';
import { InputError } from '../../../../../core/shared/errors';
import { INVENTED_SOFT_SITE } from '../../../../fixtures';
import { softSiteGather } from '../../../../signal-fixtures';

function unwrap<T>(c: { outcome: { ok: true; value: T } | { ok: false; message: string; field?: string; name: string } }): T {
  if (c.outcome.ok) return c.outcome.value;
  throw c.outcome.name === 'InputError' ? new InputError(c.outcome.field ?? '', c.outcome.message) : new Error(c.outcome.message);
}

const inProcess: RecordsCompute = {
  read: async (bytes, name, overrides) => unwrap(computeApi.readRecord(bytes, name, overrides)),
  image: async (gather, options) => unwrap(computeApi.dispersionImage(gather, options)),
  ridge: async (image, tap) => unwrap(computeApi.followRidge(image, tap)),
};

let db = 0;
let store: FieldStore;
const never = (_p: unknown, _s: unknown, signal: AbortSignal) =>
  new Promise<EstimateResult>((_ok, fail) => signal.addEventListener('abort', () => fail(new DOMException('aborted', 'AbortError'))));

async function started(): Promise<AppController> {
  const c = new AppController(never, undefined, inProcess);
  await c.start(async () => (store = await openFieldStore(`records-test-${++db}`)));
  await c.sites.createSite('Records test (invented)');
  return c;
}

function file(bytes: Uint8Array, name: string): File {
  return new File([bytes.slice().buffer as ArrayBuffer], name);
}

const gather = softSiteGather();
const segy = writeSegy({ sampleInterval: gather.sampleInterval, delay: gather.startTime, traces: [...gather.traces].slice(0, 24), offsets: Array.from(gather.offsets).slice(0, 24), component: 'transverse' });
const bare = writeSegy({ sampleInterval: gather.sampleInterval, delay: gather.startTime, traces: [...gather.traces].slice(0, 24), component: 'transverse' });

describe('records controller', () => {
  it('keeps the demo record on the invented demo site\'s ground', () => {
    expect(DEMO_RECORD_MODEL).toEqual({
      layers: [{ thickness: DEMO_MODEL.h, vs: DEMO_MODEL.vs1, density: DEMO_MODEL.rho1 }],
      halfspace: { vs: DEMO_MODEL.vs2, density: DEMO_MODEL.rho2 },
    });
  });

  it('names a bad file and adds nothing', async () => {
    const c = await started();
    await c.records.importFile(file(segy.slice(0, 3000), 'cut.sgy'));
    const s = c.current.records;
    expect(s.list).toHaveLength(0);
    expect(s.error).toMatch(/^Nothing was added from cut\.sgy\. /);
  });

  it('asks for missing offsets, then images the record with the typed geometry', async () => {
    const c = await started();
    await c.records.importFile(file(bare, 'no-offsets.sgy'));
    const rec = c.records.open()!;
    expect(rec.recording).toBeUndefined();
    expect(rec.askFor.join(' ')).toMatch(/offset of the first receiver/);
    expect(c.current.records.image).toBeUndefined();
    c.records.setOverride('first', '10');
    c.records.setOverride('spacing', 'two');
    await c.records.applyOverrides();
    expect(c.current.records.error).toBe('The receiver spacing (m) must be a number, but it is "two".');
    c.records.setOverride('spacing', '2');
    await c.records.applyOverrides();
    expect(c.current.records.image?.method).toBe('phase-shift');
  });

  it('adds the ridge from one tap as phase picks in one step, and undo takes them all back', async () => {
    const c = await started();
    await c.records.importFile(file(segy, 'gather.sgy'));
    await c.ridge.tap(20, loveVelocities(INVENTED_SOFT_SITE, 20, 0).phase);
    const ridge = c.current.records.ridge!;
    expect(ridge.velocity.length).toBeGreaterThan(10);
    c.ridge.togglePoint(0);
    c.ridge.setMode('0');
    await c.ridge.addToPicks();
    const picks = await store.listPicks(c.current.openSiteId!);
    expect(picks).toHaveLength(ridge.velocity.length - 1);
    expect(new Set(picks.map((p) => p.kind))).toEqual(new Set(['phase']));
    expect(picks[0].note).toBe('gather.sgy, phase-shift image');
    expect(c.current.undo?.label).toBe(`adding ${picks.length} pick(s) from the record`);
    await c.picks.undo();
    expect(await store.listPicks(c.current.openSiteId!)).toHaveLength(0);
  });

  it('trims the ridge by dragging its ends and adds only the kept points', async () => {
    const c = await started();
    await c.records.importFile(file(segy, 'gather.sgy'));
    await c.ridge.tap(20, loveVelocities(INVENTED_SOFT_SITE, 20, 0).phase);
    const ridge = c.current.records.ridge!;
    const n = ridge.velocity.length;
    c.ridge.dragEnd('low', ridge.frequency[3]);
    c.ridge.dragEnd('high', ridge.frequency[n - 3]);
    expect(c.current.records.range).toEqual([3, n - 3]);
    // An end dragged past the other stops there.
    c.ridge.dragEnd('low', 1e6);
    expect(c.current.records.range).toEqual([n - 3, n - 3]);
    c.ridge.dragEnd('low', ridge.frequency[3]);
    c.ridge.togglePoint(5);
    c.ridge.togglePoint(6);
    c.ridge.togglePoint(6);
    c.ridge.setMode('1');
    const kept = await c.ridge.keptPicks();
    expect(kept).toHaveLength(n - 3 - 3 + 1 - 1);
    expect(kept.every((p) => p.mode === 1)).toBe(true);
    expect(kept.some((p) => p.frequency === ridge.frequency[5])).toBe(false);
    await c.ridge.addToPicks();
    expect(await store.listPicks(c.current.openSiteId!)).toHaveLength(kept.length);
  });

  it('refuses points that repeat a pick of the table, or a bad mode, and saves nothing', async () => {
    const c = await started();
    await c.records.importFile(file(segy, 'gather.sgy'));
    await c.ridge.tap(20, loveVelocities(INVENTED_SOFT_SITE, 20, 0).phase);
    await c.ridge.addToPicks();
    const before = (await store.listPicks(c.current.openSiteId!)).length;
    await c.ridge.tap(20, loveVelocities(INVENTED_SOFT_SITE, 20, 0).phase);
    await c.ridge.addToPicks();
    expect(c.current.records.error).toMatch(/^Nothing was added to the picks\. .*repeats/);
    c.ridge.setMode('first');
    await c.ridge.addToPicks();
    expect(c.current.records.error).toBe('Nothing was added to the picks. The mode must be a whole number from 0 (fundamental) to 50, but it is "first".');
    expect(await store.listPicks(c.current.openSiteId!)).toHaveLength(before);
  });

  it('keeps an imported file with its site, lists it again when the site reopens, reads its bytes back, and removes it', async () => {
    const c = await started();
    await c.records.importFile(file(segy, 'kept.sgy'));
    const siteId = c.current.openSiteId!;
    const kept = await store.listRecordings(siteId);
    expect(kept.map((r) => r.name)).toEqual(['kept.sgy']);
    expect(kept[0].geometry.traces).toBe(24);
    // The site's list of kept files (under Site details) hears of it.
    expect(c.current.recordings.list.map((r) => r.name)).toEqual(['kept.sgy']);
    c.records.reset();
    await c.records.loadStored(siteId);
    expect(c.current.records.list.map((r) => [r.name, r.stored, r.bytes])).toEqual([['kept.sgy', true, undefined]]);
    await c.records.select(kept[0].id);
    expect(c.current.records.image?.method).toBe('phase-shift');
    await c.records.remove();
    expect(await store.listRecordings(siteId)).toEqual([]);
    expect(c.current.records.list).toEqual([]);
    expect(c.current.recordings.list).toEqual([]);
  });

  it('follows the strongest ridge without a tap (the keyboard\'s way in)', async () => {
    const c = await started();
    await c.records.importFile(file(segy, 'gather.sgy'));
    await c.ridge.followStrongest();
    const ridge = c.current.records.ridge!;
    expect(ridge.velocity.length).toBeGreaterThan(10);
    // The fundamental: within 3 % of the invented site's phase velocity at the middle point (a loose check; the reference tests hold 1 %).
    const k = Math.floor(ridge.velocity.length / 2);
    const c0 = loveVelocities(INVENTED_SOFT_SITE, ridge.frequency[k], 0).phase;
    expect(Math.abs(ridge.velocity[k] - c0) / c0).toBeLessThan(0.03);
  });

  it('opens the invented demo record, marked invented', async () => {
    const c = await started();
    await c.records.loadDemo();
    const rec = c.records.open()!;
    expect(rec.invented).toBe(true);
    expect(rec.name).toMatch(/^Invented demo record/);
    expect(rec.warnings.join(' ')).toMatch(/invented/);
    expect(c.current.records.image?.method).toBe('phase-shift');
  });
});

/**
 * The recordings of the open site in the app (pwa/ui/controllers/
 * recordings-controller.ts) on the real field store over fake-indexeddb:
 * opening a site lists its kept files, the site's choice whether raw files
 * travel is saved for every file, a deletion asks the store and the list
 * follows, and a refused change says why and leaves the stored list shown.
 * The file is an invented SEG-2 record written by the core's writer.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { geometrySummary } from '../../../../../core/recordings/recording';
import { readRecording } from '../../../../../core/recordings/read';
import { writeSeg2 } from '../../../../../core/recordings/seg2-write';
import { openFieldStore, StoreError, type FieldStore } from '../../../../../pwa/store';
import { AppController } from '../../../../../pwa/ui/controllers/app-controller';

let store: FieldStore;
let failAttach = false;
afterEach(() => store?.close());

async function started(): Promise<AppController> {
  const c = new AppController(() => new Promise(() => undefined));
  await c.start(async () => {
    store = await openFieldStore(`recordings-ui-${crypto.randomUUID()}`, { storageEstimate: async () => ({}) });
    return new Proxy(store, {
      get(target, prop, receiver) {
        if (prop === 'setRecordingAttach' && failAttach) {
          return () => Promise.reject(new StoreError("The device's storage is full, so the choice was not saved. Nothing was changed."));
        }
        const v = Reflect.get(target, prop, receiver);
        return typeof v === 'function' ? v.bind(target) : v;
      },
    });
  });
  await c.sites.createSite('Invented site: quarry road');
  return c;
}

function file(): { bytes: Uint8Array; geometry: ReturnType<typeof geometrySummary> } {
  const traces = [0, 1].map((k) => Array.from({ length: 32 }, (_, i) => Math.sin(i / 4 + k)));
  const bytes = writeSeg2({ sampleInterval: 0.002, delay: 0, traces, offsets: [5, 7] });
  return { bytes, geometry: geometrySummary(readRecording(bytes, 'shot.sg2')) };
}

describe('recordings of the open site', () => {
  it('lists the kept files when the site opens, saves the site choice for raw files, and deletes one', async () => {
    const c = await started();
    const siteId = c.current.openSiteId!;
    const { bytes, geometry } = file();
    await store.saveRecording({ siteId, name: 'shot-a.sg2', bytes, geometry });
    await store.saveRecording({ siteId, name: 'shot-b.sg2', bytes, geometry });
    c.sites.closeSite();
    c.sites.openSite(siteId, 'details');
    await c.recordings.load(siteId);
    expect(c.current.recordings.list.map((r) => [r.name, r.attach])).toEqual([
      ['shot-a.sg2', false],
      ['shot-b.sg2', false],
    ]);
    await c.recordings.setAttach(true);
    expect(c.current.recordings.list.map((r) => r.attach)).toEqual([true, true]);
    expect((await store.listRecordings(siteId)).map((r) => r.attach)).toEqual([true, true]);
    await c.recordings.remove(c.current.recordings.list[0].id);
    expect(c.current.recordings.list.map((r) => r.name)).toEqual(['shot-b.sg2']);
    expect(c.current.notices.at(-1)?.text).toBe('The recording "shot-a.sg2" was deleted from this site.');
  });

  it('says why a refused choice was not saved, and the stored list stays shown', async () => {
    const c = await started();
    const siteId = c.current.openSiteId!;
    const { bytes, geometry } = file();
    await store.saveRecording({ siteId, name: 'shot-a.sg2', bytes, geometry });
    await c.recordings.load(siteId);
    failAttach = true;
    await c.recordings.setAttach(true);
    failAttach = false;
    expect(c.current.recordings.error).toBe(
      "The choice for raw files was not saved: The device's storage is full, so the choice was not saved. Nothing was changed.",
    );
    expect(c.current.recordings.busy).toBe(false);
    expect(c.current.recordings.list.map((r) => r.attach)).toEqual([false]);
    expect((await store.listRecordings(siteId)).map((r) => r.attach)).toEqual([false]);
  });
});

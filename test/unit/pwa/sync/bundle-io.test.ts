/**
 * Bundles between two tablets with seismograph files (pwa/sync/bundle-io.ts
 * over the field store on fake-indexeddb): the records of every recording
 * travel, a raw file only where its site chose to send it, and the files
 * arrive byte for byte; importing again duplicates nothing; a file changed
 * after export is refused and nothing is written. The files are invented
 * SEG-2 records written by the core's writer. A site's layer builder model travels
 * with it, and a bundle with a bad model value changes nothing.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { toBase64 } from '../../../../core/exchange/base64';
import { geometrySummary } from '../../../../core/recordings/recording';
import { readRecording } from '../../../../core/recordings/read';
import { writeSeg2 } from '../../../../core/recordings/seg2-write';
import { newSite, openFieldStore, type FieldStore } from '../../../../pwa/store';
import { exportBundle, importBundleText } from '../../../../pwa/sync/bundle-io';

const open: FieldStore[] = [];
afterEach(() => {
  while (open.length) open.pop()!.close();
});

async function tablet(): Promise<FieldStore> {
  const s = await openFieldStore(`bundle-io-${crypto.randomUUID()}`, { storageEstimate: async () => ({}) });
  open.push(s);
  return s;
}

function shot(seed: number): { bytes: Uint8Array; geometry: ReturnType<typeof geometrySummary> } {
  const traces = [0, 1, 2].map((k) => Array.from({ length: 48 }, (_, i) => Math.sin(i / (3 + seed) + k)));
  const bytes = writeSeg2({ sampleInterval: 0.001, delay: 0, traces, offsets: [3, 5, 7] });
  return { bytes, geometry: geometrySummary(readRecording(bytes, `shot-${seed}.sg2`)) };
}

describe('bundles with seismograph files', () => {
  it('carries every recording record and only the raw files the site chose to send, byte for byte', async () => {
    const a = await tablet();
    const sending = await a.saveSite(newSite({ name: 'Invented site: sends raw files' }));
    const keeping = await a.saveSite(newSite({ name: 'Invented site: keeps raw files' }));
    const one = shot(1);
    const two = shot(2);
    const r1 = await a.saveRecording({ siteId: sending.id, name: 'shot-1.sg2', ...one });
    await a.setRecordingAttach(sending.id, true);
    const r2 = await a.saveRecording({ siteId: keeping.id, name: 'shot-2.sg2', ...two });

    const file = await exportBundle(a);
    expect([file.sites, file.recordings, file.recordingFiles, file.filesLeftOut, file.filesMissing]).toEqual([2, 2, 1, 0, 0]);

    const b = await tablet();
    const outcome = await importBundleText(b, file.text);
    expect(outcome.ok).toBe(true);
    expect(outcome.message).toMatch(/It carried 2 seismograph file record\(s\), 1 with the raw file\.$/);
    expect((await b.listRecordings(sending.id)).map((r) => [r.id, r.rev, r.attach])).toEqual([[r1.id, 2, true]]);
    expect((await b.listRecordings(keeping.id)).map((r) => [r.id, r.attach])).toEqual([[r2.id, false]]);
    expect(await b.recordingBytes(r1.id)).toEqual(one.bytes);
    expect(await b.recordingBytes(r2.id)).toBeUndefined();

    // The same file again changes nothing.
    const outboxBefore = await b.outbox();
    const again = await importBundleText(b, file.text);
    expect(again.ok).toBe(true);
    expect(await b.outbox()).toEqual(outboxBefore);
    expect(await b.allRecordings()).toHaveLength(2);
  });

  it('refuses a raw file changed after export (same size, other bytes) and writes nothing', async () => {
    const a = await tablet();
    const site = await a.saveSite(newSite({ name: 'Invented site: sends raw files' }));
    const one = shot(1);
    await a.saveRecording({ siteId: site.id, name: 'shot-1.sg2', ...one, attach: true });
    const data = JSON.parse((await exportBundle(a)).text);
    const changed = one.bytes.slice();
    changed[changed.length - 1] ^= 0xff;
    data.recordingFiles[0].bytes_base64 = toBase64(changed);
    const b = await tablet();
    const outcome = await importBundleText(b, JSON.stringify(data));
    expect(outcome).toEqual({
      ok: false,
      message: 'Nothing was imported. The bundle is not valid: recordingFiles[0] does not have the SHA-256 its recording states; the file was changed after it was written.',
    });
    expect(await b.listSites()).toEqual([]);
    expect(await b.allRecordings()).toEqual([]);
    expect(await b.outbox()).toEqual([]);
  });
});

describe('bundles with a layer builder model', () => {
  const layeredModel = {
    model: { layers: [{ thickness_m: 6, vs_m_s: 190, density_kg_m3: 1800, vp_m_s: 400 }], halfspace: { vs_m_s: 560, density_kg_m3: 2100, vp_m_s: 1700 } },
    pInput: 'vp' as const,
    waves: { love: true, rayleigh: true },
    modes: 2,
  };

  it('carries the site\'s model to another tablet unchanged', async () => {
    const a = await tablet();
    const site = await a.saveSite(newSite({ name: 'Invented site: with a model', layeredModel }));
    const b = await tablet();
    const outcome = await importBundleText(b, (await exportBundle(a)).text);
    expect(outcome.ok).toBe(true);
    expect((await b.getSite(site.id))!.layeredModel).toEqual(layeredModel);
  });

  it('refuses a bundle whose model has a bad value, naming the layer and field, and leaves the stored site as it was', async () => {
    const a = await tablet();
    const site = await a.saveSite(newSite({ name: 'Invented site: with a model', layeredModel }));
    const b = await tablet();
    expect((await importBundleText(b, (await exportBundle(a)).text)).ok).toBe(true);
    const before = await b.getSite(site.id);
    const data = JSON.parse((await exportBundle(a)).text);
    data.sites[0].rev = 2;
    data.sites[0].layeredModel.model.halfspace.density_kg_m3 = 2.1;
    const outcome = await importBundleText(b, JSON.stringify(data));
    expect(outcome).toEqual({
      ok: false,
      message:
        'Nothing was imported. The bundle is not valid: sites[0].layeredModel.model.halfspace.density_kg_m3 is 2.1 kg/m³, below the 1000 kg/m³ lower bound for density. It looks like g/cm³; enter the density in kg/m³.',
    });
    expect(await b.getSite(site.id)).toEqual(before);
  });
});

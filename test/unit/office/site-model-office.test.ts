/**
 * A site's layer-builder model at the office: a sync push keeps it in the
 * SQLite store and a pull gives it back unchanged; a push with a bad model
 * is refused with one sentence naming the layer and field and changes
 * nothing; bundle-export and bundle-import carry it; sites-export writes it
 * as a model file that `shearfield curve` reads, with the caution. Real
 * SQLite files in a temporary folder; the server and the commands run in
 * this process. The site and its model are invented.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseBundle } from '../../../core/exchange/bundle';
import { nextRevision, type SiteLayeredModel, type SiteRecord } from '../../../core/exchange/records';
import { modelFromJson } from '../../../core/dispersion/model';
import { CAUTION } from '../../../core/shared/caution';
import { cli, officeScratch } from './office-harness';
import { startOfficeServer } from '../../../office/server';
import { OfficeStore } from '../../../office/store';

const T = '2026-05-04T08:00:00.000Z';
const { dir, running } = officeScratch('shearfield-site-model-');

/** An invented two-layer model, its P speeds typed as Poisson's ratios 0.3 and 0.25 (vp = vs·√((2 − 2ν)/(1 − 2ν))). */
const layeredModel: SiteLayeredModel = {
  model: {
    layers: [
      { thickness_m: 3.5, vs_m_s: 170, density_kg_m3: 1800, vp_m_s: 170 * Math.sqrt(1.4 / 0.4) },
      { thickness_m: 8, vs_m_s: 260, density_kg_m3: 1900, vp_m_s: 260 * Math.sqrt(1.4 / 0.4) },
    ],
    halfspace: { vs_m_s: 620, density_kg_m3: 2100, vp_m_s: 620 * Math.sqrt(3) },
  },
  pInput: 'poisson',
  waves: { love: false, rayleigh: true },
  modes: 2,
};

const site: SiteRecord = {
  type: 'site', id: 'site-model-office', rev: 1, updatedAt: T, name: 'Invented site: Heron Cut', date: '2026-05-04',
  crew: 'Invented crew', notes: '', axisUnit: 'hz', settings: {}, layeredModel,
};

describe('a site layered model at the office', () => {
  it('syncs into the store and back unchanged; a bad model is refused in one sentence and changes nothing', async () => {
    const d = dir();
    const token = (await cli(['device', 'add', 'Tablet 3', '--data', d])).out.split('\n')[3].trim();
    const srv = await startOfficeServer({ port: 0, dataDir: d, distDir: join(d, 'none') });
    running.push(srv);
    const push = (batchId: string, records: unknown[]) =>
      fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body: JSON.stringify({ batchId, records }) });

    const ok = await push('b1', [site]);
    expect(ok.status).toBe(200);
    expect((await ok.json()).accepted).toBe(1);
    const pulled = await (await fetch(`${srv.url}/api/v1/pull?since=0`, { headers: { Authorization: `Bearer ${token}` } })).json();
    expect(pulled.records).toEqual([site]);

    const bad = nextRevision(site, { layeredModel: { ...layeredModel, model: { ...layeredModel.model, layers: [layeredModel.model.layers[0], { ...layeredModel.model.layers[1], vp_m_s: 280 }] } } });
    const refused = await push('b2', [bad]);
    expect(refused.status).toBe(400);
    expect((await refused.json()).error).toBe(
      'The record is not valid: records[0].layeredModel.model.layers[1].vp_m_s is 280 m/s, but it must be more than √(4/3) ≈ 1.155 times layers[1].vs_m_s (260 m/s), since no stable elastic solid has a lower P/S speed ratio. Nothing was saved.',
    );
    await srv.close();
    running.pop();
    const store = OfficeStore.open(d);
    try {
      expect(store.get(site.id)).toEqual(site);
    } finally {
      store.close();
    }
  });

  it('travels through bundle-export and bundle-import, and sites-export writes it as a model file with the caution', async () => {
    const a = dir();
    const store = OfficeStore.open(a, { create: true });
    store.applyBatch([site, { ...site, id: 'site-no-model', name: 'Invented site: Bare Field', layeredModel: undefined }], { batchId: 'seed', source: 'test' });
    store.close();

    const file = join(a, 'all.json');
    expect((await cli(['bundle-export', file, '--data', a])).code).toBe(0);
    const bundle = parseBundle(readFileSync(file, 'utf8'));
    expect(bundle.sites.find((s) => s.id === site.id)!.layeredModel).toEqual(layeredModel);
    const b = dir();
    const imported = await cli(['bundle-import', file, '--data', b]);
    expect(imported.code, imported.err).toBe(0);
    const back = OfficeStore.open(b);
    try {
      expect(back.get(site.id)).toEqual(site);
    } finally {
      back.close();
    }

    const out = join(a, 'export');
    const exported = await cli(['sites-export', out, '--data', a, '--no-estimate']);
    expect(exported.out).toContain(`and 1 layer-builder model to ${join(out, 'models')}.`);
    const modelFile = JSON.parse(readFileSync(join(out, 'models', `${site.id}.json`), 'utf8'));
    expect(modelFile).toMatchObject({ site_id: site.id, site_name: site.name, p_input: 'poisson', waves: ['rayleigh'], modes: 2, caution: CAUTION });
    // The file is a model file: its layers and half-space read back exactly.
    expect(modelFromJson(modelFile)).toEqual({
      layers: layeredModel.model.layers.map((l) => ({ thickness: l.thickness_m, vs: l.vs_m_s, density: l.density_kg_m3, vp: l.vp_m_s })),
      halfspace: { vs: 620, density: 2100, vp: 620 * Math.sqrt(3) },
    });
    const curve = await cli(['curve', join(out, 'models', `${site.id}.json`), '--freq', '8', '--wave', 'rayleigh']);
    expect(curve.code, curve.err).toBe(0);
    expect(JSON.parse(curve.out).wave).toBe('rayleigh');
  });
});

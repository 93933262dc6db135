/**
 * A site with a layer-builder model pulled from the office (pwa/sync/client.ts
 * over the field store on fake-indexeddb, the office a stub fetch): the
 * model's check loads on demand (it is not part of the first download), so
 * the first record to need it is checked and kept, never refused for want
 * of it; a model with a bad value is refused in one sentence naming the
 * layer and field, and the store keeps nothing of it. This file's first
 * test runs before anything else has loaded the check. Invented site.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import type { AnyRecord, SiteRecord } from '../../../../core/exchange/records';
import { openFieldStore, type FieldStore } from '../../../../pwa/store';
import { SyncClient } from '../../../../pwa/sync/client';

let store: FieldStore | undefined;
afterEach(() => store?.close());

const site: SiteRecord = {
  type: 'site', id: 'pulled-model-site', rev: 1, updatedAt: '2026-05-04T08:00:00.000Z', name: 'Invented site: pulled model', date: '2026-05-04',
  crew: '', notes: '', axisUnit: 'hz', settings: {},
  layeredModel: {
    model: { layers: [{ thickness_m: 6, vs_m_s: 190, density_kg_m3: 1800 }], halfspace: { vs_m_s: 560, density_kg_m3: 2100 } },
    pInput: 'vp',
    waves: { love: true, rayleigh: false },
    modes: 2,
  },
};

/** An office whose pull holds `records`. */
function office(records: AnyRecord[]): typeof fetch {
  return async (input) => {
    const url = String(input);
    if (url.includes('/api/v1/recordings')) return new Response(JSON.stringify({ recordings: [], files: [], cursor: '0', more: false }), { status: 200 });
    if (url.includes('/api/v1/pull')) return new Response(JSON.stringify({ records, cursor: String(records.length), more: false, seqs: records.map((_r, i) => String(i + 1)) }), { status: 200 });
    return new Response(JSON.stringify({ batchId: 'x', replay: false, accepted: 0, ignored: 0, conflicts: 0, outcomes: [], conflicted: [], cursor: '0' }), { status: 200 });
  };
}

async function pulled(records: AnyRecord[]) {
  store = await openFieldStore(`model-pull-${crypto.randomUUID()}`, { storageEstimate: async () => ({}) });
  const c = new SyncClient(store, { fetch: office(records), isOnline: () => true, events: new EventTarget() });
  await c.configure('http://office.invalid:8750', 'a'.repeat(43), false);
  return c.syncNow();
}

describe('a site with a model pulled from the office', () => {
  it('is checked and kept, the check loading on demand', async () => {
    const report = await pulled([site]);
    expect(report.ok).toBe(true);
    expect((await store!.getSite(site.id))!.layeredModel).toEqual(site.layeredModel);
  });

  it('with a bad value is refused in one sentence naming the layer and field, and nothing of it is kept', async () => {
    const bad: SiteRecord = { ...site, layeredModel: { ...site.layeredModel!, model: { ...site.layeredModel!.model, halfspace: { vs_m_s: 150, density_kg_m3: 2100 } } } };
    const report = await pulled([bad]);
    expect(report.ok).toBe(false);
    expect(JSON.stringify(report)).toContain('layeredModel.model.halfspace.vs_m_s is 150 m/s, but it must be faster than the slowest layer (190 m/s) for Love waves to be trapped.');
    expect(await store!.getSite(site.id)).toBeUndefined();
  });
});

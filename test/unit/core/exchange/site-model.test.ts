/**
 * The layer builder's model kept with a site (core/exchange/records.ts
 * SiteLayeredModel): its checks (core/site/site-model.ts checkSiteModel) (one sentence naming the layer and field),
 * its trip through a bundle and a sync push check, and the merge rules it
 * follows as a site field. The models are invented.
 */
import { describe, expect, it } from 'vitest';
import { bundleToJson, checkRecord, makeBundle, parseBundle, planBundleImport } from '../../../../core/exchange/bundle';
import { checkSiteModel } from '../../../../core/site/site-model';
import { nextRevision, type SiteLayeredModel, type SiteRecord } from '../../../../core/exchange/records';
import { mergeRecord } from '../../../../core/exchange/sync';
import { checkSite, loadSiteModelCheck } from '../../../../pwa/store/validate';
import { inputError } from '../../../input-error';

const T0 = '2026-05-04T08:00:00.000Z';

/** An invented two-layer model with P speeds (dry soil over saturated soil over stiffer ground). */
function model(): SiteLayeredModel {
  return {
    model: {
      layers: [
        { thickness_m: 3, vs_m_s: 180, density_kg_m3: 1800, vp_m_s: 380 },
        { thickness_m: 9, vs_m_s: 220, density_kg_m3: 1950, vp_m_s: 1550 },
      ],
      halfspace: { vs_m_s: 600, density_kg_m3: 2100, vp_m_s: 1900 },
    },
    pInput: 'vp',
    waves: { love: true, rayleigh: true },
    modes: 3,
  };
}

function site(layeredModel?: SiteLayeredModel): SiteRecord {
  return {
    type: 'site',
    id: 'site-model-1',
    rev: 1,
    updatedAt: T0,
    name: 'Invented site: Model Row',
    date: '2026-05-04',
    crew: 'Invented crew',
    notes: '',
    axisUnit: 'hz',
    settings: {},
    ...(layeredModel ? { layeredModel } : {}),
  };
}

/** A copy of the model with `edit` applied to it. */
function edited(edit: (m: SiteLayeredModel) => void): SiteLayeredModel {
  const m = structuredClone(model());
  edit(m);
  return m;
}

describe('a site layered model: checks', () => {
  it('passes a whole model, and a Love-only model without P speeds', () => {
    expect(checkSiteModel(model(), 'layeredModel')).toEqual(model());
    const love = edited((m) => {
      m.waves = { love: true, rayleigh: false };
      m.model.layers.forEach((l) => delete l.vp_m_s);
      delete m.model.halfspace.vp_m_s;
    });
    expect(() => checkSiteModel(love, 'layeredModel')).not.toThrow();
  });

  const bad: [string, (m: SiteLayeredModel) => void, string, RegExp][] = [
    ['a shear speed in km/s', (m) => (m.model.layers[1].vs_m_s = 0.22), 'sites[0].layeredModel.model.layers[1].vs_m_s', /^sites\[0\]\.layeredModel\.model\.layers\[1\]\.vs_m_s is 0\.22 m\/s, below the 30 m\/s lower bound/],
    ['a density in g/cm³', (m) => (m.model.halfspace.density_kg_m3 = 2.1), 'sites[0].layeredModel.model.halfspace.density_kg_m3', /halfspace\.density_kg_m3 is 2\.1 kg\/m³.*g\/cm³/],
    ['a zero thickness', (m) => (m.model.layers[0].thickness_m = 0), 'sites[0].layeredModel.model.layers[0].thickness_m', /layers\[0\]\.thickness_m must be greater than 0 m/],
    ['a half-space slower than a layer', (m) => (m.model.halfspace.vs_m_s = 150), 'sites[0].layeredModel.model.halfspace.vs_m_s', /must be faster than the slowest layer/],
    ['a P speed at the √(4/3) limit for Rayleigh waves', (m) => (m.model.layers[0].vp_m_s = 200), 'sites[0].layeredModel.model.layers[0].vp_m_s', /layers\[0\]\.vp_m_s is 200 m\/s, but it must be more than √\(4\/3\)/],
    ['one P speed missing', (m) => delete m.model.layers[1].vp_m_s, 'sites[0].layeredModel.model.layers[1].vp_m_s', /layers\[1\]\.vp_m_s is missing; give the P speed of every layer and of the half-space, or of none/],
    ['nine layers', (m) => (m.model.layers = Array.from({ length: 9 }, () => ({ thickness_m: 2, vs_m_s: 200, density_kg_m3: 1800, vp_m_s: 400 }))), 'sites[0].layeredModel.model.layers', /lists 9 layers; a site's model holds at most 8/],
    ['six modes', (m) => (m.modes = 6), 'sites[0].layeredModel.modes', /modes must be a whole number from 1 to 5, but it is 6/],
    ['an unknown P input', (m) => ((m as { pInput: string }).pInput = 'ratio'), 'sites[0].layeredModel.pInput', /pInput must be "vp" or "poisson"/],
  ];
  for (const [what, edit, field, message] of bad) {
    it(`refuses ${what} in one sentence naming the layer and field`, () => {
      const e = inputError(() => checkSiteModel(edited(edit), 'sites[0].layeredModel'));
      expect(e.field).toBe(field);
      expect(e.message).toMatch(message);
      expect(e.message.trim().endsWith('.')).toBe(true);
    });
  }

  it('the field store refuses a site whose model is bad, naming the layer and field', async () => {
    await loadSiteModelCheck();
    const e = inputError(() => checkSite(site(edited((m) => (m.model.layers[0].vs_m_s = -5)))));
    expect(e.message).toBe('layeredModel.model.layers[0].vs_m_s must be greater than 0 m/s, but it is -5.');
  });
});

describe('a site layered model: bundles and sync pushes', () => {
  it('travels in a bundle and back unchanged', () => {
    const s = site(model());
    const text = bundleToJson(makeBundle([s], { now: new Date(T0) }));
    const back = parseBundle(text);
    expect(back.sites[0].layeredModel).toEqual(model());
    expect(back.caution.length).toBeGreaterThan(0);
    expect(planBundleImport(back, () => undefined).writes).toEqual([s]);
  });

  it('a bundle with a bad model is refused as a whole, naming the site, layer and field', () => {
    const good = makeBundle([site(model())], { now: new Date(T0) });
    const bad = structuredClone(good);
    bad.sites[0].layeredModel!.model.layers[1].vs_m_s = 9000;
    expect(() => parseBundle(JSON.stringify(bad))).toThrow(
      'The bundle is not valid: sites[0].layeredModel.model.layers[1].vs_m_s is 9000 m/s, above the 5000 m/s upper bound for shear speed.',
    );
    const typo = structuredClone(good) as unknown as { sites: { layeredModel: { model: { layers: Record<string, unknown>[] } } }[] };
    typo.sites[0].layeredModel.model.layers[0].vs = 180;
    expect(() => parseBundle(JSON.stringify(typo))).toThrow('The bundle is not valid: sites[0].layeredModel.model.layers[0] has an unknown field "vs".');
    const text = structuredClone(good) as unknown as { sites: { layeredModel: { model: { halfspace: Record<string, unknown> } } }[] };
    text.sites[0].layeredModel.model.halfspace.vs_m_s = '600';
    expect(() => parseBundle(JSON.stringify(text))).toThrow('The bundle is not valid: sites[0].layeredModel.model.halfspace.vs_m_s must be a number.');
  });

  it('a push check refuses a bad model in a site and in a kept conflicting version', () => {
    const bad = site(edited((m) => (m.model.layers[0].density_kg_m3 = 5000)));
    expect(() => checkRecord(bad, 'records[2]')).toThrow(
      'The record is not valid: records[2].layeredModel.model.layers[0].density_kg_m3 is 5000 kg/m³, above the 3500 kg/m³ upper bound for density.',
    );
    const base = site(model());
    const mine = nextRevision(base, { name: 'Invented site: renamed' }, new Date('2026-05-04T09:01:00Z'));
    const theirs = nextRevision(base, { layeredModel: edited((m) => (m.model.layers[0].thickness_m = -1)) }, new Date('2026-05-04T09:00:00Z'));
    const merged = mergeRecord(mine, theirs).record;
    expect(merged.conflicts).toHaveLength(1);
    expect(() => checkRecord(merged, 'records[0]')).toThrow(/records\[0\]\.conflicts\[0\]\.record\.layeredModel\.model\.layers\[0\]\.thickness_m must be greater than 0 m/);
  });

  it('follows the site merge rules: a newer model wins, two edits from one revision are both kept for review', () => {
    const base = site(model());
    const thicker = nextRevision(base, { layeredModel: edited((m) => (m.model.layers[0].thickness_m = 4)) }, new Date('2026-05-04T09:00:00Z'));
    expect(mergeRecord(base, thicker).action).toBe('accept');
    expect(mergeRecord(thicker, base).action).toBe('ignore');
    const other = nextRevision(base, { layeredModel: edited((m) => (m.modes = 1)) }, new Date('2026-05-04T09:05:00Z'));
    const merged = mergeRecord(thicker, other);
    expect(merged.action).toBe('conflict');
    expect(merged.record.layeredModel!.modes).toBe(1);
    expect(merged.record.conflicts![0].record).toMatchObject({ layeredModel: { model: { layers: [{ thickness_m: 4 }, {}] } } });
  });
});

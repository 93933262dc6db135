/**
 * The one-page site summary's table of the layer builder's model
 * (pwa/ui/views/site-summary-page.ts modelRows): each layer and the
 * half-space, with the P speed and the Poisson's ratio it gives. The model
 * is invented; the ratios are closed forms (vp = vs·√((2 − 2ν)/(1 − 2ν))).
 */
import { describe, expect, it } from 'vitest';
import { MODEL_COLUMNS, modelRows } from '../../../../../pwa/ui/views/site-summary-page';

describe('the site summary: the layer builder model', () => {
  it('lists each layer and the half-space, the P speed with the Poisson ratio it gives', () => {
    const rows = modelRows({
      model: {
        layers: [
          { thickness_m: 4, vs_m_s: 180, density_kg_m3: 1800, vp_m_s: 180 * Math.sqrt(3) }, // ν = 0.25
          { thickness_m: 10, vs_m_s: 300, density_kg_m3: 1900, vp_m_s: 600 }, // vp = 2·vs: ν = 1/3
        ],
        halfspace: { vs_m_s: 600, density_kg_m3: 2100, vp_m_s: 1900 }, // r = 19/6: ν = (r² − 2)/(2(r² − 1)) = 289/650 = 0.4446
      },
      pInput: 'poisson',
      waves: { love: false, rayleigh: true },
      modes: 3,
    });
    expect(MODEL_COLUMNS).toHaveLength(6);
    expect(rows).toEqual([
      ['Layer 1', '4', '180', '312', '0.25', '1800'],
      ['Layer 2', '10', '300', '600', '0.333', '1900'],
      ['Half-space', '—', '600', '1900', '0.445', '2100'],
    ]);
  });

  it('says "—" for the P columns of a model without P speeds (Love waves only)', () => {
    const rows = modelRows({
      model: { layers: [{ thickness_m: 7.5, vs_m_s: 190, density_kg_m3: 1800 }], halfspace: { vs_m_s: 560, density_kg_m3: 2100 } },
      pInput: 'vp',
      waves: { love: true, rayleigh: false },
      modes: 1,
    });
    expect(rows).toEqual([
      ['Layer 1', '7.5', '190', '—', '—', '1800'],
      ['Half-space', '—', '560', '—', '—', '2100'],
    ]);
  });
});

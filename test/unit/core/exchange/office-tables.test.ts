/**
 * The summary CSV keeps the open-end rule (issue 9 §2): an end the data do
 * not bound is an empty cell at every level, so no search-range value or
 * 68 % end on an open side reads like a bound. The invented site: 12 m of
 * 250 m/s soil over 700 m/s ground, speeds given.
 */
import { describe, expect, it } from 'vitest';
import { loveVelocities } from '../../../../core/dispersion/love-layer';
import type { ParameterEstimate } from '../../../../core/estimate/estimate';
import { summaryToCsv, SUMMARY_CSV_COLUMNS } from '../../../../core/exchange/office-tables';
import type { PickRecord, SiteRecord } from '../../../../core/exchange/records';
import { summariseSite, type SiteSummary } from '../../../../core/exchange/site-summary';
import { CAUTION } from '../../../../core/shared/caution';

/** The data row of a one-site summary CSV as a column → cell map (no cell here holds a comma). */
function row(summary: SiteSummary): Record<string, string> {
  const lines = summaryToCsv([summary]).trimEnd().split('\r\n');
  expect(lines[0]).toBe(SUMMARY_CSV_COLUMNS.join(','));
  const cells = lines[1].split(',');
  return Object.fromEntries(SUMMARY_CSV_COLUMNS.map((c, i) => [c, cells[i]]));
}

const closed = (best: number, low68: number, high68: number, low95: number, high95: number): ParameterEstimate => ({
  best, low68, high68, low95, high95, free: true, openLow: false, openHigh: false,
});

describe('summary CSV: an open end is empty at 68 % and 95 % alike', () => {
  it('a thickness open below and a speed open above leave those sides empty and keep the closed sides', () => {
    const s: SiteSummary = {
      siteId: 's1', name: 'Invented site', date: '2026-05-04', pickCount: 8, status: 'estimated',
      // Closed 68 % ends beside open 95 % ends: the case the rule is about.
      thickness: { ...closed(12, 9, 15, 4, 19), openLow: true },
      vs1: { ...closed(250, 240, 262, 230, 400), openHigh: true },
      vs2: closed(700, 690, 710, 680, 720),
      warnings: [], caution: CAUTION,
    };
    const r = row(s);
    expect([r.thickness_m, r.thickness_68_low_m, r.thickness_68_high_m, r.thickness_95_low_m, r.thickness_95_high_m]).toEqual(['12', '', '15', '', '19']);
    expect([r.vs1_m_s, r.vs1_95_low_m_s, r.vs1_95_high_m_s]).toEqual(['250', '230', '']);
    expect([r.vs2_95_low_m_s, r.vs2_95_high_m_s]).toEqual(['680', '720']);
    const above = row({ ...s, thickness: { ...closed(12, 9, 15, 4, 19), openHigh: true } });
    expect([above.thickness_68_low_m, above.thickness_68_high_m, above.thickness_95_low_m, above.thickness_95_high_m]).toEqual(['9', '', '4', '']);
  });

  it('through a real estimate: high-frequency picks only leave the thickness open towards depth, and Vs30 open below', () => {
    const site: SiteRecord = {
      type: 'site', id: 'open-deep', rev: 1, updatedAt: '2026-05-04T08:00:00.000Z', name: 'Invented site: open towards depth',
      date: '2026-05-04', crew: '', notes: '', axisUnit: 'hz', settings: { vs1: 250, vs2: 700 },
    };
    // Exact phase picks, 40–80 Hz, sd 3 % (common practice) of the invented 12 m site: they see only the layer.
    const picks: PickRecord[] = Array.from({ length: 8 }, (_, i) => {
      const f = 40 * 2 ** (i / 7);
      const c = loveVelocities({ h: 12, vs1: 250, vs2: 700, rho1: 1800, rho2: 2100 }, f, 0).phase;
      return { type: 'pick', id: `p${i}`, rev: 1, updatedAt: site.updatedAt, siteId: site.id, order: i, frequency: f, velocity: c, sd: 0.03 * c, kind: 'phase', mode: 0 };
    });
    const s = summariseSite(site, picks);
    expect(s.status).toBe('estimated');
    expect(s.thickness!.openHigh).toBe(true);
    const r = row({ ...s, warnings: [], verdict: { level: s.verdict!.level, text: 'unresolved' } });
    expect(r.thickness_68_high_m).toBe('');
    expect(r.thickness_95_high_m).toBe('');
    expect(Number(r.thickness_m)).toBeGreaterThan(0);
    expect(r.vs30_low_m_s).toBe('');
    expect(r.vs30_high_m_s).not.toBe('');
  });
});

/**
 * From records to the thickness: the picker's picks of the two synthetic
 * records (test/signal-fixtures.ts, made from the core's own modal solution
 * of the invented soft site, H = 12 m) go through the existing estimate
 * (core/estimate), whose 95 % interval must hold the true thickness. The
 * truth here is the invented model itself, not a published value.
 */
import { describe, expect, it } from 'vitest';
import { estimateLayer } from '../../core/estimate/estimate';
import { picksToCsv, parsePicksCsv } from '../../core/picks/picks';
import { linearAxis } from '../../core/signal/image';
import { multipleFilterImage } from '../../core/signal/multiple-filter';
import { phaseShiftImage } from '../../core/signal/phase-shift';
import { followRidge, ridgePicks, strongestRidgeSeed } from '../../core/signal/ridge';
import { INVENTED_SOFT_SITE } from '../fixtures';
import { softSiteGather, softSiteTrace } from '../signal-fixtures';

describe('picks taken by following ridges give back the layer thickness', () => {
  const velocities = linearAxis(100, 700, 241, 'velocity', 'm/s');
  const phaseImage = phaseShiftImage(softSiteGather(), { frequencies: linearAxis(4, 60, 57, 'frequency', 'Hz'), velocities });
  const groupImage = multipleFilterImage(softSiteTrace(), { frequencies: linearAxis(2, 40, 39, 'frequency', 'Hz'), velocities });
  const phase = ridgePicks(phaseImage, followRidge(phaseImage, strongestRidgeSeed(phaseImage)!));
  const group = ridgePicks(groupImage, followRidge(groupImage, strongestRidgeSeed(groupImage)!));

  it('labels the picks by image: phase from phase-shift, group from multiple-filter, each with an sd and the record named', () => {
    expect(phase.length).toBeGreaterThan(20);
    expect(group.length).toBeGreaterThan(10);
    for (const p of phase) {
      expect(p.kind).toBe('phase');
      expect(p.mode).toBe(0);
      expect(p.sd).toBeGreaterThan(0);
      expect(p.note).toMatch(/^invented-soft-site-gather, phase-shift image/);
    }
    for (const p of group) {
      expect(p.kind).toBe('group');
      expect(p.note).toMatch(/^invented-soft-site-trace, multiple-filter image/);
    }
  });

  it('round-trips through the picks CSV file unchanged', () => {
    const back = parsePicksCsv(picksToCsv([...phase, ...group])).picks;
    expect(back).toHaveLength(phase.length + group.length);
    expect(back[0].velocity).toBeCloseTo(phase[0].velocity, 6);
  });

  for (const [name, picks] of [
    ['phase picks alone', () => phase],
    ['group picks alone', () => group],
    ['both together', () => [...phase, ...group]],
  ] as const) {
    it(`holds H = ${INVENTED_SOFT_SITE.h} m in the estimate's 95 % interval (${name})`, () => {
      const r = estimateLayer(picks());
      const { low95, high95, best } = r.thickness;
      if (!(low95 <= INVENTED_SOFT_SITE.h && INVENTED_SOFT_SITE.h <= high95)) {
        throw new Error(`H: expected ${INVENTED_SOFT_SITE.h} m inside [${low95}, ${high95}] (best ${best})`);
      }
      expect(r.caution).toMatch(/Screening estimate only/);
    });
  }
});

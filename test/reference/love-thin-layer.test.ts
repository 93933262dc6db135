/**
 * Independent numerical reference: the thin-layer method (Lysmer 1970, BSSA
 * 60:89–104; Kausel & Roësset 1981, BSSA 71:1743), written in
 * test/reference/thin-layer.ts with ml-matrix's Cholesky and symmetric
 * EigenvalueDecomposition, against core's closed forms (one layer) and the
 * Thomson–Haskell solver (three layers with a low-velocity layer at depth).
 *
 * Mesh: linear elements of at most h in the layers and in the top half shear
 * wavelength of the half-space, growing by 10 % per element below that, down to a fixed base at
 * 6 shear wavelengths of the half-space below the layers; then every element
 * split in two (h/2).
 *
 * Stated bound (from memory, verify: the consistent-mass linear-element
 * dispersion error for a homogeneous medium is about (kh)²/12): relative
 * error in c at most B = (2π h f / β_min)² / 12, with h the element size and
 * β_min the slowest layer's speed; in U at most 4B (U is a derivative of the
 * discrete dispersion relation: same O(h²) rate, a larger constant near
 * cutoff; the factor 4 is our margin, common practice). The mesh also has to show O(h²)
 * convergence to our value: halving h divides the difference by 3 to 5.5
 * (4 in the limit) wherever it exceeds B/100, and the Richardson
 * extrapolate (4·c(h/2) − c(h))/3 removes at least 75 % of it (to B/1000).
 */
import { describe, expect, it } from 'vitest';
import { loveCurves } from '../../core/dispersion/curve';
import type { LayeredModel } from '../../core/dispersion/model';
import { INVENTED_LVL_SITE, SHEARER_CRUST_MODEL } from '../fixtures';
import { thinLayerModes, type TlmMode } from './thin-layer';

interface Case {
  name: string;
  model: LayeredModel;
  f: number;
  h: number;
  modes: number;
}

/** Shearer, *Introduction to Seismology*, ch. 8 exercises: crust over mantle. */
const shearer: LayeredModel = SHEARER_CRUST_MODEL;

/** Invented three-layer site with a low-velocity layer at depth. */
const lvl: LayeredModel = INVENTED_LVL_SITE;

const cases: Case[] = [
  { name: 'Shearer crust, 0.05 Hz', model: shearer, f: 0.05, h: 2000, modes: 5 },
  { name: 'Shearer crust, 0.2 Hz (3 modes)', model: shearer, f: 0.2, h: 1000, modes: 5 },
  { name: 'three layers with a low-velocity layer at depth, 12 Hz', model: lvl, f: 12, h: 0.5, modes: 8 },
];

function tlm(c: Case, split: number): TlmMode[] {
  const zH = c.model.layers.reduce((s, l) => s + l.thickness, 0);
  const depth = zH + (6 * c.model.halfspace.vs) / c.f;
  return thinLayerModes(c.model, c.f, { h: c.h, uniform: c.model.halfspace.vs / (2 * c.f), growth: 1.1, depth, split });
}

describe('Love modes agree with the thin-layer method within its discretisation error', () => {
  for (const c of cases) {
    it(c.name, () => {
      const ours = loveCurves(c.model, [c.f], { modes: c.modes });
      const present = ours.modes.filter((m) => m.phase.length === 1);
      const coarse = tlm(c, 1);
      const fine = tlm(c, 2);
      // The same modes exist in both (the base adds no trapped modes below β_H).
      expect(coarse.length, 'modes found by the thin-layer method (h)').toBe(present.length);
      expect(fine.length, 'modes found by the thin-layer method (h/2)').toBe(present.length);
      expect(present.length).toBeGreaterThan(0);
      const betaMin = Math.min(...c.model.layers.map((l) => l.vs));
      for (const [i, m] of present.entries()) {
        const exact = { phase: m.phase[0], group: m.group[0] };
        for (const key of ['phase', 'group'] as const) {
          const e1 = coarse[i][key] / exact[key] - 1;
          const e2 = fine[i][key] / exact[key] - 1;
          const phaseBound = ((2 * Math.PI * (c.h / 2) * c.f) / betaMin) ** 2 / 12;
          const bound = key === 'phase' ? phaseBound : 4 * phaseBound;
          const detail = `mode ${i} ${key}: ours ${exact[key]}, thin-layer h/2 ${fine[i][key]}, rel. diff ${e2}, bound ${bound}`;
          expect(Math.abs(e2), detail).toBeLessThanOrEqual(bound);
          if (Math.abs(e2) > phaseBound / 100) {
            // Above the level where higher-order terms blur it, the difference is O(h²).
            const ratio = e1 / e2;
            expect(ratio, `${detail}; error ratio h vs h/2 = ${ratio}`).toBeGreaterThan(3);
            expect(ratio, `${detail}; error ratio h vs h/2 = ${ratio}`).toBeLessThan(5.5);
          }
          const richardson = (4 * fine[i][key] - coarse[i][key]) / 3;
          expect(Math.abs(richardson / exact[key] - 1), `${detail}; Richardson ${richardson}`).toBeLessThanOrEqual(
            0.25 * Math.abs(e2) + phaseBound / 1000,
          );
        }
        if (i > 0) expect(m.phase[0]).toBeGreaterThan(present[i - 1].phase[0]);
      }
    });
  }
});

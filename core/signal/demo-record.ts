/**
 * The invented demo record: a synthetic Love-wave gather of an INVENTED
 * site, so that a new user can try records → image → picks without a
 * seismograph file. Nothing here is a real place, survey or record.
 *
 * The invented ground is the demo site's (core/exchange/demo.ts DEMO_MODEL,
 * restated here because signal/ may not import exchange/; a test keeps the
 * two equal): 7.5 m of loose sandy gravel (β1 = 190 m/s, ρ1 = 1850 kg/m³)
 * over weathered mudstone (β2 = 560 m/s, ρ2 = 2150 kg/m³). The invented
 * spread: 24 transverse geophones every 2 m from 6 m, 1 ms sampling, 0.1 s
 * pre-trigger; fundamental mode and a weaker first higher mode, a 20 Hz
 * source, 5 % seeded noise (synthetic-love.ts).
 */
import type { LayeredModel } from '../dispersion/model';
import type { Gather } from './gather';
import { syntheticLoveGather } from './synthetic-love';

/** The invented ground of the demo record (the demo site's model). */
export const DEMO_RECORD_MODEL: LayeredModel = {
  layers: [{ thickness: 7.5, vs: 190, density: 1850 }],
  halfspace: { vs: 560, density: 2150 },
};

/** The demo record's name: says it is invented wherever it shows. */
export const DEMO_RECORD_NAME = 'Invented demo record (synthetic, not a real survey)';

/** Seed of the demo record's noise. */
export const DEMO_RECORD_SEED = 20260414;

/** The invented demo gather (deterministic). */
export function demoRecord(): Gather {
  return syntheticLoveGather(DEMO_RECORD_MODEL, {
    offsets: Array.from({ length: 24 }, (_, j) => 6 + 2 * j),
    sampleInterval: 0.001,
    samples: 1024,
    startTime: -0.1,
    peakHz: 20,
    modes: [
      { mode: 0, amplitude: 1 },
      { mode: 1, amplitude: 0.3 },
    ],
    noise: { level: 0.05, seed: DEMO_RECORD_SEED },
    name: DEMO_RECORD_NAME,
  });
}

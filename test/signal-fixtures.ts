/**
 * The invented records the signal tests, the CLI tests and the benches share:
 * synthetic Love-wave records of the invented soft site (test/fixtures.ts
 * INVENTED_SOFT_SITE: H = 12 m, β1 = 200 m/s, β2 = 500 m/s) made by
 * core/signal/synthetic-love.ts from the core's own modal solution. The
 * geometry, source and noise are invented too.
 */
import type { LayeredModel } from '../core/dispersion/model';
import type { Gather } from '../core/signal/gather';
import { syntheticLoveGather } from '../core/signal/synthetic-love';
import { INVENTED_SOFT_SITE } from './fixtures';

/** INVENTED_SOFT_SITE as a LayeredModel. */
export const SOFT_SITE_MODEL: LayeredModel = {
  layers: [{ thickness: INVENTED_SOFT_SITE.h, vs: INVENTED_SOFT_SITE.vs1, density: INVENTED_SOFT_SITE.rho1 }],
  halfspace: { vs: INVENTED_SOFT_SITE.vs2, density: INVENTED_SOFT_SITE.rho2 },
};

/** 48 receivers every 2 m from 10 m (spread 94 m), 1 ms sampling, 0.1 s pre-trigger. */
export const SOFT_GATHER = { traces: 48, first: 10, spacing: 2, sampleInterval: 0.001, samples: 1024, startTime: -0.1 } as const;

/**
 * The invented multichannel record: fundamental mode (excitation 1) and first
 * higher mode (0.2), 20 Hz Ricker source, 5 % noise with the given seed.
 */
export function softSiteGather(seed = 12, traces: number = SOFT_GATHER.traces): Gather {
  return syntheticLoveGather(SOFT_SITE_MODEL, {
    offsets: Array.from({ length: traces }, (_, j) => SOFT_GATHER.first + SOFT_GATHER.spacing * j),
    sampleInterval: SOFT_GATHER.sampleInterval,
    samples: SOFT_GATHER.samples,
    startTime: SOFT_GATHER.startTime,
    peakHz: 20,
    modes: [
      { mode: 0, amplitude: 1 },
      { mode: 1, amplitude: 0.2 },
    ],
    noise: { level: 0.05, seed },
    name: 'invented-soft-site-gather',
  });
}

/** The invented single-trace record: one receiver at 150 m, fundamental mode, 12 Hz source, 5 % noise. */
export function softSiteTrace(seed = 3, samples = 4096): Gather {
  return syntheticLoveGather(SOFT_SITE_MODEL, {
    offsets: [150],
    sampleInterval: 0.001,
    samples,
    startTime: -0.1,
    peakHz: 12,
    noise: { level: 0.05, seed },
    name: 'invented-soft-site-trace',
  });
}

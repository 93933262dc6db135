/**
 * The layer builder's work per edit (pwa/worker/model-trial.ts, which the
 * compute worker runs): the edited model's curves on the plot's 160-point
 * band, each pick's prediction with the misfit, and the site figures, in
 * Node on one thread as in the worker. The invented two-layer site of
 * test/fixtures.ts with P speeds from ν = 0.3 and 12 Rayleigh picks of it.
 * No target is set (none stated); the figure says how long the plot waits
 * after an edit.
 */
import { vpFromPoisson } from '../../core/profile/p-speed';
import type { LayeredModel } from '../../core/dispersion/model';
import { plotBand } from '../../pwa/ui/charts/chart-data';
import { trialModel } from '../../pwa/worker/model-trial';
import { INVENTED_TWO_LAYER_SITE, layeredPicks } from '../fixtures';
import { bench, type BenchResult } from './harness';

const M = INVENTED_TWO_LAYER_SITE;
const VP = [...M.layers.map((l) => vpFromPoisson(l.vs, 0.3)), vpFromPoisson(M.halfspace.vs, 0.3)];
const MODEL: LayeredModel = {
  layers: M.layers.map((l, i) => ({ ...l, vp: VP[i] })),
  halfspace: { ...M.halfspace, vp: VP[M.layers.length] },
};

export default async function (): Promise<BenchResult[]> {
  const picks = layeredPicks(M, 'rayleigh', 12, 3, 50, undefined, VP);
  const band = plotBand(picks);
  let k = 0;
  // Each edit moves the top layer's shear speed a little, so no root is reused from the last call.
  const edited = (): LayeredModel => ({ ...MODEL, layers: MODEL.layers.map((l, i) => (i === 0 ? { ...l, vs: l.vs * (0.95 + 0.1 * ((k++ % 31) / 30)) } : l)) });
  return [
    await bench('layer builder edit: Rayleigh, 2 layers, 3 modes, 160 points, 12 picks, figures', () =>
      trialModel(edited(), { band, waves: [{ wave: 'rayleigh', modes: 3 }], picks }), { samples: 21, warmup: 3, note: 'model-trial.ts as the worker runs it, Node' }),
    await bench('layer builder edit: Love + Rayleigh, 2 layers, 3 modes each, 160 points', () =>
      trialModel(edited(), { band, waves: [{ wave: 'love', modes: 3 }, { wave: 'rayleigh', modes: 3 }], picks }), { samples: 21, warmup: 3, note: 'model-trial.ts as the worker runs it, Node' }),
  ];
}

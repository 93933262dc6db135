/**
 * What-if slider redraw (issue 4 §5: ≤ 16 ms median, one display frame at
 * 60 Hz): the work done per slider step before uPlot draws, in Node without
 * a DOM. That is the model's curves for every (mode, kind) the picks hold
 * (core/dispersion/curve.ts loveCurves through pwa/ui/charts/chart-data.ts curveColumns, on
 * the plot's 160-point band) and the pick columns. Each step moves H a
 * little, as a dragged slider does. uPlot's own canvas drawing is not
 * included (it needs a browser).
 */
import { demoPicks, DEMO_MODEL } from '../../core/exchange/demo';
import type { LayeredModel } from '../../core/dispersion/model';
import type { Pick } from '../../core/picks/picks';
import { chi2At, prepareEstimate } from '../../core/estimate/estimate';
import { curveColumns, curveKeysOf, pickColumns, plotBand } from '../../pwa/ui/charts/chart-data';
import { bench, type BenchResult } from './harness';

function modelAt(h: number): LayeredModel {
  return {
    layers: [{ thickness: h, vs: DEMO_MODEL.vs1, density: DEMO_MODEL.rho1 }],
    halfspace: { vs: DEMO_MODEL.vs2, density: DEMO_MODEL.rho2 },
  };
}

function step(picks: Pick[]) {
  const keys = curveKeysOf(picks);
  const band = plotBand(picks);
  let k = 0;
  return () => {
    const h = DEMO_MODEL.h * (0.8 + 0.4 * ((k++ % 97) / 96)); // a slider sweep over ±20 %
    const curves = curveColumns(modelAt(h), band, keys, 'frequency');
    const cols = pickColumns(picks, 'frequency');
    return curves.y.length + cols.x.length;
  };
}

/** The what-if misfit readout per step: the estimate's χ² of the slider model (as pwa/ui/views/whatif-view.tsx does). */
function misfitStep(picks: Pick[]) {
  let k = 0;
  return () => {
    const h = DEMO_MODEL.h * (0.8 + 0.4 * ((k++ % 97) / 96));
    const P = prepareEstimate(picks, { vs1: DEMO_MODEL.vs1, vs2: DEMO_MODEL.vs2, density1: DEMO_MODEL.rho1, density2: DEMO_MODEL.rho2 });
    return chi2At(P, [Math.log(h)]);
  };
}

export default async function (): Promise<BenchResult[]> {
  const demo = demoPicks();
  // A heavier table: the demo picks copied into modes 0–3 as group and phase picks (8 curves).
  const heavy: Pick[] = [];
  for (const kind of ['group', 'phase'] as const) {
    for (let mode = 0; mode < 4; mode++) {
      for (const p of demo) heavy.push({ ...p, kind, mode, frequency: p.frequency * (1 + mode * 0.001) });
    }
  }
  return [
    await bench('what-if step: demo site (2 curves, 23 picks, 160 points)', step(demo), {
      samples: 101,
      target_ms: 16,
      note: 'curves + columns per slider step, Node, no DOM',
    }),
    await bench('what-if step: misfit readout, demo site (23 picks)', misfitStep(demo), {
      samples: 101,
      target_ms: 16,
      note: 'χ² of the slider model, Node',
    }),
    await bench('what-if step: 8 curves (modes 0–3, group and phase), 184 picks', step(heavy), {
      samples: 51,
      target_ms: 16,
      note: 'curves + columns per slider step, Node, no DOM',
    }),
  ];
}

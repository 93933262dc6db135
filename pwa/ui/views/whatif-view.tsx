/**
 * What-if: sliders for H, β1, β2 and the densities move the model curves
 * against the picks, redrawn once per animation frame (plot-engine.ts).
 */
import { chi2At, prepareEstimate, type EstimateResult } from '../../../core/estimate/estimate';
import type { LayeredModel } from '../../../core/dispersion/model';
import type { PickRecord } from '../../../core/exchange/records';
import { Caution } from './estimate-view';
import { num } from './format';
import { PlotPanel } from '../charts/plot-panel';
import type { PlotSettings, WhatIfModel } from '../controllers/app-state';

export interface WhatIfViewProps {
  model?: WhatIfModel;
  result?: EstimateResult;
  picks: readonly PickRecord[];
  selectedId?: string;
  plot: PlotSettings;
  theme: string;
  onModel: (m: WhatIfModel) => void;
  onSelect: (id: string | undefined) => void;
  onPlot: (p: Partial<PlotSettings>) => void;
}

/** Slider bounds: within the core's model bounds (30–5000 m/s, 1000–3500 kg/m³), narrowed to site scales. */
const SLIDERS: { key: keyof WhatIfModel; label: string; unit: string; min: number; max: number; step: number }[] = [
  { key: 'h', label: 'Layer thickness H', unit: 'm', min: 0.5, max: 80, step: 0.1 },
  { key: 'vs1', label: 'Layer shear speed β1', unit: 'm/s', min: 50, max: 1500, step: 1 },
  { key: 'vs2', label: 'Half-space shear speed β2', unit: 'm/s', min: 80, max: 3000, step: 1 },
  { key: 'rho1', label: 'Layer density ρ1', unit: 'kg/m³', min: 1200, max: 3000, step: 10 },
  { key: 'rho2', label: 'Half-space density ρ2', unit: 'kg/m³', min: 1200, max: 3000, step: 10 },
];

/** A starting what-if model: the best fit, else a guess from the picks' speeds. */
export function startingModel(result: EstimateResult | undefined, picks: readonly PickRecord[]): WhatIfModel {
  if (result) {
    return { h: result.thickness.best, vs1: result.vs1.best, vs2: result.vs2.best, rho1: result.density1, rho2: result.density2 };
  }
  const v = picks.map((p) => p.velocity);
  const lo = v.length ? Math.min(...v) : 200;
  const hi = v.length ? Math.max(...v) : 500;
  return { h: 10, vs1: Math.max(60, Math.round(lo)), vs2: Math.max(Math.round(hi * 1.1), Math.round(lo) + 50), rho1: 1800, rho2: 2100 };
}

/** The layered model of a what-if setting; undefined (with a reason) when Love waves cannot be trapped. */
export function layeredOf(m: WhatIfModel): { model?: LayeredModel; problem?: string } {
  if (!(m.vs2 > m.vs1)) {
    return { problem: `β2 (${num(m.vs2)} m/s) must be faster than β1 (${num(m.vs1)} m/s) for Love waves to be trapped; no curves are drawn.` };
  }
  return {
    model: {
      layers: [{ thickness: m.h, vs: m.vs1, density: m.rho1 }],
      halfspace: { vs: m.vs2, density: m.rho2 },
    },
  };
}

/**
 * χ² of a what-if model against the picks: the estimate's own misfit
 * (core/estimate/estimate.ts prepareEstimate + chi2At with both speeds given).
 * Undefined without picks or for a model that cannot trap Love waves.
 */
export function whatIfMisfit(picks: readonly PickRecord[], m: WhatIfModel): { chi2: number; n: number } | undefined {
  if (picks.length === 0 || !(m.vs2 > m.vs1)) return undefined;
  try {
    const P = prepareEstimate(
      picks.map((p) => ({ frequency: p.frequency, velocity: p.velocity, kind: p.kind, mode: p.mode, sd: p.sd })),
      { vs1: m.vs1, vs2: m.vs2, density1: m.rho1, density2: m.rho2 },
    );
    return { chi2: chi2At(P, [Math.log(m.h)]), n: P.n };
  } catch {
    return undefined;
  }
}

export function WhatIfView(props: WhatIfViewProps) {
  const m = props.model ?? startingModel(props.result, props.picks);
  const { model, problem } = layeredOf(m);
  const misfit = whatIfMisfit(props.picks, m);
  const set = (key: keyof WhatIfModel, value: number) => props.onModel({ ...m, [key]: value });
  return (
    <div class="split">
      <section class="panel" aria-labelledby="whatif-h">
        <div class="panel-head">
          <h2 id="whatif-h">What-if model</h2>
          <button type="button" disabled={!props.result} onClick={() => props.onModel(startingModel(props.result, props.picks))}>
            Back to the best fit
          </button>
        </div>
        <Caution />
        <p class="hint">Drag to see how another layer over half-space would look against the picks. Nothing here is saved.</p>
        {SLIDERS.map((s) => {
          const id = `wi-${s.key}`;
          return (
            <div class="slider" key={s.key}>
              <label for={id}>
                {s.label} ({s.unit}): <output for={id}>{num(m[s.key], 4)}</output>
              </label>
              <input
                id={id}
                type="range"
                min={s.min}
                max={s.max}
                step={s.step}
                value={m[s.key]}
                aria-valuetext={`${num(m[s.key], 4)} ${s.unit}`}
                onInput={(e) => set(s.key, Number(e.currentTarget.value))}
              />
            </div>
          );
        })}
        {problem ? (
          <p class="error" role="alert">
            {problem}
          </p>
        ) : null}
        {misfit ? (
          <p class="readout">
            Misfit of this model: χ² = {num(misfit.chi2)} over {misfit.n} picks (χ² per pick {num(misfit.chi2 / misfit.n, 2)})
            {props.result ? `; the best fit has χ² = ${num(props.result.chi2)}` : ''}.
          </p>
        ) : null}
      </section>
      <PlotPanel
        id="whatif-plot-h"
        picks={props.picks}
        model={model}
        curveLabel="what-if"
        selectedId={props.selectedId}
        settings={props.plot}
        theme={props.theme}
        onSelect={props.onSelect}
        onSettings={props.onPlot}
      />
    </div>
  );
}

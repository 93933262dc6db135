/**
 * What-if: for H, β1, β2 and the densities, a slider over a range centred on
 * the best fit (± 50 %, in 1000 fine steps), a typed value and ±
 * nudges move the model curves against the picks, with the best-fit curves
 * drawn thin and grey for comparison, redrawn once per animation frame
 * (plot-engine.ts). The plot stays in view while dragging (beside the
 * sliders on a wide screen, above them on a narrow one).
 */
import { useState } from 'preact/hooks';
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

export interface Control {
  key: keyof WhatIfModel;
  label: string;
  unit: string;
  /** Hard bounds (the core's model bounds: 30–5000 m/s, 1000–3500 kg/m³; thickness above 0). */
  lo: number;
  hi: number;
  /** Centred range: the centre value ± 50 % (speeds and thickness), so the best fit sits mid-slider; the bounds for densities. */
  centred: boolean;
}

export const CONTROLS: Control[] = [
  { key: 'h', label: 'Layer thickness H', unit: 'm', lo: 0.01, hi: 5000, centred: true },
  { key: 'vs1', label: 'Layer shear speed β1', unit: 'm/s', lo: 30, hi: 5000, centred: true },
  { key: 'vs2', label: 'Half-space shear speed β2', unit: 'm/s', lo: 30, hi: 5000, centred: true },
  { key: 'rho1', label: 'Layer density ρ1', unit: 'kg/m³', lo: 1000, hi: 3500, centred: false },
  { key: 'rho2', label: 'Half-space density ρ2', unit: 'kg/m³', lo: 1000, hi: 3500, centred: false },
];

/** Slider steps across a range: fine enough that one step moves a value by 0.15 % of the centre. */
const STEPS = 1000;

/** The slider range and the nudge of one parameter, from its centre (the best fit). */
export function controlRange(c: Control, centre: number): { min: number; max: number; step: number; nudge: number } {
  const min = c.centred ? Math.max(c.lo, centre / 2) : c.lo;
  const max = c.centred ? Math.min(c.hi, centre * 1.5) : c.hi;
  const step = (max - min) / STEPS;
  // About 1 % of the centre, rounded to one significant figure.
  const raw = c.centred ? centre / 100 : 10;
  const nudge = Number(raw.toPrecision(1));
  return { min, max, step, nudge };
}

/** A typed what-if value: the number, or a sentence naming the field and why it is refused. */
export function typedValue(c: Control, text: string): { value?: number; error?: string } {
  const t = text.trim().replace(',', '.');
  const v = Number(t);
  if (t === '' || !Number.isFinite(v)) return { error: `${c.label} must be a number in ${c.unit}, but it is "${text.trim()}".` };
  if (v < c.lo || v > c.hi) return { error: `${c.label} must lie between ${c.lo} and ${c.hi} ${c.unit}, but it is ${v}.` };
  return { value: v };
}

/** One parameter: − , typed value, + , and the slider over the range centred on the best fit. */
function ParameterControl(props: { c: Control; value: number; centre: number; onValue: (v: number) => void }) {
  const { c, value } = props;
  const [text, setText] = useState<string | undefined>(undefined);
  const [error, setError] = useState<string | undefined>(undefined);
  const r = controlRange(c, props.centre);
  const id = `wi-${c.key}`;
  const set = (v: number) => {
    const clamped = Math.min(c.hi, Math.max(c.lo, v));
    setText(undefined);
    setError(undefined);
    props.onValue(Number(clamped.toPrecision(6)));
  };
  return (
    <div class="slider" key={c.key}>
      <label for={`${id}-n`}>
        {c.label} ({c.unit})
      </label>
      <div class="nudge">
        <button type="button" aria-label={`${c.label}: less by ${r.nudge} ${c.unit}`} onClick={() => set(value - r.nudge)}>
          −
        </button>
        <input
          id={`${id}-n`}
          type="number"
          inputMode="decimal"
          step="any"
          value={text ?? num(value, 4)}
          aria-invalid={error ? 'true' : undefined}
          aria-describedby={error ? `${id}-err` : undefined}
          onInput={(e) => setText(e.currentTarget.value)}
          onChange={(e) => {
            const t = typedValue(c, e.currentTarget.value);
            if (t.value === undefined) setError(t.error);
            else set(t.value);
          }}
        />
        <button type="button" aria-label={`${c.label}: more by ${r.nudge} ${c.unit}`} onClick={() => set(value + r.nudge)}>
          +
        </button>
        <input
          id={id}
          type="range"
          min={r.min}
          max={r.max}
          step={r.step}
          value={Math.min(r.max, Math.max(r.min, value))}
          aria-label={`${c.label}, slider from ${num(r.min, 3)} to ${num(r.max, 3)} ${c.unit}`}
          aria-valuetext={`${num(value, 4)} ${c.unit}`}
          onInput={(e) => set(Number(e.currentTarget.value))}
        />
      </div>
      {error ? (
        <p id={`${id}-err`} class="error" role="alert">
          {error}
        </p>
      ) : null}
    </div>
  );
}

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
  // The ranges centre on the best fit (or the first guess from the picks), and stay put while dragging.
  const centre = startingModel(props.result, props.picks);
  const best = props.result ? layeredOf(startingModel(props.result, props.picks)).model : undefined;
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
        <p class="hint">
          Drag, type or nudge to see how another layer over half-space would look against the picks; the sliders run from
          half to one and a half times the best fit (type any other value), and the best-fit curves stay on the plot, thin and grey, for comparison. Nothing here is
          saved.
        </p>
        {CONTROLS.map((c) => (
          <ParameterControl key={c.key} c={c} value={m[c.key]} centre={centre[c.key]} onValue={(v) => set(c.key, v)} />
        ))}
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
        compare={best}
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

/**
 * The layer builder: a what-if for N layers over a half-space. Rows of
 * thickness, shear speed, P speed or Poisson's ratio (the crew picks which
 * to type; the other is shown derived) and density, the half-space without
 * a thickness; layers added and removed; a start from the layered
 * estimate's best fit, the one-layer estimate's, or blank. Every bad value
 * is named in one sentence and the kept model stays as it was. Beside it,
 * the model's Love and/or Rayleigh curves (computed in the worker) against
 * the picks, the misfit in plain words, and Vs30, site classes and f0 of
 * the model with the caution. State and actions: layered-controller.ts.
 */
import { useMemo } from 'preact/hooks';
import type { PickRecord } from '../../../core/exchange/records';
import type { SiteFigures } from '../../../core/site/site';
import type { ComputedCurves } from '../charts/chart-data';
import { PlotPanel } from '../charts/plot-panel';
import type { LayeredState, PlotSettings } from '../controllers/app-state';
import type { LayeredController } from '../controllers/layered-controller';
import { derivedP, fieldWords, MAX_BUILDER_LAYERS, MODE_CHOICES, rowName, type TextField } from '../controllers/layered-form';
import type { TrialFit } from '../../worker/model-trial';
import { Caution } from './estimate-view';
import { num } from './format';
import '../styles/builder.css';

export interface LayerBuilderProps {
  state: LayeredState;
  picks: readonly PickRecord[];
  hasProfile: boolean;
  hasEstimate: boolean;
  /** The layered estimate's best-fit curves, drawn thin and grey for comparison. */
  bestFit?: ComputedCurves;
  /** A layered estimate is running: the worker takes one computation at a time, so the curves wait for it. */
  profileRunning?: boolean;
  selectedId?: string;
  plot: PlotSettings;
  theme: string;
  layered: LayeredController;
  onSelect: (id: string | undefined) => void;
  onPlot: (p: Partial<PlotSettings>) => void;
}

/**
 * The misfit in plain words. The grading is our own rule of thumb: a
 * typical miss (√(χ²/n)) up to 1.5 pick sd passes within the errors, up to
 * 3 misses by more than them, beyond that clearly misses.
 */
export function misfitWords(fit: TrialFit): string {
  if (fit.n === 0) return 'No pick of the drawn waves can be compared with this model.';
  const how =
    fit.rms <= 1.5
      ? 'The curves pass within the picks’ errors'
      : fit.rms <= 3
        ? 'The curves miss the picks by more than their errors'
        : 'The curves clearly miss the picks';
  let text = `${how}: on average ${num(fit.rms, 2)} sd from a pick (RMS of the misses in pick sd; χ² = ${num(fit.chi2)} over ${fit.n} pick${fit.n > 1 ? 's' : ''}).`;
  if (fit.missing > 0) text += ` ${fit.missing} pick${fit.missing > 1 ? 's lie' : ' lies'} where this model has no such mode (left out).`;
  if (fit.skipped > 0) text += ` ${fit.skipped} pick${fit.skipped > 1 ? 's' : ''} of a wave not drawn ${fit.skipped > 1 ? 'are' : 'is'} not compared.`;
  return text;
}

function classes(codes: string[]): string {
  return codes.length ? codes.join(' or ') : '–';
}

function Figures({ f }: { f: SiteFigures }) {
  return (
    <div class="table-wrap">
      <table class="params" data-testid="builder-figures">
        <caption>This model's site figures</caption>
        <tbody>
          <tr>
            <th scope="row">Vs30 (EN 1998-1 eq. 3.1)</th>
            <td data-testid="builder-vs30">{num(f.vs30.best)} m/s</td>
          </tr>
          <tr>
            <th scope="row">Site class: ASCE 7-16 / ASCE 7-22 / EN 1998-1</th>
            <td>
              {classes(f.classes.asce7_16)} / {classes(f.classes.asce7_22)} / {classes(f.classes.en1998_1)}
            </td>
          </tr>
          <tr>
            <th scope="row">Fundamental site frequency f0</th>
            <td data-testid="builder-f0">
              {num(f.f0_hz.best)} Hz (T0 {num(f.t0_s.best)} s)
            </td>
          </tr>
        </tbody>
      </table>
    </div>
  );
}

function Cell(props: { row: number; rows: number; field: TextField; state: LayeredState; layered: LayeredController; unit: string }) {
  const { row, field, state } = props;
  const label = `${rowName(row, props.rows)} ${fieldWords(field, state.pInput)}${props.unit ? ` (${props.unit})` : ''}`;
  const id = `lb-${row}-${field}`;
  return (
    <span class="lb-cell">
      <label for={id}>{label}</label>
      <input
        id={id}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        value={state.rows[row][field]}
        onInput={(e) => props.layered.editCell(row, field, e.currentTarget.value)}
        onChange={() => props.layered.commit()}
      />
    </span>
  );
}

export function LayerBuilderView(props: LayerBuilderProps) {
  const { state: s, layered } = props;
  const n = s.rows.length;
  const t = s.trial;
  const pUnit = s.pInput === 'vp' ? 'm/s' : '';
  const computed = useMemo(() => (t.result && t.band ? { band: t.band, curves: t.result.curves } : undefined), [t.result, t.band]);
  const approaches = t.result?.curves.find((c) => c.wave === 'rayleigh')?.approaches.length ?? 0;
  return (
    <div class="split">
      <section class="panel builder" aria-labelledby="builder-h">
        <div class="panel-head">
          <h2 id="builder-h">Layer builder</h2>
        </div>
        <Caution />
        <p class="hint">
          Type a model of up to {MAX_BUILDER_LAYERS} layers over a half-space to see its curves against the picks. The model is kept
          with the site as soon as every value passes the checks, and goes with it to the office and in bundles.
        </p>
        <div class="row-form" role="group" aria-label="Start from">
          <button type="button" disabled={!props.hasProfile} onClick={() => layered.startFrom('profile')}>
            From the layered estimate
          </button>
          <button type="button" disabled={!props.hasEstimate} onClick={() => layered.startFrom('estimate')}>
            From the one-layer estimate
          </button>
          <button type="button" onClick={() => layered.startFrom('blank')}>
            Blank
          </button>
        </div>
        <div class="row-form">
          <span class="seg-label">P waves as</span>
          <div class="seg" role="group" aria-label="Type the P waves as">
            <button type="button" aria-pressed={s.pInput === 'vp'} onClick={() => layered.setPInput('vp')}>
              P speed
            </button>
            <button type="button" aria-pressed={s.pInput === 'poisson'} onClick={() => layered.setPInput('poisson')}>
              Poisson's ratio
            </button>
          </div>
        </div>
        <div class="row-form">
          <label class="check">
            <input type="checkbox" checked={s.waves.love} onChange={(e) => layered.setWaves({ love: e.currentTarget.checked })} />
            Love curves
          </label>
          <label class="check">
            <input type="checkbox" checked={s.waves.rayleigh} onChange={(e) => layered.setWaves({ rayleigh: e.currentTarget.checked })} />
            Rayleigh curves
          </label>
          <label>
            Modes{' '}
            <select value={String(s.modes)} onChange={(e) => layered.setModes(Number(e.currentTarget.value))}>
              {MODE_CHOICES.map((m) => (
                <option key={m} value={String(m)}>
                  {m === 1 ? 'fundamental only' : `fundamental + ${m - 1}`}
                </option>
              ))}
            </select>
          </label>
        </div>
        {s.rows.map((_r, i) => (
          <fieldset key={i} class="lb-row" data-testid={`builder-row-${i}`}>
            <legend>{rowName(i, n)}</legend>
            {i < n - 1 ? <Cell row={i} rows={n} field="thickness" state={s} layered={layered} unit="m" /> : null}
            <Cell row={i} rows={n} field="vs" state={s} layered={layered} unit="m/s" />
            <Cell row={i} rows={n} field="p" state={s} layered={layered} unit={pUnit} />
            <span class="lb-derived" aria-live="polite">
              {derivedP(s.rows[i], s.pInput)}
            </span>
            <Cell row={i} rows={n} field="density" state={s} layered={layered} unit="kg/m³" />
            {i < n - 1 && n > 2 ? (
              <button type="button" aria-label={`Remove ${rowName(i, n).toLowerCase()}`} onClick={() => layered.removeLayer(i)}>
                Remove
              </button>
            ) : null}
          </fieldset>
        ))}
        <button type="button" onClick={() => layered.addLayer()} disabled={n - 1 >= MAX_BUILDER_LAYERS}>
          Add a layer
        </button>
        {s.errors.length ? (
          <ul class="error lb-errors" role="alert" data-testid="builder-errors">
            {s.errors.map((e) => (
              <li key={e}>{e}</li>
            ))}
            <li>The kept model is unchanged until every value passes.</li>
          </ul>
        ) : s.empty > 0 ? (
          <p class="status" role="status">
            {s.empty} field{s.empty > 1 ? 's are' : ' is'} still empty; the kept model and its curves stay as they were until every
            field is filled.
          </p>
        ) : null}
        {s.note ? <p class="hint">{s.note}</p> : null}
        {s.saveError ? (
          <p class="error" role="alert">
            {s.saveError}
          </p>
        ) : null}
        {s.warnings.map((w) => (
          <p key={w} class="warn">
            {w}
          </p>
        ))}
        <div class="lb-readout" data-testid="builder-readout" data-status={t.status} aria-live="polite">
          {t.status === 'running' ? (
            <p class="status" role="status">
              Computing the curves in the background…
              {props.profileRunning ? ' They wait until the layered estimate in progress finishes (or is cancelled).' : ''}
            </p>
          ) : t.status === 'error' ? (
            <p class="error" role="alert">
              {t.error}
            </p>
          ) : null}
          {t.result ? (
            <>
              <p class="readout" data-testid="builder-misfit">{misfitWords(t.result.fit)}</p>
              {approaches > 0 ? (
                <p class="hint">
                  Two Rayleigh modes come close in {approaches} place{approaches > 1 ? 's' : ''}: there a mode number can pass from one
                  branch to the other.
                </p>
              ) : null}
              {t.result.figures ? <Figures f={t.result.figures} /> : null}
              {t.result.figuresError ? <p class="warn">Site figures: {t.result.figuresError}</p> : null}
              {t.result.figures?.warnings.length ? (
                <details class="lb-notes">
                  <summary>What these figures cannot say ({t.result.figures.warnings.length} notes)</summary>
                  {t.result.figures.warnings.map((w) => (
                    <p key={w} class="hint">
                      {w}
                    </p>
                  ))}
                </details>
              ) : null}
              <Caution />
            </>
          ) : null}
        </div>
      </section>
      <PlotPanel
        id="builder-plot-h"
        picks={props.picks}
        computed={computed}
        computedCompare={props.bestFit}
        curveLabel="layer builder"
        caption={t.result ? 'Curves of the layer builder’s model (not fitted).' : undefined}
        selectedId={props.selectedId}
        settings={props.plot}
        theme={props.theme}
        onSelect={props.onSelect}
        onSettings={props.onPlot}
      />
    </div>
  );
}

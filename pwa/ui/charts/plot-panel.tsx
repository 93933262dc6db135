/**
 * The dispersion plot panel: axis controls, a legend in words, and the
 * lazily loaded uPlot engine (plot-engine.ts).
 */
import { useEffect, useRef, useState } from 'preact/hooks';
import type { LayeredModel } from '../../../core/dispersion/model';
import type { PickRecord } from '../../../core/exchange/records';
import type { DispersionPlot } from './plot-engine';
import type { ComputedCurves } from './chart-data';
import type { PlotSettings } from '../controllers/app-state';

export interface PlotPanelProps {
  picks: readonly PickRecord[];
  model?: LayeredModel;
  /** Words for the curves, e.g. "best fit" or "what-if". */
  curveLabel: string;
  /** A second model drawn thin and grey for comparison (the best fit under the what-if curves). */
  compare?: LayeredModel;
  /** Curves computed in the worker (Love and/or Rayleigh, several layers), drawn instead of the model's; unsupported: thin and faint. */
  computed?: ComputedCurves & { unsupported?: boolean };
  /** Computed curves drawn thin, grey and dotted for comparison under `computed` (the layered estimate's best fit under the builder's). */
  computedCompare?: ComputedCurves;
  selectedId?: string;
  settings: PlotSettings;
  theme: string;
  onSelect: (id: string | undefined) => void;
  onSettings: (patch: Partial<PlotSettings>) => void;
  /** Shown under the title; e.g. the state of the estimate. */
  caption?: string;
  /** Headline id, for aria-labelledby. */
  id: string;
}

/** Loads the plot engine once; later calls share the promise. */
let engineModule: Promise<typeof import('./plot-engine')> | undefined;
export function loadPlotEngine(): Promise<typeof import('./plot-engine')> {
  engineModule ??= import('./plot-engine');
  return engineModule;
}

export function PlotPanel(props: PlotPanelProps) {
  const host = useRef<HTMLDivElement>(null);
  const engine = useRef<DispersionPlot | null>(null);
  const [failed, setFailed] = useState<string | undefined>(undefined);
  const onSelect = useRef(props.onSelect);
  onSelect.current = props.onSelect;

  useEffect(() => {
    let live = true;
    loadPlotEngine().then(
      (m) => {
        if (!live || !host.current) return;
        engine.current = new m.DispersionPlot(host.current, (id) => onSelect.current(id));
        engine.current.update(inputOf(props));
        engine.current.flush();
      },
      (e) => setFailed(`The plot could not load: ${e instanceof Error ? e.message : String(e)}`),
    );
    return () => {
      live = false;
      engine.current?.destroy();
      engine.current = null;
    };
  }, []);

  useEffect(() => {
    engine.current?.update(inputOf(props));
  }, [props.picks, props.model, props.compare, props.computed, props.computedCompare, props.selectedId, props.settings, props.theme, props.curveLabel]);

  const s = props.settings;
  const kinds = new Set(props.picks.map((p) => `${p.wave === 'rayleigh' ? 'rayleigh' : 'love'}-${p.kind}`));
  // Love picks take their mode's colour; Rayleigh picks are drawn in one colour of their own (plot-engine.ts).
  const loveModes = [...new Set(props.picks.filter((p) => p.wave !== 'rayleigh').map((p) => p.mode))].sort((a, b) => a - b);
  const rayleighModes = [...new Set(props.picks.filter((p) => p.wave === 'rayleigh').map((p) => p.mode))].sort((a, b) => a - b);
  const modes = [...new Set(props.picks.map((p) => p.mode))];
  const summary =
    `Dispersion plot: ${props.picks.length} pick(s), velocity in m/s against ${s.axis === 'frequency' ? 'frequency in Hz' : 'period in s'}` +
    (props.model || props.computed ? `, with the ${props.curveLabel} curves.` : '.') +
    ' The picks table lists the same values.';
  return (
    <section class="panel plot-panel" aria-labelledby={props.id}>
      <div class="panel-head">
        <h2 id={props.id}>Dispersion plot</h2>
        <span class="seg-label" aria-hidden="true">
          Plot against
        </span>
        <div class="seg" role="group" aria-label="Horizontal axis quantity">
          <button type="button" aria-pressed={s.axis === 'frequency'} onClick={() => props.onSettings({ axis: 'frequency' })}>
            Frequency (Hz)
          </button>
          <button type="button" aria-pressed={s.axis === 'period'} onClick={() => props.onSettings({ axis: 'period' })}>
            Period (s)
          </button>
        </div>
        <label class="check">
          <input type="checkbox" checked={s.xLog} onChange={(e) => props.onSettings({ xLog: e.currentTarget.checked })} />
          <span class="long-label">Log horizontal axis</span>
          <span class="short-label">Log x</span>
        </label>
        <label class="check">
          <input type="checkbox" checked={s.yLog} onChange={(e) => props.onSettings({ yLog: e.currentTarget.checked })} />
          <span class="long-label">Log velocity axis (m/s)</span>
          <span class="short-label">Log v</span>
        </label>
      </div>
      {props.caption ? <p class="caption">{props.caption}</p> : null}
      {/* With nothing to draw the axes would be meaningless (0–1 m/s): the plot waits, hidden, and says why. */}
      {props.picks.length === 0 && !props.model && !props.computed ? (
        <p class="empty plot-empty">No picks yet: the plot appears with the first pick.</p>
      ) : null}
      <div class={`plot-host${props.picks.length === 0 && !props.model && !props.computed ? ' is-empty' : ''}`} ref={host} role="img" aria-label={summary} />
      {failed ? <p class="error" role="alert">{failed}</p> : null}
      <ul class="legend" aria-label="Plot key">
        {loveModes.map((m) => (
          <li key={`love-${m}`}>
            <span class={`swatch m${m % 4}`} aria-hidden="true" /> {rayleighModes.length ? 'Love ' : ''}mode {m}
          </li>
        ))}
        {rayleighModes.length ? (
          <li>
            <span class="swatch rayleigh" aria-hidden="true" /> Rayleigh, {rayleighModes.length === 1 ? 'mode' : 'modes'} {rayleighModes.join(', ')}
          </li>
        ) : null}
        {kinds.has('love-group') ? <li><span class="glyph disc" aria-hidden="true" /> Love group-velocity pick ± 1 sd</li> : null}
        {kinds.has('love-phase') ? <li><span class="glyph diamond" aria-hidden="true" /> Love phase-velocity pick ± 1 sd</li> : null}
        {kinds.has('rayleigh-group') ? <li><span class="glyph square" aria-hidden="true" /> Rayleigh group-velocity pick ± 1 sd</li> : null}
        {kinds.has('rayleigh-phase') ? <li><span class="glyph triangle" aria-hidden="true" /> Rayleigh phase-velocity pick ± 1 sd</li> : null}
        {props.computed ? (
          props.computed.curves.map((c) => (
            <li key={c.wave}>
              <svg class="glyph-svg" width="34" height="10" aria-hidden="true" opacity={props.computed?.unsupported ? 0.5 : undefined}>
                <line x1="1" y1="5" x2="33" y2="5" class={`curve-${c.wave}`} stroke-dasharray={c.wave === 'rayleigh' ? '12 4 2 4' : '8 5'} />
              </svg>{' '}
              {props.curveLabel} {c.wave === 'rayleigh' ? 'Rayleigh curves, dash-dot (phase; group: dash-dot-dot)' : 'Love curves, dashed (phase; group: solid)'}
              {props.computed?.unsupported ? ', thin and faint: not resolved, for reference only' : ''}
            </li>
          ))
        ) : props.model ? (
          <li><span class="glyph line" aria-hidden="true" /> {props.curveLabel} Love curve (dashed: phase)</li>
        ) : null}
        {props.computed && props.computedCompare ? <li><span class="glyph dash" aria-hidden="true" /> layered best fit, for comparison (thin, grey, dotted)</li> : null}
        {props.model && props.compare && !props.computed ? <li><span class="glyph dash" aria-hidden="true" /> best fit, for comparison (thin, grey, dotted)</li> : null}
        {props.model && modes.some((m) => m > 0) ? <li><span class="glyph dash" aria-hidden="true" /> higher-mode cutoff</li> : null}
        <li>Tap a pick to select its row.</li>
      </ul>
    </section>
  );
}

function inputOf(p: PlotPanelProps) {
  return {
    picks: p.picks,
    model: p.model,
    curveLabel: p.curveLabel,
    compare: p.compare,
    computed: p.computed,
    computedCompare: p.computedCompare,
    selectedId: p.selectedId,
    axis: p.settings.axis,
    xLog: p.settings.xLog,
    yLog: p.settings.yLog,
    theme: p.theme,
  };
}

/**
 * The estimate, answer first: the thickness with its verdict (resolved,
 * only roughly known, not resolved: core/estimate/verdict.ts), its
 * intervals and the caution at the top at every size; then what is known
 * (the settings, folded once there is a result), the speeds, the
 * alternatives, the diagnostics in plain words (worst first) and the misfit
 * map; the statistics stay in "How this was computed". An unresolved
 * thickness is never shown as a bare number.
 */
import { CAUTION } from '../../../core/shared/caution';
import type { EstimateResult, ParameterEstimate } from '../../../core/estimate/estimate';
import type { MisfitSlice } from '../../../core/estimate/misfit-slice';
import type { SiteRecord } from '../../../core/exchange/records';
import { settingText, SETTING_FIELDS, type SettingKey } from '../controllers/form-text';
import { num } from './format';
import { MisfitMapView } from '../charts/misfit-map';
import { LEVEL_WORDS } from './verdict-text';
import { handEntryMessage } from '../controllers/app-state';
import type { EstimateState, SiteFormError } from '../controllers/app-state';

export interface EstimateViewProps {
  site: SiteRecord;
  drafts: Readonly<Record<string, string>>;
  error?: SiteFormError;
  estimate: EstimateState;
  pickCount: number;
  theme: string;
  onEdit: (key: SettingKey, text: string) => void;
  onCommit: (key: SettingKey) => void;
  onKnown: (which: 'vs1' | 'vs2', known: boolean, suggestion?: number) => void;
  onRun: () => void;
  /** Opens the survey plan (the link beside an unresolved thickness). */
  onSurvey: () => void;
}

export function Caution() {
  return (
    <p class="caution" role="note">
      <strong>Caution.</strong> {CAUTION}
    </p>
  );
}

function SettingInput(props: { k: SettingKey; view: EstimateViewProps; short?: string }) {
  const { k, view } = props;
  const meta = SETTING_FIELDS[k];
  const bad = view.error?.field === `set.${k}` || view.error?.field === `settings.${k}`;
  return (
    <label class="field">
      <span>
        {props.short ?? meta.label} ({meta.unit})
      </span>
      <input
        inputMode="decimal"
        autoComplete="off"
        value={settingText(view.site, view.drafts, k)}
        aria-invalid={bad ? 'true' : undefined}
        aria-describedby={bad ? 'settings-err' : undefined}
        onInput={(e) => view.onEdit(k, e.currentTarget.value)}
        onChange={() => view.onCommit(k)}
      />
    </label>
  );
}

function SpeedChoice(props: { which: 'vs1' | 'vs2'; view: EstimateViewProps }) {
  const { which, view } = props;
  const known = view.site.settings[which] !== undefined || view.drafts[`set.${which}`] !== undefined;
  const name = which === 'vs1' ? 'Layer shear speed β1' : 'Half-space shear speed β2';
  const best = view.estimate.result?.[which].best;
  return (
    <fieldset class="choice">
      <legend>{name} (m/s)</legend>
      <div class="seg" role="group" aria-label={`${name}: known or free`}>
        <button type="button" aria-pressed={!known} onClick={() => view.onKnown(which, false)}>
          Free: estimate it
        </button>
        <button type="button" aria-pressed={known} onClick={() => view.onKnown(which, true, best)}>
          Known from another source
        </button>
      </div>
      {known ? (
        <SettingInput k={which} view={view} short={`${name}, known value`} />
      ) : (
        <div class="pair">
          <SettingInput k={which === 'vs1' ? 'vs1Lo' : 'vs2Lo'} view={view} short="Search from" />
          <SettingInput k={which === 'vs1' ? 'vs1Hi' : 'vs2Hi'} view={view} short="to" />
        </div>
      )}
    </fieldset>
  );
}

function interval(p: ParameterEstimate, unit: string, level: 68 | 95): string {
  if (!p.free) return 'given';
  const lo = level === 68 ? p.low68 : p.low95;
  const hi = level === 68 ? p.high68 : p.high95;
  const loText = p.openLow && level === 95 ? `≤ ${num(lo)}` : num(lo);
  const hiText = p.openHigh && level === 95 ? `≥ ${num(hi)} (open)` : num(hi);
  return `${loText} to ${hiText} ${unit}`;
}

function ParamRow(props: { name: string; unit: string; p: ParameterEstimate }) {
  const { p } = props;
  return (
    <tr>
      <th scope="row">{props.name}</th>
      <td class="big">
        {num(p.best)} {props.unit}
      </td>
      <td>{interval(p, props.unit, 68)}</td>
      <td>{interval(p, props.unit, 95)}</td>
      <td>{p.free ? 'estimated' : 'known (fixed)'}</td>
    </tr>
  );
}

/**
 * The answer: the thickness with its verdict, its intervals and the caution.
 * Not resolved: the words say so first, with what is known and the one
 * thing to do before leaving, and a link to the survey plan; no best value
 * stands as the answer.
 */
export function VerdictHeadline(props: { r: EstimateResult; onSurvey?: () => void; compact?: boolean }) {
  const { r } = props;
  const v = r.verdict;
  const h = r.thickness;
  return (
    <div class={`verdict verdict-${v.level}`} data-testid="verdict" data-level={v.level}>
      {v.level === 'unresolved' ? (
        <p class="headline" data-testid="thickness" data-value={String(h.best)}>
          Layer thickness <strong>not resolved</strong>: {v.known}
        </p>
      ) : (
        <p class="headline" data-testid="thickness" data-value={String(h.best)}>
          Layer thickness H {v.level === 'rough' ? '≈' : '='} <strong>{num(h.best)} m</strong>{' '}
          <span class={`badge badge-${v.level}`}>{LEVEL_WORDS[v.level]}</span>
        </p>
      )}
      {v.level !== 'unresolved' || !props.compact ? (
        <p class="intervals">
          68 %: {interval(h, 'm', 68)}; 95 %: {interval(h, 'm', 95)}
          {v.level === 'unresolved' ? ` (best fit ${num(h.best)} m, not an answer)` : ''}
        </p>
      ) : null}
      <p class="verdict-text">{v.text}</p>
      {v.level !== 'resolved' && props.onSurvey ? (
        <button type="button" class="link" onClick={props.onSurvey}>
          Open the survey plan: what to change before leaving
        </button>
      ) : null}
    </div>
  );
}

/** How the fit and the defaults came out, in the statistics' own terms (for the fold). */
function FitFigures({ r }: { r: EstimateResult }) {
  return (
    <p>
      Densities used: layer ρ1 = {num(r.density1, 4)} kg/m³{r.density1Defaulted ? ' (default)' : ''}, half-space ρ2 ={' '}
      {num(r.density2, 4)} kg/m³{r.density2Defaulted ? ' (default)' : ''}. Fit: {r.diagnostics.fitDetail}.
      {Number.isFinite(r.correlationThicknessVs1) ? ` H–β1 correlation: ${num(r.correlationThicknessVs1, 2)}.` : ''}
    </p>
  );
}

export function EstimateResultView(props: { r: EstimateResult; slice?: MisfitSlice; theme: string }) {
  const { r } = props;
  const map = props.slice ?? r.misfitMap;
  const alternatives = r.alternatives.filter((a) => a.rank > 1);
  const mapParam = map.yName === 'vs1_m_s' ? r.vs1 : r.vs2;
  const mapSpeed = mapParam.best;
  const box: [number, number, number, number] = [r.thickness.low95, r.thickness.high95, mapParam.low95, mapParam.high95];
  return (
    <div class="result">
      <section aria-labelledby="diag-h">
        <h3 id="diag-h">What the picks say (most serious first)</h3>
        <ul class="plain diag">
          {r.warnings.map((w, i) => (
            // The crew reads column words here too ("sd", not the CSV name sd_m_s).
            <li key={i}>{handEntryMessage(w)}</li>
          ))}
        </ul>
      </section>
      <div class="table-wrap">
        <table class="params">
          <caption>Best fit and intervals from the profile likelihood</caption>
          <thead>
            <tr>
              <th scope="col">Parameter</th>
              <th scope="col">Best</th>
              <th scope="col">68 % interval</th>
              <th scope="col">95 % interval</th>
              <th scope="col">Source</th>
            </tr>
          </thead>
          <tbody>
            <ParamRow name="Layer thickness H" unit="m" p={r.thickness} />
            <ParamRow name="Layer shear speed β1" unit="m/s" p={r.vs1} />
            <ParamRow name="Half-space shear speed β2" unit="m/s" p={r.vs2} />
          </tbody>
        </table>
      </div>
      {alternatives.length > 0 ? (
        <section aria-labelledby="alt-h">
          <h3 id="alt-h">Other models that also fit ({alternatives.length})</h3>
          <ul class="plain">
            {alternatives.map((a) => (
              <li key={a.rank}>
                Alternative {a.rank - 1}: H = {num(a.thickness.best)} m (95 %: {interval(a.thickness, 'm', 95)}), β1 ={' '}
                {num(a.vs1.best)} m/s, β2 = {num(a.vs2.best)} m/s; misfit higher by Δχ² = {num(a.deltaChi2, 2)}.
              </li>
            ))}
          </ul>
        </section>
      ) : (
        <p>No other separate model fits within the noise.</p>
      )}
      <section aria-labelledby="map-h">
        <h3 id="map-h">Misfit map: the thickness–speed trade-off</h3>
        <MisfitMapView
          map={map}
          slice={props.slice}
          bestChi2={r.chi2}
          bestThickness={r.thickness.best}
          bestSpeed={mapSpeed}
          scale={r.intervalScale}
          correlation={r.correlationThicknessVs1}
          box={box}
          theme={props.theme}
        />
      </section>
      <details>
        <summary>How this was computed</summary>
        <FitFigures r={r} />
        <p>{r.method}</p>
      </details>
    </div>
  );
}

export function EstimateView(props: EstimateViewProps) {
  const e = props.estimate;
  const settingsError = props.error?.field.startsWith('set') ? props.error.text : undefined;
  const settings = (
    <>
      <p class="hint">
        Speeds known from a borehole or a refraction line are held fixed; free ones are searched within the range (blank:
        a range from the picks). Blank densities use 1800 and 2100 kg/m³ (common practice).
      </p>
      <div class="settings-grid">
        <SpeedChoice which="vs1" view={props} />
        <SpeedChoice which="vs2" view={props} />
        <fieldset class="choice">
          <legend>Densities (kg/m³)</legend>
          <div class="pair">
            <SettingInput k="density1" view={props} short="Layer ρ1" />
            <SettingInput k="density2" view={props} short="Half-space ρ2" />
          </div>
        </fieldset>
        <fieldset class="choice">
          <legend>Thickness search range (m)</legend>
          <div class="pair">
            <SettingInput k="hLo" view={props} short="From" />
            <SettingInput k="hHi" view={props} short="to" />
          </div>
        </fieldset>
      </div>
      {settingsError ? (
        <p id="settings-err" class="error" role="alert">
          {settingsError}
        </p>
      ) : null}
    </>
  );
  return (
    <div class="estimate">
      <section class="panel answer" aria-labelledby="est-h">
        <div class="panel-head">
          <h2 id="est-h">Estimate</h2>
          <button type="button" onClick={props.onRun} disabled={props.pickCount === 0}>
            Compute again
          </button>
        </div>
        <p class="status" role="status" aria-live="polite">
          {props.pickCount === 0
            ? 'Enter or import picks first.'
            : e.status === 'running'
              ? 'Computing in the background…'
              : e.status === 'done'
                ? 'Up to date with the picks and settings.'
                : ''}
        </p>
        {e.status === 'error' && e.error ? (
          <p class="error" role="alert">
            {e.error}
          </p>
        ) : null}
        {e.result ? <VerdictHeadline r={e.result} onSurvey={props.onSurvey} /> : null}
        <Caution />
      </section>
      {/* The settings: open until there is a result (or while one of them is refused), folded after. */}
      <details class="panel settings-fold" open={!e.result || !!settingsError}>
        <summary>
          <h2 id="known-h">What is known (speeds, densities, search ranges)</h2>
        </summary>
        {settings}
      </details>
      {e.result ? (
        <section class="panel" aria-labelledby="detail-h">
          <h2 id="detail-h">The estimate in detail</h2>
          <EstimateResultView r={e.result} slice={e.slice} theme={props.theme} />
        </section>
      ) : null}
    </div>
  );
}

/**
 * Site figures from the estimate with its uncertainty: Vs30, the classes in
 * three tables (every class the range meets, so straddling shows), f0, T0
 * and the impedance ratio. Computed by core/site/site.ts siteFiguresOfEstimate
 * over the 95 % intervals.
 */
import type { EstimateResult } from '../../../core/estimate/estimate';
import { siteFiguresOfEstimate, type FigureRange, type SiteFigures } from '../../../core/site/site';
import { useState } from 'preact/hooks';
import type { PickRecord, SiteRecord } from '../../../core/exchange/records';
import { Caution, VerdictHeadline } from './estimate-view';
import { buildSiteSummary } from './site-summary-page';
import { num } from './format';

export interface FiguresViewProps {
  result?: EstimateResult;
  running: boolean;
  /** Opens the survey plan (beside an unresolved thickness). */
  onSurvey?: () => void;
  /** For the one-page summary. */
  site?: SiteRecord;
  picks?: readonly PickRecord[];
}

/** Opens the one-page site summary in a page of its own, to print or save as PDF; a reason when the device refuses. */
function SummaryButton(props: { site: SiteRecord; picks: readonly PickRecord[]; result?: EstimateResult; figures?: SiteFigures }) {
  const [refused, setRefused] = useState('');
  const open = () => {
    const w = window.open('', '_blank');
    if (!w) {
      setRefused('The device did not open a new page for the summary (pop-ups blocked); allow pop-ups for this app and try again.');
      return;
    }
    setRefused('');
    buildSiteSummary(w.document, props.site, props.picks, props.result, props.figures);
  };
  return (
    <div class="row-form">
      <button type="button" onClick={open}>
        One-page site summary (print, save or share)
      </button>
      {refused ? (
        <p class="error" role="alert">
          {refused}
        </p>
      ) : null}
    </div>
  );
}

/** The figures for an estimate, over its 95 % intervals; an error message when the core refuses. */
export function figuresOf(r: EstimateResult): { figures?: SiteFigures; error?: string } {
  try {
    const figures = siteFiguresOfEstimate(r);
    return { figures };
  } catch (e) {
    return { error: e instanceof Error ? e.message : String(e) };
  }
}

/**
 * The best value and its 95 % range. An end the data do not bound (from an
 * open interval end, site.ts) is never shown as a bound: the text says
 * "at least" or "at most" the other end, and names the model's limit apart.
 */
export function rangeText(f: FigureRange, unit: string, digits = 3): string {
  const same = f.low === f.best && f.high === f.best;
  const u = unit ? ` ${unit}` : '';
  const best = `${num(f.best, digits)}${u}`;
  if (same) return best;
  const limit = (x: number) => (Number.isFinite(x) ? `; the model's limit is ${num(x, digits)}${u}` : '');
  if (f.openLow && f.openHigh) return `${best} (not bounded by the data${Number.isFinite(f.low) && Number.isFinite(f.high) ? `; the model's limits are ${num(f.low, digits)} to ${num(f.high, digits)}${u}` : ''})`;
  if (f.openLow) return `${best} (95 %: at most ${num(f.high, digits)}${u}, not bounded below by the data${limit(f.low)})`;
  if (f.openHigh) return `${best} (95 %: at least ${num(f.low, digits)}${u}, not bounded above by the data${limit(f.high)})`;
  return `${best} (95 %: ${num(f.low, digits)} to ${num(f.high, digits)}${u})`;
}

function classText(codes: string[]): string {
  if (codes.length === 0) return 'none decided';
  if (codes.length === 1) return codes[0];
  return `${codes.join(' or ')}: the range straddles a class boundary`;
}

export function FiguresView(props: FiguresViewProps) {
  if (!props.result) {
    return (
      <section class="panel" aria-labelledby="fig-h">
        <h2 id="fig-h">Site figures</h2>
        <p class="status" role="status">
          {props.running ? 'Waiting for the estimate…' : 'The site figures follow from the estimate: enter picks first.'}
        </p>
        <Caution />
      </section>
    );
  }
  const { figures, error } = figuresOf(props.result);
  const v = props.result.verdict;
  return (
    <section class="panel" aria-labelledby="fig-h">
      <h2 id="fig-h">Site figures</h2>
      {/* The thickness these figures rest on, with its verdict, and the caution: first, at every size. */}
      <VerdictHeadline r={props.result} onSurvey={props.onSurvey} compact />
      {v.level === 'unresolved' ? (
        <p class="warn" data-testid="figures-unresolved">
          These figures rest on a layer thickness the picks do not resolve: read them as a range of possibilities, not as the
          site's values.
        </p>
      ) : null}
      <Caution />
      {props.site ? <SummaryButton site={props.site} picks={props.picks ?? []} result={props.result} figures={figures} /> : null}
      <p class="hint">
        From the estimated layer over half-space, over the 95 % intervals of H, β1 and β2; an interval end the data do not
        bound leaves the figures open on that side.
      </p>
      {error ? (
        <p class="error" role="alert">
          {error}
        </p>
      ) : null}
      {figures ? (
        <>
          <div class="table-wrap">
            <table class="params">
              <caption>Figures with their ranges</caption>
              <tbody>
                <tr>
                  <th scope="row">Vs30, EN 1998-1 eq. 3.1 (top 30 m)</th>
                  <td>{rangeText(figures.vs30, 'm/s')}</td>
                </tr>
                <tr>
                  <th scope="row">v̄s over 100 ft (30.48 m), ASCE/SEI 7</th>
                  <td>{rangeText(figures.vs100ft, 'm/s')}</td>
                </tr>
                <tr>
                  <th scope="row">Fundamental site frequency f0 = β1/(4H)</th>
                  <td>{rangeText(figures.f0_hz, 'Hz')}</td>
                </tr>
                <tr>
                  <th scope="row">Fundamental site period T0 = 4H/β1</th>
                  <td>{rangeText(figures.t0_s, 's')}</td>
                </tr>
                <tr>
                  <th scope="row">Impedance ratio ρ1β1/(ρ2β2) (no unit)</th>
                  <td>{rangeText(figures.impedance_ratio, '', 2)}</td>
                </tr>
              </tbody>
            </table>
          </div>
          <div class="table-wrap">
            <table class="params classes">
              <caption>Site class by table</caption>
              <tbody>
                <tr>
                  <th scope="row">ASCE/SEI 7-16 Table 20.3-1</th>
                  <td data-testid="class-asce7_16">{classText(figures.classes.asce7_16)}</td>
                </tr>
                <tr>
                  <th scope="row">ASCE/SEI 7-22 Table 20.2-1</th>
                  <td data-testid="class-asce7_22">{classText(figures.classes.asce7_22)}</td>
                </tr>
                <tr>
                  <th scope="row">EN 1998-1 Table 3.1 (ground type)</th>
                  <td data-testid="class-en1998_1">{classText(figures.classes.en1998_1)}</td>
                </tr>
              </tbody>
            </table>
          </div>
          <h3>Notes</h3>
          <ul class="plain diag">
            {figures.warnings.map((w, i) => (
              <li key={i}>{w}</li>
            ))}
          </ul>
        </>
      ) : null}
      <Caution />
    </section>
  );
}

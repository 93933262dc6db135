/**
 * Survey advice: from a target depth, the estimate and the picks so far,
 * what the spread and source must reach (core/site/survey.ts, common practice),
 * and what to change before leaving the site.
 */
import type { EstimateResult } from '../../../core/estimate/estimate';
import type { PickRecord } from '../../../core/exchange/records';
import { pickWavelengths, surveyAdvice, type SurveyAdvice } from '../../../core/site/survey';
import { Caution } from './estimate-view';
import { num, span } from './format';

export interface SurveyViewProps {
  depthText: string;
  picks: readonly PickRecord[];
  result?: EstimateResult;
  onDepth: (text: string) => void;
}

/** Target depth to offer when none is typed: twice the estimated thickness (deep enough to see below the layer), else 30 m. */
export function defaultDepth(r: EstimateResult | undefined): number {
  const h = r?.thickness.best;
  if (h === undefined || !Number.isFinite(h) || !(h > 0)) return 30;
  return Math.min(1000, Number((2 * h).toPrecision(2)));
}

export function adviceOf(props: SurveyViewProps): { advice?: SurveyAdvice; error?: string } {
  const typed = props.depthText.trim();
  const t = typed === '' ? String(defaultDepth(props.result)) : typed;
  const depth = Number(t.replace(',', '.'));
  if (!Number.isFinite(depth)) {
    return { error: `The target depth must be a number of metres greater than 0, but it is "${t}".` };
  }
  const r = props.result;
  const model = r ? { h: r.thickness.best, vs1: r.vs1.best, vs2: r.vs2.best, rho1: r.density1, rho2: r.density2 } : undefined;
  try {
    const advice = surveyAdvice({ targetDepth: depth, model, pickedWavelengths: pickWavelengths(props.picks, model) });
    return { advice };
  } catch (e) {
    return { error: e instanceof Error ? e.message : String(e) };
  }
}

export function SurveyView(props: SurveyViewProps) {
  const { advice, error } = adviceOf(props);
  const r = props.result;
  const notResolved = r && r.verdict.level === 'unresolved';
  const fromEstimate = props.depthText.trim() === '';
  return (
    <section class="panel" aria-labelledby="survey-h">
      <h2 id="survey-h">Survey plan</h2>
      <Caution />
      {notResolved ? (
        <p class="warn" role="alert" data-testid="survey-verdict">
          {r.verdict.text}
        </p>
      ) : null}
      <label class="field short">
        <span>Target depth (m){fromEstimate ? (r ? ', from the estimate: 2 × H' : ', 30 m until there is an estimate') : ', kept for this site'}</span>
        <input
          inputMode="decimal"
          value={props.depthText}
          placeholder={String(defaultDepth(r))}
          aria-invalid={error ? 'true' : undefined}
          aria-describedby={error ? 'survey-err' : 'survey-note'}
          onInput={(e) => props.onDepth(e.currentTarget.value)}
        />
      </label>
      {error ? (
        <p id="survey-err" class="error" role="alert">
          {error}
        </p>
      ) : null}

      {advice ? (
        <>
          {advice.actions.length > 0 ? (
            <div class="todo" role="status">
              <h3>Before leaving the site</h3>
              <ul class="plain">
                {advice.actions.map((a, i) => (
                  <li key={i}>{a}</li>
                ))}
              </ul>
            </div>
          ) : (
            <p class="ok" role="status">
              The picks reach {num(advice.targetDepth)} m on the cautious rule (a third of the longest wavelength).
            </p>
          )}
          <div class="table-wrap">
            <table class="params">
              <caption>To see {num(advice.targetDepth)} m deep (common practice)</caption>
              <tbody>
                <tr>
                  <th scope="row">Longest wavelength needed (m)</th>
                  <td>
                    at least {num(advice.wavelength[0])} m (2 × depth); {num(advice.wavelength[1])} m to be safe (3 × depth)
                  </td>
                </tr>
                <tr>
                  <th scope="row">Pick down to (Hz)</th>
                  <td>
                    {Number.isFinite(advice.lowestFrequency[0])
                      ? `${num(advice.lowestFrequency[1])} Hz or lower at the very least; ${num(advice.lowestFrequency[0])} Hz or lower to be safe (fundamental mode of the current estimate)`
                      : 'needs an estimate of the ground speeds'}
                  </td>
                </tr>
                <tr>
                  <th scope="row">Spread length (m)</th>
                  <td>
                    at least {num(advice.spreadLength[0])} m (the depth); {num(advice.spreadLength[1])} m advised (the cautious
                    wavelength)
                  </td>
                </tr>
                <tr>
                  <th scope="row">Source offset from the first receiver (m)</th>
                  <td>{span(advice.sourceOffset[0], advice.sourceOffset[1])} m (a quarter to a half of the advised spread)</td>
                </tr>
                <tr>
                  <th scope="row">Depth the picks reach now (m)</th>
                  <td>
                    {Number.isFinite(advice.pickedLongest)
                      ? `${span(advice.reachedDepth[0], advice.reachedDepth[1])} m (a third to a half of the longest picked wavelength, ${num(advice.pickedLongest)} m)`
                      : 'no picks yet'}
                  </td>
                </tr>
                <tr>
                  <th scope="row">Largest receiver spacing (m)</th>
                  <td>
                    {Number.isFinite(advice.receiverSpacing)
                      ? `${num(advice.receiverSpacing)} m (half the shortest picked wavelength, ${num(advice.pickedShortest)} m)`
                      : 'no picks yet'}
                  </td>
                </tr>
              </tbody>
            </table>
          </div>
          <p id="survey-note" class="hint">
            {advice.note} A pick's wavelength is its phase velocity ÷ frequency (for group picks, the phase velocity of the
            current estimate{props.result ? '' : ', or the group velocity itself until there is one'}).
          </p>
        </>
      ) : null}
      <Caution />
    </section>
  );
}

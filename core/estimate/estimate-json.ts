/**
 * The estimate as plain JSON: the shape `shearfield estimate` prints and the
 * app saves as an estimate record's summary (contract keys first, SI units
 * in the key names), and its reader for commands that take an estimate
 * back (`shearfield site ESTIMATE.json`). Pure; no numbers are computed here.
 */
import { InputError } from '../shared/errors';
import type { FigureRange } from '../site/site';
import type { EstimateResult, ParameterEstimate } from './estimate';
import { VERDICT_LEVELS, type VerdictLevel } from './verdict';

/**
 * One parameter's interval. An open end (the interval reached the search
 * range, open_ends says which) is null, never the search range's own value,
 * which would read like a bound: the data do not bound it there. A 68 % end
 * sitting on that same range end is null too.
 */
function parameterJson(e: ParameterEstimate, range: readonly [number, number]) {
  return {
    best: e.best,
    low68: e.openLow && e.low68 === range[0] ? null : e.low68,
    high68: e.openHigh && e.high68 === range[1] ? null : e.high68,
    low95: e.openLow ? null : e.low95,
    high95: e.openHigh ? null : e.high95,
  };
}

/** A site figure's best value and 95 % ends, an end the data do not bound flagged open beside it. */
function figureJson(f: FigureRange) {
  return { best: f.best, low95: f.low, high95: f.high, open_low: f.openLow === true, open_high: f.openHigh === true };
}

/** The JSON the command prints, for a result (contract keys first). */
export function estimateJson(r: EstimateResult) {
  const site = r.site;
  return {
    thickness_m: parameterJson(r.thickness, r.searchRange.thickness),
    vs1_m_s: parameterJson(r.vs1, r.searchRange.vs1),
    vs2_m_s: parameterJson(r.vs2, r.searchRange.vs2),
    alternatives: r.alternatives.map((a) => ({
      rank: a.rank,
      thickness_m: parameterJson(a.thickness, r.searchRange.thickness),
      vs1_m_s: parameterJson(a.vs1, r.searchRange.vs1),
      vs2_m_s: parameterJson(a.vs2, r.searchRange.vs2),
      chi2: a.chi2,
      delta_chi2: a.deltaChi2,
    })),
    misfit: { chi2: r.chi2, dof: r.dof, detail: r.diagnostics.fitDetail },
    warnings: [...r.warnings, r.siteNote, ...(site ? site.warnings : [])],
    caution: r.caution,
    chi2_per_dof: r.chi2PerDof,
    interval_scale: r.intervalScale,
    open_ends: {
      thickness_m: { low: r.thickness.openLow, high: r.thickness.openHigh },
      vs1_m_s: { low: r.vs1.openLow, high: r.vs1.openHigh },
      vs2_m_s: { low: r.vs2.openLow, high: r.vs2.openHigh },
    },
    correlation_thickness_vs1: r.correlationThicknessVs1,
    density_kg_m3: {
      layer: r.density1,
      halfspace: r.density2,
      layer_defaulted: r.density1Defaulted,
      halfspace_defaulted: r.density2Defaulted,
    },
    defaulted_sd: r.defaultedSdCount,
    search_range: {
      thickness_m: r.searchRange.thickness,
      vs1_m_s: r.searchRange.vs1,
      vs2_m_s: r.searchRange.vs2,
    },
    vs30_m_s: site ? figureJson(site.vs30) : null,
    site_class: site ? site.classes : null,
    picks: r.pickFit.labels.map((label, i) => ({
      pick: label,
      predicted_m_s: r.pickFit.predicted[i],
      residual_m_s: r.pickFit.residual[i],
      residual_sd: r.pickFit.normalised[i],
      sd_m_s: r.pickFit.sd[i],
    })),
    method: r.method,
    verdict: { level: r.verdict.level, text: r.verdict.text },
  };
}

/**
 * The same, safe to store and send: JSON has no NaN or ±∞, so those become
 * null (as JSON.stringify writes them), and typed arrays become plain lists.
 */
export function estimateSummary(r: EstimateResult): Record<string, unknown> {
  return JSON.parse(JSON.stringify(estimateJson(r))) as Record<string, unknown>;
}

/** A best value with its 95 % interval and which ends are open, as read back from the JSON. */
export interface IntervalRead {
  best: number;
  low95: number;
  high95: number;
  openLow: boolean;
  openHigh: boolean;
}

/** What `estimateFromJson` reads back: enough for the site figures and the verdict. */
export interface EstimateRead {
  thickness: IntervalRead;
  vs1: IntervalRead;
  vs2: IntervalRead;
  density1: number;
  density2: number;
  verdict: { level: VerdictLevel; text: string };
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/** True when `json` looks like the estimate JSON (it has a thickness_m object), not a model file. */
export function looksLikeEstimateJson(json: unknown): boolean {
  return isObject(json) && isObject(json.thickness_m);
}

/**
 * Reads back the JSON `estimateJson` writes (as `shearfield estimate`
 * prints it): the best values and 95 % intervals, open ends, densities and
 * the verdict. Throws InputError naming the first field that is missing or
 * not what the estimate writes.
 */
export function estimateFromJson(json: unknown): EstimateRead {
  if (!isObject(json)) throw new InputError('estimate', 'The estimate must be a JSON object as shearfield estimate prints it.');
  const num = (x: unknown, field: string): number => {
    if (typeof x !== 'number' || !Number.isFinite(x)) {
      throw new InputError(field, `${field} must be a finite number, but it is ${x === undefined ? 'missing' : JSON.stringify(x)}.`);
    }
    return x;
  };
  const opens = isObject(json.open_ends) ? json.open_ends : {};
  const interval = (key: 'thickness_m' | 'vs1_m_s' | 'vs2_m_s'): IntervalRead => {
    const p = json[key];
    if (!isObject(p)) throw new InputError(key, `${key} must be an object with best, low95 and high95, but it is ${p === undefined ? 'missing' : 'something else'}.`);
    const o = isObject(opens[key]) ? (opens[key] as Record<string, unknown>) : {};
    const openLow = o.low === true;
    const openHigh = o.high === true;
    // An open end is written as null (older files wrote the search range's value): either is read as "not bounded".
    return {
      best: num(p.best, `${key}.best`),
      low95: openLow && p.low95 === null ? NaN : num(p.low95, `${key}.low95`),
      high95: openHigh && p.high95 === null ? NaN : num(p.high95, `${key}.high95`),
      openLow,
      openHigh,
    };
  };
  const thickness = interval('thickness_m');
  const vs1 = interval('vs1_m_s');
  const vs2 = interval('vs2_m_s');
  const d = json.density_kg_m3;
  if (!isObject(d)) throw new InputError('density_kg_m3', 'density_kg_m3 must be an object with layer and halfspace, but it is missing.');
  const v = json.verdict;
  if (!isObject(v)) {
    throw new InputError('verdict', 'The estimate has no verdict (it was written by an older version); run shearfield estimate on the picks again.');
  }
  if (typeof v.level !== 'string' || !(VERDICT_LEVELS as readonly string[]).includes(v.level)) {
    throw new InputError('verdict.level', `verdict.level must be one of ${VERDICT_LEVELS.join(', ')}, but it is ${JSON.stringify(v.level)}.`);
  }
  if (typeof v.text !== 'string' || v.text.trim() === '') throw new InputError('verdict.text', 'verdict.text must be the verdict sentence, but it is empty or missing.');
  return {
    thickness,
    vs1,
    vs2,
    density1: num(d.layer, 'density_kg_m3.layer'),
    density2: num(d.halfspace, 'density_kg_m3.halfspace'),
    verdict: { level: v.level as VerdictLevel, text: v.text },
  };
}

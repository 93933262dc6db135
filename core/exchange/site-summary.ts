/**
 * One site's estimate summary, recomputed from its stored records: the
 * layer-thickness estimate (core/estimate/estimate.ts) from the site's picks and
 * settings, then the site figures over the 95 % box (core/site/site.ts). Used by
 * the office summary table and the GeoJSON export, so that both say the
 * same thing. Pure; composes the core, recomputes nothing of its own.
 */
import { CAUTION } from '../shared/caution';
import { InputError } from '../shared/errors';
import { estimateLayer, type EstimateOptions, type ParameterEstimate } from '../estimate/estimate';
import type { VerdictLevel } from '../estimate/verdict';
import type { Pick } from '../picks/picks';
import type { PickRecord, SiteRecord } from './records';
import { siteFiguresOfEstimate, type SiteFigures } from '../site/site';

export interface SiteSummary {
  siteId: string;
  name: string;
  date: string;
  /** Live (not deleted) picks used. */
  pickCount: number;
  /** 'estimated'; 'no-picks' when the site has none; 'failed' when the picks or settings were refused (see `message`). */
  status: 'estimated' | 'no-picks' | 'failed';
  /** Why there is no estimate, in plain words (status 'no-picks' or 'failed'). */
  message?: string;
  thickness?: ParameterEstimate;
  vs1?: ParameterEstimate;
  vs2?: ParameterEstimate;
  /** The verdict on the thickness (core/estimate/verdict.ts), when estimated. */
  verdict?: { level: VerdictLevel; text: string };
  /** Site figures over the 95 % box of the estimate (speeds flagged as estimated). */
  figures?: SiteFigures;
  /** Estimate and site-figure warnings, as sentences. */
  warnings: string[];
  caution: string;
}

/** The live picks of a site in table order, as the estimate takes them. */
export function sitePicks(siteId: string, picks: readonly PickRecord[]): Pick[] {
  return picks
    .filter((p) => p.siteId === siteId && !p.deleted)
    .sort((a, b) => a.order - b.order || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0))
    .map((p) => {
      const out: Pick = { id: p.id, frequency: p.frequency, velocity: p.velocity, kind: p.kind, mode: p.mode };
      if (p.period !== undefined) out.period = p.period;
      if (p.sd !== undefined) out.sd = p.sd;
      if (p.note !== undefined) out.note = p.note;
      if (p.time !== undefined) out.time = p.time;
      return out;
    });
}

/** Re-runs the estimate of one site from its picks (any list; other sites' picks are skipped) and its settings. */
export function summariseSite(site: SiteRecord, picks: readonly PickRecord[]): SiteSummary {
  const own = sitePicks(site.id, picks);
  const base = { siteId: site.id, name: site.name, date: site.date, pickCount: own.length, warnings: [] as string[], caution: CAUTION };
  if (own.length === 0) return { ...base, status: 'no-picks', message: 'The site has no picks yet.' };
  const s = site.settings ?? {};
  const options: EstimateOptions = {
    vs1: s.vs1,
    vs2: s.vs2,
    density1: s.density1,
    density2: s.density2,
    vs1Range: s.vs1Range,
    vs2Range: s.vs2Range,
    thicknessRange: s.thicknessRange,
  };
  try {
    const r = estimateLayer(own, options);
    const figures = siteFiguresOfEstimate(r);
    return {
      ...base,
      status: 'estimated',
      thickness: r.thickness,
      vs1: r.vs1,
      vs2: r.vs2,
      verdict: { level: r.verdict.level, text: r.verdict.text },
      figures,
      warnings: [...r.warnings, ...figures.warnings],
    };
  } catch (e) {
    if (e instanceof InputError) return { ...base, status: 'failed', message: e.message };
    throw e;
  }
}

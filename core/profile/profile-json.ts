/**
 * The layered estimate as plain JSON: the shape `shearfield estimate
 * --layers N` prints and the app keeps (SI units in the key names; the
 * "profile" object first, exactly as issue 13 gives it). Pure; no numbers
 * are computed here beyond the verdict's rules.
 */
import type { Interval, ProfileResult } from './profile-types';
import { profileVerdict } from './profile-verdict';

function iv(e: Interval) {
  return { best: e.best, low68: e.low68, high68: e.high68, low95: e.low95, high95: e.high95 };
}

/** The JSON the command prints for a layered result. */
export function profileJson(r: ProfileResult) {
  const b = r.band;
  const verdict = profileVerdict(r);
  return {
    profile: {
      layers: r.profile.layers.map((l) => ({ thickness_m: iv(l.thickness), vs_m_s: iv(l.vs) })),
      halfspace: { vs_m_s: iv(r.profile.halfspace.vs) },
      depth_m: Array.from(b.depth),
      vs_band_m_s: {
        best: Array.from(b.best),
        low68: Array.from(b.low68),
        high68: Array.from(b.high68),
        low95: Array.from(b.low95),
        high95: Array.from(b.high95),
      },
    },
    verdict: { level: verdict.level, text: verdict.text, reasons: verdict.reasons },
    layers: r.layers,
    waves: { love: r.waves.love, rayleigh: r.waves.rayleigh },
    alternatives: r.alternatives.map((a) => ({
      layers: a.layers,
      kind: a.kind,
      thickness_m: a.thickness,
      vs_m_s: a.vs,
      halfspace_vs_m_s: a.halfspaceVs,
      chi2: a.chi2,
      delta_chi2: a.deltaChi2,
    })),
    model_choice: {
      tried: r.choice.tried.map((c) => ({ layers: c.layers, chi2: c.chi2, parameters: c.parameters, bic: c.bic })),
      recommended_layers: r.choice.recommended,
      criterion: r.choice.criterion,
    },
    misfit: { chi2: r.chi2, dof: r.dof },
    chi2_per_dof: r.chi2PerDof,
    interval_scale: r.intervalScale,
    depth_of_investigation_m: r.depthOfInvestigation,
    band_note:
      `Below ${Number(r.depthOfInvestigation.toPrecision(3))} m (the depth of investigation) the band spans the whole search range of shear speed: ` +
      'the picks do not constrain the speeds there.',
    resolved: {
      layers: r.profile.layers.map((l) => ({ thickness_m: l.thickness.resolved, vs_m_s: l.vs.resolved })),
      halfspace: { vs_m_s: r.profile.halfspace.vs.resolved },
    },
    search_range: {
      layers: r.profile.layers.map((l) => ({ thickness_m: l.thickness.range, vs_m_s: l.vs.range })),
      halfspace: { vs_m_s: r.profile.halfspace.vs.range },
    },
    vs30_m_s: iv(r.vs30),
    vs100ft_m_s: iv(r.vs100ft),
    site_class: r.siteClasses,
    p_speed: {
      rule: r.pRule.kind,
      poisson: r.pRule.kind === 'fixed' ? null : r.pRule.poisson,
      poisson_defaulted: r.pRule.kind === 'fixed' ? false : r.pRule.defaulted,
      water_table_m: r.pRule.kind === 'water-table' ? r.pRule.depth : null,
      layers_vp_m_s: r.profile.layers.map((l) => l.vp),
      halfspace_vp_m_s: r.profile.halfspace.vp,
      used: r.waves.rayleigh > 0,
    },
    density_kg_m3: { layers: r.profile.layers.map((l) => l.density), halfspace: r.profile.halfspace.density },
    ensemble: { models: r.ensemble.size, acceptance: r.ensemble.acceptance, searched: r.ensemble.searched, seed: r.ensemble.seed },
    warnings: r.warnings,
    caution: r.caution,
    picks: r.pickFit.labels.map((label, i) => ({
      pick: label,
      predicted_m_s: r.pickFit.predicted[i],
      residual_m_s: r.pickFit.residual[i],
      residual_sd: r.pickFit.normalised[i],
      sd_m_s: r.pickFit.sd[i],
    })),
    method: r.method,
  };
}

/** The same, safe to store and send (NaN and ±∞ become null, typed arrays plain lists). */
export function profileSummary(r: ProfileResult): Record<string, unknown> {
  return JSON.parse(JSON.stringify(profileJson(r))) as Record<string, unknown>;
}

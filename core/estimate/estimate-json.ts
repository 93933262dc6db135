/**
 * The estimate as plain JSON: the shape `shearfield estimate` prints and the
 * app saves as an estimate record's summary (contract keys first, SI units
 * in the key names). Pure; no numbers are computed here.
 */
import type { EstimateResult, ParameterEstimate } from './estimate';

function parameterJson(e: ParameterEstimate) {
  return { best: e.best, low68: e.low68, high68: e.high68, low95: e.low95, high95: e.high95 };
}

/** The JSON the command prints, for a result (contract keys first). */
export function estimateJson(r: EstimateResult) {
  const site = r.site;
  return {
    thickness_m: parameterJson(r.thickness),
    vs1_m_s: parameterJson(r.vs1),
    vs2_m_s: parameterJson(r.vs2),
    alternatives: r.alternatives.map((a) => ({
      rank: a.rank,
      thickness_m: parameterJson(a.thickness),
      vs1_m_s: parameterJson(a.vs1),
      vs2_m_s: parameterJson(a.vs2),
      chi2: a.chi2,
      delta_chi2: a.deltaChi2,
    })),
    misfit: { chi2: r.chi2, dof: r.dof },
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
    vs30_m_s: site ? { best: site.vs30.best, low95: site.vs30.low, high95: site.vs30.high } : null,
    site_class: site ? site.classes : null,
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

/**
 * The same, safe to store and send: JSON has no NaN or ±∞, so those become
 * null (as JSON.stringify writes them), and typed arrays become plain lists.
 */
export function estimateSummary(r: EstimateResult): Record<string, unknown> {
  return JSON.parse(JSON.stringify(estimateJson(r))) as Record<string, unknown>;
}

/**
 * The estimate's vocabulary: default rules, options, and the shapes of a
 * parameter, a minimum, a per-pick fit and the laid-out problem. Shared by
 * the search (estimate.ts) and the diagnostics (estimate-diagnostics.ts), so
 * that the arrow between those two runs one way.
 */
// ---------------------------------------------------------------- constants

/**
 * Default layer density, kg/m³, when none is given: a typical soil value.
 * Common practice; soils are about 1600–2300 kg/m³ (from memory: Telford et
 * al., *Applied Geophysics*, 2nd ed. 1990, Table 6.1 — verify). Love-wave
 * dispersion depends on density only through μ2/μ1, and weakly.
 */
export const DEFAULT_DENSITY_LAYER = 1800;
/**
 * Default half-space density, kg/m³: stiffer soil or weathered rock.
 * Common practice (typical ranges from memory: Telford et al., 2nd ed.,
 * Table 6.1 — verify).
 */
export const DEFAULT_DENSITY_HALFSPACE = 2100;

/** Δχ² for a 68.27 % (1σ) interval on one parameter (Press et al., NR 3rd ed., §15.6). */
export const DELTA_CHI2_68 = 1;
/** Δχ² for a 95 % interval on one parameter: 1.959963984540054² (the normal 97.5 % point squared). */
export const DELTA_CHI2_95 = 3.841458820694124;

/** Smallest β2/β1 the search allows (β2 must exceed β1 for Love waves to be trapped). */
export const MIN_SPEED_RATIO = 1.001;

/**
 * Default search ranges (common practice for a search box, no published
 * source), from the picks' velocities v and wavelengths λ = v/f:
 *  - thickness: 0.02·λmin to 3·λmax;
 *  - β1: 0.5·vmin to 1.1·vmax;
 *  - β2: vmin to 4·vmax;
 * each clipped to the model's speed bounds (30–5000 m/s, shared/PHYSICS.md
 * §9) and to β2 > β1 when one speed is given.
 */
export const DEFAULT_RANGE_RULE = {
  thicknessLowPerShortestWavelength: 0.02,
  thicknessHighPerLongestWavelength: 3,
  vs1LowPerSlowestPick: 0.5,
  vs1HighPerFastestPick: 1.1,
  vs2LowPerSlowestPick: 1,
  vs2HighPerFastestPick: 4,
} as const;

// ---------------------------------------------------------------- options and result

export interface EstimateOptions {
  /** Layer shear speed β1, m/s. Given = fixed; omitted = estimated within vs1Range. */
  vs1?: number;
  /** Half-space shear speed β2, m/s. Given = fixed; omitted = estimated within vs2Range. */
  vs2?: number;
  /** Layer density ρ1, kg/m³. @default DEFAULT_DENSITY_LAYER (1800, common practice) */
  density1?: number;
  /** Half-space density ρ2, kg/m³. @default DEFAULT_DENSITY_HALFSPACE (2100, common practice) */
  density2?: number;
  /** Search range [low, high] for β1, m/s. @default [0.5·slowest pick, 1.1·fastest pick] (DEFAULT_RANGE_RULE) */
  vs1Range?: readonly [number, number];
  /** Search range [low, high] for β2, m/s. @default [slowest pick, 4·fastest pick] (DEFAULT_RANGE_RULE) */
  vs2Range?: readonly [number, number];
  /** Search range [low, high] for H, m. @default [0.02·shortest, 3·longest picked wavelength] (DEFAULT_RANGE_RULE) */
  thicknessRange?: readonly [number, number];
  /** How picks are named in messages. @default (i) => `pick ${i + 1}` */
  whereOf?: (index: number) => string;
  /** How the options are named in messages (the CLI passes its flags). @default the option names */
  fieldLabels?: Partial<Record<EstimateField, string>>;
  /** Called now and then with the fraction done (0–1). Cheap; optional. */
  onProgress?: (fraction: number) => void;
}

export type EstimateField = 'vs1' | 'vs2' | 'density1' | 'density2' | 'vs1Range' | 'vs2Range' | 'thicknessRange' | 'picks';

/** One parameter's estimate. A fixed parameter has all bounds equal to best. */
export interface ParameterEstimate {
  best: number;
  low68: number;
  high68: number;
  low95: number;
  high95: number;
  /** False when the value was given (fixed). */
  free: boolean;
  /** The 95 % interval runs into the low end of the search range: not constrained from below. */
  openLow: boolean;
  /** The 95 % interval runs into the high end of the search range: not constrained from above. */
  openHigh: boolean;
}

/** A separate minimum of χ², with intervals from its own basin. */
export interface EstimateMinimum {
  /** 1 = best fit. */
  rank: number;
  thickness: ParameterEstimate;
  vs1: ParameterEstimate;
  vs2: ParameterEstimate;
  chi2: number;
  /** χ² − χ² of the best minimum. */
  deltaChi2: number;
}

/**
 * χ² on the search grid, for plotting: row-major, `rows` × `cols`, entry
 * [row·cols + col] is χ² at thickness x[col] and speed y[row], minimised
 * over the parameter not shown. Computed from the dimensionless tables
 * (linear interpolation, ~1e-3 relative), NaN where the search box has no
 * model (e.g. β2 ≤ β1).
 */
export interface MisfitMap {
  xName: 'thickness_m';
  /** The speed on the rows: β1 when it is free, else β2 when free, else β1 (one row). */
  yName: 'vs1_m_s' | 'vs2_m_s';
  /** Thickness values, m (log-spaced), length cols. */
  x: Float64Array;
  /** Speed values, m/s, length rows. */
  y: Float64Array;
  chi2: Float64Array;
  rows: number;
  cols: number;
}

/** Per-pick fit at the best model, columnar (pick order). */
export interface PickFit {
  /** How each pick is named in messages. */
  labels: string[];
  predicted: Float64Array;
  /** Observed − predicted, m/s. */
  residual: Float64Array;
  /** residual / sd. */
  normalised: Float64Array;
  /** The sd used, m/s. */
  sd: Float64Array;
}

// ---------------------------------------------------------------- the problem

/** Columnar picks and the parameter layout, resolved once. */
export interface EstimateProblem {
  n: number;
  f: Float64Array;
  lnF: Float64Array;
  v: Float64Array;
  sd: Float64Array;
  mode: Int32Array;
  isPhase: Uint8Array;
  labels: string[];
  rho1: number;
  rho2: number;
  /** Fixed speeds (NaN when free). */
  fixedVs1: number;
  fixedVs2: number;
  /** Index of each parameter in the free vector (−1 when fixed); H is always free (index 0). */
  iVs1: number;
  iVs2: number;
  k: number;
  /** Search box in log parameters. */
  lower: Float64Array;
  upper: Float64Array;
  ranges: { thickness: [number, number]; vs1: [number, number]; vs2: [number, number] };
  /** Last phase velocity found for each pick: the next solve's starting guess (working state). */
  guess: Float64Array;
  /** Working space, length n. */
  scratch: Float64Array;
}

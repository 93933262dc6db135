/**
 * The layered estimate's vocabulary: limits, default rules and sizes,
 * options, and the shapes of its result.
 */
import type { PickWave } from '../picks/picks';
import type { PSpeedRule } from './p-speed';

/** Layers above the half-space the estimate handles. */
export const MAX_PROFILE_LAYERS = 4;

/**
 * Default search box for the layered estimate (common practice for a search
 * box, no published source), from the picks' velocities v and wavelengths
 * λ = v/f:
 *  - each layer's thickness: 0.02·λmin to 1·λmax;
 *  - each layer's shear speed: 0.5·vmin to 1.3·vmax (Rayleigh waves travel
 *    at about 0.87–0.96 of the shear speed, so the box reaches above the
 *    fastest pick);
 *  - the half-space's shear speed: vmin to 4·vmax;
 * clipped to the model's speed bounds (30–5000 m/s).
 */
export const PROFILE_RANGE_RULE = {
  thicknessLowPerShortestWavelength: 0.02,
  thicknessHighPerLongestWavelength: 1,
  vsLowPerSlowestPick: 0.5,
  vsHighPerFastestPick: 1.3,
  halfspaceLowPerSlowestPick: 1,
  halfspaceHighPerFastestPick: 4,
} as const;

/**
 * Depth of investigation: half the longest picked wavelength. Common
 * practice for surface-wave surveys (rules of a third to a half of λmax are
 * in use; from memory, verify); below it the picks say little.
 */
export const DEPTH_OF_INVESTIGATION_PER_LONGEST_WAVELENGTH = 0.5;

/**
 * Model choice: the Bayesian information criterion BIC = χ²_min + k·ln n
 * (Schwarz 1978, Ann. Stat. 6:461; with known pick errors −2 ln L = χ² +
 * const), k free parameters, n picks. The smallest N whose BIC is within 2
 * of the least BIC is recommended: a difference below 2 is "not worth more
 * than a bare mention" (Kass & Raftery 1995, J. Am. Stat. Assoc. 90:773).
 */
export const BIC_NOT_WORTH_MENTIONING = 2;

/**
 * The share of its search range (in log units) that a parameter's 95 %
 * interval may span before the output calls it not resolved (common
 * practice for this tool: more than half the box means the picks barely
 * narrow it).
 */
export const UNRESOLVED_SHARE = 0.5;

/** Search and appraisal sizes (see neighbourhood.ts and appraisal.ts). */
export interface ProfileEffort {
  /** Neighbourhood algorithm: uniform samples to start with. */
  initial: number;
  /** Neighbourhood algorithm: new samples per round. */
  perIteration: number;
  /** Neighbourhood algorithm: cells resampled per round. */
  cells: number;
  /** Neighbourhood algorithm: rounds. */
  iterations: number;
  /** Appraisal chain: kept steps. */
  chainSteps: number;
  /** Appraisal chain: burn-in steps. */
  burnIn: number;
}

/**
 * Default effort for N layers (k = 2N + 1 parameters): chosen so that three
 * layers from 40 picks take about a second in Node on a 2-core machine
 * (npm run bench), with the coverage tests as the check that the ensemble
 * is large enough.
 */
export function defaultEffort(layers: number): ProfileEffort {
  const k = 2 * layers + 1;
  return { initial: 20 * k, perIteration: 10 * k, cells: 5, iterations: 10, chainSteps: 1500, burnIn: 300 };
}

/** A cheaper effort for the other layer counts tried in model choice (search and refinement only). */
export function choiceEffort(layers: number): ProfileEffort {
  const e = defaultEffort(layers);
  return { ...e, iterations: Math.ceil(e.iterations / 2), chainSteps: 0, burnIn: 0 };
}

export interface ProfileOptions {
  /** Layers above the half-space, 1–4; 'auto' tries 1–4 and keeps the one model choice recommends. @default 'auto' */
  layers?: number | 'auto';
  /** Poisson's ratio for the P speeds (Rayleigh picks). @default DEFAULT_POISSON (0.3, common practice, warned about) */
  poisson?: number;
  /** Water-table depth, m: below it P speed ≥ 1500 m/s (common practice). */
  waterTableDepth?: number;
  /** Fixed P speeds, m/s, per layer and for the half-space (e.g. from a model file); excludes poisson and waterTableDepth. */
  fixedVp?: { layers: readonly number[]; halfspace: number };
  /** Densities, kg/m³, per layer and for the half-space. @default 1800 per layer, 2100 half-space (common practice) */
  densities?: { layers: readonly number[]; halfspace: number };
  /** Seed of the search and appraisal. @default 1 */
  seed?: number;
  /** Search and appraisal sizes. @default defaultEffort(layers) */
  effort?: Partial<ProfileEffort>;
  /** Try fewer layers too and report the misfit of each (model choice). @default true */
  compareLayers?: boolean;
  /** How picks are named in messages. @default (i) => `pick ${i + 1}` */
  whereOf?: (index: number) => string;
  /** How options are named in messages (the CLI passes its flags). */
  fieldLabels?: Partial<Record<ProfileField, string>>;
  /** Called now and then with the fraction done (0–1). */
  onProgress?: (fraction: number) => void;
}

export type ProfileField = 'layers' | 'poisson' | 'waterTableDepth' | 'fixedVp' | 'densities' | 'seed' | 'picks';

/** One parameter over the ensemble: the best fit and the central 68 % and 95 % intervals. */
export interface Interval {
  best: number;
  low68: number;
  high68: number;
  low95: number;
  high95: number;
}

/** One parameter with its search range and whether the picks resolve it. */
export interface ParameterInterval extends Interval {
  /** The search range, [low, high]. */
  range: [number, number];
  /** False when the 95 % interval spans more than UNRESOLVED_SHARE of the range (in log units). */
  resolved: boolean;
}

export interface ProfileLayer {
  thickness: ParameterInterval;
  vs: ParameterInterval;
  /** P speed at the best fit, m/s (from the rule; NaN-free). */
  vp: number;
  density: number;
}

/** Shear speed against depth over the ensemble. */
export interface ProfileBand {
  /** Depths, m, from 0 down. */
  depth: Float64Array;
  best: Float64Array;
  low68: Float64Array;
  high68: Float64Array;
  low95: Float64Array;
  high95: Float64Array;
  /** Index of the first depth below the depth of investigation (depth.length when none). */
  belowFrom: number;
}

/** The misfit of each layer count tried. */
export interface LayerChoice {
  layers: number;
  chi2: number;
  /** Free parameters, 2N + 1. */
  parameters: number;
  bic: number;
}

/** Another layering that fits: a separate minimum, or the best fit with another number of layers. */
export interface ProfileAlternative {
  layers: number;
  thickness: number[];
  vs: number[];
  halfspaceVs: number;
  chi2: number;
  /** χ² − χ² of the best fit (negative when it has more layers and fits better). */
  deltaChi2: number;
  /** 'minimum' (same N, another basin) or 'layer-count' (best fit with another N). */
  kind: 'minimum' | 'layer-count';
}

export interface ProfileResult {
  layers: number;
  /** Picks of each wave used. */
  waves: Record<PickWave, number>;
  profile: { layers: ProfileLayer[]; halfspace: { vs: ParameterInterval; vp: number; density: number } };
  band: ProfileBand;
  depthOfInvestigation: number;
  /** Vs30 over the ensemble (EN 1998-1:2004 eq. 3.1), m/s. */
  vs30: Interval;
  /** v̄s over 100 ft over the ensemble (ASCE/SEI 7-16 §20.4), m/s. */
  vs100ft: Interval;
  /** Classes over the 95 % range of the ensemble, and each class's share of the ensemble. */
  siteClasses: Record<'asce7_16' | 'asce7_22' | 'en1998_1', { classes: string[]; share: Record<string, number> }>;
  chi2: number;
  dof: number;
  chi2PerDof: number;
  intervalScale: number;
  choice: { tried: LayerChoice[]; recommended: number; criterion: string };
  alternatives: ProfileAlternative[];
  pickFit: { labels: string[]; predicted: Float64Array; residual: Float64Array; normalised: Float64Array; sd: Float64Array };
  pRule: PSpeedRule;
  ensemble: { size: number; acceptance: number; searched: number; seed: number };
  warnings: string[];
  method: string;
  caution: string;
}

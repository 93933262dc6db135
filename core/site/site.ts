/**
 * Site figures from a layered model, or from one layer over a half-space
 * with uncertainty ranges: the time-averaged shear speed over the top 30 m
 * (Vs30) and 100 ft, site classes in three code tables, the fundamental site
 * frequency and period, and the layer/base impedance ratio.
 *
 * Sources:
 * - Vs30 = 30 / Σ(h_i / v_i) over the top 30 m: EN 1998-1:2004 §3.1.2,
 *   eq. (3.1).
 * - v̄s over the top 100 ft = 30.48 m, the same travel-time average:
 *   ASCE/SEI 7-16 §20.4.1 (eq. 20.4-1).
 * - Site classes: ASCE/SEI 7-16 Table 20.3-1; ASCE/SEI 7-22 Table 20.2-1;
 *   EN 1998-1:2004 Table 3.1 (ground types, with type E recognised).
 * - f0 = β1/(4H), T0 = 4H/β1 for a uniform layer over a stiffer base, and the
 *   impedance ratio ρ1β1/(ρ2β2): Kramer, *Geotechnical Earthquake
 *   Engineering*, 1996, ch. 7 (one-dimensional ground response).
 * - 1 ft = 0.3048 m exactly (international yard and pound agreement, 1959).
 *
 * Where a table leaves the side of a shared boundary open, the choice is
 * written beside the table below and marked "[memory, verify]".
 *
 * Units: SI (m, m/s, kg/m³, Hz, s). Bad input throws InputError from one
 * validation step (model.ts rules). The class tables decide from shear
 * speeds only; what they cannot decide (ASCE class F, EN types S1 and S2)
 * goes into plain-words warnings. Every result carries CAUTION.
 */
import { CAUTION } from '../shared/caution';
import { InputError, describeValue } from '../shared/errors';
import { checkDensity, checkShearSpeed, checkThickness, MODEL_BOUNDS, validateModel, type LayeredModel } from '../dispersion/model';

/** One international foot in metres, exact by definition (1959). */
export const FOOT_M = 0.3048;
/** EN 1998-1:2004 eq. (3.1): the top 30 m. */
export const VS30_DEPTH_M = 30;
/** ASCE/SEI 7-16 §20.4: the top 100 ft = 30.48 m. */
export const VS100FT_DEPTH_M = 100 * FOOT_M;

export type SiteClassTableId = 'asce7_16' | 'asce7_22' | 'en1998_1';

/** One class of a table: a band of average shear speed in m/s. */
export interface SiteClassBand {
  code: string;
  /** Lower end, m/s (0 for the slowest class). */
  lower: number;
  lowerInclusive: boolean;
  /** Upper end, m/s (Infinity for the fastest class). */
  upper: number;
  upperInclusive: boolean;
}

export interface SiteClassTable {
  id: SiteClassTableId;
  /** The published table, for citations in outputs. */
  source: string;
  /**
   * Bands from slowest to fastest; they tile [0, ∞) without gaps. Where the
   * published reproductions leave the side of a shared end open or disagree,
   * both neighbours include it (a one-point overlap: that value straddles).
   */
  bands: readonly SiteClassBand[];
}

const ft = (v: number): number => v * FOOT_M;

/**
 * ASCE/SEI 7-16 Table 20.3-1 (v̄s in ft/s, converted exactly), as
 * reproduced in US Army Corps of Engineers risk-management documentation
 * (the primary text was not at hand): A > 5000; B 2500 < v̄s ≤ 5000;
 * C 1200 < v̄s ≤ 2500; D 600 ≤ v̄s ≤ 1200; E < 600; F by site-specific
 * evaluation. An older reproduction gives D as 600 ≤ v̄s < 1200, so the
 * side of 1200 ft/s is disputed: both D and C include it, and a speed of
 * exactly 1200 ft/s straddles (siteClassesInRange lists D and C).
 */
export const ASCE7_16_TABLE: SiteClassTable = {
  id: 'asce7_16',
  source: 'ASCE/SEI 7-16 Table 20.3-1',
  bands: [
    { code: 'E', lower: 0, lowerInclusive: true, upper: ft(600), upperInclusive: false },
    { code: 'D', lower: ft(600), lowerInclusive: true, upper: ft(1200), upperInclusive: true },
    // Disputed side (see above): C includes 1200 ft/s too, so the value straddles D and C.
    { code: 'C', lower: ft(1200), lowerInclusive: true, upper: ft(2500), upperInclusive: true },
    { code: 'B', lower: ft(2500), lowerInclusive: false, upper: ft(5000), upperInclusive: true },
    { code: 'A', lower: ft(5000), lowerInclusive: false, upper: Infinity, upperInclusive: false },
  ],
};

/**
 * ASCE/SEI 7-22 Table 20.2-1 (v̄s in ft/s, converted exactly; as reproduced
 * in the same US Army Corps of Engineers documentation):
 *   A > 5000; B > 3000 to 5000; BC > 2100 to 3000; C > 1450 to 2100;
 *   CD > 1000 to 1450; D > 700 to 1000; DE > 500 to 700; E ≤ 500;
 *   F site-specific. The "> x to y" form makes each band open below and
 *   closed above (shared/PHYSICS.md §7).
 */
export const ASCE7_22_TABLE: SiteClassTable = {
  id: 'asce7_22',
  source: 'ASCE/SEI 7-22 Table 20.2-1',
  bands: [
    { code: 'E', lower: 0, lowerInclusive: true, upper: ft(500), upperInclusive: true },
    { code: 'DE', lower: ft(500), lowerInclusive: false, upper: ft(700), upperInclusive: true },
    { code: 'D', lower: ft(700), lowerInclusive: false, upper: ft(1000), upperInclusive: true },
    { code: 'CD', lower: ft(1000), lowerInclusive: false, upper: ft(1450), upperInclusive: true },
    { code: 'C', lower: ft(1450), lowerInclusive: false, upper: ft(2100), upperInclusive: true },
    { code: 'BC', lower: ft(2100), lowerInclusive: false, upper: ft(3000), upperInclusive: true },
    { code: 'B', lower: ft(3000), lowerInclusive: false, upper: ft(5000), upperInclusive: true },
    { code: 'A', lower: ft(5000), lowerInclusive: false, upper: Infinity, upperInclusive: false },
  ],
};

/**
 * EN 1998-1:2004 Table 3.1 (vs,30 in m/s, as reproduced; the primary text
 * was not at hand): A > 800; B 360–800; C 180–360; D < 180; E see below;
 * S1, S2 special. The reproductions do not say which class 360 and 180
 * belong to: both neighbours include them, so a value exactly there
 * straddles (C and B at 360, D and C at 180). A > 800 makes 800 B.
 * Type E's "vs of type C or D" is taken as vs < 360 (a layer at exactly
 * 360 may be B).
 */
export const EN1998_1_TABLE: SiteClassTable = {
  id: 'en1998_1',
  source: 'EN 1998-1:2004 Table 3.1',
  bands: [
    // 180 and 360 are in both neighbours: the reproductions leave their side open, so they straddle.
    { code: 'D', lower: 0, lowerInclusive: true, upper: 180, upperInclusive: true },
    { code: 'C', lower: 180, lowerInclusive: true, upper: 360, upperInclusive: true },
    { code: 'B', lower: 360, lowerInclusive: true, upper: 800, upperInclusive: true },
    { code: 'A', lower: 800, lowerInclusive: false, upper: Infinity, upperInclusive: false },
  ],
};

export const SITE_CLASS_TABLES: Readonly<Record<SiteClassTableId, SiteClassTable>> = {
  asce7_16: ASCE7_16_TABLE,
  asce7_22: ASCE7_22_TABLE,
  en1998_1: EN1998_1_TABLE,
};

/**
 * EN 1998-1:2004 Table 3.1, ground type E: "a soil profile consisting of a
 * surface alluvium layer with vs values of type C or D and thickness varying
 * between about 5 m and 20 m, underlain by stiffer material with
 * vs > 800 m/s". We take 5 ≤ H ≤ 20 m inclusive and warn within 1 m of
 * either end, since the standard says "about".
 */
export const EN_TYPE_E = {
  minThickness: 5,
  maxThickness: 20,
  /** The layer must be type C or D: vs < 360 m/s (EN1998_1_TABLE). */
  layerVsBelow: 360,
  /** The base must have vs > 800 m/s. */
  baseVsAbove: 800,
  /** Warn when the thickness is this close (m) to 5 or 20 m. */
  edgeWarning: 1,
} as const;

/**
 * The factor of the ±30 % speed sensitivity check (SiteOptions.estimatedVelocities):
 * a user's choice, offered because estimated speeds are uncertain. It was
 * not found in any reproduction of ASCE/SEI 7-22, so no standard is named
 * for it anywhere in the output.
 */
export const ASCE7_22_ESTIMATE_FACTOR = 1.3;

export interface SiteOptions {
  /**
   * Turn on the ±30 % speed sensitivity check (the user's choice, no
   * standard named): widen the ASCE/SEI 7-22 range to [low / 1.3, high × 1.3]
   * before classing.
   * @default false
   */
  estimatedVelocities?: boolean;
}

/** A figure with its range; for a single model low = best = high. */
export interface FigureRange {
  best: number;
  low: number;
  high: number;
  /**
   * The data do not bound the figure on this side: the end comes from an
   * open interval end (the search range, extended to what the model allows),
   * so it is a limit of the model, not of the data. Read it as "at least" /
   * "at most" the other end. Absent or false: an ordinary 95 % end.
   */
  openLow?: boolean;
  openHigh?: boolean;
}

export interface SiteFigures {
  /** Vs30, EN 1998-1:2004 eq. (3.1), m/s. */
  vs30: FigureRange;
  /** v̄s over the top 100 ft (30.48 m), ASCE/SEI 7-16 §20.4, m/s. */
  vs100ft: FigureRange;
  /** Every class each table allows over the range, slowest first. F, S1 and S2 never appear (see warnings). */
  classes: Record<SiteClassTableId, string[]>;
  /** Fundamental site frequency, Hz (exact for one layer, approximate for several: see warnings). */
  f0_hz: FigureRange;
  /** Fundamental site period, s. */
  t0_s: FigureRange;
  /** ρ1β1/(ρ2β2) of the soft column over the half-space (< 1 when the base is stiffer). */
  impedance_ratio: FigureRange;
  /** Plain-words notes: what the tool cannot decide, approximations, straddled boundaries. */
  warnings: string[];
  caution: string;
}

/**
 * Time-averaged shear speed over the top `depth` metres: depth / Σ(h_i/v_i),
 * the layers taken in order and the half-space continuing below the last
 * layer (EN 1998-1:2004 eq. 3.1 with depth 30; ASCE/SEI 7-16 §20.4 with
 * 30.48). The model is validated first.
 */
export function vsAverage(model: LayeredModel, depth: number): number {
  const m = validateModel(model);
  checkThickness(depth, 'depth');
  return vsAverageUnchecked(m, depth);
}

function vsAverageUnchecked(m: LayeredModel, depth: number): number {
  let remaining = depth;
  let time = 0;
  for (const layer of m.layers) {
    if (remaining <= 0) break;
    const h = Math.min(layer.thickness, remaining);
    time += h / layer.vs;
    remaining -= h;
  }
  if (remaining > 0) time += remaining / m.halfspace.vs;
  return depth / time;
}

/** Vs30 by EN 1998-1:2004 eq. (3.1); `depth` defaults to 30 m. */
export function vs30(model: LayeredModel, depth: number = VS30_DEPTH_M): number {
  return vsAverage(model, depth);
}

/** v̄s over the top 100 ft = 30.48 m (ASCE/SEI 7-16 §20.4). */
export function vs100ft(model: LayeredModel): number {
  return vsAverage(model, VS100FT_DEPTH_M);
}

function bandContains(b: SiteClassBand, v: number): boolean {
  const aboveLower = v > b.lower || (v === b.lower && b.lowerInclusive);
  const belowUpper = v < b.upper || (v === b.upper && b.upperInclusive);
  return aboveLower && belowUpper;
}

function bandMeets(b: SiteClassBand, lo: number, hi: number): boolean {
  const aboveLower = hi > b.lower || (hi === b.lower && b.lowerInclusive);
  const belowUpper = lo < b.upper || (lo === b.upper && b.upperInclusive);
  return aboveLower && belowUpper;
}

function checkRange(range: readonly [number, number], field: string, allowInfiniteHigh = false): [number, number] {
  if (!Array.isArray(range) || range.length !== 2) {
    throw new InputError(field, `${field} must be a pair [low, high].`);
  }
  const [lo, hi] = range;
  for (const [v, end] of [
    [lo, 'low'],
    [hi, 'high'],
  ] as const) {
    if (typeof v !== 'number' || Number.isNaN(v)) {
      throw new InputError(field, `${field} ${end} end must be a number, but it is ${describeValue(v)}.`);
    }
    if (v < 0 || (v === 0 && end === 'high')) {
      throw new InputError(field, `${field} ${end} end must be 0 or more (the high end above 0), but it is ${v}.`);
    }
    if (!Number.isFinite(v) && !(allowInfiniteHigh && end === 'high')) {
      throw new InputError(field, `${field} ${end} end must be finite, but it is ${v}.`);
    }
  }
  if (lo > hi) throw new InputError(field, `${field} is [${lo}, ${hi}]: the low end is above the high end.`);
  return [lo, hi];
}

/**
 * The class of one average speed (m/s) in a table (F, S1, S2 are never
 * returned). Exactly on a disputed boundary this gives the slower class;
 * siteClassesInRange([v, v]) lists both.
 */
export function siteClassOf(table: SiteClassTableId, vs: number): string {
  if (typeof vs !== 'number' || !Number.isFinite(vs) || vs <= 0) {
    throw new InputError('vs', `vs must be a finite speed above 0 m/s, but it is ${describeValue(vs)}.`);
  }
  const v = vs;
  const band = SITE_CLASS_TABLES[table].bands.find((b) => bandContains(b, v));
  // The bands tile [0, ∞), so a finite v ≥ 0 always has one.
  return band!.code;
}

/**
 * Every class of a table whose band meets the closed speed range
 * [low, high] (m/s), slowest first: never just one when the range crosses
 * a boundary.
 */
export function siteClassesInRange(table: SiteClassTableId, range: readonly [number, number]): string[] {
  const [lo, hi] = checkRange(range, 'vs range', true);
  return SITE_CLASS_TABLES[table].bands.filter((b) => bandMeets(b, lo, hi)).map((b) => b.code);
}

/** Ranges of one layer over a half-space, for the EN type E test. */
export interface TypeERanges {
  /** Layer thickness range, m. */
  thickness: readonly [number, number];
  /** Layer shear-speed range, m/s. */
  vs1: readonly [number, number];
  /** Half-space (base) shear-speed range, m/s. */
  vs2: readonly [number, number];
}

/**
 * EN 1998-1:2004 Table 3.1 type E for one layer over a half-space, over
 * ranges: 'certain' when every point of the box meets the definition,
 * 'possible' when some do, 'no' when none do.
 */
export function enTypeE(r: TypeERanges): 'certain' | 'possible' | 'no' {
  const [h0, h1] = checkRange(r.thickness, 'thickness range', true);
  const [a0, a1] = checkRange(r.vs1, 'vs1 range');
  const [b0, b1] = checkRange(r.vs2, 'vs2 range');
  const E = EN_TYPE_E;
  const some = h1 >= E.minThickness && h0 <= E.maxThickness && a0 < E.layerVsBelow && b1 > E.baseVsAbove;
  if (!some) return 'no';
  const all = h0 >= E.minThickness && h1 <= E.maxThickness && a1 < E.layerVsBelow && b0 > E.baseVsAbove;
  return all ? 'certain' : 'possible';
}

/**
 * EN 1998-1:2004 Table 3.1 type A: "rock or other rock-like geological
 * formation, including at most 5 m of weaker material at the surface"
 * (as reproduced). Applied here: when everything below a surface column of
 * at most 5 m is faster than 800 m/s, the ground is type A whatever Vs30
 * says (4 m of 150 m/s over 1000 m/s has Vs30 = 568 m/s, B by speed, but is
 * A by this description). At exactly 5 m type E (5–20 m) holds too: both
 * are listed.
 */
export const EN_TYPE_A_MAX_WEAK_M = 5;

/**
 * The soft column of a layered model for the EN type E test: the layers
 * above the first material faster than 800 m/s. Type E needs every one of
 * them slower than 360 m/s, their total 5–20 m, and everything below
 * faster than 800 m/s.
 */
function typeEOfModel(m: LayeredModel): { isE: boolean; depth: number; baseFast: boolean } {
  const E = EN_TYPE_E;
  let k = 0;
  let depth = 0;
  while (k < m.layers.length && !(m.layers[k].vs > E.baseVsAbove)) {
    depth += m.layers[k].thickness;
    k++;
  }
  const top = m.layers.slice(0, k);
  const below = [...m.layers.slice(k).map((l) => l.vs), m.halfspace.vs];
  const baseFast = below.every((v) => v > E.baseVsAbove);
  const isE =
    top.length > 0 &&
    top.every((l) => l.vs < E.layerVsBelow) &&
    baseFast &&
    depth >= E.minThickness &&
    depth <= E.maxThickness;
  return { isE, depth, baseFast };
}

const fmt = (x: number): string => (Number.isFinite(x) ? String(Math.round(x * 10) / 10) : 'unbounded');

function range(best: number, values: readonly number[]): FigureRange {
  return { best, low: Math.min(best, ...values), high: Math.max(best, ...values) };
}

/**
 * The range over corner values, each with a flag saying whether the corner
 * uses an open end: an extreme is open when every corner reaching it does
 * (a closed corner reaching the same value makes it a true 95 % end).
 */
function openRange(best: number, values: readonly number[], open: readonly boolean[]): FigureRange {
  const r = range(best, values);
  const openAt = (x: number) => {
    let any = false;
    for (let i = 0; i < values.length; i++) {
      if (values[i] === x) {
        if (!open[i]) return false;
        any = true;
      }
    }
    return any;
  };
  return { ...r, openLow: r.low !== best && openAt(r.low), openHigh: r.high !== best && openAt(r.high) };
}

/** Warnings that every site result carries: what shear speeds alone cannot decide. */
function standingWarnings(): string[] {
  // The soft-clay rule for class E is from memory of ASCE/SEI 7-16 Table 20.3-1 (verify); the text a crew reads leaves the provenance out.
  return [
    'ASCE/SEI 7 site class F (soils that need a site-specific evaluation, such as liquefiable or sensitive soils, peat, ' +
      'or very thick soft or highly plastic clay) cannot be decided from shear speeds alone; check the soil descriptions.',
    'ASCE/SEI 7-16 Table 20.3-1 also makes a site class E when more than 10 ft (3 m) of soft clay is present, whatever ' +
      'the average speed; that needs soil tests, not shear speeds.',
    'EN 1998-1 ground types S1 (soft clays or silts with high plasticity and water content, at least 10 m thick) and ' +
      'S2 (liquefiable soils, sensitive clays) cannot be decided from shear speeds alone.',
  ];
}

function straddleWarnings(classes: Record<SiteClassTableId, string[]>, ranges: Record<SiteClassTableId, FigureRange>): string[] {
  const out: string[] = [];
  for (const id of ['asce7_16', 'asce7_22', 'en1998_1'] as const) {
    if (classes[id].length > 1 && ranges[id].low === ranges[id].high) {
      out.push(
        `The average shear speed ${fmt(ranges[id].low)} m/s lies exactly on a boundary of ${SITE_CLASS_TABLES[id].source} ` +
          `whose side the published reproductions leave open or dispute: classes ${classes[id].join(', ')} are both possible.`,
      );
    } else if (classes[id].length > 1) {
      const r = ranges[id];
      out.push(
        `The average shear speed range ${fmt(r.low)}–${fmt(r.high)} m/s crosses a class boundary of ` +
          `${SITE_CLASS_TABLES[id].source}: classes ${classes[id].join(', ')} are all possible.`,
      );
    }
  }
  return out;
}

function edgeWarning(thickness: readonly [number, number]): string[] {
  const E = EN_TYPE_E;
  const near = (x: number) =>
    Math.abs(x - E.minThickness) <= E.edgeWarning || Math.abs(x - E.maxThickness) <= E.edgeWarning;
  if (near(thickness[0]) || near(thickness[1])) {
    return [
      'EN 1998-1 type E speaks of "about 5 m and 20 m" of soft soil; this layer is near one of those ends, so the ' +
        'type E decision is borderline.',
    ];
  }
  return [];
}

/**
 * Site figures of a layered model: Vs30 (EN 1998-1:2004 eq. 3.1), v̄s over
 * 100 ft (ASCE/SEI 7-16 §20.4), classes in the three tables, f0 and T0
 * (Kramer 1996, ch. 7; for several layers the labelled approximation
 * f0 ≈ 1/(4 Σ h_i/β_i) over the layers above the half-space), and the
 * impedance ratio. Validates the model (InputError naming the field).
 */
export function siteFigures(model: LayeredModel, options: SiteOptions = {}): SiteFigures {
  const m = validateModel(model);
  const v30 = vsAverageUnchecked(m, VS30_DEPTH_M);
  const v100 = vsAverageUnchecked(m, VS100FT_DEPTH_M);
  const warnings: string[] = [];

  const column = m.layers.reduce((s, l) => s + l.thickness, 0);
  const time = m.layers.reduce((s, l) => s + l.thickness / l.vs, 0);
  const columnDensity = m.layers.reduce((s, l) => s + l.thickness * l.density, 0) / column;
  const vsColumn = column / time;
  const f0 = 1 / (4 * time);
  const impedance = (columnDensity * vsColumn) / (m.halfspace.density * m.halfspace.vs);
  if (m.layers.length > 1) {
    warnings.push(
      `f0 and T0 use the approximation f0 ≈ 1/(4 Σ h_i/β_i) over the ${m.layers.length} layers above the half-space ` +
        '(exact only for one uniform layer, Kramer 1996, ch. 7); the true resonance of a layered column can differ.',
      'The impedance ratio uses the travel-time average speed and thickness-weighted density of the layers above the ' +
        'half-space: an approximation for several layers.',
    );
  }
  if (column < VS100FT_DEPTH_M) {
    warnings.push(
      `The layers end at ${fmt(column)} m; the half-space speed (${m.halfspace.vs} m/s) is taken to continue down to ` +
        (column < VS30_DEPTH_M ? `${VS30_DEPTH_M} m and ${VS100FT_DEPTH_M} m for the averages.` : `${VS100FT_DEPTH_M} m for the 100 ft average.`),
    );
  }
  if (!(m.halfspace.vs > Math.max(...m.layers.map((l) => l.vs)))) {
    warnings.push(
      'The half-space is not faster than every layer, so f0 = β/(4H) of a soft column over a stiffer base does not strictly apply.',
    );
  }

  const speedClasses = siteClassesForRanges({ vs30: [v30, v30], vs100ft: [v100, v100] }, options);
  const classes = speedClasses.classes;
  warnings.push(...speedClasses.warnings);
  const e = typeEOfModel(m);
  const typeA = e.depth > 0 && e.depth <= EN_TYPE_A_MAX_WEAK_M && e.baseFast;
  if (typeA) {
    warnings.push(
      `EN 1998-1 Table 3.1 ground type A includes at most ${EN_TYPE_A_MAX_WEAK_M} m of weaker material at the surface: ` +
        `${fmt(e.depth)} m of it lies over material faster than 800 m/s. By Vs30 alone it would be type ${classes.en1998_1.join(', ')}.`,
    );
  }
  if (e.isE) {
    warnings.push(
      `EN 1998-1 Table 3.1 ground type E: ${fmt(e.depth)} m of type C or D soil (vs < 360 m/s) over material faster ` +
        `than 800 m/s. By Vs30 alone it would be type ${classes.en1998_1.join(', ')}.`,
      ...edgeWarning([e.depth, e.depth]),
    );
    classes.en1998_1 = typeA ? ['A', 'E'] : ['E'];
  } else if (typeA) {
    classes.en1998_1 = ['A'];
  }
  if (!e.isE && m.layers.length === 1) {
    const l = m.layers[0];
    if (l.vs < EN_TYPE_E.layerVsBelow && m.halfspace.vs > EN_TYPE_E.baseVsAbove) {
      warnings.push(...edgeWarning([l.thickness, l.thickness]));
    }
  }
  warnings.push(...standingWarnings());
  return {
    vs30: range(v30, []),
    vs100ft: range(v100, []),
    classes,
    f0_hz: range(f0, []),
    t0_s: range(1 / f0, []),
    impedance_ratio: range(impedance, []),
    warnings,
    caution: CAUTION,
  };
}

function estimatedWarning(): string {
  // A ×1.3 rule was not found in any reproduction of ASCE/SEI 7-22 (shared/PHYSICS.md §7): this is the user's own
  // ±30 % sensitivity check, and the text names no standard for it.
  return (
    `Speed sensitivity check (±30 %, chosen by the user, not a rule of any standard): the ASCE/SEI 7-22 classes also cover the average speed divided and ` +
    `multiplied by ${ASCE7_22_ESTIMATE_FACTOR}.`
  );
}

/** Speed ranges to class: Vs30 for EN 1998-1, v̄s100ft for ASCE/SEI 7, and optionally the layer ranges for type E. */
export interface ClassRanges {
  /** Vs30 range [low, high], m/s (EN 1998-1:2004 eq. 3.1). */
  vs30: readonly [number, number];
  /** v̄s over 100 ft range [low, high], m/s (ASCE/SEI 7-16 §20.4). */
  vs100ft: readonly [number, number];
  /** One layer over a half-space: thickness and speed ranges, for EN type E. Omitted: type E not considered. */
  typeE?: TypeERanges;
}

/**
 * Every class each table allows over speed ranges, never just one when a
 * range crosses a boundary (ASCE/SEI 7-16 Table 20.3-1 and ASCE/SEI 7-22
 * Table 20.2-1 from v̄s100ft, EN 1998-1:2004 Table 3.1 from Vs30). With
 * layer ranges, EN type E is the only EN type when certain over the box and
 * is listed beside the Vs30 types when only possible. Returns the classes
 * (slowest first, E last) and plain-words warnings on straddled boundaries
 * and type E; the standing warnings (F, S1, S2) come with siteFigures.
 */
export function siteClassesForRanges(
  r: ClassRanges,
  options: SiteOptions = {},
): { classes: Record<SiteClassTableId, string[]>; warnings: string[] } {
  if (!r || typeof r !== 'object') throw new InputError('ranges', 'ranges must be an object.');
  const [a0, a1] = checkRange(r.vs30, 'vs30 range', true);
  const [c0, c1] = checkRange(r.vs100ft, 'vs100ft range', true);
  const v30: FigureRange = { best: a0, low: a0, high: a1 };
  const v100: FigureRange = { best: c0, low: c0, high: c1 };
  const warnings: string[] = [];
  const r22 = options.estimatedVelocities
    ? { best: c0, low: c0 / ASCE7_22_ESTIMATE_FACTOR, high: c1 * ASCE7_22_ESTIMATE_FACTOR }
    : v100;
  if (options.estimatedVelocities) warnings.push(estimatedWarning());
  const classes: Record<SiteClassTableId, string[]> = {
    asce7_16: siteClassesInRange('asce7_16', [v100.low, v100.high]),
    asce7_22: siteClassesInRange('asce7_22', [r22.low, r22.high]),
    en1998_1: siteClassesInRange('en1998_1', [v30.low, v30.high]),
  };
  // Straddled boundaries of the speed-based classes, before type E joins them.
  const straddles = straddleWarnings(classes, { asce7_16: v100, asce7_22: r22, en1998_1: v30 });
  if (r.typeE !== undefined) {
    const H = r.typeE.thickness;
    const e = enTypeE(r.typeE);
    if (e === 'certain') {
      warnings.push(
        `EN 1998-1 Table 3.1 ground type E over the whole range: ${fmt(H[0])}–${fmt(H[1])} m of type C or D soil ` +
          `(vs < 360 m/s) over material faster than 800 m/s. By Vs30 alone it would be type ${classes.en1998_1.join(', ')}.`,
      );
      classes.en1998_1 = ['E'];
    } else if (e === 'possible') {
      warnings.push(
        'EN 1998-1 Table 3.1 ground type E (5–20 m of type C or D soil over material faster than 800 m/s) is possible ' +
          'within the ranges but not certain, so it is listed with the types by Vs30.',
      );
      classes.en1998_1 = [...classes.en1998_1, 'E'];
    }
    if (e !== 'no') warnings.push(...edgeWarning(H));
    // EN type A: at most 5 m of weaker material over material faster than 800 m/s (see EN_TYPE_A_MAX_WEAK_M).
    const [h0, h1] = H;
    const [b0, b1] = r.typeE.vs2;
    if (h1 <= EN_TYPE_A_MAX_WEAK_M && b0 > EN_TYPE_E.baseVsAbove) {
      warnings.push(
        `EN 1998-1 Table 3.1 ground type A over the whole range: at most ${EN_TYPE_A_MAX_WEAK_M} m of weaker material over material faster than 800 m/s.`,
      );
      classes.en1998_1 = classes.en1998_1.includes('E') ? ['A', 'E'] : ['A'];
    } else if (h0 <= EN_TYPE_A_MAX_WEAK_M && b1 > EN_TYPE_E.baseVsAbove && !classes.en1998_1.includes('A')) {
      warnings.push(
        `EN 1998-1 Table 3.1 ground type A (at most ${EN_TYPE_A_MAX_WEAK_M} m of weaker material over material faster than 800 m/s) is possible within the ranges, so it is listed too.`,
      );
      const withoutE = classes.en1998_1.filter((c) => c !== 'E');
      classes.en1998_1 = [...withoutE, 'A', ...(classes.en1998_1.includes('E') ? ['E'] : [])];
    }
  }
  warnings.push(...straddles);
  return { classes, warnings };
}

/** Best values of one layer over a half-space. */
export interface TwoLayerBest {
  /** Layer thickness H, m. */
  thickness: number;
  /** Layer shear speed β1, m/s. */
  vs1: number;
  /** Half-space shear speed β2, m/s. */
  vs2: number;
  /** Layer density ρ1, kg/m³. */
  density1: number;
  /** Half-space density ρ2, kg/m³. */
  density2: number;
}

/** Uncertainty ranges [low, high] of one layer over a half-space (e.g. 95 % intervals). */
export interface TwoLayerRanges {
  /** m; the high end may be Infinity for a one-sided interval. */
  thickness: readonly [number, number];
  /** m/s. */
  vs1: readonly [number, number];
  /** m/s. */
  vs2: readonly [number, number];
}

/** Average speed over `depth` of one layer over a half-space; H may be Infinity. */
function twoLayerAverage(h: number, b1: number, b2: number, depth: number): number {
  const inLayer = Math.min(h, depth);
  return depth / (inLayer / b1 + (depth - inLayer) / b2);
}

/**
 * Site figures of one layer over a half-space with uncertainty ranges (for
 * the thickness estimate). Every figure's range is exact over the box of
 * ranges:
 *
 * Vs_avg(H, β1, β2) = D / t with t = min(H, D)/β1 + (D − min(H, D))/β2.
 * For fixed H and β2, t falls as β1 rises; for fixed H and β1, t falls as
 * β2 rises; for fixed speeds, t is piecewise linear in H (slope
 * 1/β1 − 1/β2 below D, 0 above), so monotone in H whatever the sign of the
 * slope. A function monotone in each variable with the others held reaches
 * its extremes over a box at corners (move one coordinate at a time to the
 * better end), so the 8 corners give the exact Vs30 and v̄s100ft range.
 * f0 = β1/(4H), T0 = 4H/β1 and ρ1β1/(ρ2β2) are monotone in each variable
 * too. Densities are taken as known.
 *
 * Classes: every class the Vs30 (EN) or v̄s100ft (ASCE) range meets; EN type
 * E is added when some corner of the box meets its definition, and is the
 * only EN type when every point does. Validates the best model and the
 * ranges (InputError naming the field); the best values must lie inside
 * their ranges.
 */
export function siteFiguresForRanges(
  best: TwoLayerBest,
  ranges: TwoLayerRanges,
  options: SiteOptions = {},
  open: OpenEnds = {},
): SiteFigures {
  if (!best || typeof best !== 'object') throw new InputError('best', 'best must be an object.');
  if (!ranges || typeof ranges !== 'object') throw new InputError('ranges', 'ranges must be an object.');
  const h = checkThickness(best.thickness, 'thickness');
  const b1 = checkShearSpeed(best.vs1, 'vs1');
  const b2 = checkShearSpeed(best.vs2, 'vs2');
  const r1 = checkDensity(best.density1, 'density1');
  const r2 = checkDensity(best.density2, 'density2');
  validateModel({ layers: [{ thickness: h, vs: b1, density: r1 }], halfspace: { vs: b2, density: r2 } });
  const H = checkRange(ranges.thickness, 'ranges.thickness', true);
  const V1 = checkRange(ranges.vs1, 'ranges.vs1');
  const V2 = checkRange(ranges.vs2, 'ranges.vs2');
  for (const [name, value, [lo, hi]] of [
    ['thickness', h, H],
    ['vs1', b1, V1],
    ['vs2', b2, V2],
  ] as const) {
    if (value < lo || value > hi) {
      throw new InputError(`ranges.${name}`, `The best ${name} (${value}) lies outside its range [${lo}, ${hi}].`);
    }
  }
  if (H[0] <= 0 && !open.thickness?.[0]) throw new InputError('ranges.thickness', 'ranges.thickness low end must be greater than 0 m.');
  if (V1[0] <= 0) throw new InputError('ranges.vs1', 'ranges.vs1 low end must be greater than 0 m/s.');
  if (V2[0] <= 0) throw new InputError('ranges.vs2', 'ranges.vs2 low end must be greater than 0 m/s.');

  const corners: [number, number, number][] = [];
  const cornerOpen: [boolean, boolean, boolean][] = [];
  const oH = open.thickness ?? [false, false];
  const o1 = open.vs1 ?? [false, false];
  const o2 = open.vs2 ?? [false, false];
  for (let i = 0; i < 2; i++) {
    for (let j = 0; j < 2; j++) {
      for (let k = 0; k < 2; k++) {
        corners.push([H[i], V1[j], V2[k]]);
        cornerOpen.push([oH[i], o1[j], o2[k]]);
      }
    }
  }
  // Which parameters each figure depends on: a corner counts as open for a figure only through those.
  const openBy = (useH: boolean, use1: boolean, use2: boolean) =>
    cornerOpen.map(([a, b, c]) => (useH && a) || (use1 && b) || (use2 && c));
  const v30 = openRange(
    twoLayerAverage(h, b1, b2, VS30_DEPTH_M),
    corners.map(([hh, a, b]) => twoLayerAverage(hh, a, b, VS30_DEPTH_M)),
    openBy(true, true, true),
  );
  const v100 = openRange(
    twoLayerAverage(h, b1, b2, VS100FT_DEPTH_M),
    corners.map(([hh, a, b]) => twoLayerAverage(hh, a, b, VS100FT_DEPTH_M)),
    openBy(true, true, true),
  );
  const f0 = openRange(b1 / (4 * h), corners.map(([hh, a]) => a / (4 * hh)), openBy(true, true, false));
  const t0 = openRange((4 * h) / b1, corners.map(([hh, a]) => (4 * hh) / a), openBy(true, true, false));
  const imp = openRange((r1 * b1) / (r2 * b2), corners.map(([, a, b]) => (r1 * a) / (r2 * b)), openBy(false, true, true));

  const { classes, warnings } = siteClassesForRanges(
    { vs30: [v30.low, v30.high], vs100ft: [v100.low, v100.high], typeE: { thickness: H, vs1: V1, vs2: V2 } },
    options,
  );
  if (!Number.isFinite(H[1])) {
    warnings.push('The thickness has no upper bound, so f0 has no lower bound and T0 no upper bound.');
  }
  if (oH[0]) {
    warnings.push(
      'The thickness interval is open below, so the figures are taken down to no layer at all: f0 has no upper bound, ' +
        'and Vs30 may reach the half-space speed.',
    );
  }
  for (const [name, o] of [
    ['layer', o1],
    ['half-space', o2],
  ] as const) {
    if (o[0] || o[1]) {
      warnings.push(
        `The ${name} speed interval is open ${o[0] && o[1] ? 'at both ends' : o[0] ? 'below' : 'above'}, so the figures take that speed ` +
          `out to the model's limits (${MODEL_BOUNDS.vsMin}–${MODEL_BOUNDS.vsMax} m/s, common practice) on that side.`,
      );
    }
  }
  if (V1[1] >= V2[0]) {
    warnings.push(
      'The layer and half-space speed ranges overlap, so the layer may not be softer than its base; f0 = β1/(4H) ' +
        'assumes a stiffer base.',
    );
  }
  warnings.push(...standingWarnings());
  return {
    vs30: v30,
    vs100ft: v100,
    classes,
    f0_hz: f0,
    t0_s: t0,
    impedance_ratio: imp,
    warnings,
    caution: CAUTION,
  };
}

/** A best value with its 95 % interval (core/estimate/estimate.ts ParameterEstimate fits). */
export interface Interval95 {
  best: number;
  low95: number;
  high95: number;
  /** The interval reached the search range below: the data do not bound it there (low95 is then not used). */
  openLow?: boolean;
  /** The same above (high95 is then not used). */
  openHigh?: boolean;
}

/** Which range ends are open ([low, high]) for siteFiguresForRanges: the data do not bound them. */
export interface OpenEnds {
  thickness?: readonly [boolean, boolean];
  vs1?: readonly [boolean, boolean];
  vs2?: readonly [boolean, boolean];
}

/** An estimate of one layer over a half-space: thickness and speeds with 95 % intervals, densities as used. */
export interface TwoLayerEstimate {
  thickness: Interval95;
  vs1: Interval95;
  vs2: Interval95;
  density1: number;
  density2: number;
}

/**
 * Site figures of an estimate: the one path for every caller (the estimate
 * itself, the app's figures view, sites-summary, GeoJSON, `shearfield site`
 * on an estimate file), with one rule.
 *
 * Each figure is taken over the box of the 95 % intervals. An open interval
 * end is not a bound: the figure is open on that side and extends to what
 * the open end allows: thickness open below goes down to 0 m (no layer:
 * Vs30 reaches the half-space speed, f0 is unbounded), open above to
 * infinity; a speed open below or above goes to the model's limits
 * (MODEL_BOUNDS, common practice), the layer kept no faster than the
 * half-space's high end and the half-space no slower than the layer's low
 * end. So the classes list every class the data cannot rule out.
 *
 * Level: the box contains every model within the profile Δχ² of the best
 * (each marginal interval is that region's projection), so each figure's
 * range covers that figure's own 95 % profile-likelihood interval (Wilks
 * 1938) and usually more. It is not a joint 95 % region for all three
 * parameters at once, and the classes of the three tables are each such a
 * one-figure statement.
 *
 * The ±30 % speed sensitivity check applies only when `options` asks for
 * it (a user's choice, no standard named). Throws InputError where
 * siteFiguresForRanges does.
 */
export function siteFiguresOfEstimate(r: TwoLayerEstimate, options: SiteOptions = {}): SiteFigures {
  const B = MODEL_BOUNDS;
  const t = r.thickness;
  const a = r.vs1;
  const b = r.vs2;
  const oH: [boolean, boolean] = [t.openLow === true, t.openHigh === true];
  const o1: [boolean, boolean] = [a.openLow === true, a.openHigh === true];
  const o2: [boolean, boolean] = [b.openLow === true, b.openHigh === true];
  const v2High = o2[1] ? B.vsMax : b.high95;
  const v1Low = o1[0] ? Math.min(B.vsMin, a.best) : a.low95;
  const v1High = o1[1] ? Math.max(a.best, Math.min(B.vsMax, v2High)) : a.high95;
  const v2Low = o2[0] ? Math.min(b.best, Math.max(B.vsMin, v1Low)) : b.low95;
  const figures = siteFiguresForRanges(
    { thickness: t.best, vs1: a.best, vs2: b.best, density1: r.density1, density2: r.density2 },
    {
      thickness: [oH[0] ? 0 : t.low95, oH[1] ? Infinity : t.high95],
      vs1: [v1Low, v1High],
      vs2: [v2Low, v2High],
    },
    options,
    { thickness: oH, vs1: o1, vs2: o2 },
  );
  if (oH[0] && Number.isFinite(t.low95)) {
    figures.warnings.unshift(
      `The data do not rule out a layer thinner than ${fmt(t.low95)} m, the low end of the thickness search range${oH[1] ? '' : `: read the thickness as "at most ${fmt(t.high95)} m"`}.`,
    );
  }
  return figures;
}

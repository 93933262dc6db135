/**
 * `shearfield estimate PICKS.csv`: layer thickness (and any shear speed not
 * given) of one layer over a half-space from dispersion picks, with 68 % and
 * 95 % intervals, as JSON.
 *
 * Output contract (read by other tools, keep it exact; extra keys only after these):
 *   {"thickness_m":{"best":…,"low68":…,"high68":…,"low95":…,"high95":…},
 *    "vs1_m_s":{…same keys…},"vs2_m_s":{…},"alternatives":[…],
 *    "misfit":{"chi2":…,"dof":…,"detail":…},"warnings":["…"],"caution":"…", …, "verdict":{"level":…,"text":…}}
 * A fixed (given) speed reports its value with equal bounds. Numbers that do
 * not exist (e.g. a 68 % bound of a minimum outside the 68 % level) print as null.
 *
 * With --layers N (2–4, or auto), or with Rayleigh picks, the layered estimate
 * (core/profile) runs instead; its output starts with the "profile" object
 *   {"profile":{"layers":[{"thickness_m":{best,low68,high68,low95,high95},"vs_m_s":{…}}],
 *    "halfspace":{"vs_m_s":{…}},"depth_m":[…],"vs_band_m_s":{"best":[…],"low68":[…],…}},
 *    "verdict":{…},"layers":N,…}
 * --layers 1 with Love picks only keeps the one-layer output above exactly.
 */
import { parseArgs } from 'node:util';
import {
  DEFAULT_DENSITY_HALFSPACE,
  DEFAULT_DENSITY_LAYER,
  estimateLayer,
  type EstimateField,
  type EstimateOptions,
} from '../../core/estimate/estimate';
import { estimateJson } from '../../core/estimate/estimate-json';
import { InputError, describeValue } from '../../core/shared/errors';
import { DEFAULT_SD_FRACTION, parsePicksCsv } from '../../core/picks/picks';
import { estimateProfile, MAX_PROFILE_LAYERS, type ProfileOptions } from '../../core/profile/profile-estimate';
import { profileJson } from '../../core/profile/profile-json';
import { DEFAULT_POISSON, WATER_P_SPEED } from '../../core/profile/p-speed';
import { readTextFile } from '../cli-options';
import type { Command, CommandIO } from '../command';

const HELP = `Usage: shearfield estimate PICKS.csv [--vs1 V] [--vs2 V] [--density1 D] [--density2 D]
                           [--vs1-range A:B] [--vs2-range A:B] [--thickness-range A:B]
       shearfield estimate PICKS.csv --layers N|auto [--poisson NU] [--water-table-m D]
                           [--p-speeds MODEL.json] [--seed S]

Estimates the thickness of a soft layer over stiffer ground (one layer over a
half-space, Love waves) from dispersion picks, with 68 % and 95 % intervals.

PICKS.csv: a header row with units in the column names: frequency_hz or period_s,
velocity_m_s, and optionally sd_m_s, kind (group | phase, default group),
mode (default 0), wave (love | rayleigh, default love), id, note, time. Comma or semicolon separated. A pick with no
sd_m_s uses ${DEFAULT_SD_FRACTION * 100} % of its velocity (common practice); the output says how many did.

Options (SI units):
  --vs1 V                Layer shear speed, m/s. Given = fixed; omitted = estimated.
  --vs2 V                Half-space shear speed, m/s. Given = fixed; omitted = estimated.
                         Must be faster than --vs1.
  --density1 D           Layer density, kg/m³. Default ${DEFAULT_DENSITY_LAYER} (common practice for soils).
  --density2 D           Half-space density, kg/m³. Default ${DEFAULT_DENSITY_HALFSPACE} (common practice).
  --vs1-range A:B        Search range for an estimated --vs1, m/s.
                         Default 0.5 × the slowest pick velocity to 1.1 × the fastest.
  --vs2-range A:B        Search range for an estimated --vs2, m/s.
                         Default the slowest pick velocity to 4 × the fastest.
                         Speed ranges are clipped to 30–5000 m/s and to vs2 > vs1.
  --thickness-range A:B  Search range for the thickness, m.
                         Default 0.02 × the shortest to 3 × the longest picked
                         wavelength (velocity / frequency).
  -h, --help             Show this help.
  The default ranges are common practice for a search box, not a published rule.

Layered estimate (N = 1–${MAX_PROFILE_LAYERS} layers over a half-space, Love and/or Rayleigh picks):
  --layers N             Number of layers, 1–${MAX_PROFILE_LAYERS}, or "auto" to let the picks decide
                         (by the Bayesian information criterion, Schwarz 1978). Runs by
                         itself when the picks include Rayleigh picks (then N defaults to 1).
                         --layers 1 with Love picks only is the one-layer estimate above.
  --poisson NU           Poisson's ratio for the P speeds that Rayleigh waves need.
                         Default ${DEFAULT_POISSON} (common practice for unsaturated soil; the output
                         warns that it was assumed). Rayleigh speeds change by a few per cent with it.
  --water-table-m D      Depth of the water table, m: below it the P speed is at least
                         ${WATER_P_SPEED} m/s (saturated ground, common practice).
  --p-speeds MODEL.json  Fixed P speeds (vp_m_s) and densities (density_kg_m3) per layer and
                         for the half-space, from a model file with at least N layers
                         (its thicknesses and shear speeds are not used).
  --seed S               Seed of the search and the ensemble (whole number). Default 1.
  The P-speed options apply only to Rayleigh picks. The one-layer options above
  (--vs1 … --thickness-range) do not apply to the layered estimate.

  Method: global search by the neighbourhood algorithm (Sambridge 1999, GJI 138:479)
  over each layer's thickness (0.02 × the shortest to 1 × the longest picked wavelength)
  and shear speed (0.5 × the slowest to 1.3 × the fastest pick; the half-space the
  slowest to 4 × the fastest), Levenberg–Marquardt refinement, then an ensemble by a
  Metropolis random walk for the 68 %/95 % intervals, the depth band, Vs30 and the
  site classes. Fewer layers are fitted too, and the misfit of each is reported.

  Output (JSON), the "profile" object first:
  {"profile":{"layers":[{"thickness_m":{"best":…,"low68":…,"high68":…,"low95":…,"high95":…},
               "vs_m_s":{…}}],"halfspace":{"vs_m_s":{…}},"depth_m":[…],
              "vs_band_m_s":{"best":[…],"low68":[…],"high68":[…],"low95":[…],"high95":[…]}},
   "verdict":{"level":"resolved|rough|unresolved","text":"…","reasons":[…]},
   "layers":N,"waves":{"love":…,"rayleigh":…},
   "alternatives":[{"layers":…,"kind":"minimum|layer-count","thickness_m":[…],"vs_m_s":[…],
                    "halfspace_vs_m_s":…,"chi2":…,"delta_chi2":…}],
   "model_choice":{"tried":[{"layers":…,"chi2":…,"parameters":…,"bic":…}],
                   "recommended_layers":…,"criterion":"…"},
   "misfit":{"chi2":…,"dof":…},"chi2_per_dof":…,"interval_scale":…,
   "depth_of_investigation_m":…,"band_note":"…","resolved":{…},"search_range":{…},
   "vs30_m_s":{…},"vs100ft_m_s":{…},
   "site_class":{"asce7_16":{"classes":[…],"share":{…}},"asce7_22":{…},"en1998_1":{…}},
   "p_speed":{…},"density_kg_m3":{…},"ensemble":{…},"warnings":[…],"caution":"…",
   "picks":[…],"method":"…"}
  The depth of investigation is half the longest picked wavelength (common
  practice); below it the band spans the whole search range of shear speed.

Method: maximum likelihood for Gaussian pick errors. A global grid search over
the ranges (using the dimensionless scaling c/β1 against f·H/β1), then
Levenberg–Marquardt on the exact closed-form forward model. Intervals from the
profile likelihood: Δχ² = 1 (68 %) and 3.84 (95 %), the other free parameters
re-optimised (Press et al., Numerical Recipes, 3rd ed., §15.6). An interval
that reaches the search range is open there (a warning says so).

Output (JSON):
  {"thickness_m":{"best":…,"low68":…,"high68":…,"low95":…,"high95":…},
   "vs1_m_s":{…},"vs2_m_s":{…},
   "alternatives":[{"rank":1,"thickness_m":{…},"vs1_m_s":{…},"vs2_m_s":{…},"chi2":…,"delta_chi2":…},…],
   "misfit":{"chi2":…,"dof":…,"detail":"…"},"warnings":["…"],"caution":"…",
   "chi2_per_dof":…,"interval_scale":…,"open_ends":{…},"correlation_thickness_vs1":…,
   "density_kg_m3":{…},"defaulted_sd":…,"search_range":{…},"vs30_m_s":{…},
   "site_class":{…},"picks":[…],"method":"…",
   "verdict":{"level":"resolved | rough | unresolved","text":"…"}}
  A given speed reports its value with equal bounds. "alternatives" lists every
  separate minimum within Δχ² = 3.84 of the best, ranked (rank 1 = best); when
  there are several, the headline intervals span them all. "vs30_m_s" gives
  the best model's Vs30 (EN 1998-1 eq. 3.1) and its range over the box of 95 %
  intervals. "interval_scale" is the factor on the Δχ² levels: 1, or χ²/dof
  when the fit is poor (a warning says so). Values that do not exist print as null.
  "verdict" judges the thickness: "level" is resolved (a closed 95 % interval no
  wider than half the best value, within the depth the picks see), rough (only
  roughly known: a wide interval, several models, a poor fit, a doubtful mode, or
  deeper than the cautious λ/3 depth) or unresolved (the 95 % interval is open, or
  the thickness lies deeper than half the longest picked wavelength). "text" is one
  plain sentence that contains "not resolved" exactly when the level is unresolved,
  says what is known ("more than X m", the open range), and the one thing to do
  before leaving (e.g. the lowest frequency and spread needed). The depth rules
  are common practice. "warnings" list the diagnostics worst first.

Exit status: 0 success; 1 bad file, pick or option value (one line on stderr
naming the row and column, or the option); 2 usage error.`;

const NUMBER_TEXT = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

const FLAGS: Record<EstimateField, string> = {
  vs1: '--vs1',
  vs2: '--vs2',
  density1: '--density1',
  density2: '--density2',
  vs1Range: '--vs1-range',
  vs2Range: '--vs2-range',
  thicknessRange: '--thickness-range',
  picks: 'PICKS.csv',
};

function numberOption(text: string | undefined, flag: string, unit: string): number | undefined {
  if (text === undefined) return undefined;
  const t = text.trim();
  if (!NUMBER_TEXT.test(t)) {
    throw new InputError(flag, `${flag} must be a number in ${unit}, but it is ${describeValue(text)}.`);
  }
  return Number(t);
}

function rangeOption(text: string | undefined, flag: string, unit: string): [number, number] | undefined {
  if (text === undefined) return undefined;
  const parts = text.split(':');
  if (parts.length !== 2 || parts.some((p) => !NUMBER_TEXT.test(p.trim()))) {
    throw new InputError(flag, `${flag} must be two numbers in ${unit} written LOW:HIGH (e.g. 100:400), but it is ${describeValue(text)}.`);
  }
  return [Number(parts[0].trim()), Number(parts[1].trim())];
}

/** P speeds and densities per layer and for the half-space from a model file (vp_m_s, density_kg_m3). */
function readPSpeeds(path: string): Pick<ProfileOptions, 'fixedVp' | 'densities'> {
  const text = readTextFile(path, '--p-speeds', 'model');
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw new InputError('--p-speeds', `The model file "${path}" is not valid JSON.`);
  }
  const o = json as { layers?: unknown; halfspace?: unknown };
  if (!o || typeof o !== 'object' || !Array.isArray(o.layers) || !o.halfspace || typeof o.halfspace !== 'object') {
    throw new InputError('--p-speeds', `The model file "${path}" must hold "layers" (a list) and "halfspace", each with vp_m_s and density_kg_m3.`);
  }
  const field = (x: unknown, name: string, where: string): number => {
    const v = (x as Record<string, unknown> | null)?.[name];
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new InputError('--p-speeds', `The model file "${path}": ${where}.${name} must be a number, but it is ${describeValue(v)}.`);
    }
    return v;
  };
  const layers = o.layers as unknown[];
  return {
    fixedVp: { layers: layers.map((l, j) => field(l, 'vp_m_s', `layers[${j}]`)), halfspace: field(o.halfspace, 'vp_m_s', 'halfspace') },
    densities: { layers: layers.map((l, j) => field(l, 'density_kg_m3', `layers[${j}]`)), halfspace: field(o.halfspace, 'density_kg_m3', 'halfspace') },
  };
}

const command: Command = {
  name: 'estimate',
  summary: 'Layer thickness (and speeds) from dispersion picks, with 68 % and 95 % intervals.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      allowPositionals: true,
      strict: true,
      options: {
        vs1: { type: 'string' },
        vs2: { type: 'string' },
        density1: { type: 'string' },
        density2: { type: 'string' },
        'vs1-range': { type: 'string' },
        'vs2-range': { type: 'string' },
        'thickness-range': { type: 'string' },
        layers: { type: 'string' },
        poisson: { type: 'string' },
        'water-table-m': { type: 'string' },
        'p-speeds': { type: 'string' },
        seed: { type: 'string' },
      },
    });
    if (positionals.length !== 1) {
      io.err(
        `shearfield estimate: give exactly one picks file (PICKS.csv), but ${positionals.length === 0 ? 'none was given' : `${positionals.length} were given`}. See --help.\n`,
      );
      return 2;
    }
    const options: EstimateOptions = {
      vs1: numberOption(values.vs1, '--vs1', 'm/s'),
      vs2: numberOption(values.vs2, '--vs2', 'm/s'),
      density1: numberOption(values.density1, '--density1', 'kg/m³'),
      density2: numberOption(values.density2, '--density2', 'kg/m³'),
      vs1Range: rangeOption(values['vs1-range'], '--vs1-range', 'm/s'),
      vs2Range: rangeOption(values['vs2-range'], '--vs2-range', 'm/s'),
      thicknessRange: rangeOption(values['thickness-range'], '--thickness-range', 'm'),
      whereOf: (i) => `row ${i + 1}`,
      fieldLabels: FLAGS,
    };
    if (options.vs1 !== undefined && options.vs1Range !== undefined) {
      throw new InputError('--vs1-range', '--vs1-range applies only when --vs1 is not given (a given --vs1 is fixed); give one or the other.');
    }
    if (options.vs2 !== undefined && options.vs2Range !== undefined) {
      throw new InputError('--vs2-range', '--vs2-range applies only when --vs2 is not given (a given --vs2 is fixed); give one or the other.');
    }
    const path = positionals[0];
    const layersText = values.layers?.trim();
    let layers: number | 'auto' | undefined;
    if (layersText !== undefined) {
      if (layersText.toLowerCase() === 'auto') layers = 'auto';
      else if (/^\d+$/.test(layersText) && Number(layersText) >= 1 && Number(layersText) <= MAX_PROFILE_LAYERS) layers = Number(layersText);
      else {
        throw new InputError('--layers', `--layers must be a whole number from 1 to ${MAX_PROFILE_LAYERS} or "auto", but it is ${describeValue(values.layers)}.`);
      }
    }
    const pOptions = (['poisson', 'water-table-m', 'p-speeds'] as const).filter((k) => values[k] !== undefined);
    const parsed = parsePicksCsv(readTextFile(path, 'PICKS.csv', 'picks'));
    const rayleigh = parsed.picks.some((p) => p.wave === 'rayleigh');
    if (pOptions.length > 0 && !rayleigh) {
      throw new InputError(`--${pOptions[0]}`, `--${pOptions[0]} sets P speeds for Rayleigh picks, but every pick in the file is a Love pick (Love waves do not depend on P speed).`);
    }
    if (rayleigh || (layers !== undefined && layers !== 1)) {
      const oneLayer = (['vs1', 'vs2', 'density1', 'density2', 'vs1-range', 'vs2-range', 'thickness-range'] as const).find((k) => values[k] !== undefined);
      if (oneLayer) {
        throw new InputError(`--${oneLayer}`, `--${oneLayer} applies only to the one-layer Love estimate, not to the layered estimate (--layers or Rayleigh picks).`);
      }
      const profileOptions: ProfileOptions = {
        layers: layers ?? 1,
        poisson: numberOption(values.poisson, '--poisson', 'its own units (a ratio such as 0.3)'),
        waterTableDepth: numberOption(values['water-table-m'], '--water-table-m', 'm'),
        seed: numberOption(values.seed, '--seed', 'its own units (a whole number)'),
        whereOf: (i) => `row ${i + 1}`,
        fieldLabels: { layers: '--layers', poisson: '--poisson', waterTableDepth: '--water-table-m', fixedVp: '--p-speeds', densities: '--p-speeds', seed: '--seed', picks: 'PICKS.csv' },
      };
      if (values['p-speeds'] !== undefined) Object.assign(profileOptions, readPSpeeds(values['p-speeds']));
      const result = estimateProfile(parsed.picks, profileOptions);
      io.out(JSON.stringify(profileJson(result), null, 2) + '\n');
      return 0;
    }
    if (values.seed !== undefined) {
      throw new InputError('--seed', '--seed applies only to the layered estimate (--layers 2–4 or auto, or Rayleigh picks); the one-layer estimate has no randomness.');
    }
    const result = estimateLayer(parsed.picks, options);
    io.out(JSON.stringify(estimateJson(result), null, 2) + '\n');
    return 0;
  },
};

export default command;

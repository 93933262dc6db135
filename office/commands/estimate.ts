/**
 * `shearfield estimate PICKS.csv`: layer thickness (and any shear speed not
 * given) of one layer over a half-space from dispersion picks, with 68 % and
 * 95 % intervals, as JSON.
 *
 * Output contract (read by other tools, keep it exact; extra keys only after these):
 *   {"thickness_m":{"best":…,"low68":…,"high68":…,"low95":…,"high95":…},
 *    "vs1_m_s":{…same keys…},"vs2_m_s":{…},"alternatives":[…],
 *    "misfit":{"chi2":…,"dof":…},"warnings":["…"],"caution":"…", …, "verdict":{"level":…,"text":…}}
 * A fixed (given) speed reports its value with equal bounds. Numbers that do
 * not exist (e.g. a 68 % bound of a minimum outside the 68 % level) print as null.
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
import { readTextFile } from '../cli-options';
import type { Command, CommandIO } from '../command';

const HELP = `Usage: shearfield estimate PICKS.csv [--vs1 V] [--vs2 V] [--density1 D] [--density2 D]
                           [--vs1-range A:B] [--vs2-range A:B] [--thickness-range A:B]

Estimates the thickness of a soft layer over stiffer ground (one layer over a
half-space, Love waves) from dispersion picks, with 68 % and 95 % intervals.

PICKS.csv: a header row with units in the column names: frequency_hz or period_s,
velocity_m_s, and optionally sd_m_s, kind (group | phase, default group),
mode (default 0), id, note, time. Comma or semicolon separated. A pick with no
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
   "misfit":{"chi2":…,"dof":…},"warnings":["…"],"caution":"…",
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
    const parsed = parsePicksCsv(readTextFile(path, 'PICKS.csv', 'picks'));
    const result = estimateLayer(parsed.picks, options);
    io.out(JSON.stringify(estimateJson(result), null, 2) + '\n');
    return 0;
  },
};

export default command;

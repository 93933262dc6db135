/**
 * `shearfield curve MODEL.json`: Love- or Rayleigh-wave dispersion curves
 * of a layered model, as JSON (default) or CSV, for the office's batch work.
 *
 * Output contract (read by other tools, keep it exact):
 *   {"wave":"love","modes":[{"mode":0,"points":[{"frequency_hz":…,"period_s":…,
 *     "phase_velocity_m_s":…,"group_velocity_m_s":…}]}]}
 * with "wave":"rayleigh" for --wave rayleigh. Notes (model warnings, modes
 * that meet) go to stderr, one line each.
 * With --csv: a header `mode,frequency_hz,period_s,phase_velocity_m_s,group_velocity_m_s`
 * and one row per point. Points appear only where the mode exists.
 */
import { parseArgs } from 'node:util';
import { APPROACH_RTOL, dispersionCurves, logBand, MAX_MODES, type CurveFailure, type DispersionCurves, type Wave } from '../../core/dispersion/curve';
import { checkRayleighModel } from '../../core/dispersion/model';
import { InputError } from '../../core/shared/errors';
import { oneModelPath, readModelFile } from '../cli-options';
import type { Command, CommandIO } from '../command';

/** Largest number of frequencies accepted in one run (common practice: keeps a typo from filling the disk). */
const MAX_FREQUENCIES = 100_000;

const HELP = `Usage: shearfield curve MODEL.json (--freq LIST | --band FROM:TO:COUNT) [--modes N] [--wave love|rayleigh] [--csv]

Love- or Rayleigh-wave dispersion curves (phase and group velocity) of a layered
model: N layers over a half-space. Love waves: Thomson–Haskell propagator (closed
forms for one layer). Rayleigh waves: compound matrices (Dunkin 1965), every root
isolated by a phase-resolved scan; modes numbered by order of phase velocity.

MODEL.json holds, in SI units named in the fields:
  {"layers":[{"thickness_m":10,"vs_m_s":200,"density_kg_m3":1800,"vp_m_s":600}],
   "halfspace":{"vs_m_s":500,"density_kg_m3":2000,"vp_m_s":1600}}
vp_m_s (P-wave speed) is required in every layer and the half-space for
Rayleigh waves, with vp/vs above √(4/3) ≈ 1.155; Love waves ignore it.

Options:
  --freq LIST            Frequencies in Hz, comma-separated, e.g. --freq 1,2,5.5.
  --band FROM:TO:COUNT   COUNT frequencies log-spaced from FROM Hz to TO Hz inclusive,
                         e.g. --band 1:50:200. Give either --freq or --band, not both.
  --modes N              Number of modes, from the fundamental (mode 0) up, 1 to ${MAX_MODES}.
                         Default: 1.
  --wave love|rayleigh   Wave type. Default: love.
  --csv                  Print a CSV table (columns mode, frequency_hz, period_s,
                         phase_velocity_m_s, group_velocity_m_s) instead of JSON.
  -h, --help             Show this help.

Output (JSON, default):
  {"wave":"love","modes":[{"mode":0,"points":[{"frequency_hz":…,"period_s":…,
    "phase_velocity_m_s":…,"group_velocity_m_s":…}]}]}
with "wave":"rayleigh" for Rayleigh waves. Points appear only where a mode exists
(above its cutoff), in ascending frequency. On stderr, one line each: warnings
about the model (a Poisson's ratio below 0) and, for Rayleigh waves, where two
neighbouring modes come within ${APPROACH_RTOL * 100} % of each other (their branches
osculate or cross there, so a mode number may pass from one branch to the other).

Exit status: 0 success; 1 bad file, model or option value (one line on stderr
naming the field); 2 usage error.`;

function parsePositiveNumber(text: string, what: string): number {
  const t = text.trim();
  const v = t === '' ? NaN : Number(t);
  if (!Number.isFinite(v)) throw new InputError(what, `${what} must be a number, but it is "${t}".`);
  if (v <= 0) throw new InputError(what, `${what} must be a frequency above 0 Hz, but it is ${v}.`);
  return v;
}

function parseFreq(text: string): Float64Array {
  const parts = text.split(',');
  if (parts.length > MAX_FREQUENCIES) {
    throw new InputError('--freq', `--freq lists ${parts.length} frequencies; at most ${MAX_FREQUENCIES} are allowed.`);
  }
  const out = new Float64Array(parts.length);
  parts.forEach((p, i) => {
    out[i] = parsePositiveNumber(p, `--freq value ${i + 1}`);
  });
  return out;
}

function parseBand(text: string): Float64Array {
  const parts = text.split(':');
  if (parts.length !== 3) {
    throw new InputError('--band', `--band must be FROM:TO:COUNT (e.g. 1:50:200), but it is "${text}".`);
  }
  const from = parsePositiveNumber(parts[0], '--band FROM');
  const to = parsePositiveNumber(parts[1], '--band TO');
  const countText = parts[2].trim();
  const count = countText === '' ? NaN : Number(countText);
  if (!Number.isInteger(count) || count < 2 || count > MAX_FREQUENCIES) {
    throw new InputError('--band COUNT', `--band COUNT must be a whole number from 2 to ${MAX_FREQUENCIES}, but it is "${countText}".`);
  }
  if (!(to > from)) {
    throw new InputError('--band TO', `--band TO (${to} Hz) must be above FROM (${from} Hz).`);
  }
  return logBand(from, to, count);
}

function parseModes(text: string | undefined): number {
  if (text === undefined) return 1;
  const t = text.trim();
  const v = t === '' ? NaN : Number(t);
  if (!Number.isInteger(v) || v < 1 || v > MAX_MODES) {
    throw new InputError('--modes', `--modes must be a whole number from 1 to ${MAX_MODES}, but it is "${t}".`);
  }
  return v;
}

function parseWave(text: string | undefined): Wave {
  if (text === undefined) return 'love';
  const t = text.trim().toLowerCase();
  if (t !== 'love' && t !== 'rayleigh') {
    throw new InputError('--wave', `--wave must be love or rayleigh, but it is "${text.trim()}".`);
  }
  return t;
}

/** Why a root search gave up, in plain words (statuses of core/dispersion/love-stack.ts and core/numeric/roots.ts). */
const FAILURE_REASON: Record<string, string> = {
  inseparable: 'modes there lie closer together than double precision can tell apart (near-identical wave guides, e.g. many equal soft layers between stiff ones)',
  unstable: 'the propagator’s arithmetic broke down for this model',
  'evaluation-limit': 'the root search reached its bound on evaluations',
  'max-iterations': 'the root search did not converge',
  'bracket-lost': 'the root search lost its bracket',
};

/** One sentence for all the roots left out: how many, which modes at which frequencies, and why. */
function failureSentence(failures: CurveFailure[]): string {
  const freqs = [...new Set(failures.map((f) => f.frequency))];
  const modes = [...new Set(failures.map((f) => f.mode))].sort((a, b) => a - b);
  const reasons = [...new Set(failures.map((f) => FAILURE_REASON[f.status] ?? `the root search ended with "${f.status}"`))];
  const where = `${freqs.length === 1 ? `${freqs[0]} Hz` : `${freqs.length} frequencies from ${freqs[0]} to ${freqs[freqs.length - 1]} Hz`}`;
  const which = modes.length === 1 ? `mode ${modes[0]}` : `modes ${modes.join(', ')}`;
  return `${failures.length} point${failures.length === 1 ? '' : 's'} left out (${which} at ${where}): ${reasons.join('; ')}.`;
}

function toJson(curves: DispersionCurves): string {
  return JSON.stringify({
    wave: curves.wave,
    modes: curves.modes.map((m) => {
      const points = new Array(m.frequency.length);
      for (let i = 0; i < points.length; i++) {
        points[i] = {
          frequency_hz: m.frequency[i],
          period_s: m.period[i],
          phase_velocity_m_s: m.phase[i],
          group_velocity_m_s: m.group[i],
        };
      }
      return { mode: m.mode, points };
    }),
  });
}

function toCsv(curves: DispersionCurves): string {
  const rows = ['mode,frequency_hz,period_s,phase_velocity_m_s,group_velocity_m_s'];
  for (const m of curves.modes) {
    for (let i = 0; i < m.frequency.length; i++) {
      rows.push(`${m.mode},${m.frequency[i]},${m.period[i]},${m.phase[i]},${m.group[i]}`);
    }
  }
  return rows.join('\n');
}

const curve: Command = {
  name: 'curve',
  summary: 'Love- or Rayleigh-wave dispersion curves (phase and group velocity) of a layered model.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      options: {
        freq: { type: 'string' },
        band: { type: 'string' },
        modes: { type: 'string' },
        wave: { type: 'string' },
        csv: { type: 'boolean', default: false },
      },
      allowPositionals: true,
      strict: true,
    });
    const path = oneModelPath(positionals, 'shearfield curve model.json --band 1:50:200');
    if ((values.freq === undefined) === (values.band === undefined)) {
      throw new InputError('--freq', 'Give either --freq LIST or --band FROM:TO:COUNT (exactly one of them).');
    }
    const modes = parseModes(values.modes);
    const wave = parseWave(values.wave);
    const frequencies = values.freq !== undefined ? parseFreq(values.freq) : parseBand(values.band as string);
    const model = readModelFile(path);
    let warnings: string[] = [];
    if (wave === 'rayleigh') {
      try {
        warnings = checkRayleighModel(model, 'file');
      } catch (e) {
        if (e instanceof InputError) throw new InputError(e.field, `The model file "${path}" is invalid: ${e.message}`);
        throw e;
      }
    }
    const curves = dispersionCurves(model, frequencies, { modes, wave });
    for (const w of warnings) io.err(`shearfield curve: warning: ${w}\n`);
    for (const a of curves.approaches) {
      io.err(
        `shearfield curve: note: modes ${a.mode} and ${a.mode + 1} come within ${a.gap.toPrecision(3)} m/s of each other near ${a.frequency.toPrecision(4)} Hz; their branches osculate or cross there, and modes are numbered by order of phase velocity.\n`,
      );
    }
    if (curves.failures.length > 0) {
      const sentence = failureSentence(curves.failures);
      if (curves.modes.every((m) => m.frequency.length === 0)) {
        // Nothing could be solved: an error, not an empty curve.
        throw new InputError(path, `No point of the curve could be computed for this model: ${sentence}`);
      }
      io.err(`shearfield curve: warning: ${sentence}\n`);
    }
    io.out((values.csv ? toCsv(curves) : toJson(curves)) + '\n');
    return 0;
  },
};

export default curve;

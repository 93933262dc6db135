/**
 * `shearfield pick FILE --method …`: follows the strongest fundamental ridge
 * of a record's dispersion image and prints the picks as a picks CSV (the
 * format `shearfield estimate` reads). The image's reliability notes and the
 * caution go to standard error, so standard output stays a clean file.
 */
import { parseArgs } from 'node:util';
import { picksToCsv } from '../../core/picks/picks';
import { CAUTION } from '../../core/shared/caution';
import { InputError } from '../../core/shared/errors';
import { followRidge, ridgePicks, strongestRidgeSeed } from '../../core/signal/ridge';
import type { Command, CommandIO } from '../command';
import { imageOf, oneRecordPath, readGather, SIGNAL_OPTIONS, SIGNAL_OPTIONS_HELP } from '../signal-options';

const HELP = `Usage: shearfield pick FILE --method multiple-filter|phase-shift [--trace K]
                       [--near-trace K] [--seed-hz F] [--freq FROM:TO:COUNT] [--velocity FROM:TO:COUNT]
                       [--offsets FIRST:SPACING]

Follows the strongest fundamental-mode ridge of a record's dispersion image
and prints its points as a picks CSV (frequency_hz, velocity_m_s, sd_m_s,
kind, mode, note), ready for \`shearfield estimate\`. Kind is group for the
multiple-filter image, phase for phase-shift; mode 0; the note names the file.

Options:
${SIGNAL_OPTIONS_HELP}
  --seed-hz F            Start the ridge at the row nearest F Hz, on its slowest strong
                         peak. Default: the strongest reliable row.
  -h, --help             Show this help.

The ridge is followed both ways from the start, taking the local maximum
within 10 % of the velocity extrapolated from the last points, and stops where
it fades, jumps or leaves the reliable band. Each pick's sd is the Gaussian sd
of the ridge's half-power width, never below one resolution cell of the record
(common practice). Standard error gives the image's reliability notes, where
the ridge stopped and why, and the caution.

Exit status: 0 success; 1 bad file or option value, or no ridge to follow
(one line on stderr); 2 usage error.`;

const pick: Command = {
  name: 'pick',
  summary: 'Picks along the strongest fundamental ridge of a record\'s dispersion image, as a picks CSV.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      options: { ...SIGNAL_OPTIONS, 'seed-hz': { type: 'string' } },
      allowPositionals: true,
      strict: true,
    });
    const path = oneRecordPath(positionals, 'shearfield pick shot.sgy --method phase-shift');
    let seedHz: number | undefined;
    if (values['seed-hz'] !== undefined) {
      const t = values['seed-hz'].trim();
      seedHz = t === '' ? NaN : Number(t);
      if (!Number.isFinite(seedHz) || seedHz <= 0) throw new InputError('--seed-hz', `--seed-hz must be a frequency above 0 Hz, but it is "${t}".`);
    }
    const gather = readGather(path, values.offsets);
    const img = imageOf(gather, values);
    const seed = strongestRidgeSeed(img, seedHz);
    if (seed === null) {
      throw new InputError('--seed-hz', `No reliable ridge peak was found${seedHz !== undefined ? ` at ${seedHz} Hz` : ''} in the ${img.method} image; try another --seed-hz or wider --freq/--velocity axes.`);
    }
    const ridge = followRidge(img, seed);
    if (ridge.velocity.length === 0) throw new InputError('--seed-hz', ridge.reason);
    const picks = ridgePicks(img, ridge);
    io.out(picksToCsv(picks, { lineEnding: '\n' }));
    for (const note of img.notes) io.err(`shearfield pick: ${note}\n`);
    io.err(
      `shearfield pick: ${picks.length} picks from ${ridge.frequency[0].toFixed(2)} to ${ridge.frequency[ridge.frequency.length - 1].toFixed(2)} Hz; ` +
        `the ridge stopped below because it ${STOP_WORDS[ridge.stops.low]} and above because it ${STOP_WORDS[ridge.stops.high]}.\n`,
    );
    io.err(`shearfield pick: ${CAUTION}\n`);
    return 0;
  },
};

const STOP_WORDS = {
  faded: 'faded',
  'left-reliable-band': 'left the reliable band',
  jumped: 'jumped',
  'image-edge': 'reached the edge of the image',
} as const;

export default pick;

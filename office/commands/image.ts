/**
 * `shearfield image FILE --method …`: a dispersion image of a seismograph
 * record, as JSON.
 *
 * Output contract (read by other tools, keep it exact; extra keys only after these):
 *   {"method":…,"frequencies_hz":[…],"velocities_m_s":[…],"power":[[…] one row per frequency],
 *    "reliability":[[2|1|0 …] one row per frequency],"notes":["…"]}
 * Power is normalised per row to 0–1. Reliability: 2 reliable, 1 marginal,
 * 0 unreliable (the notes say why).
 */
import { parseArgs } from 'node:util';
import type { Command, CommandIO } from '../command';
import { imageOf, oneRecordPath, readGather, SIGNAL_OPTIONS, SIGNAL_OPTIONS_HELP } from '../signal-options';

const HELP = `Usage: shearfield image FILE --method multiple-filter|phase-shift [--trace K]
                        [--near-trace K] [--freq FROM:TO:COUNT] [--velocity FROM:TO:COUNT]
                        [--offsets FIRST:SPACING]

A dispersion image of a seismograph record (SEG-Y, SEG-2 or CSV traces):
power against frequency and velocity, each frequency's row scaled to 0–1.

Options:
${SIGNAL_OPTIONS_HELP}
  -h, --help             Show this help.

Output (JSON):
  {"method":…,"frequencies_hz":[…],"velocities_m_s":[…],
   "power":[[…] one row per frequency],
   "reliability":[[…] one row per frequency: 2 reliable, 1 marginal, 0 unreliable],
   "notes":["why cells are marginal or unreliable", …]}
Multiple-filter rows are the filter centres; a pick takes the instantaneous
frequency at the envelope peak instead (shearfield pick does this).

Exit status: 0 success; 1 bad file or option value (one line on stderr naming
the field); 2 usage error.`;

const round = (x: number) => Math.round(x * 1e6) / 1e6;

const image: Command = {
  name: 'image',
  summary: 'Dispersion image (multiple-filter or phase-shift) of a seismograph record, as JSON.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({ args, options: SIGNAL_OPTIONS, allowPositionals: true, strict: true });
    const path = oneRecordPath(positionals, 'shearfield image shot.sgy --method phase-shift');
    const gather = readGather(path, values.offsets);
    const img = imageOf(gather, values);
    const cols = img.velocities.length;
    const power: number[][] = [];
    const reliability: number[][] = [];
    for (let i = 0; i < img.frequencies.length; i++) {
      power.push(Array.from(img.power.subarray(i * cols, (i + 1) * cols), round));
      reliability.push(Array.from(img.reliability.subarray(i * cols, (i + 1) * cols)));
    }
    io.out(
      JSON.stringify({
        method: img.method,
        frequencies_hz: Array.from(img.frequencies, round),
        velocities_m_s: Array.from(img.velocities, round),
        power,
        reliability,
        notes: img.notes,
      }) + '\n',
    );
    return 0;
  },
};

export default image;

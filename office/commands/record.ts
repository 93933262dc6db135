/**
 * `shearfield record FILE`: reads a seismograph record (SEG-Y rev 0/1/2.0,
 * SEG-2 or CSV traces) and prints its geometry as JSON, so that the office
 * can check a file before making images from it.
 *
 * Output contract (read by other tools, keep it exact):
 *   {"format","traces","samples","sample_interval_s","delay_s","offsets_m":[…],"component"}
 * Offsets the file does not record print as null. Warnings and the
 * questions for missing geometry go to stderr, one line each.
 */
import { parseArgs } from 'node:util';
import { geometrySummary } from '../../core/recordings/recording';
import type { Command, CommandIO } from '../command';
import { oneRecordFile, readRecordFile, RECORD_OPTIONS, RECORD_OPTIONS_HELP } from '../record-options';

const HELP = `Usage: shearfield record FILE [--offsets FIRST:SPACING] [--delay S] [--component C]

Reads a seismograph record and prints its geometry as JSON. FILE is a SEG-Y
file (rev 0, 1 or 2.0; EBCDIC or ASCII text header; either byte order), a
SEG-2 file, or CSV traces (a time column in seconds, one column per trace,
receiver offsets in metres in the header row). The format is told by content.

Options:
${RECORD_OPTIONS_HELP}
  -h, --help             Show this help.

Output (JSON, one line):
  {"format":"segy"|"seg2"|"csv","traces":N,"samples":N,"sample_interval_s":…,
   "delay_s":…,"offsets_m":[… one per trace, null where unknown],
   "component":"vertical"|"inline"|"crossline"|"transverse"|"unknown"}
On stderr, one line each: "warning: …" for what the reader noticed or
replaced, and "missing: …" for geometry the file does not give (then give it
with --offsets or --component).

Exit status: 0 read (missing geometry is reported on stderr, not an error);
1 bad or unreadable file or option value (one line on stderr naming the byte
offset, key, row or option); 2 usage error.`;

const record: Command = {
  name: 'record',
  summary: 'Geometry of a seismograph record (SEG-Y, SEG-2 or CSV traces) as JSON.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({ args, options: RECORD_OPTIONS, allowPositionals: true, strict: true });
    const path = oneRecordFile(positionals, 'shearfield record shot-01.sgy');
    const rec = readRecordFile(path, values);
    for (const w of rec.warnings) io.err(`shearfield record: warning: ${w}\n`);
    for (const a of rec.askFor) io.err(`shearfield record: missing: ${a}\n`);
    io.out(JSON.stringify(geometrySummary(rec)) + '\n');
    return 0;
  },
};

export default record;

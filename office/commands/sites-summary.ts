/**
 * `shearfield sites-summary OUT.csv [--data DIR]`: re-runs the thickness
 * estimate and the site figures for every site into one CSV table.
 */
import { writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { InputError } from '../../core/shared/errors';
import type { PickRecord } from '../../core/exchange/records';
import { summariseSite } from '../../core/exchange/site-summary';
import { SUMMARY_CSV_COLUMNS, summaryToCsv } from '../../core/exchange/office-tables';
import { liveSitesAndPicks } from '../cli-options';
import type { Command, CommandIO } from '../command';
import { DEFAULT_DATA_DIR } from '../store';

const HELP = `Usage: shearfield sites-summary OUT.csv [--data DIR]

Re-runs the layer-thickness estimate (from each site's picks and its stated speeds and
ranges) and the site figures over the 95 % box, for every live site in the office store,
and writes one row per site ("-" writes to stdout). Columns:
  ${SUMMARY_CSV_COLUMNS.join(', ')}
status is estimated, no-picks or failed (the reason is in warnings). verdict is the
judgement on the thickness: resolved, rough (only roughly known) or unresolved (the
picks do not resolve it); verdict_text says it in one sentence with what to do. Classes list every
class the 95 % range allows, joined by "/". Every row carries the caution.

Options:
  --data DIR  Folder of the office store. Default ${DEFAULT_DATA_DIR}.
  -h, --help  Show this help.`;

const sitesSummary: Command = {
  name: 'sites-summary',
  summary: 'Re-run the estimate for every site into one summary CSV.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({ args, options: { data: { type: 'string', default: DEFAULT_DATA_DIR } }, allowPositionals: true, strict: true });
    if (positionals.length !== 1) throw new InputError('OUT.csv', 'Give one output file (or - for stdout), e.g. shearfield sites-summary summary.csv.');
    const live = liveSitesAndPicks(values.data!);
    const sites = live.sites.sort((a, b) => a.date.localeCompare(b.date) || a.name.localeCompare(b.name) || a.id.localeCompare(b.id));
    const picks = live.picks;
    const bySite = new Map<string, PickRecord[]>();
    for (const p of picks) bySite.set(p.siteId, [...(bySite.get(p.siteId) ?? []), p]);
    const summaries = sites.map((s) => summariseSite(s, bySite.get(s.id) ?? []));
    const csv = summaryToCsv(summaries);
    if (positionals[0] === '-') io.out(csv);
    else {
      writeFileSync(positionals[0], csv);
      const done = summaries.filter((s) => s.status === 'estimated').length;
      io.out(`Wrote ${summaries.length} sites to ${positionals[0]} (${done} estimated, ${summaries.length - done} without an estimate).\n`);
    }
    return 0;
  },
};

export default sitesSummary;

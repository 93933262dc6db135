/**
 * `shearfield conflicts [--data DIR] [--json]`: records edited in two
 * places from the same revision, waiting for review.
 */
import { parseArgs } from 'node:util';
import { InputError } from '../../core/shared/errors';
import type { AnyRecord } from '../../core/exchange/records';
import { revisionKey } from '../../core/exchange/revision';
import type { Command, CommandIO } from '../command';
import { DEFAULT_DATA_DIR, OfficeStore } from '../store';

const HELP = `Usage: shearfield conflicts [--data DIR] [--json]

Lists the records that were edited in two places from the same revision. Both versions
are kept: the record shows one (the higher revision, then the later save) and carries the
other for review. For each, the fields that differ are listed. A crew member resolves a
conflict in the app (or by editing the record), which supersedes the kept versions.

Options:
  --json      Print the records as JSON instead.
  --data DIR  Folder of the office store. Default ${DEFAULT_DATA_DIR}.
  -h, --help  Show this help.`;

const SKIP = new Set(['history', 'conflicts', 'rev', 'updatedAt']);

function differences(a: Record<string, unknown>, b: Record<string, unknown>): string[] {
  const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
  return [...keys].filter((k) => !SKIP.has(k) && JSON.stringify(a[k]) !== JSON.stringify(b[k])).sort();
}

function label(r: AnyRecord): string {
  return r.type === 'site' ? `site ${JSON.stringify(r.name)}` : `${r.type} of site ${r.siteId}`;
}

const conflicts: Command = {
  name: 'conflicts',
  summary: 'List records edited in two places, waiting for review.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({ args, options: { data: { type: 'string', default: DEFAULT_DATA_DIR }, json: { type: 'boolean', default: false } }, allowPositionals: true, strict: true });
    if (positionals.length > 0) throw new InputError('conflicts', 'conflicts takes no file names; use --data DIR to choose the store.');
    const store = OfficeStore.open(values.data!);
    let list: AnyRecord[];
    try {
      list = store.conflicted();
    } finally {
      store.close();
    }
    if (values.json) {
      io.out(JSON.stringify(list, null, 2) + '\n');
      return 0;
    }
    if (list.length === 0) {
      io.out('No conflicts: every record has one version.\n');
      return 0;
    }
    const lines = [`${list.length} record(s) with versions waiting for review:`];
    for (const r of list) {
      lines.push(``, `${label(r)} (id ${r.id})`, `  shown:  rev ${r.rev}, saved ${r.updatedAt}, key ${revisionKey(r)}`);
      for (const c of r.conflicts ?? []) {
        const diff = differences(r as unknown as Record<string, unknown>, c.record as unknown as Record<string, unknown>);
        lines.push(`  kept:   rev ${c.record.rev}, saved ${c.record.updatedAt}, key ${c.key}${c.from ? `, from ${c.from}` : ''}; differs in ${diff.join(', ') || 'nothing but its lineage'}`);
      }
    }
    io.out(lines.join('\n') + '\n');
    return 0;
  },
};

export default conflicts;

/**
 * `shearfield bundle-export OUT.json [--site ID ...] [--data DIR]`: writes
 * the office store (or some sites) as one site bundle.
 */
import { writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { bundleToJson, makeBundle } from '../../core/exchange/bundle';
import { InputError } from '../../core/shared/errors';
import type { Command, CommandIO } from '../command';
import { DEFAULT_DATA_DIR, OfficeStore } from '../store';

const HELP = `Usage: shearfield bundle-export OUT.json [--site SITE_ID ...] [--data DIR]

Writes every site in the office store (or only the --site ones) with its picks and
estimates as one site bundle (JSON, format version 1; schema/site-bundle.schema.json),
deletions and kept conflicts included, for a tablet to import. "-" writes to stdout.

Options:
  --site ID   Only this site (repeatable). Default: every site.
  --data DIR  Folder of the office store. Default ${DEFAULT_DATA_DIR}.
  -h, --help  Show this help.`;

const bundleExport: Command = {
  name: 'bundle-export',
  summary: 'Write sites from the office store as a site bundle for tablets.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      options: { data: { type: 'string', default: DEFAULT_DATA_DIR }, site: { type: 'string', multiple: true } },
      allowPositionals: true,
      strict: true,
    });
    if (positionals.length !== 1) throw new InputError('OUT.json', 'Give one output file (or - for stdout), e.g. shearfield bundle-export sites.json.');
    const store = OfficeStore.open(values.data!);
    try {
      const records = store.allRecords();
      const known = new Set(records.filter((r) => r.type === 'site').map((r) => r.id));
      for (const id of values.site ?? []) if (!known.has(id)) throw new InputError('--site', `No site with id ${JSON.stringify(id)} is in the office store.`);
      const bundle = makeBundle(records, { exportedBy: 'office', siteIds: values.site });
      const text = bundleToJson(bundle);
      if (positionals[0] === '-') io.out(text);
      else {
        writeFileSync(positionals[0], text);
        io.out(`Wrote ${bundle.sites.length} sites, ${bundle.picks.length} picks and ${bundle.estimates.length} estimates to ${positionals[0]}.\n`);
      }
    } finally {
      store.close();
    }
    return 0;
  },
};

export default bundleExport;

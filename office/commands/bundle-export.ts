/**
 * `shearfield bundle-export OUT.json [--site ID ...] [--data DIR]`: writes
 * the office store (or some sites) as one site bundle.
 */
import { writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { bundleRecords, bundleToJson, makeBundle, MAX_BUNDLE_CHARS } from '../../core/exchange/bundle';
import { checkRecordLimits } from '../../core/exchange/record-limits';
import type { StoredRecord } from '../../core/exchange/records';
import { InputError } from '../../core/shared/errors';
import type { Command, CommandIO } from '../command';
import { DEFAULT_DATA_DIR, OfficeStore } from '../store';

const HELP = `Usage: shearfield bundle-export OUT.json [--site SITE_ID ...] [--data DIR]

Writes every site in the office store (or only the --site ones) with its picks,
estimates and seismograph file records as one site bundle (JSON, format version 1;
schema/site-bundle.schema.json), deletions and kept conflicts included, for a tablet or
bundle-import to read. A seismograph file's raw bytes go in (base64, checked by SHA-256
on import) when its site chose to send them and the office holds them, as in the app's
bundles. "-" writes to stdout.
The file is compact JSON, one record per line, and always imports again: a record beyond
the record bound (32 levels, 262,144 characters) or a file over the bundle limit (64 Mi
characters) stops the export with a sentence saying which, and nothing is written.

Options:
  --site ID   Only this site (repeatable). Default: every site.
  --data DIR  Folder of the office store. Default ${DEFAULT_DATA_DIR}.
  -h, --help  Show this help.`;

/** Refuses a record the bundle check would refuse on import (one stored before the record bound existed). */
function checkExportable(rec: StoredRecord): void {
  try {
    checkRecordLimits(rec, '');
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const site = rec.type === 'site' ? rec.id : rec.siteId;
    throw new InputError(
      '--site',
      `${e.message.replace(/; it was refused\.$/, '')}, so a bundle holding it could not be imported again; nothing was written. Export the other sites with --site, leaving out site ${JSON.stringify(site)}.`,
    );
  }
}

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
      const { recordings, files } = store.recordingsForBundle(values.site);
      const bundle = makeBundle(records, { exportedBy: 'office', siteIds: values.site, recordings, recordingFiles: files });
      // The office's own export always imports again: every record within the record bound, the file within the bundle limit.
      for (const rec of [...bundleRecords(bundle), ...(bundle.recordings ?? [])]) checkExportable(rec);
      const text = bundleToJson(bundle);
      if (text.length > MAX_BUNDLE_CHARS) {
        throw new InputError(
          '--site',
          `The bundle would be ${text.length} characters, more than the ${MAX_BUNDLE_CHARS} a bundle may hold, so it could not be imported again; nothing was written. Export fewer sites per file with --site.`,
        );
      }
      if (positionals[0] === '-') io.out(text);
      else {
        writeFileSync(positionals[0], text);
        const held = bundle.recordings?.length ?? 0;
        const what = held > 0
          ? `${bundle.picks.length} picks, ${bundle.estimates.length} estimates and ${held} seismograph file records (${bundle.recordingFiles?.length ?? 0} with the raw file)`
          : `${bundle.picks.length} picks and ${bundle.estimates.length} estimates`;
        io.out(`Wrote ${bundle.sites.length} sites, ${what} to ${positionals[0]}.\n`);
      }
    } finally {
      store.close();
    }
    return 0;
  },
};

export default bundleExport;

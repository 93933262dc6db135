/**
 * `shearfield bundle-import FILE... [--data DIR]`: merges site bundles into
 * the office store with the sync rules, each file in one transaction.
 */
import { readFileSync, statSync } from 'node:fs';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { randomUUID } from 'node:crypto';
import { importSummary, MAX_BUNDLE_CHARS, parseBundle, bundleRecords } from '../../core/exchange/bundle';
import { fromBase64 } from '../../core/exchange/base64';
import { InputError } from '../../core/shared/errors';
import type { Command, CommandIO } from '../command';
import { busyMessage, DEFAULT_BUSY_TIMEOUT_MS, DEFAULT_DATA_DIR, isBusyError, OfficeStore } from '../store';

const HELP = `Usage: shearfield bundle-import FILE.json [FILE.json ...] [--data DIR]

Merges site bundles (exported by the app or by bundle-export) into the office store.
Records merge by id and revision: nothing is duplicated, a newer revision is never
replaced by an older one, and two versions edited side by side are both kept and
flagged for review (see shearfield conflicts). Each file is checked whole first; a bad
file changes nothing and the reason is printed. Importing the same file twice changes
nothing the second time.

Options:
  --data DIR  Folder of the office store (created if missing). Default ${DEFAULT_DATA_DIR}.
  --wait S    How long to wait, in seconds, while another writer (the office server, another
              command) holds the store, before giving up on a file. Default ${DEFAULT_BUSY_TIMEOUT_MS / 1000}.
  -h, --help  Show this help.

Exit status: 0 all files imported; 1 a file was refused or the store stayed busy (files before
it stay imported).`;

/** Reads and checks one bundle file; throws InputError naming the file. */
export function readBundleFile(path: string) {
  let text: string;
  try {
    if (statSync(path).size > MAX_BUNDLE_CHARS * 4) throw new InputError(path, `${path} is larger than a bundle can be.`);
    text = readFileSync(path, 'utf8');
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(path, `Cannot read ${path}: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (e as Error).message}.`);
  }
  try {
    return parseBundle(text);
  } catch (e) {
    if (e instanceof InputError) throw new InputError(e.field, `${basename(path)}: ${e.message} Nothing was imported from it.`);
    throw e;
  }
}

const bundleImport: Command = {
  name: 'bundle-import',
  summary: 'Merge site bundle files into the office store (same rules as sync).',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      options: { data: { type: 'string', default: DEFAULT_DATA_DIR }, wait: { type: 'string', default: String(DEFAULT_BUSY_TIMEOUT_MS / 1000) } },
      allowPositionals: true,
      strict: true,
    });
    if (positionals.length === 0) throw new InputError('FILE', 'Give at least one bundle file, e.g. shearfield bundle-import sites.json.');
    const wait = Number(values.wait);
    if (!/^\d+(\.\d+)?$/.test(values.wait!) || wait > 3600) {
      throw new InputError('--wait', `--wait must be a number of seconds from 0 to 3600, but it is ${JSON.stringify(values.wait)}.`);
    }
    const waitMs = Math.round(wait * 1000);
    const bundles = positionals.map((p) => [p, readBundleFile(p)] as const);
    const store = OfficeStore.open(values.data!, { create: true, busyTimeoutMs: waitMs });
    try {
      for (const [path, bundle] of bundles) {
        // The file's own claim of who exported it is shown as a claim, never as a device of this office.
        const source = `bundle ${basename(path)}${bundle.exportedBy ? ` (says exported by ${bundle.exportedBy})` : ''}`.slice(0, 200);
        let result;
        try {
          result = store.applyBatch(bundleRecords(bundle), { batchId: `bundle-${randomUUID()}`, source });
        } catch (e) {
          const earlier = bundles.findIndex(([p]) => p === path) > 0 ? ' (the files before it are imported)' : '';
          if (isBusyError(e)) throw new InputError(path, `${basename(path)}: ${busyMessage(waitMs)} Nothing was imported from it${earlier}.`);
          if (e instanceof InputError) throw new InputError(e.field, `${basename(path)}: ${e.message} Nothing was imported from it${earlier}.`);
          throw e;
        }
        io.out(`${basename(path)}: ${importSummary(bundle, result.plan)}\n`);
        if (bundle.recordings && bundle.recordings.length > 0) {
          // Seismograph file records (and the raw files the site chose to send), after their sites.
          const files = (bundle.recordingFiles ?? []).map((f, i) => ({ id: f.id, sha256: f.sha256, bytes: fromBase64(f.bytes_base64, `recordingFiles[${i}].bytes_base64`) }));
          try {
            const rec = store.applyRecordings(bundle.recordings, files, source);
            io.out(`${basename(path)}: ${bundle.recordings.length} seismograph file record(s), ${files.length} with the raw file: ${rec.accepted} new or newer, ${rec.ignored} already here or older${rec.conflicts > 0 ? `, ${rec.conflicts} conflict(s) kept for review` : ''}.\n`);
          } catch (e) {
            if (isBusyError(e)) throw new InputError(path, `${basename(path)}: the sites, picks and estimates are imported, but not its seismograph files: ${busyMessage(waitMs)}`);
            if (e instanceof InputError) throw new InputError(e.field, `${basename(path)}: the sites, picks and estimates are imported, but not its seismograph files: ${e.message}`);
            throw e;
          }
        }
      }
    } finally {
      store.close();
    }
    return 0;
  },
};

export default bundleImport;

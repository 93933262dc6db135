/**
 * `shearfield sites-export OUTDIR [--data DIR]`: every site as CSV and
 * GeoJSON, and each site's picks as a picks CSV file.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { CAUTION } from '../../core/shared/caution';
import { InputError } from '../../core/shared/errors';
import { sitesToGeoJson } from '../../core/exchange/geojson';
import { picksToCsv } from '../../core/picks/picks';
import { sitePicks, summariseSite, type SiteSummary } from '../../core/exchange/site-summary';
import { sitesToCsv } from '../../core/exchange/office-tables';
import type { SiteRecord } from '../../core/exchange/records';
import { liveSitesAndPicks } from '../cli-options';
import type { Command, CommandIO } from '../command';
import { DEFAULT_DATA_DIR } from '../store';

const HELP = `Usage: shearfield sites-export OUTDIR [--data DIR] [--no-estimate]

Writes into OUTDIR (created if missing):
  sites.csv          one row per site: site_id, name, date, crew, lat_deg, lon_deg,
                     location_accuracy_m, location_source, axis_unit, picks, rev, updated_at,
                     conflicts, notes, caution
  sites.geojson      RFC 7946 FeatureCollection: a Point [lon, lat] per located site with its
                     name, date, crew, the estimate (thickness and 95 % interval, speeds, Vs30
                     range) and site classes, re-run from the picks; and the caution
  picks/SITE_ID.csv  each site's live picks in the picks CSV format (frequency_hz or period_s,
                     velocity_m_s, sd_m_s, kind, mode, id, note, time), for spreadsheets: an
                     apostrophe goes before any text that could start a formula
  picks-raw/SITE_ID.csv  the same with the text exactly as stored, for Shearfield and scripts
                     (the app and shearfield estimate read it back exactly); do not open it in
                     a spreadsheet. A ":" in a site id is written %3A in these file names.
  CAUTION.txt        the screening caution
Every text cell of sites.csv gets the same apostrophe guard as picks/.
Deleted sites are left out.

Options:
  --no-estimate  Leave the estimate fields of sites.geojson empty (faster).
  --data DIR     Folder of the office store. Default ${DEFAULT_DATA_DIR}.
  -h, --help     Show this help.`;

/**
 * One picks file name per site, from its id (ids hold letters, digits and
 * . _ : -; ":" is written "%3A" so that "a:b" and "a_b" stay apart). Two
 * names that differ only in letter case would overwrite each other on
 * Windows and macOS disks: the export stops before writing anything.
 */
function pickFileNames(sites: readonly SiteRecord[]): Map<string, string> {
  const names = new Map<string, string>();
  const byFolded = new Map<string, string>();
  for (const s of sites) {
    const name = `${s.id.replace(/:/g, '%3A')}.csv`;
    const other = byFolded.get(name.toLowerCase());
    if (other !== undefined) {
      throw new InputError(
        'OUTDIR',
        `Sites ${JSON.stringify(other)} and ${JSON.stringify(s.id)} would write picks files whose names differ only in letter case, which many disks treat as one file; nothing was exported. Export one of them on its own with shearfield bundle-export --site.`,
      );
    }
    byFolded.set(name.toLowerCase(), s.id);
    names.set(s.id, name);
  }
  return names;
}

const sitesExport: Command = {
  name: 'sites-export',
  summary: 'Export every site as CSV and GeoJSON, and each site\'s picks as CSV.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      options: { data: { type: 'string', default: DEFAULT_DATA_DIR }, 'no-estimate': { type: 'boolean', default: false } },
      allowPositionals: true,
      strict: true,
    });
    if (positionals.length !== 1) throw new InputError('OUTDIR', 'Give one output folder, e.g. shearfield sites-export export/.');
    const { sites, picks } = liveSitesAndPicks(values.data!);
    const out = positionals[0];
    const names = pickFileNames(sites.filter((s) => sitePicks(s.id, picks).length > 0));
    mkdirSync(join(out, 'picks'), { recursive: true });
    const summaries = new Map<string, SiteSummary>();
    if (!values['no-estimate']) for (const s of sites) summaries.set(s.id, summariseSite(s, picks));
    writeFileSync(join(out, 'sites.csv'), sitesToCsv(sites, picks));
    writeFileSync(join(out, 'sites.geojson'), JSON.stringify(sitesToGeoJson(sites, summaries), null, 2) + '\n');
    writeFileSync(join(out, 'CAUTION.txt'), CAUTION + '\n');
    mkdirSync(join(out, 'picks-raw'), { recursive: true });
    let files = 0;
    for (const s of sites) {
      const own = sitePicks(s.id, picks);
      if (own.length === 0) continue;
      const name = names.get(s.id)!;
      writeFileSync(join(out, 'picks', name), picksToCsv(own, { forSpreadsheet: true }));
      writeFileSync(join(out, 'picks-raw', name), picksToCsv(own));
      files++;
    }
    io.out(
      `Wrote ${sites.length} sites to ${join(out, 'sites.csv')} and ${join(out, 'sites.geojson')}, and ${files} picks files to ${join(out, 'picks')} (for spreadsheets) and ${files} to ${join(out, 'picks-raw')} (exact text).\n`,
    );
    return 0;
  },
};

export default sitesExport;

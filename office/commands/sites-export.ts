/**
 * `shearfield sites-export OUTDIR [--data DIR]`: every site as CSV and
 * GeoJSON, each site's picks as a picks CSV file, and the seismograph files
 * the office holds with their list.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { CAUTION } from '../../core/shared/caution';
import { InputError } from '../../core/shared/errors';
import { sitesToGeoJson } from '../../core/exchange/geojson';
import { picksToCsv } from '../../core/picks/picks';
import { sitePicks, summariseSite, type SiteSummary } from '../../core/exchange/site-summary';
import { recordingsToCsv, sitesToCsv, type RecordingRow } from '../../core/exchange/office-tables';
import type { RecordingRecord, SiteRecord } from '../../core/exchange/records';
import { liveSitesAndPicks } from '../cli-options';
import type { Command, CommandIO } from '../command';
import { DEFAULT_DATA_DIR, OfficeStore } from '../store';

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
  recordings.csv     when the sites have seismograph files: one row per file (site_id,
                     recording_id, name, format, bytes, sha256, traces, samples,
                     sample_interval_s, delay_s, component, first_offset_m, spacing_m,
                     raw_file, file, caution); raw_file says whether the raw file is
                     written here, stayed on the tablet (the site's choice) or has not
                     reached the office
  models/SITE_ID.json  each site's layer-builder model, when it has one: a model file
                     (layers, halfspace; units in the field names) that shearfield curve
                     reads, with the site's id and name, what the crew typed for the P waves
                     (p_input: vp or poisson), the waves and modes drawn, and the caution
  recordings/SITE_ID/RECORDING_ID-NAME  each raw file the office holds, byte for byte
                     (the name as the crew gave it, with characters other than letters,
                     digits, . _ - written _)
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

/** The safe stem of an id in a file or folder name ("a:b" → "a%3Ab"). */
const idStem = (id: string) => id.replace(/:/g, '%3A');

/**
 * Where each held raw file goes, relative to OUTDIR: recordings/SITE/ID-NAME.
 * Stops before anything is written when two site folders, or two files in
 * one folder, would differ only in letter case (one file on many disks).
 */
function recordingPaths(recordings: readonly RecordingRecord[]): Map<string, string> {
  const paths = new Map<string, string>();
  const folded = new Map<string, string>();
  for (const r of recordings) {
    const name = r.name.replace(/[^A-Za-z0-9._-]+/g, '_').replace(/^[._]+/, '').slice(0, 80) || 'record';
    const path = `recordings/${idStem(r.siteId)}/${idStem(r.id)}-${name}`;
    const other = folded.get(path.toLowerCase());
    if (other !== undefined) {
      throw new InputError(
        'OUTDIR',
        `Seismograph files ${JSON.stringify(other)} and ${JSON.stringify(r.id)} would be written under names that differ only in letter case, which many disks treat as one file; nothing was exported. Export their sites one by one with shearfield bundle-export --site.`,
      );
    }
    folded.set(path.toLowerCase(), r.id);
    paths.set(r.id, path);
  }
  return paths;
}

/**
 * A site's layer-builder model as a model file (core/dispersion/model.ts
 * ModelJson: `shearfield curve` reads its layers and halfspace and ignores
 * the rest), with the site it belongs to, how it was typed and drawn, and
 * the caution.
 */
function siteModelFile(s: SiteRecord): Record<string, unknown> {
  const m = s.layeredModel!;
  return {
    site_id: s.id,
    site_name: s.name,
    layers: m.model.layers,
    halfspace: m.model.halfspace,
    p_input: m.pInput,
    waves: (['love', 'rayleigh'] as const).filter((w) => m.waves[w]),
    modes: m.modes,
    caution: CAUTION,
  };
}

const sitesExport: Command = {
  name: 'sites-export',
  summary: 'Export every site as CSV and GeoJSON, each site\'s picks as CSV, and the seismograph files the office holds.',
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
    const live = new Set(sites.map((s) => s.id));
    const store = OfficeStore.open(values.data!);
    try {
      const recordings = store
        .recordingRecords()
        .filter((r) => !r.deleted && live.has(r.siteId))
        .sort((a, b) => (a.siteId < b.siteId ? -1 : a.siteId > b.siteId ? 1 : a.addedAt.localeCompare(b.addedAt) || (a.id < b.id ? -1 : 1)));
      const paths = recordingPaths(recordings);
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
      // Seismograph files: each raw file the office holds, one file at a time, and the list of them all.
      const rows: RecordingRow[] = [];
      for (const r of recordings) {
        const bytes = store.recordingFile(r);
        if (!bytes) {
          rows.push({ recording: r });
          continue;
        }
        const path = paths.get(r.id)!;
        mkdirSync(join(out, path, '..'), { recursive: true });
        writeFileSync(join(out, path), bytes);
        rows.push({ recording: r, file: path });
      }
      if (recordings.length > 0) writeFileSync(join(out, 'recordings.csv'), recordingsToCsv(rows));
      const modelled = sites.filter((s) => s.layeredModel !== undefined);
      if (modelled.length > 0) {
        mkdirSync(join(out, 'models'), { recursive: true });
        const modelNames = pickFileNames(modelled);
        for (const s of modelled) writeFileSync(join(out, 'models', modelNames.get(s.id)!.replace(/\.csv$/, '.json')), JSON.stringify(siteModelFile(s), null, 2) + '\n');
      }
      const held = rows.filter((r) => r.file !== undefined).length;
      io.out(
        `Wrote ${sites.length} sites to ${join(out, 'sites.csv')} and ${join(out, 'sites.geojson')}, and ${files} picks files to ${join(out, 'picks')} (for spreadsheets) and ${files} to ${join(out, 'picks-raw')} (exact text)` +
          (recordings.length > 0 ? `, and ${recordings.length} seismograph files to ${join(out, 'recordings.csv')} (${held} raw files under ${join(out, 'recordings')})` : '') +
          (modelled.length > 0 ? `, and ${modelled.length} layer-builder model${modelled.length === 1 ? '' : 's'} to ${join(out, 'models')}.\n` : '.\n'),
      );
    } finally {
      store.close();
    }
    return 0;
  },
};

export default sitesExport;

/**
 * Office tables as CSV (RFC 4180: quoted fields, doubled quotes, CRLF):
 * the list of sites, and the per-site estimate summary. Numbers in SI units
 * named in the column; text as stored, except that an apostrophe goes
 * before every character that could start a formula in a spreadsheet, at
 * the start of the cell or after any separator a spreadsheet may split on
 * (core/shared/spreadsheet-text.ts).
 * Every table ends each row with the caution.
 */
import { CAUTION } from '../shared/caution';
import { spreadsheetSafeText } from '../shared/spreadsheet-text';
import type { PickRecord, RecordingRecord, SiteRecord } from './records';
import type { SiteSummary } from './site-summary';

function textCell(s: string | undefined): string {
  if (s === undefined || s === '') return '';
  const safe = spreadsheetSafeText(s);
  return /[",\r\n]/.test(safe) || safe !== safe.trim() ? `"${safe.replace(/"/g, '""')}"` : safe;
}

function numCell(x: number | undefined): string {
  return x === undefined || Number.isNaN(x) ? '' : String(x);
}

/** An interval or range end: empty when the data do not bound it (open), so no search-range value reads like a bound. */
function openCell(x: number | undefined, open: boolean | undefined): string {
  return open ? '' : numCell(x);
}

function table(header: readonly string[], rows: string[][]): string {
  return [header.join(','), ...rows.map((r) => r.join(','))].join('\r\n') + '\r\n';
}

/** The columns of the sites table, in order. */
export const SITES_CSV_COLUMNS = [
  'site_id',
  'name',
  'date',
  'crew',
  'lat_deg',
  'lon_deg',
  'location_accuracy_m',
  'location_source',
  'axis_unit',
  'picks',
  'rev',
  'updated_at',
  'conflicts',
  'notes',
  'caution',
] as const;

/** Every live (not deleted) site, one row each, sorted by date then name. */
export function sitesToCsv(sites: readonly SiteRecord[], picks: readonly PickRecord[]): string {
  const counts = new Map<string, number>();
  for (const p of picks) if (!p.deleted) counts.set(p.siteId, (counts.get(p.siteId) ?? 0) + 1);
  const live = sites.filter((s) => !s.deleted).sort((a, b) => a.date.localeCompare(b.date) || a.name.localeCompare(b.name) || a.id.localeCompare(b.id));
  return table(
    SITES_CSV_COLUMNS,
    live.map((s) => [
      textCell(s.id),
      textCell(s.name),
      textCell(s.date),
      textCell(s.crew),
      numCell(s.location?.lat),
      numCell(s.location?.lon),
      numCell(s.location?.accuracy_m),
      textCell(s.location?.source),
      s.axisUnit,
      String(counts.get(s.id) ?? 0),
      String(s.rev),
      textCell(s.updatedAt),
      String(s.conflicts?.length ?? 0),
      textCell(s.notes),
      textCell(CAUTION),
    ]),
  );
}

/** The columns of the summary table, in order. */
export const SUMMARY_CSV_COLUMNS = [
  'site_id',
  'name',
  'date',
  'picks',
  'status',
  'verdict',
  'verdict_text',
  'thickness_m',
  'thickness_68_low_m',
  'thickness_68_high_m',
  'thickness_95_low_m',
  'thickness_95_high_m',
  'vs1_m_s',
  'vs1_95_low_m_s',
  'vs1_95_high_m_s',
  'vs2_m_s',
  'vs2_95_low_m_s',
  'vs2_95_high_m_s',
  'vs30_m_s',
  'vs30_low_m_s',
  'vs30_high_m_s',
  'vs100ft_m_s',
  'class_asce7_16',
  'class_asce7_22',
  'class_en1998_1',
  'f0_hz',
  'f0_low_hz',
  'f0_high_hz',
  'warnings',
  'caution',
] as const;

/**
 * The estimate summary table, one row per site. `verdict` is the level
 * (resolved, rough, unresolved; core/estimate/verdict.ts) and `verdict_text`
 * its sentence, next to the thickness they judge. Speeds given (fixed) show
 * equal bounds; an end the data do not bound (an open interval end, or a
 * site figure made open by one) is an empty cell, never a number that reads
 * like a bound: the warnings say "thinner than", "at least" or "at most". An
 * open 95 % end opens that side at every level: the 68 % end on that side is
 * empty too (a closed 68 % end beside an open 95 % end would read as a bound
 * the data do not give). Classes
 * list every class the 95 % range allows, slowest first, joined by "/".
 * `warnings` joins the plain-words warnings (or the reason there is no
 * estimate) with " | ".
 */
export function summaryToCsv(summaries: readonly SiteSummary[]): string {
  return table(
    SUMMARY_CSV_COLUMNS,
    summaries.map((s) => {
      const f = s.figures;
      return [
        textCell(s.siteId),
        textCell(s.name),
        textCell(s.date),
        String(s.pickCount),
        s.status,
        s.verdict?.level ?? '',
        textCell(s.verdict?.text),
        numCell(s.thickness?.best),
        openCell(s.thickness?.low68, s.thickness?.openLow),
        openCell(s.thickness?.high68, s.thickness?.openHigh),
        openCell(s.thickness?.low95, s.thickness?.openLow),
        openCell(s.thickness?.high95, s.thickness?.openHigh),
        numCell(s.vs1?.best),
        openCell(s.vs1?.low95, s.vs1?.openLow),
        openCell(s.vs1?.high95, s.vs1?.openHigh),
        numCell(s.vs2?.best),
        openCell(s.vs2?.low95, s.vs2?.openLow),
        openCell(s.vs2?.high95, s.vs2?.openHigh),
        numCell(f?.vs30.best),
        openCell(f?.vs30.low, f?.vs30.openLow),
        openCell(f?.vs30.high, f?.vs30.openHigh),
        numCell(f?.vs100ft.best),
        textCell(f?.classes.asce7_16.join('/')),
        textCell(f?.classes.asce7_22.join('/')),
        textCell(f?.classes.en1998_1.join('/')),
        numCell(f?.f0_hz.best),
        openCell(f?.f0_hz.low, f?.f0_hz.openLow),
        openCell(f?.f0_hz.high, f?.f0_hz.openHigh),
        textCell((s.message ? [s.message, ...s.warnings] : s.warnings).join(' | ')),
        textCell(s.caution),
      ];
    }),
  );
}

/** The columns of the seismograph files table, in order. */
export const RECORDINGS_CSV_COLUMNS = [
  'site_id',
  'recording_id',
  'name',
  'format',
  'bytes',
  'sha256',
  'traces',
  'samples',
  'sample_interval_s',
  'delay_s',
  'component',
  'first_offset_m',
  'spacing_m',
  'raw_file',
  'file',
  'caution',
] as const;

/** The receiver spacing of offsets that are all known and evenly spaced (to 1 mm), else undefined. */
function evenSpacing(offsets: readonly (number | null)[]): number | undefined {
  if (offsets.length < 2 || offsets.some((o) => o === null)) return undefined;
  const o = offsets as number[];
  const d = o[1] - o[0];
  return o.every((x, k) => Math.abs(x - (o[0] + k * d)) <= 1e-3) ? d : undefined;
}

/** One live recording and where its raw file was written (relative path), if the office holds it. */
export interface RecordingRow {
  recording: RecordingRecord;
  file?: string;
}

/**
 * The seismograph files of the sites, one row per live recording, in the
 * given order. Geometry is the file's as read on the tablet, except that
 * `first_offset_m`/`spacing_m` and `delay_s`/`component` show what the crew
 * set over it when they did; `spacing_m` is empty when the file's offsets
 * are not evenly spaced and the crew set none. `raw_file` says whether the raw file is here
 * (`written`), stayed on the tablet by the site's choice (`kept on tablet`)
 * or was sent but has not reached the office (`not received`); `file` is the
 * path it was written to, relative to the export folder.
 */
export function recordingsToCsv(rows: readonly RecordingRow[]): string {
  return table(
    RECORDINGS_CSV_COLUMNS,
    rows
      .filter((r) => !r.recording.deleted)
      .map(({ recording: r, file }) => [
        textCell(r.siteId),
        textCell(r.id),
        textCell(r.name),
        r.format,
        String(r.byteLength),
        r.sha256,
        String(r.geometry.traces),
        String(r.geometry.samples),
        numCell(r.geometry.sample_interval_s),
        numCell(r.overrides.delay ?? r.geometry.delay_s),
        r.overrides.component ?? r.geometry.component,
        numCell(r.overrides.offsets?.first ?? r.geometry.offsets_m[0] ?? undefined),
        numCell(r.overrides.offsets?.spacing ?? evenSpacing(r.geometry.offsets_m)),
        file !== undefined ? 'written' : r.attach ? 'not received' : 'kept on tablet',
        textCell(file),
        textCell(CAUTION),
      ]),
  );
}

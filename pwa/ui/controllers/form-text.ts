/**
 * The text the forms show and the names they edit: site-form fields, the
 * picks table's text columns and the estimate settings with their labels.
 * Pure helpers, shared by the controllers that commit the text and the
 * views that show it.
 */
import type { PickRecord, SiteRecord } from '../../../core/exchange/records';

/** The text fields of the site form. */
export type SiteTextField = 'name' | 'date' | 'crew' | 'notes' | 'lat' | 'lon';

/** Columns of the picks table that hold typed text. */
export type PickTextColumn = 'frequency_hz' | 'period_s' | 'velocity_m_s' | 'sd_m_s' | 'mode';

/** The estimate settings the form edits. */
export type SettingKey =
  | 'vs1'
  | 'vs2'
  | 'density1'
  | 'density2'
  | 'vs1Lo'
  | 'vs1Hi'
  | 'vs2Lo'
  | 'vs2Hi'
  | 'hLo'
  | 'hHi';

export type RangeName = 'vs1Range' | 'vs2Range' | 'thicknessRange';

/** Labels, units and range pairing of each setting, for the form and its messages. */
export const SETTING_FIELDS: Record<SettingKey, { label: string; unit: string; range?: [RangeName, 0 | 1]; pair?: SettingKey }> = {
  vs1: { label: 'Known layer shear speed β1', unit: 'm/s' },
  vs2: { label: 'Known half-space shear speed β2', unit: 'm/s' },
  density1: { label: 'Layer density ρ1', unit: 'kg/m³' },
  density2: { label: 'Half-space density ρ2', unit: 'kg/m³' },
  vs1Lo: { label: 'Lowest β1 to search', unit: 'm/s', range: ['vs1Range', 0], pair: 'vs1Hi' },
  vs1Hi: { label: 'Highest β1 to search', unit: 'm/s', range: ['vs1Range', 1], pair: 'vs1Lo' },
  vs2Lo: { label: 'Lowest β2 to search', unit: 'm/s', range: ['vs2Range', 0], pair: 'vs2Hi' },
  vs2Hi: { label: 'Highest β2 to search', unit: 'm/s', range: ['vs2Range', 1], pair: 'vs2Lo' },
  hLo: { label: 'Thinnest layer to search', unit: 'm', range: ['thicknessRange', 0], pair: 'hHi' },
  hHi: { label: 'Thickest layer to search', unit: 'm', range: ['thicknessRange', 1], pair: 'hLo' },
};

/** The text of one end of a stored range ('' when the range is not set). */
export function rangeEndText(range: readonly [number, number] | undefined, end: 0 | 1): string {
  return range ? String(range[end]) : '';
}

/** The text the settings form shows for a key: the typed draft, else the stored value. */
export function settingText(site: SiteRecord, drafts: Readonly<Record<string, string>>, key: SettingKey): string {
  const d = drafts[`set.${key}`];
  if (d !== undefined) return d;
  const meta = SETTING_FIELDS[key];
  if (meta.range) return rangeEndText(site.settings[meta.range[0]], meta.range[1]);
  const v = site.settings[key as 'vs1' | 'vs2' | 'density1' | 'density2'];
  return v === undefined ? '' : String(v);
}

/** The text of a stored pick's cell, as the table shows it. */
export function cellText(p: PickRecord, column: PickTextColumn): string {
  const num = (x: number | undefined) => (x === undefined || !Number.isFinite(x) ? '' : String(Number(x.toPrecision(10))));
  switch (column) {
    case 'frequency_hz':
      return num(p.frequency);
    case 'period_s':
      return num(p.period ?? 1 / p.frequency);
    case 'velocity_m_s':
      return num(p.velocity);
    case 'sd_m_s':
      return num(p.sd);
    case 'mode':
      return String(p.mode);
  }
}

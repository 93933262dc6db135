/**
 * The app controller: owns the state object, and every piece of async work
 * (store reads and writes, geolocation, the compute worker). Components only
 * read the state and call these actions; they never await anything.
 *
 * Rules kept here:
 * - Every edit saves at once through the store (no save button).
 * - A refused or failed write tells the crew, and the typed text stays on
 *   screen (drafts), so nothing typed is lost.
 * - A new input aborts the stale estimate (AbortController per run).
 */
import { DEMO_SITE, demoPicks } from '../../core/exchange/demo';
import { InputError } from '../../core/shared/errors';
import { checkPickSet, checkPicksCsv, pickFromCells, type Pick, type PickCells, type PickKind } from '../../core/picks/picks';
import { nextRevision, type EstimateSettings, type PickRecord, type SiteRecord } from '../../core/exchange/records';
import { newEstimate, newPick, newSite, pickOf, type FieldStore } from '../store';
import { estimateSummary } from '../../core/estimate/estimate-json';
import type { EstimateResult } from '../../core/estimate/estimate';
import type { MisfitSlice } from '../../core/estimate/misfit-slice';
import { runEstimate, runMisfitSlice, type EstimateOutcome } from './compute';
import {
  initialState,
  NEW_ROW,
  replaceById,
  without,
  type AppState,
  type PlotSettings,
  type RowDraft,
  type SiteSort,
  type Theme,
  type ViewName,
  type WhatIfModel,
} from './state';

type Listener = (s: AppState) => void;

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

type RangeName = 'vs1Range' | 'vs2Range' | 'thicknessRange';

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

/** How long the store may take to open before the crew is told, ms. */
const STORE_OPEN_PATIENCE_MS = 8000;

/** Delay before an estimate starts after the last change, ms (lets a burst of edits settle). */
const ESTIMATE_DELAY_MS = 250;

function messageOf(e: unknown): string {
  if (e instanceof Error) return e.message;
  return String(e);
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

/** How the controller runs the estimate (the worker bridge in the app; tests may pass their own). */
export type EstimateRunner = (picks: readonly Pick[], settings: EstimateSettings, signal: AbortSignal) => Promise<EstimateOutcome>;
/** How the controller asks for the fine misfit picture after an estimate. */
export type SliceRunner = (
  picks: readonly Pick[],
  settings: EstimateSettings,
  result: EstimateOutcome,
  signal: AbortSignal,
) => Promise<MisfitSlice>;

export class Controller {
  constructor(
    private readonly estimate: EstimateRunner = runEstimate,
    private readonly slice: SliceRunner = runMisfitSlice,
  ) {}

  private state: AppState = initialState;
  private listeners = new Set<Listener>();
  private store?: FieldStore;
  private noticeSeq = 0;
  private estimateAbort?: AbortController;
  private estimateTimer?: ReturnType<typeof setTimeout>;
  /** The chain of estimate saves (one at a time). */
  private keeping: Promise<void> = Promise.resolve();

  get current(): AppState {
    return this.state;
  }

  subscribe(fn: Listener): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }

  private set(patch: Partial<AppState>): void {
    this.state = { ...this.state, ...patch };
    for (const fn of this.listeners) fn(this.state);
  }

  private site(): SiteRecord | undefined {
    return this.state.sites.find((s) => s.id === this.state.openSiteId);
  }

  // ---- start-up -------------------------------------------------------

  /** Opens the app on a store: reads the sites and the saved theme. */
  async start(openStore: () => Promise<FieldStore>): Promise<void> {
    const online = typeof navigator !== 'undefined' ? navigator.onLine : true;
    if (typeof window !== 'undefined') {
      window.addEventListener('online', () => this.set({ online: true }));
      window.addEventListener('offline', () => this.set({ online: false }));
    }
    // If the database does not answer (another tab holding an old version open), say so while waiting.
    const slow = setTimeout(
      () =>
        this.notify(
          'error',
          'The on-device store is taking long to open. If Shearfield is open in another tab or window, close it; otherwise reload the page.',
        ),
      STORE_OPEN_PATIENCE_MS,
    );
    try {
      this.store = await openStore();
      const [sites, theme] = await Promise.all([this.store.listSites(), this.store.getSetting<Theme>('theme')]);
      this.set({ ready: true, online, sites, theme: theme === 'sun' ? 'sun' : 'standard' });
    } catch (e) {
      this.set({ ready: true, online, fatal: messageOf(e) });
    } finally {
      clearTimeout(slow);
    }
  }

  /**
   * Re-reads the site list (and the open site's picks) after records arrived
   * from outside the controller: an office sync or a bundle import
   * (pwa/ui/SyncPanel.tsx).
   */
  async reloadFromStore(): Promise<void> {
    if (!this.store) return;
    const sites = await this.store.listSites();
    this.set({ sites });
    await this.reloadPicks();
  }

  notify(tone: 'error' | 'info', text: string): void {
    const id = ++this.noticeSeq;
    this.set({ notices: [...this.state.notices, { id, tone, text }].slice(-4) });
    if (tone === 'info') setTimeout(() => this.dismiss(id), 6000);
  }

  dismiss(id: number): void {
    this.set({ notices: this.state.notices.filter((n) => n.id !== id) });
  }

  /** A new version is ready; `apply` reloads into it. */
  offerUpdate(apply: () => void): void {
    this.set({ updateReady: apply });
  }

  /** Reloads into the new version, but only once every typed row is saved. */
  async applyUpdate(): Promise<void> {
    for (const key of Object.keys(this.state.drafts)) await this.commitRow(key, true);
    const left = Object.keys(this.state.drafts).length + Object.keys(this.state.siteDraft).length;
    if (left > 0) {
      this.notify(
        'error',
        `The update waits: ${left} typed value(s) are not saved yet. Correct or clear the rows marked in red, then update.`,
      );
      return;
    }
    this.state.updateReady?.();
  }

  dismissUpdate(): void {
    this.set({ updateReady: undefined });
  }

  async setTheme(theme: Theme): Promise<void> {
    this.set({ theme });
    try {
      await this.store?.putSetting('theme', theme);
    } catch (e) {
      this.notify('error', `The theme choice was not kept for next time: ${messageOf(e)}`);
    }
  }

  // ---- sites ----------------------------------------------------------

  setSiteQuery(siteQuery: string): void {
    this.set({ siteQuery });
  }

  setSiteSort(siteSort: SiteSort): void {
    this.set({ siteSort });
  }

  /** Creates a site with a name and opens it at its details. */
  async createSite(name: string): Promise<boolean> {
    if (!this.store) return false;
    const site = newSite({ name: name.trim() });
    try {
      const saved = await this.store.saveSite(site);
      this.set({ sites: [saved, ...this.state.sites], siteError: undefined });
      this.openSite(saved.id, 'details');
      return true;
    } catch (e) {
      this.set({ siteError: { field: 'new-name', text: messageOf(e) } });
      return false;
    }
  }

  openSite(id: string, view: ViewName = 'picks'): void {
    this.estimateAbort?.abort();
    const site = this.state.sites.find((s) => s.id === id);
    this.set({
      plot: { ...this.state.plot, axis: site?.axisUnit === 's' ? 'period' : 'frequency' },
      openSiteId: id,
      view,
      picks: [],
      drafts: {},
      selectedPickId: undefined,
      undo: undefined,
      siteDraft: {},
      siteError: undefined,
      importState: { text: '', replace: false },
      estimate: { status: 'idle' },
      whatif: undefined,
    });
    void this.loadPicks(id);
  }

  closeSite(): void {
    this.estimateAbort?.abort();
    if (Object.keys(this.state.drafts).length > 0 || Object.keys(this.state.siteDraft).length > 0) {
      this.notify('error', 'This site has typed values that are not saved; correct or clear them before leaving.');
      return;
    }
    this.set({ openSiteId: undefined, picks: [], undo: undefined, estimate: { status: 'idle' } });
  }

  setView(view: ViewName): void {
    this.set({ view });
  }

  private async loadPicks(siteId: string): Promise<void> {
    if (!this.store) return;
    try {
      const picks = await this.store.listPicks(siteId);
      if (this.state.openSiteId !== siteId) return;
      this.set({ picks });
      this.scheduleEstimate();
    } catch (e) {
      this.notify('error', messageOf(e));
    }
  }

  private async reloadPicks(): Promise<void> {
    const id = this.state.openSiteId;
    if (!id || !this.store) return;
    const picks = await this.store.listPicks(id);
    if (this.state.openSiteId === id) this.set({ picks });
  }

  /** Saves a site revision; on failure the typed text stays in siteDraft with the message. */
  private async saveSiteChanges(changes: Partial<SiteRecord>, draftKeys: string[]): Promise<boolean> {
    const site = this.site();
    if (!site || !this.store) return false;
    try {
      const saved = await this.store.saveSite(nextRevision(site, changes));
      let siteDraft = this.state.siteDraft;
      for (const k of draftKeys) siteDraft = without(siteDraft, k);
      this.set({ sites: replaceById(this.state.sites, saved), siteDraft, siteError: undefined });
      return true;
    } catch (e) {
      this.set({ siteError: { field: draftKeys[0] ?? 'site', text: messageOf(e) } });
      return false;
    }
  }

  /** Typing in the site form: kept as text until committed. */
  editSiteField(field: SiteTextField, text: string): void {
    this.set({ siteDraft: { ...this.state.siteDraft, [field]: text } });
  }

  /** Commits one site-form field (on change / blur). */
  async commitSiteField(field: SiteTextField): Promise<void> {
    const site = this.site();
    const text = this.state.siteDraft[field];
    if (!site || text === undefined) return;
    if (field === 'lat' || field === 'lon') {
      const latText = this.state.siteDraft.lat ?? (site.location ? String(site.location.lat) : '');
      const lonText = this.state.siteDraft.lon ?? (site.location ? String(site.location.lon) : '');
      if (latText.trim() === '' && lonText.trim() === '') {
        await this.saveSiteChanges({ location: undefined }, ['lat', 'lon']);
        return;
      }
      const lat = Number(latText.trim());
      const lon = Number(lonText.trim());
      if (latText.trim() === '' || lonText.trim() === '') {
        // Wait for the other half; nothing to save yet.
        return;
      }
      if (!Number.isFinite(lat) || lat < -90 || lat > 90) {
        this.set({ siteError: { field: 'lat', text: `Latitude must be a number of degrees from -90 to 90, but it is "${latText}".` } });
        return;
      }
      if (!Number.isFinite(lon) || lon < -180 || lon > 180) {
        this.set({ siteError: { field: 'lon', text: `Longitude must be a number of degrees from -180 to 180, but it is "${lonText}".` } });
        return;
      }
      await this.saveSiteChanges({ location: { lat, lon, source: 'typed' } }, ['lat', 'lon']);
      return;
    }
    await this.saveSiteChanges({ [field]: field === 'name' ? text.trim() : text } as Partial<SiteRecord>, [field]);
  }

  /** Asks the device for its position and stores it on the open site. */
  locate(): void {
    if (typeof navigator === 'undefined' || !navigator.geolocation) {
      this.notify('error', 'This device gives no position; type the latitude and longitude instead.');
      return;
    }
    this.set({ locating: true });
    navigator.geolocation.getCurrentPosition(
      (pos) => {
        this.set({ locating: false });
        void this.saveSiteChanges(
          {
            location: {
              lat: pos.coords.latitude,
              lon: pos.coords.longitude,
              accuracy_m: pos.coords.accuracy,
              source: 'device',
            },
          },
          ['lat', 'lon'],
        );
      },
      (err) => {
        this.set({ locating: false });
        this.notify('error', `The device did not give a position (${err.message || 'permission refused or no fix'}); type it instead.`);
      },
      { enableHighAccuracy: true, timeout: 20_000, maximumAge: 60_000 },
    );
  }

  async setAxisUnit(axisUnit: 'hz' | 's'): Promise<void> {
    if (Object.keys(this.state.drafts).length > 0) {
      this.notify('error', 'Finish or clear the rows being typed before switching between Hz and s.');
      return;
    }
    if (await this.saveSiteChanges({ axisUnit }, [])) {
      this.set({ plot: { ...this.state.plot, axis: axisUnit === 's' ? 'period' : 'frequency' } });
    }
  }

  async updateSettings(settings: EstimateSettings): Promise<void> {
    if (await this.saveSiteChanges({ settings }, [])) this.scheduleEstimate();
  }

  /** Typing in the estimate settings form: kept as text until committed. */
  editSetting(key: SettingKey, text: string): void {
    this.set({ siteDraft: { ...this.state.siteDraft, [`set.${key}`]: text } });
  }

  /** Marks a speed as known (shows its box, prefilled) or free (clears it). */
  async setKnown(which: 'vs1' | 'vs2', known: boolean, suggestion?: number): Promise<void> {
    const site = this.site();
    if (!site) return;
    if (known) {
      const text = suggestion !== undefined && Number.isFinite(suggestion) ? String(Math.round(suggestion)) : '';
      this.set({ siteDraft: { ...this.state.siteDraft, [`set.${which}`]: text } });
      if (text) await this.commitSetting(which);
      return;
    }
    this.set({ siteDraft: without(this.state.siteDraft, `set.${which}`) });
    const settings: EstimateSettings = { ...site.settings };
    delete settings[which];
    await this.updateSettings(settings);
  }

  /** Commits one estimate setting: a number, or empty for the default. */
  async commitSetting(key: SettingKey): Promise<void> {
    const site = this.site();
    const text = this.state.siteDraft[`set.${key}`];
    if (!site || text === undefined) return;
    const meta = SETTING_FIELDS[key];
    const t = text.trim();
    const value = t === '' ? undefined : Number(t.replace(',', '.'));
    if (value !== undefined && !Number.isFinite(value)) {
      this.set({ siteError: { field: `set.${key}`, text: `${meta.label} must be a number in ${meta.unit}, but it is "${t}".` } });
      return;
    }
    const settings: EstimateSettings = { ...site.settings };
    if (meta.range) {
      const [name, end] = meta.range;
      const other = (this.state.siteDraft[`set.${meta.pair}`] ?? rangeEndText(site.settings[name], end === 0 ? 1 : 0)).trim();
      const otherValue = other === '' ? undefined : Number(other.replace(',', '.'));
      if (value === undefined && otherValue === undefined) delete settings[name];
      else if (value === undefined || otherValue === undefined || !Number.isFinite(otherValue)) {
        // The other end is still missing: keep the text, wait.
        this.set({ siteError: { field: `set.${key}`, text: `${meta.label}: give both ends of the search range, or neither (then the default range is used).` } });
        return;
      } else {
        settings[name] = end === 0 ? [value, otherValue] : [otherValue, value];
      }
      if (await this.saveSiteChanges({ settings }, [`set.${key}`, `set.${meta.pair}`])) this.scheduleEstimate();
      return;
    }
    const name = key as 'vs1' | 'vs2' | 'density1' | 'density2';
    if (value === undefined) delete settings[name];
    else settings[name] = value;
    if (await this.saveSiteChanges({ settings }, [`set.${key}`])) this.scheduleEstimate();
  }

  async deleteOpenSite(): Promise<void> {
    const site = this.site();
    if (!site || !this.store) return;
    try {
      await this.store.deleteSite(site.id);
      this.set({
        sites: this.state.sites.filter((s) => s.id !== site.id),
        openSiteId: undefined,
        picks: [],
        drafts: {},
        siteDraft: {},
        undo: undefined,
      });
      this.notify('info', `The site "${site.name}" was deleted.`);
    } catch (e) {
      this.notify('error', messageOf(e));
    }
  }

  /** Installs the invented demo site with its picks and opens it. */
  async loadDemo(): Promise<void> {
    if (!this.store) return;
    const site = newSite({ ...DEMO_SITE, location: { ...DEMO_SITE.location } });
    const picks = demoPicks().map((p, i) => newPick(site.id, p, i));
    try {
      const saved = await this.store.saveSite(site);
      await this.store.savePicks(picks);
      this.set({ sites: [saved, ...this.state.sites] });
      this.openSite(saved.id, 'picks');
      this.notify('info', 'The invented demo site is loaded. Its picks come from a made-up model with seeded noise.');
    } catch (e) {
      this.notify('error', `The demo site could not be installed: ${messageOf(e)}`);
    }
  }

  // ---- picks ----------------------------------------------------------

  selectPick(id: string | undefined): void {
    this.set({ selectedPickId: id });
  }

  /** Typing in a cell: kept as text until the row is committed. */
  editCell(rowKey: string, column: PickTextColumn, text: string): void {
    const d = this.state.drafts[rowKey] ?? { cells: {} };
    // Typing into the new row while its last pick is still being saved starts
    // the next pick: none of the saving pick's values carry over into it.
    const next = d.saving && rowKey === NEW_ROW && !d.next ? { cells: {}, saving: true, next: true } : d;
    const cells: PickCells = { ...next.cells, [column]: text };
    this.set({ drafts: { ...this.state.drafts, [rowKey]: { ...next, cells, error: undefined, errorColumn: undefined } } });
  }

  /** Choosing group or phase commits a stored row at once (the new row waits for its numbers). */
  async setKind(rowKey: string, kind: PickKind): Promise<void> {
    const d = this.state.drafts[rowKey] ?? { cells: {} };
    this.set({ drafts: { ...this.state.drafts, [rowKey]: { ...d, kind } } });
    if (rowKey !== NEW_ROW) await this.commitRow(rowKey);
  }

  /** Clears a row's unsaved text (the stored pick shows again). */
  discardDraft(rowKey: string): void {
    this.set({ drafts: without(this.state.drafts, rowKey) });
  }

  /**
   * The drafts once a row's save has ended: the saved draft goes, unless the
   * crew typed in that row (or changed its kind) while it was saving; then
   * what they typed stays, ready for its own commit.
   */
  private draftsAfterSave(rowKey: string, saved: RowDraft): Record<string, RowDraft> {
    const current = this.state.drafts[rowKey];
    if (!current || (current.cells === saved.cells && current.kind === saved.kind)) {
      return without(this.state.drafts, rowKey);
    }
    return { ...this.state.drafts, [rowKey]: { ...current, saving: false, next: undefined } };
  }

  private setDraft(rowKey: string, patch: Partial<RowDraft>): void {
    const d = this.state.drafts[rowKey] ?? { cells: {} };
    this.set({ drafts: { ...this.state.drafts, [rowKey]: { ...d, ...patch } } });
  }

  /**
   * Checks and saves one row. The new row waits until it has a frequency (or
   * period) and a velocity, unless `force` (Enter) asks for the check now.
   */
  async commitRow(rowKey: string, force = false): Promise<void> {
    const site = this.site();
    const draft = this.state.drafts[rowKey];
    if (!site || !this.store || !draft) return;
    if (draft.saving) {
      // The row's last save is still running: commit again when it ends, so nothing typed meanwhile is lost.
      this.setDraft(rowKey, { pendingCommit: { force: force || (draft.pendingCommit?.force ?? false) } });
      return;
    }
    const unit = site.axisUnit;
    const absCol = unit === 's' ? 'period_s' : 'frequency_hz';
    const isNew = rowKey === NEW_ROW;
    const rec = isNew ? undefined : this.state.picks.find((p) => p.id === rowKey);
    if (!isNew && !rec) {
      this.discardDraft(rowKey);
      return;
    }
    const index = isNew ? this.state.picks.length : this.state.picks.indexOf(rec!);
    const where = `pick ${index + 1}`;

    // The row's cells: typed text where the crew typed, else the stored values.
    const cells: PickCells = {};
    const typed = draft.cells;
    if (typed.frequency_hz !== undefined || typed.period_s !== undefined) {
      if (typed.frequency_hz !== undefined) cells.frequency_hz = typed.frequency_hz;
      else cells.period_s = typed.period_s;
    } else if (rec) {
      if (rec.period !== undefined) cells.period_s = String(rec.period);
      else cells.frequency_hz = String(rec.frequency);
    }
    cells.velocity_m_s = typed.velocity_m_s ?? (rec ? String(rec.velocity) : undefined);
    const sdText = typed.sd_m_s ?? (rec?.sd !== undefined ? String(rec.sd) : '');
    if (sdText.trim() !== '') cells.sd_m_s = sdText;
    const modeText = typed.mode ?? (rec ? String(rec.mode) : '');
    if (modeText.trim() !== '') cells.mode = modeText;
    cells.kind = draft.kind ?? rec?.kind ?? 'group';

    if (isNew) {
      const hasAbs = (cells[absCol] ?? cells.frequency_hz ?? cells.period_s ?? '').trim() !== '';
      const hasVel = (cells.velocity_m_s ?? '').trim() !== '';
      const anything = Object.values(typed).some((t) => t !== undefined && t.trim() !== '');
      if (!anything) {
        if (!draft.kind) this.discardDraft(rowKey);
        return;
      }
      if (!force && !(hasAbs && hasVel)) return;
      if (!hasAbs) {
        const column = unit === 's' ? 'period_s' : 'frequency_hz';
        this.setDraft(rowKey, {
          error: `Pick ${index + 1}, column ${column}: is empty; give the ${unit === 's' ? 'period in s' : 'frequency in Hz'}.`,
          errorColumn: column,
        });
        return;
      }
    }

    let pick: Pick;
    try {
      pick = pickFromCells(cells, where);
      const others = this.state.picks.filter((p) => p.id !== rowKey).map(pickOf);
      const all = [...others, pick];
      checkPickSet(all, (i) => (i === all.length - 1 ? where : `pick ${this.state.picks.indexOf(this.state.picks.filter((p) => p.id !== rowKey)[i]) + 1}`));
    } catch (e) {
      const column = e instanceof InputError ? e.field.split(', ').pop() : undefined;
      this.setDraft(rowKey, { error: messageOf(e), errorColumn: column });
      return;
    }

    this.setDraft(rowKey, { saving: true, error: undefined, errorColumn: undefined });
    try {
      if (isNew) {
        const order = this.state.picks.reduce((m, p) => Math.max(m, p.order + 1), 0);
        const saved = await this.store.savePick(newPick(site.id, pick, order));
        this.set({
          picks: [...this.state.picks, saved],
          drafts: this.draftsAfterSave(rowKey, draft),
          undo: { label: `adding pick ${index + 1}`, revert: () => this.removePick(saved.id) },
        });
      } else {
        const changes: Partial<PickRecord> = { ...pick, period: pick.period, sd: pick.sd };
        const saved = await this.store.savePick(nextRevision(rec!, changes));
        const before = rec!;
        this.set({
          picks: replaceById(this.state.picks, saved),
          drafts: this.draftsAfterSave(rowKey, draft),
          undo: { label: `the change to pick ${index + 1}`, revert: () => this.restorePick(before) },
        });
      }
      this.scheduleEstimate();
      const pending = this.state.drafts[rowKey]?.pendingCommit;
      if (pending) {
        this.setDraft(rowKey, { pendingCommit: undefined });
        await this.commitRow(rowKey, pending.force);
      }
    } catch (e) {
      this.setDraft(rowKey, { saving: false, next: undefined, pendingCommit: undefined, error: `${messageOf(e)} Your input is kept on screen.` });
      this.notify('error', `Pick ${index + 1} was not saved: ${messageOf(e)}`);
    }
  }

  /** Deletes a pick (a tombstone revision in the store); undo brings it back. */
  async deletePick(id: string): Promise<void> {
    const rec = this.state.picks.find((p) => p.id === id);
    if (!rec || !this.store) return;
    const index = this.state.picks.indexOf(rec);
    try {
      await this.store.deletePick(id);
      this.set({
        picks: this.state.picks.filter((p) => p.id !== id),
        drafts: without(this.state.drafts, id),
        selectedPickId: this.state.selectedPickId === id ? undefined : this.state.selectedPickId,
        undo: {
          label: `deleting pick ${index + 1}`,
          revert: () => this.revivePick(rec),
        },
      });
      this.scheduleEstimate();
    } catch (e) {
      this.notify('error', `Pick ${index + 1} was not deleted: ${messageOf(e)}`);
    }
  }

  /** Takes back the last change. */
  async undo(): Promise<void> {
    const u = this.state.undo;
    if (!u) return;
    try {
      await u.revert();
      this.set({ undo: undefined });
      this.notify('info', `Undone: ${u.label}.`);
      this.scheduleEstimate();
    } catch (e) {
      this.notify('error', `Could not undo ${u.label}: ${messageOf(e)}`);
    }
  }

  private async removePick(id: string): Promise<void> {
    await this.store!.deletePick(id);
    this.set({ picks: this.state.picks.filter((p) => p.id !== id) });
  }

  /** Writes the earlier values of a pick back as a new revision. */
  private async restorePick(before: PickRecord): Promise<void> {
    const now = this.state.picks.find((p) => p.id === before.id);
    if (!now) throw new Error('the pick is no longer in the table');
    const { id: _i, rev: _r, updatedAt: _u, type: _t, ...values } = before;
    const saved = await this.store!.savePick(nextRevision(now, { ...values, period: before.period, sd: before.sd }));
    this.set({ picks: replaceById(this.state.picks, saved) });
  }

  /** The stored versions (tombstones included) of some picks, by id. */
  private async storedPicks(ids: readonly string[]): Promise<Map<string, PickRecord>> {
    const want = new Set(ids);
    const out = new Map<string, PickRecord>();
    for (const r of await this.store!.allRecords()) {
      if (r.type === 'pick' && want.has(r.id)) out.set(r.id, r);
    }
    return out;
  }

  /** A live revision of a stored (deleted) pick. */
  private static revived(tomb: PickRecord): PickRecord {
    const alive = nextRevision(tomb, {} as Partial<PickRecord>);
    delete (alive as { deleted?: boolean }).deleted;
    return alive;
  }

  /** Brings a deleted pick back (the tombstone gets a live revision). */
  private async revivePick(rec: PickRecord): Promise<void> {
    const tomb = (await this.storedPicks([rec.id])).get(rec.id);
    if (!tomb) throw new Error('the pick is no longer in the store');
    const saved = await this.store!.savePick(Controller.revived(tomb));
    const picks = [...this.state.picks, saved].sort((a, b) => a.order - b.order);
    this.set({ picks });
  }

  // ---- CSV import -------------------------------------------------------

  setImportText(text: string): void {
    this.set({ importState: { ...this.state.importState, text, error: undefined, problems: undefined, moreProblems: undefined, info: undefined } });
  }

  setImportReplace(replace: boolean): void {
    this.set({ importState: { ...this.state.importState, replace } });
  }

  /** Reads a chosen CSV file and imports it (all or nothing). */
  async importFile(file: File): Promise<void> {
    let text: string;
    try {
      text = await file.text();
    } catch (e) {
      this.set({
        importState: {
          ...this.state.importState,
          info: undefined,
          problems: undefined,
          moreProblems: undefined,
          error: `The file ${file.name} could not be read: ${messageOf(e)}`,
        },
      });
      return;
    }
    await this.importCsv(text, `the file ${file.name}`);
  }

  /**
   * Imports picks from CSV text through the core reader. All or nothing: the
   * whole file is checked first, every bad row is listed (row, line, column
   * and reason; checkPicksCsv caps the list) and nothing is written, the
   * text staying on screen to be fixed; a good file is written in one
   * transaction (replacing the table's picks when asked).
   */
  async importCsv(text: string, source = 'the pasted text'): Promise<void> {
    const site = this.site();
    if (!site || !this.store) return;
    const check = checkPicksCsv(text);
    const parsed = check.parsed;
    if (!parsed) {
      const single = check.problems.length === 1 && check.moreProblems === 0;
      const rows = check.problems.length + check.moreProblems;
      this.set({
        importState: {
          ...this.state.importState,
          text,
          info: undefined,
          error: single
            ? `Nothing was imported from ${source}. ${check.problems[0].message}`
            : `Nothing was imported from ${source}. ${rows} rows have problems; fix them and import again.`,
          problems: single ? undefined : check.problems,
          moreProblems: single ? undefined : check.moreProblems,
        },
      });
      return;
    }
    const replace = this.state.importState.replace;
    const old = this.state.picks;
    const start = replace ? 0 : old.reduce((m, p) => Math.max(m, p.order + 1), 0);
    const incoming = parsed.picks.map((p, i) => {
      const { id: _drop, ...values } = p;
      return newPick(site.id, values, start + i);
    });
    const tombs = replace ? old.map((p) => nextRevision(p, { deleted: true } as Partial<PickRecord>)) : [];
    try {
      await this.store.savePicks([...tombs, ...incoming]);
    } catch (e) {
      this.set({
        importState: {
          ...this.state.importState,
          text,
          info: undefined,
          problems: undefined,
          moreProblems: undefined,
          error: `Nothing was imported from ${source}. ${messageOf(e)}`,
        },
      });
      return;
    }
    await this.reloadPicks();
    const info =
      `Imported ${incoming.length} pick(s) from ${source}${replace ? `, replacing ${old.length}` : ''}.` +
      (parsed.sdNote ? ` ${parsed.sdNote}` : '');
    this.set({
      importState: { text: '', replace: false, info },
      undo: {
        label: `the import of ${incoming.length} pick(s)`,
        revert: async () => {
          const stored = await this.storedPicks([...incoming, ...tombs].map((p) => p.id));
          const undoIncoming = incoming.map((p) => nextRevision(stored.get(p.id) ?? p, { deleted: true } as Partial<PickRecord>));
          const revived = tombs.map((t) => Controller.revived(stored.get(t.id) ?? t));
          await this.store!.savePicks([...undoIncoming, ...revived]);
          await this.reloadPicks();
        },
      },
    });
    this.scheduleEstimate();
  }

  // ---- plot, what-if, survey -----------------------------------------------

  setPlot(patch: Partial<PlotSettings>): void {
    this.set({ plot: { ...this.state.plot, ...patch } });
  }

  setWhatIf(model: WhatIfModel | undefined): void {
    this.set({ whatif: model });
  }

  setSurveyDepth(surveyDepth: string): void {
    this.set({ surveyDepth });
  }

  // ---- the estimate ------------------------------------------------------

  /** Starts a fresh estimate after a short pause; any running one is aborted. */
  scheduleEstimate(): void {
    clearTimeout(this.estimateTimer);
    this.estimateAbort?.abort();
    // The shown result no longer matches the input: say so at once.
    if (this.state.openSiteId) this.set({ estimate: { ...this.state.estimate, status: 'running', error: undefined } });
    this.estimateTimer = setTimeout(() => void this.estimateNow(), ESTIMATE_DELAY_MS);
  }

  /**
   * Keeps a finished estimate with its site (one estimate record per site,
   * a new revision when the result or its settings change), so that sync and
   * bundles carry it. Saves run one after another.
   */
  private keepEstimate(siteId: string, settings: EstimateSettings, result: EstimateResult): void {
    this.keeping = this.keeping.then(async () => {
      const store = this.store;
      if (!store) return;
      try {
        const summary = estimateSummary(result);
        const prior = await store.latestEstimate(siteId);
        if (prior && sameJson(prior.summary, summary) && sameJson(prior.settings, settings)) return;
        const now = new Date();
        await store.saveEstimate(
          prior
            ? nextRevision(prior, { settings, summary, computedAt: now.toISOString() }, now)
            : newEstimate(siteId, settings, summary, now),
        );
      } catch (e) {
        this.notify('error', `The estimate was computed but not kept on this device: ${messageOf(e)}`);
      }
    });
  }

  /** Runs the estimate of the open site in the worker now. */
  async estimateNow(): Promise<void> {
    const site = this.site();
    if (!site) return;
    this.estimateAbort?.abort();
    const abort = new AbortController();
    this.estimateAbort = abort;
    const picks = this.state.picks.map(pickOf);
    this.set({ estimate: { ...this.state.estimate, status: 'running', error: undefined } });
    try {
      const result = await this.estimate(picks, site.settings, abort.signal);
      if (abort.signal.aborted) return;
      this.set({ estimate: { status: 'done', result } });
      this.keepEstimate(site.id, site.settings, result);
      // Then the close-up picture of the misfit; the same signal drops it when the input changes.
      try {
        const slice = await this.slice(picks, site.settings, result, abort.signal);
        if (!abort.signal.aborted) this.set({ estimate: { ...this.state.estimate, slice } });
      } catch {
        // The coarse map of the result still shows; nothing to tell the crew.
      }
    } catch (e) {
      if (abort.signal.aborted || (e as { name?: string })?.name === 'AbortError') return;
      this.set({ estimate: { status: 'error', error: messageOf(e) } });
    }
  }
}

/** Whether two JSON-safe values are the same (key order as written). */
function sameJson(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

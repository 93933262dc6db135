/**
 * Settings and display choices: the open site's estimate settings (typed
 * text kept until committed, each committed value saved at once and a fresh
 * estimate asked for), Hz or s for the site, the plot, the what-if model,
 * the survey depth, the theme (kept on the device) and the new-version
 * prompt, which waits until every typed value is saved.
 */
import type { EstimateSettings } from '../../../core/exchange/records';
import { without, type PlotSettings, type Theme, type WhatIfModel } from './app-state';
import type { EstimateController } from './estimate-controller';
import { rangeEndText, SETTING_FIELDS, type SettingKey } from './form-text';
import type { PicksController } from './picks-controller';
import type { SitesController } from './sites-controller';
import { messageOf, type StateHub } from './state-hub';

/** Settings key of a site's survey target depth (kept on this device only). */
export function surveyDepthKey(siteId: string): string {
  return `survey.depth.${siteId}`;
}

export class SettingsController {
  constructor(
    private readonly hub: StateHub,
    private readonly sites: SitesController,
    private readonly picks: PicksController,
    private readonly estimates: EstimateController,
  ) {}

  // ---- theme and the new-version prompt ------------------------------------

  async setTheme(theme: Theme): Promise<void> {
    this.hub.set({ theme });
    try {
      await this.hub.store?.putSetting('theme', theme);
    } catch (e) {
      this.hub.notify('error', `The theme choice was not kept for next time: ${messageOf(e)}`);
    }
  }

  /** A new version is ready; `apply` reloads into it. */
  offerUpdate(apply: () => void): void {
    this.hub.set({ updateReady: apply });
  }

  /** Reloads into the new version, but only once every typed row is saved. */
  async applyUpdate(): Promise<void> {
    for (const key of Object.keys(this.hub.current.drafts)) await this.picks.commitRow(key, true);
    const s = this.hub.current;
    const left = Object.keys(s.drafts).length + Object.keys(s.siteDraft).length;
    if (left > 0) {
      this.hub.notify(
        'error',
        `The update waits: ${left} typed value(s) are not saved yet. Correct or clear the rows marked in red, then update.`,
      );
      return;
    }
    s.updateReady?.();
  }

  dismissUpdate(): void {
    this.hub.set({ updateReady: undefined });
  }

  // ---- units, plot, what-if, survey ----------------------------------------

  /** Switches the open site between frequencies (Hz) and periods (s); the plot follows. */
  async setAxisUnit(axisUnit: 'hz' | 's'): Promise<void> {
    if (Object.keys(this.hub.current.drafts).length > 0) {
      this.hub.notify('error', 'Finish or clear the rows being typed before switching between Hz and s.');
      return;
    }
    if (await this.sites.saveSiteChanges({ axisUnit }, [])) {
      this.hub.set({ plot: { ...this.hub.current.plot, axis: axisUnit === 's' ? 'period' : 'frequency' } });
    }
  }

  setPlot(patch: Partial<PlotSettings>): void {
    this.hub.set({ plot: { ...this.hub.current.plot, ...patch } });
  }

  setWhatIf(model: WhatIfModel | undefined): void {
    this.hub.set({ whatif: model });
  }

  /** The survey plan's target depth as typed ('' = from the estimate); kept per site on this device. */
  setSurveyDepth(surveyDepth: string): void {
    this.hub.set({ surveyDepth });
    const id = this.hub.current.openSiteId;
    if (id) void this.hub.store?.putSetting(surveyDepthKey(id), surveyDepth).catch(() => undefined);
  }

  // ---- estimate settings ---------------------------------------------------

  async updateSettings(settings: EstimateSettings): Promise<void> {
    if (await this.sites.saveSiteChanges({ settings }, [])) this.estimates.scheduleEstimate();
  }

  /** Typing in the estimate settings form: kept as text until committed. */
  editSetting(key: SettingKey, text: string): void {
    this.hub.set({ siteDraft: { ...this.hub.current.siteDraft, [`set.${key}`]: text } });
  }

  /** Marks a speed as known (shows its box, prefilled) or free (clears it). */
  async setKnown(which: 'vs1' | 'vs2', known: boolean, suggestion?: number): Promise<void> {
    const site = this.hub.openSite();
    if (!site) return;
    if (known) {
      const text = suggestion !== undefined && Number.isFinite(suggestion) ? String(Math.round(suggestion)) : '';
      this.hub.set({ siteDraft: { ...this.hub.current.siteDraft, [`set.${which}`]: text } });
      if (text) await this.commitSetting(which);
      return;
    }
    this.hub.set({ siteDraft: without(this.hub.current.siteDraft, `set.${which}`) });
    const settings: EstimateSettings = { ...site.settings };
    delete settings[which];
    await this.updateSettings(settings);
  }

  /** Commits one estimate setting: a number, or empty for the default. */
  async commitSetting(key: SettingKey): Promise<void> {
    const site = this.hub.openSite();
    const siteDraft = this.hub.current.siteDraft;
    const text = siteDraft[`set.${key}`];
    if (!site || text === undefined) return;
    const meta = SETTING_FIELDS[key];
    const t = text.trim();
    const value = t === '' ? undefined : Number(t.replace(',', '.'));
    if (value !== undefined && !Number.isFinite(value)) {
      this.hub.set({ siteError: { field: `set.${key}`, text: `${meta.label} must be a number in ${meta.unit}, but it is "${t}".` } });
      return;
    }
    const settings: EstimateSettings = { ...site.settings };
    if (meta.range) {
      const [name, end] = meta.range;
      const other = (siteDraft[`set.${meta.pair}`] ?? rangeEndText(site.settings[name], end === 0 ? 1 : 0)).trim();
      const otherValue = other === '' ? undefined : Number(other.replace(',', '.'));
      if (value === undefined && otherValue === undefined) delete settings[name];
      else if (value === undefined || otherValue === undefined || !Number.isFinite(otherValue)) {
        // The other end is still missing: keep the text, wait.
        this.hub.set({
          siteError: { field: `set.${key}`, text: `${meta.label}: give both ends of the search range, or neither (then the default range is used).` },
        });
        return;
      } else {
        settings[name] = end === 0 ? [value, otherValue] : [otherValue, value];
      }
      if (await this.sites.saveSiteChanges({ settings }, [`set.${key}`, `set.${meta.pair}`])) this.estimates.scheduleEstimate();
      return;
    }
    const name = key as 'vs1' | 'vs2' | 'density1' | 'density2';
    if (value === undefined) delete settings[name];
    else settings[name] = value;
    if (await this.sites.saveSiteChanges({ settings }, [`set.${key}`])) this.estimates.scheduleEstimate();
  }
}

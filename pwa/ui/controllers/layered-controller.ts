/**
 * The layer builder's controller as the app holds it: a thin door to
 * layered-work.ts (the checks, the kept model, the worker runs, the
 * layered estimate's best-fit curves), which loads as a chunk of its own
 * once a site opens, so the first screen's JavaScript stays small. Typing
 * and the What-if tab change the state at once; every other action waits
 * for that chunk (a few milliseconds, offline too: the service worker
 * precaches it).
 */
import { WHATIF_TAB_KEY, type LayeredState, type AppState } from './app-state';
import type { LayerRowText, PInput, WaveChoice } from './layered-form';
import type { LayeredWork, TrialRunner } from './layered-work';
import { messageOf, type StateHub } from './state-hub';

export type { TrialRunner } from './layered-work';

export class LayeredController {
  private work?: Promise<LayeredWork>;

  constructor(
    private readonly hub: StateHub,
    private readonly runner?: TrialRunner,
  ) {
    hub.subscribe((s) => this.follow(s));
  }

  /** Loads the work once; it then follows every change of the state. */
  private load(): Promise<LayeredWork> {
    this.work ??= import('./layered-work').then((m) => {
      const w = new m.LayeredWork(this.hub, this.runner);
      w.follow(this.hub.current);
      return w;
    });
    return this.work;
  }

  private follow(s: AppState): void {
    if (this.work) void this.work.then((w) => w.follow(this.hub.current));
    else if (s.openSiteId) void this.load().catch((e) => this.hub.notify('error', `The layer builder could not load: ${messageOf(e)}`));
  }

  private patch(p: Partial<LayeredState>): void {
    this.hub.set({ layered: { ...this.hub.current.layered, ...p } });
  }

  /** Which what-if the What-if view shows (kept on this device, so a reload returns to it). */
  setTab(tab: LayeredState['tab']): void {
    this.patch({ tab });
    void this.hub.store?.putSetting(WHATIF_TAB_KEY, tab).catch(() => undefined);
  }

  /** Typing in a cell: kept as text until committed. */
  editCell(row: number, field: keyof LayerRowText, text: string): void {
    this.patch({ rows: this.hub.current.layered.rows.map((r, i) => (i === row ? { ...r, [field]: text } : r)) });
  }

  /** Checks the rows; a model that passes is kept with the site and computed in the worker. */
  async commit(): Promise<void> {
    (await this.load()).commit();
  }

  /** Type P speeds or Poisson's ratios (the typed values are converted). */
  async setPInput(pInput: PInput): Promise<void> {
    (await this.load()).setPInput(pInput);
  }

  async setWaves(patch: Partial<WaveChoice>): Promise<void> {
    (await this.load()).setWaves(patch);
  }

  async setModes(modes: number): Promise<void> {
    (await this.load()).setModes(modes);
  }

  async addLayer(): Promise<void> {
    (await this.load()).addLayer();
  }

  async removeLayer(row: number): Promise<void> {
    (await this.load()).removeLayer(row);
  }

  /** Rows from the layered estimate's best fit, the one-layer estimate's, or blank. */
  async startFrom(source: 'profile' | 'estimate' | 'blank'): Promise<void> {
    (await this.load()).startFrom(source);
  }
}

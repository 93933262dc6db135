/**
 * The work behind the layer builder (layered-controller.ts loads this
 * module when a site opens, so the first screen's JavaScript stays small).
 *
 * The layer builder and its what-if (the `layered` slice of the state):
 * rows of N layers over a half-space, typed and checked by the core's model
 * rules (layered-form.ts), kept with the site (the site record's
 * `layeredModel`, so it syncs to the office and travels in bundles) as soon
 * as every value passes; a refused value is named in one sentence and the
 * kept model stays as it was. A newer model arriving with the site (a sync
 * pull, a bundle import) replaces the rows. A model an earlier version kept
 * on this device only (settings store) moves to the site when it opens. The model's Love and/or Rayleigh curves,
 * its misfit against the picks and its site figures are computed in the
 * compute worker (model-trial.ts), the latest edit aborting the stale run.
 *
 * It also draws up the layered estimate's best fit: when the Layered
 * profile has a result, its Love and Rayleigh curves (for the waves picked)
 * are computed in the worker for the picks plot, with the estimate's
 * verdict, so an unresolved estimate's curves can look unsupported.
 */
import type { LayeredModel } from '../../../core/dispersion/model';
import { nextRevision, type SiteLayeredModel } from '../../../core/exchange/records';
import { canonicalJson } from '../../../core/exchange/revision';
import type { Pick } from '../../../core/picks/picks';
import type { ProfileResult } from '../../../core/profile/profile-types';
import { profileVerdict } from '../../../core/profile/profile-verdict';
import { pickOf } from '../../store';
import { computeModelTrial, type TrialRequest, type TrialResult } from '../../worker/bridge';
import { initialState, replaceById, WHATIF_TAB_KEY, type AppState, type LayeredState, type TrialState } from './app-state';
import {
  blankRows,
  builderKey,
  MAX_BUILDER_LAYERS,
  readRows,
  readStored,
  rowsOfEstimate,
  rowsOfProfile,
  rowsOfSiteModel,
  siteModelOf,
  switchPInput,
  type LayerRowText,
  type PInput,
  type StoredBuilderModel,
  type WaveChoice,
} from './layered-form';
import { messageOf, type StateHub } from './state-hub';

/** How the app computes a model trial (the worker bridge in the app; tests may pass their own). */
export type TrialRunner = (model: LayeredModel, request: TrialRequest, signal: AbortSignal) => Promise<TrialResult>;

/** The app's runner: the compute worker. */
export const workerTrial: TrialRunner = (m, r, s) => computeModelTrial(m, r, s);

/** The plot's frequency band for a set of picks (charts/chart-data.ts plotBand, loaded with the charts chunk). */
async function bandFor(picks: readonly Pick[]): Promise<Float64Array> {
  const { plotBand } = await import('../charts/chart-data');
  return plotBand(picks);
}

/** The waves that have picks (Love alone when there are none). */
export function wavesOfPicks(picks: readonly { wave?: string }[]): WaveChoice {
  const rayleigh = picks.some((p) => p.wave === 'rayleigh');
  const love = picks.some((p) => p.wave !== 'rayleigh');
  return { love: love || !rayleigh, rayleigh };
}

/** The best-fit model of a layered estimate. */
export function modelOfProfile(r: ProfileResult): LayeredModel {
  return {
    layers: r.profile.layers.map((l) => ({ thickness: l.thickness.best, vs: l.vs.best, vp: l.vp, density: l.density })),
    halfspace: { vs: r.profile.halfspace.vs.best, vp: r.profile.halfspace.vp, density: r.profile.halfspace.density },
  };
}

/** The waves to draw for a layered estimate: those it used, each up to the highest mode picked. */
export function bestFitWaves(r: ProfileResult, picks: readonly Pick[]): TrialRequest['waves'] {
  const out: { wave: 'love' | 'rayleigh'; modes: number }[] = [];
  for (const wave of ['love', 'rayleigh'] as const) {
    if (!(r.waves[wave] > 0)) continue;
    const modes = picks.filter((p) => (p.wave ?? 'love') === wave).map((p) => p.mode);
    out.push({ wave, modes: Math.max(0, ...modes) + 1 });
  }
  return out;
}

/**
 * The picks plot's caption for a layered estimate's best-fit curves, in the
 * manner of the one-layer caption (views/verdict-text.ts bestFitCaption):
 * an unresolved estimate's curves are for reference only.
 */
export function bestFitCaption(v: { level: 'resolved' | 'rough' | 'unresolved'; text: string }, layers: number): string {
  const n = `${layers} layer${layers > 1 ? 's' : ''}`;
  if (v.level === 'unresolved') return `Layered best-fit curves (${n}) for reference only: ${v.text}`;
  if (v.level === 'rough') return `Layered best fit (${n}), only roughly known: ${v.text}`;
  return `Layered best fit (${n}, resolved): ${v.text}`;
}

/** The open site's record. */
function siteOf(s: AppState): AppState['sites'][number] | undefined {
  return s.openSiteId === undefined ? undefined : s.sites.find((x) => x.id === s.openSiteId);
}

/** Canonical JSON of a site's layered model (undefined when it has none), to tell a model from elsewhere from the one kept. */
function modelJson(site: { layeredModel?: SiteLayeredModel } | undefined): string | undefined {
  return site?.layeredModel ? canonicalJson(site.layeredModel) : undefined;
}

export class LayeredWork {
  private siteId?: string;
  private picks?: AppState['picks'];
  private profile?: ProfileResult;
  private trialRun?: AbortController;
  private bestRun?: AbortController;
  /** The crew chose the waves (or a stored model did): picks no longer set them. */
  private wavesChosen = false;
  /** Canonical JSON of the site's model the rows last took or gave (so only a model from elsewhere replaces them). */
  private keptJson?: string;
  /** Saves run one after another, each on the site as the one before left it. */
  private saving: Promise<void> = Promise.resolve();
  private pendingSaves = 0;

  constructor(
    private readonly hub: StateHub,
    private readonly runner: TrialRunner = workerTrial,
  ) {}

  private get state(): LayeredState {
    return this.hub.current.layered;
  }

  private patch(p: Partial<LayeredState>): void {
    this.hub.set({ layered: { ...this.hub.current.layered, ...p } });
  }

  /** Follows the open site, its picks and the layered estimate (called on every change of the state). */
  follow(s: AppState): void {
    if (s.openSiteId !== this.siteId) {
      this.siteId = s.openSiteId;
      this.picks = s.picks;
      this.profile = undefined;
      this.trialRun?.abort();
      this.bestRun?.abort();
      this.wavesChosen = false;
      this.keptJson = modelJson(siteOf(s));
      this.hub.set({ layered: { ...initialState.layered, tab: s.layered.tab } });
      if (s.openSiteId) void this.load(s.openSiteId);
      return;
    }
    const arrived = siteOf(s)?.layeredModel;
    if (arrived && this.pendingSaves === 0 && modelJson(siteOf(s)) !== this.keptJson) {
      // A newer model came with the site from elsewhere (sync, a bundle): it replaces the rows.
      this.keptJson = modelJson(siteOf(s));
      this.take(rowsOfSiteModel(arrived), false);
      return;
    }
    if (s.picks !== this.picks) {
      this.picks = s.picks;
      if (!this.wavesChosen) {
        const waves = wavesOfPicks(s.picks);
        if (waves.love !== s.layered.waves.love || waves.rayleigh !== s.layered.waves.rayleigh) {
          this.patch({ waves });
          this.commit();
          return;
        }
      }
      if (this.state.trial.model) this.runTrial(this.state.trial.model);
      if (this.profile) this.runBest(this.profile);
    }
    if (s.profile.result !== this.profile) {
      this.profile = s.profile.result;
      if (this.profile) this.runBest(this.profile);
      else {
        this.bestRun?.abort();
        this.patch({ best: { status: 'idle' } });
      }
    }
  }

  /**
   * Reads the site's model (or, for a site without one, the model an
   * earlier version kept on this device, which then moves to the site) and
   * computes it.
   */
  private async load(siteId: string): Promise<void> {
    const own = siteOf(this.hub.current)?.layeredModel;
    let stored: StoredBuilderModel | undefined;
    try {
      const [kept, tab] = await Promise.all([
        own ? undefined : this.hub.store?.getSetting<unknown>(builderKey(siteId)),
        this.hub.store?.getSetting<unknown>(WHATIF_TAB_KEY),
      ]);
      stored = own ? readStored(rowsOfSiteModel(own)) : readStored(kept);
      if (this.siteId === siteId && (tab === 'one' || tab === 'layers') && tab !== this.state.tab) this.patch({ tab });
    } catch {
      stored = undefined;
    }
    if (this.siteId !== siteId || !stored) return;
    this.take(stored, !own);
  }

  /** Shows a kept model's rows and computes them; `save` keeps them with the site. */
  private take(stored: StoredBuilderModel, save: boolean): void {
    this.wavesChosen = true;
    this.patch({ pInput: stored.pInput, rows: stored.rows, waves: stored.waves, modes: stored.modes, note: undefined });
    this.commit(save);
  }

  /** Type P speeds or Poisson's ratios; the typed values are converted where they can be. */
  setPInput(pInput: PInput): void {
    const s = this.state;
    if (s.pInput === pInput) return;
    this.patch({ pInput, rows: switchPInput(s.rows, s.pInput, pInput) });
    this.commit();
  }

  setWaves(patch: Partial<WaveChoice>): void {
    this.wavesChosen = true;
    this.patch({ waves: { ...this.state.waves, ...patch } });
    this.commit();
  }

  setModes(modes: number): void {
    this.patch({ modes });
    this.commit();
  }

  /** A new layer just above the half-space, a copy of the layer above it (so the model stays whole); edit it from there. */
  addLayer(): void {
    const rows = this.state.rows;
    if (rows.length - 1 >= MAX_BUILDER_LAYERS) {
      this.patch({ note: `The builder takes at most ${MAX_BUILDER_LAYERS} layers over the half-space.` });
      return;
    }
    const above = rows.length >= 2 ? rows[rows.length - 2] : { thickness: '', vs: '', p: '', density: '' };
    this.patch({ rows: [...rows.slice(0, -1), { ...above }, rows[rows.length - 1]], note: undefined });
    this.commit();
  }

  /** Removes a layer (never the half-space, never the last layer). */
  removeLayer(row: number): void {
    const rows = this.state.rows;
    if (row < 0 || row >= rows.length - 1 || rows.length <= 2) return;
    this.patch({ rows: rows.filter((_r, i) => i !== row), note: undefined });
    this.commit();
  }

  /** Fills the rows from the layered estimate's best fit, the one-layer estimate's, or blank. */
  startFrom(source: 'profile' | 'estimate' | 'blank'): void {
    const s = this.hub.current;
    const pInput = this.state.pInput;
    let rows: LayerRowText[];
    let note: string;
    if (source === 'profile') {
      if (!s.profile.result) return;
      rows = rowsOfProfile(s.profile.result, pInput);
      note = `Started from the layered estimate's best fit (${s.profile.result.layers} layers).`;
    } else if (source === 'estimate') {
      if (!s.estimate.result) return;
      rows = rowsOfEstimate(s.estimate.result, pInput);
      note = "Started from the one-layer estimate's best fit; its P speeds come from Poisson's ratio 0.3 (common practice): check them.";
    } else {
      rows = blankRows();
      note = 'Blank rows: the kept model stays as it was until every field is filled.';
    }
    this.patch({ rows, note });
    this.commit();
  }

  /**
   * Checks the rows; a model that passes every check is kept for the site
   * (when `save`) and computed in the worker. A refused value leaves the
   * kept model and the curves as they were.
   */
  commit(save = true): void {
    const s = this.state;
    const reading = readRows(s.rows, s.pInput, s.waves.rayleigh);
    this.patch({ errors: reading.errors, empty: reading.empty, warnings: reading.warnings });
    if (!reading.model) return;
    if (save && this.siteId) {
      const [id, model] = [this.siteId, siteModelOf(reading.model, s)];
      this.pendingSaves++;
      this.saving = this.saving.then(() => this.save(id, model)).finally(() => this.pendingSaves--);
    }
    this.runTrial(reading.model);
  }

  /**
   * Keeps the model with the site as a new revision of it (none when it is
   * the one kept). While the site's last revision has not left the device,
   * the new one folds into it: the site's history stays one step from what
   * the office holds however many cells are edited between syncs.
   */
  private async save(id: string, layeredModel: SiteLayeredModel): Promise<void> {
    const store = this.hub.store;
    const site = this.hub.current.sites.find((x) => x.id === id);
    if (!store || !site || site.deleted) return;
    const json = canonicalJson(layeredModel);
    if (json === modelJson(site)) return;
    this.keptJson = json;
    try {
      // Edits since the last sync fold into the site's unsent revision (field-store.ts amendUnsent), so a long run of them never looks like a conflict.
      const saved = await store.saveSite(nextRevision(site, { layeredModel }), { amendUnsent: true });
      this.hub.set({ sites: replaceById(this.hub.current.sites, saved) });
      if (this.siteId === id) this.patch({ saveError: undefined });
    } catch (e) {
      if (this.siteId === id) {
        this.keptJson = modelJson(site);
        this.patch({ saveError: `The model was not kept with the site: ${messageOf(e)}` });
      }
    }
  }

  /** The builder's model in the worker; the latest call wins. */
  private runTrial(model: LayeredModel): void {
    const s = this.state;
    const waves: { wave: 'love' | 'rayleigh'; modes: number }[] = [];
    if (s.waves.love) waves.push({ wave: 'love', modes: s.modes });
    if (s.waves.rayleigh) waves.push({ wave: 'rayleigh', modes: s.modes });
    void this.run('trial', model, waves, true);
  }

  /** The layered estimate's best-fit curves in the worker. */
  private runBest(r: ProfileResult): void {
    const picks = this.hub.current.picks.map(pickOf);
    const v = profileVerdict(r);
    this.patch({ best: { ...this.state.best, verdict: { level: v.level, text: v.text }, layers: r.layers, caption: bestFitCaption(v, r.layers) } });
    void this.run('best', modelOfProfile(r), bestFitWaves(r, picks), false);
  }

  private async run(which: 'trial' | 'best', model: LayeredModel, waves: TrialRequest['waves'], figures: boolean): Promise<void> {
    const abort = new AbortController();
    if (which === 'trial') {
      this.trialRun?.abort();
      this.trialRun = abort;
    } else {
      this.bestRun?.abort();
      this.bestRun = abort;
    }
    const site = this.siteId;
    const set = (t: Partial<TrialState>) => {
      if (abort.signal.aborted || this.siteId !== site) return;
      const cur = this.state[which];
      this.patch({ [which]: { ...cur, ...t } } as Partial<LayeredState>);
    };
    set({ status: 'running', model, error: undefined });
    if (waves.length === 0) {
      set({ status: 'error', error: 'Choose Love or Rayleigh waves (or both) to draw.' });
      return;
    }
    try {
      const picks = this.hub.current.picks.map(pickOf);
      const band = await bandFor(picks);
      if (abort.signal.aborted) return;
      const result = await this.runner(model, { band, waves, picks, figures }, abort.signal);
      set({ status: 'done', band, result });
    } catch (e) {
      if (abort.signal.aborted || (e as { name?: string })?.name === 'AbortError') return;
      set({ status: 'error', error: messageOf(e) });
    }
  }
}

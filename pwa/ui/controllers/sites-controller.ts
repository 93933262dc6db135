/**
 * Sites (the `sites`, `siteQuery`, `siteSort`, `openSiteId`, `view`,
 * `siteDraft`, `siteError` and `locating` slices of the state): the list,
 * a new site, opening and closing one, its details form (saved field by
 * field, the typed text kept on a refusal), its position, deleting it, and
 * the invented demo site.
 */
import { DEMO_SITE } from '../../../core/exchange/records';
import { nextRevision, type SiteRecord } from '../../../core/exchange/records';
import { newPick, newSite } from '../../store';
import { replaceById, VIEW_NAMES, without, type SiteFacts, type SiteSort, type ViewName } from './app-state';
import { storedVerdict } from '../views/verdict-text';
import type { EstimateController } from './estimate-controller';
import type { SiteTextField } from './form-text';
import type { PicksController } from './picks-controller';
import type { RecordingsController } from './recordings-controller';
import { messageOf, type StateHub } from './state-hub';

/** Settings key of the open site and view (kept on this device). */
const PLACE_KEY = 'ui.place';

export class SitesController {
  constructor(
    private readonly hub: StateHub,
    private readonly picks: PicksController,
    private readonly estimates: EstimateController,
    private readonly recordings: RecordingsController,
  ) {}

  /** Re-reads the site list (records arrived from a sync or a bundle). */
  async reload(): Promise<void> {
    const store = this.hub.store;
    if (!store) return;
    this.hub.set({ sites: await store.listSites() });
    void this.loadFacts();
  }

  /** Reads what each site card shows: pick count, the kept thickness with its verdict, the last change. */
  async loadFacts(): Promise<void> {
    const store = this.hub.store;
    if (!store) return;
    try {
      const facts: Record<string, SiteFacts> = {};
      for (const site of this.hub.current.sites) {
        const [picks, est] = await Promise.all([store.listPicks(site.id), store.latestEstimate(site.id)]);
        let lastChange = site.updatedAt;
        for (const p of picks) if (p.updatedAt > lastChange) lastChange = p.updatedAt;
        const f: SiteFacts = { picks: picks.length, lastChange };
        const t = est?.summary.thickness_m as { best?: unknown; low95?: unknown; high95?: unknown } | undefined;
        const open = (est?.summary.open_ends as { thickness_m?: { low?: unknown; high?: unknown } } | undefined)?.thickness_m;
        // An open end is written as null (core/estimate/estimate-json.ts): read as "not bounded" (NaN).
        const end = (x: unknown) => (typeof x === 'number' ? x : NaN);
        if (t && typeof t.best === 'number') {
          f.thickness = { best: t.best, low95: end(t.low95), high95: end(t.high95), openLow: open?.low === true, openHigh: open?.high === true };
          f.verdict = storedVerdict(est?.summary);
        }
        facts[site.id] = f;
      }
      this.hub.set({ siteFacts: facts });
    } catch {
      // The cards show the site's own fields; nothing to tell the crew.
    }
  }

  setSiteQuery(siteQuery: string): void {
    this.hub.set({ siteQuery });
  }

  setSiteSort(siteSort: SiteSort): void {
    this.hub.set({ siteSort });
  }

  /** Creates a site with a name and opens it at its details. */
  async createSite(name: string): Promise<boolean> {
    const store = this.hub.store;
    if (!store) return false;
    const site = newSite({ name: name.trim() });
    try {
      const saved = await store.saveSite(site);
      this.hub.set({ sites: [saved, ...this.hub.current.sites], siteError: undefined });
      this.openSite(saved.id, 'details');
      return true;
    } catch (e) {
      this.hub.set({ siteError: { field: 'new-name', text: messageOf(e) } });
      return false;
    }
  }

  openSite(id: string, view: ViewName = 'picks'): void {
    this.estimates.abort();
    const s = this.hub.current;
    const site = s.sites.find((x) => x.id === id);
    this.hub.set({
      plot: { ...s.plot, axis: site?.axisUnit === 's' ? 'period' : 'frequency' },
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
      recordings: { siteId: id, list: [], busy: false },
      surveyDepth: '',
    });
    void this.picks.load(id);
    void this.recordings.load(id);
    this.rememberPlace();
    // The survey target depth typed for this site before ('' = from the estimate).
    void this.hub.store
      ?.getSetting<string>(`survey.depth.${id}`)
      .then((t) => {
        if (typeof t === 'string' && this.hub.current.openSiteId === id && this.hub.current.surveyDepth === '') this.hub.set({ surveyDepth: t });
      })
      .catch(() => undefined);
  }

  /** Keeps the open site and view on this device, so a reload returns there. */
  private rememberPlace(): void {
    const s = this.hub.current;
    void this.hub.store?.putSetting(PLACE_KEY, s.openSiteId ? { siteId: s.openSiteId, view: s.view } : null).catch(() => undefined);
  }

  /** After a reload: opens the site and view that were open, when the site still exists. */
  async returnToPlace(): Promise<void> {
    const store = this.hub.store;
    if (!store) return;
    try {
      const place = await store.getSetting<{ siteId?: string; view?: ViewName } | null>(PLACE_KEY);
      if (!place?.siteId || !this.hub.current.sites.some((x) => x.id === place.siteId) || this.hub.current.openSiteId) return;
      this.openSite(place.siteId, place.view && (VIEW_NAMES as readonly string[]).includes(place.view) ? place.view : 'picks');
    } catch {
      // Nothing kept: the site list it is.
    }
  }

  closeSite(): void {
    this.estimates.abort();
    if (this.picks.hasUnsavedText()) {
      this.hub.notify('error', 'This site has typed values that are not saved; correct or clear them before leaving.');
      return;
    }
    this.hub.set({ openSiteId: undefined, picks: [], undo: undefined, estimate: { status: 'idle' } });
    this.rememberPlace();
    void this.loadFacts();
  }

  setView(view: ViewName): void {
    this.hub.set({ view });
    this.rememberPlace();
  }

  /** Saves a revision of the open site; on failure the typed text stays in siteDraft with the message. */
  async saveSiteChanges(changes: Partial<SiteRecord>, draftKeys: string[]): Promise<boolean> {
    const site = this.hub.openSite();
    const store = this.hub.store;
    if (!site || !store) return false;
    try {
      const saved = await store.saveSite(nextRevision(site, changes));
      let siteDraft = this.hub.current.siteDraft;
      for (const k of draftKeys) siteDraft = without(siteDraft, k);
      this.hub.set({ sites: replaceById(this.hub.current.sites, saved), siteDraft, siteError: undefined });
      return true;
    } catch (e) {
      this.hub.set({ siteError: { field: draftKeys[0] ?? 'site', text: messageOf(e) } });
      return false;
    }
  }

  /** Typing in the site form: kept as text until committed. */
  editSiteField(field: SiteTextField, text: string): void {
    this.hub.set({ siteDraft: { ...this.hub.current.siteDraft, [field]: text } });
  }

  /** Commits one site-form field (on change / blur). */
  async commitSiteField(field: SiteTextField): Promise<void> {
    const site = this.hub.openSite();
    const siteDraft = this.hub.current.siteDraft;
    const text = siteDraft[field];
    if (!site || text === undefined) return;
    if (field === 'lat' || field === 'lon') {
      const latText = siteDraft.lat ?? (site.location ? String(site.location.lat) : '');
      const lonText = siteDraft.lon ?? (site.location ? String(site.location.lon) : '');
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
        this.hub.set({ siteError: { field: 'lat', text: `Latitude must be a number of degrees from -90 to 90, but it is "${latText}".` } });
        return;
      }
      if (!Number.isFinite(lon) || lon < -180 || lon > 180) {
        this.hub.set({ siteError: { field: 'lon', text: `Longitude must be a number of degrees from -180 to 180, but it is "${lonText}".` } });
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
      this.hub.notify('error', 'This device gives no position; type the latitude and longitude instead.');
      return;
    }
    this.hub.set({ locating: true });
    navigator.geolocation.getCurrentPosition(
      (pos) => {
        this.hub.set({ locating: false });
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
        this.hub.set({ locating: false });
        this.hub.notify('error', `The device did not give a position (${err.message || 'permission refused or no fix'}); type it instead.`);
      },
      { enableHighAccuracy: true, timeout: 20_000, maximumAge: 60_000 },
    );
  }

  async deleteOpenSite(): Promise<void> {
    const site = this.hub.openSite();
    const store = this.hub.store;
    if (!site || !store) return;
    try {
      await store.deleteSite(site.id);
      this.hub.set({
        sites: this.hub.current.sites.filter((s) => s.id !== site.id),
        openSiteId: undefined,
        picks: [],
        drafts: {},
        siteDraft: {},
        undo: undefined,
      });
      this.hub.notify('info', `The site "${site.name}" was deleted.`);
    } catch (e) {
      this.hub.notify('error', messageOf(e));
    }
  }

  /** Installs the invented demo site with its picks and opens it. */
  async loadDemo(): Promise<void> {
    const store = this.hub.store;
    if (!store) return;
    const site = newSite({ ...DEMO_SITE, location: { ...DEMO_SITE.location } });
    try {
      // The generator loads on first use: it is not part of the first download.
      const { demoPicks } = await import('../../../core/exchange/demo');
      const picks = demoPicks().map((p, i) => newPick(site.id, p, i));
      const saved = await store.saveSite(site);
      await store.savePicks(picks);
      this.hub.set({ sites: [saved, ...this.hub.current.sites] });
      this.openSite(saved.id, 'picks');
      this.hub.notify('info', 'The invented demo site is loaded. Its picks come from a made-up model with seeded noise.');
    } catch (e) {
      this.hub.notify('error', `The demo site could not be installed: ${messageOf(e)}`);
    }
  }
}

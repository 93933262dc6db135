/**
 * The app: one small object composing the controllers of each concern over
 * one state hub. The views read the state (`current`, `subscribe`) and call
 * the controller of the concern they act on; they never await anything.
 *
 * Rules every controller keeps:
 * - Every edit saves at once through the store (no save button).
 * - A refused or failed write tells the crew, and the typed text stays on
 *   screen (drafts), so nothing typed is lost.
 * - A new input aborts the stale estimate (AbortController per run).
 */
import type { FieldStore } from '../../store';
import type { AppState, Theme } from './app-state';
import { EstimateController, type EstimateRunner, type SliceRunner } from './estimate-controller';
import { ImportController } from './import-controller';
import { PicksController } from './picks-controller';
import { RecordsController } from './records-controller';
import { RECORDS_BRIDGE, type RecordsCompute } from './records-state';
import { RidgeController } from './ridge-controller';
import { LatestOnly } from '../../worker/bridge';
import { RecordingsController } from './recordings-controller';
import { ProfileController, type ProfileRunner } from './profile-controller';
import { LayeredController, type TrialRunner } from './layered-controller';
import { SettingsController } from './settings-controller';
import { SitesController } from './sites-controller';
import { messageOf, StateHub } from './state-hub';
import { SyncController } from './sync-controller';

/** How long the store may take to open before the crew is told, ms. */
const STORE_OPEN_PATIENCE_MS = 8000;

export class AppController {
  private readonly hub = new StateHub();
  /** Estimate runs of the open site. */
  readonly estimates: EstimateController;
  /** The picks table: typed rows, commits, deletions, undo. */
  readonly picks: PicksController;
  /** CSV import into the picks table. */
  readonly imports: ImportController;
  /** The open site's kept seismograph files and whether they travel. */
  readonly recordings: RecordingsController;
  /** The site list, the open site, its details and the demo. */
  readonly sites: SitesController;
  /** Estimate settings, units, plot, what-if, survey depth, theme, update prompt. */
  readonly settings: SettingsController;
  /** Network state, office sync and bundles. */
  readonly sync: SyncController;
  /** Seismograph records: reading the files, keeping them, their geometry. */
  readonly records: RecordsController;
  /** The open record's dispersion image, its ridge and the picks taken from it. */
  readonly ridge: RidgeController;

  /** The layered estimate: run on request, progress and cancel. */
  readonly profiles: ProfileController;

  /** The layer builder, its what-if, and the layered estimate's best-fit curves. */
  readonly layered: LayeredController;

  constructor(estimate?: EstimateRunner, slice?: SliceRunner, recordsCompute?: RecordsCompute, profile?: ProfileRunner, trial?: TrialRunner) {
    this.estimates = new EstimateController(this.hub, estimate, slice);
    this.picks = new PicksController(this.hub, this.estimates);
    this.imports = new ImportController(this.hub, this.picks, this.estimates);
    this.recordings = new RecordingsController(this.hub);
    this.sites = new SitesController(this.hub, this.picks, this.estimates, this.recordings);
    this.settings = new SettingsController(this.hub, this.sites, this.picks, this.estimates);
    this.sync = new SyncController(this.hub, this.sites, this.picks, this.recordings);
    const compute = recordsCompute ?? RECORDS_BRIDGE;
    const latest = new LatestOnly(); // one queue for the Records view: a new reading aborts a stale image, and back
    this.ridge = new RidgeController(this.hub, this.picks, this.estimates, compute, latest);
    this.records = new RecordsController(this.hub, this.ridge, compute, latest, this.recordings);
    this.profiles = new ProfileController(this.hub, profile);
    this.layered = new LayeredController(this.hub, trial);
  }

  get current(): AppState {
    return this.hub.current;
  }

  subscribe(fn: (s: AppState) => void): () => void {
    return this.hub.subscribe(fn);
  }

  /** Takes a message off the screen. */
  dismiss(id: number): void {
    this.hub.dismiss(id);
  }

  /** Opens the app on a store: reads the sites and the saved theme. */
  async start(openStore: () => Promise<FieldStore>): Promise<void> {
    const online = typeof navigator !== 'undefined' ? navigator.onLine : true;
    this.sync.watchNetwork();
    // If the database does not answer (another tab holding an old version open), say so while waiting.
    const slow = setTimeout(
      () =>
        this.hub.notify(
          'error',
          'The on-device store is taking long to open. If Shearfield is open in another tab or window, close it; otherwise reload the page.',
        ),
      STORE_OPEN_PATIENCE_MS,
    );
    try {
      const store = await openStore();
      this.hub.store = store;
      const [sites, theme] = await Promise.all([store.listSites(), store.getSetting<Theme>('theme')]);
      this.hub.set({ ready: true, online, sites, theme: theme === 'sun' ? 'sun' : 'standard' });
      await this.sites.returnToPlace();
      void this.sites.loadFacts();
    } catch (e) {
      this.hub.set({ ready: true, online, fatal: messageOf(e) });
    } finally {
      clearTimeout(slow);
    }
  }
}

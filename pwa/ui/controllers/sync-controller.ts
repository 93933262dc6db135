/**
 * Sync with the office and site bundles, as the UI sees them (the `online`
 * and `sync` slices of the state): whether the device is online, the sync
 * client's status in plain words, the last message, records edited in two
 * places, and the actions of the sync panel (connect, sync now, export and
 * import a bundle, choose the version to keep). The sync client runs in the
 * background once the panel has been shown (pwa/sync/client.ts), on a store
 * connection of its own; the bundle code loads only when used. Records that
 * arrive this way are re-read into the site list and the open table.
 */
import type { AnyRecord, ConflictVersion } from '../../../core/exchange/records';
import { resolveConflict } from '../../../core/exchange/sync';
import { openFieldStore, type FieldStore } from '../../store';
import { SyncClient, SyncError } from '../../sync/client';
import type { SyncPanelState } from './app-state';
import type { PicksController } from './picks-controller';
import type { RecordingsController } from './recordings-controller';
import type { SitesController } from './sites-controller';
import type { StateHub } from './state-hub';

interface SyncParts {
  store: FieldStore;
  client: SyncClient;
}

const SKIP_FIELDS = new Set(['history', 'conflicts', 'rev', 'updatedAt', 'id', 'type']);

/** Fields whose values differ between the shown record and a kept version. */
export function differing(shown: AnyRecord, other: ConflictVersion['record']): string[] {
  const a = shown as unknown as Record<string, unknown>;
  const b = other as unknown as Record<string, unknown>;
  return [...new Set([...Object.keys(a), ...Object.keys(b)])].filter((k) => !SKIP_FIELDS.has(k) && JSON.stringify(a[k]) !== JSON.stringify(b[k])).sort();
}

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

async function saveResolved(store: FieldStore, r: AnyRecord): Promise<void> {
  if (r.type === 'site') await store.saveSite(r);
  else if (r.type === 'pick') await store.savePick(r);
  else await store.saveEstimate(r);
}

export class SyncController {
  private parts?: Promise<SyncParts>;
  private lastConflicts = -1;

  constructor(
    private readonly hub: StateHub,
    private readonly sites: SitesController,
    private readonly picks: PicksController,
    private readonly recordings?: RecordingsController,
  ) {}

  private patch(p: Partial<SyncPanelState>): void {
    this.hub.set({ sync: { ...this.hub.current.sync, ...p } });
  }

  /** Follows the device's network state. */
  watchNetwork(): void {
    if (typeof window === 'undefined') return;
    window.addEventListener('online', () => this.hub.set({ online: true }));
    window.addEventListener('offline', () => this.hub.set({ online: false }));
  }

  /**
   * Re-reads the site list (and the open site's picks) after records arrived
   * from outside the app's own actions: an office sync or a bundle import.
   */
  async recordsChanged(): Promise<void> {
    if (!this.hub.store) return;
    await this.sites.reload();
    await this.picks.reload();
    const open = this.hub.current.openSiteId;
    if (open) await this.recordings?.load(open);
  }

  /** The sync panel is shown: opens its store connection and starts the background client once. */
  attach(): void {
    const first = !this.parts;
    this.parts ??= openFieldStore().then((store) => {
      const client = new SyncClient(store);
      client.start();
      return { store, client };
    });
    this.parts
      .then((p) => {
        if (first) {
          p.client.subscribe((status) => {
            this.patch({ status });
            if (status.conflicts !== this.lastConflicts) {
              this.lastConflicts = status.conflicts;
              void this.reloadConflicts(p.store);
            }
          });
        }
        void p.client.refresh().then((s) => {
          // Installed from the office server itself? Then its address is this page's origin.
          if (s.serverUrl || typeof location === 'undefined') return;
          fetch(`${location.origin}/api/v1/status`, { cache: 'no-store' })
            .then((res) => {
              if (res.status === 401 && (res.headers.get('www-authenticate') ?? '').includes('shearfield-office')) {
                this.patch({ suggestedUrl: location.origin });
              }
            })
            .catch(() => undefined);
        });
      })
      .catch((e: unknown) => this.patch({ message: { tone: 'error', text: `Sync is unavailable: ${(e as Error).message}` } }));
  }

  private async reloadConflicts(store: FieldStore): Promise<void> {
    const all = await store.allRecords();
    this.patch({
      conflicted: all.filter((r) => (r.conflicts?.length ?? 0) > 0 && !r.deleted),
      siteNames: Object.fromEntries(all.filter((r) => r.type === 'site').map((r) => [r.id, (r as { name: string }).name])),
    });
  }

  /** Runs one action of the panel with the buttons held, once the connection is open. */
  private async busy(work: (p: SyncParts) => Promise<void>): Promise<void> {
    const p = await this.parts;
    if (!p) return;
    this.patch({ busy: true });
    try {
      await work(p);
    } finally {
      this.patch({ busy: false });
    }
  }

  /**
   * Saves the office address and device token and syncs. Without a network
   * the settings are kept and sync tries again later. `onSaved` runs as soon
   * as the settings are kept (the form closes); otherwise `formError` says why.
   */
  async connect(url: string, token: string, onSaved: () => void): Promise<void> {
    this.patch({ formError: '' });
    await this.busy(async ({ client }) => {
      try {
        let reached = true;
        let device = '';
        try {
          device = await client.configure(url, token);
        } catch (err) {
          // No network here (a field setup): keep the settings, sync tries again when it can.
          if (!(err instanceof SyncError) || !err.retry) throw err;
          await client.configure(url, token, false);
          reached = false;
        }
        onSaved();
        if (!reached) {
          this.patch({ message: { tone: 'ok', text: 'Saved. The office cannot be reached just now; sync will try again when it can.' } });
          // One attempt now, so the panel shows its outcome (and the changes still waiting) at once.
          void client.syncNow();
          return;
        }
        this.patch({ message: { tone: 'ok', text: `Connected to the office as “${device}”. Syncing now.` } });
        const report = await client.syncNow();
        this.patch({ message: { tone: report.ok ? 'ok' : 'error', text: report.message } });
        if (report.pulled > 0) void this.recordsChanged();
      } catch (err) {
        this.patch({ formError: err instanceof SyncError ? err.message : `The settings were not saved: ${(err as Error).message}` });
      }
    });
  }

  async syncNow(): Promise<void> {
    const p = await this.parts;
    if (!p) return;
    this.patch({ busy: true });
    const report = await p.client.syncNow();
    this.patch({ busy: false, message: { tone: report.ok ? 'ok' : 'error', text: report.message } });
    await this.reloadConflicts(p.store);
    if (report.pulled > 0) void this.recordsChanged();
  }

  /** Sends the invented demo site to the office too (on), or keeps it on this tablet (off, the default). */
  async setIncludeDemo(on: boolean): Promise<void> {
    const p = await this.parts;
    if (!p) return;
    await p.client.setIncludeDemo(on);
    if (on) void this.syncNow();
  }

  /** Makes a bundle of every site (the invented demo site only when asked) and shares or saves it. */
  async exportAll(includeDemo = false): Promise<void> {
    await this.busy(async ({ store }) => {
      try {
        const io = await import('../../sync/bundle-io');
        const file = await io.exportBundle(store, undefined, undefined, { includeDemo });
        const left =
          (file.demoLeftOut > 0 ? ' The invented demo site was left out.' : '') +
          (file.recordings > 0 ? ` ${plural(file.recordings, 'seismograph file record', 'seismograph file records')} (${file.recordingFiles} with the raw file).` : '') +
          (file.filesLeftOut > 0 ? ` ${plural(file.filesLeftOut, 'raw file', 'raw files')} did not fit in one bundle and stayed on this device; their records travel.` : '') +
          (file.filesMissing > 0 ? ` ${plural(file.filesMissing, 'raw file is', 'raw files are')} not on this device; their records travel.` : '');
        const how = await io.deliverBundle(file);
        this.patch({
          message: {
            tone: 'ok',
            text:
              how === 'cancelled'
                ? 'Sharing was cancelled; nothing was sent.'
                : `${how === 'shared' ? 'Shared' : 'Saved'} ${file.name}: ${plural(file.sites, 'site', 'sites')}, ${plural(file.picks, 'pick', 'picks')}.${left}`,
          },
        });
      } catch (err) {
        this.patch({ message: { tone: 'error', text: `The bundle could not be made: ${(err as Error).message}` } });
      }
    });
  }

  /** Imports a bundle file (never a duplicate, never an older version over a newer one). */
  async importBundle(file: File): Promise<void> {
    await this.busy(async ({ store, client }) => {
      try {
        const io = await import('../../sync/bundle-io');
        const outcome = await io.importBundleText(store, await file.text());
        this.patch({ message: { tone: outcome.ok ? 'ok' : 'error', text: `${file.name}: ${outcome.message}` } });
        if (outcome.ok) {
          await client.refresh();
          await this.reloadConflicts(store);
          void this.recordsChanged();
        }
      } catch (err) {
        this.patch({ message: { tone: 'error', text: `${file.name}: nothing was imported (${(err as Error).message}).` } });
      }
    });
  }

  /** Keeps one version of a record edited in two places (`keep` undefined: the shown one). */
  async resolve(r: AnyRecord, keep: ConflictVersion | undefined): Promise<void> {
    await this.busy(async ({ store, client }) => {
      try {
        let changes: Record<string, unknown> = {};
        if (keep) {
          const { id: _i, rev: _r, updatedAt: _u, history: _h, type: _t, ...fields } = keep.record as unknown as Record<string, unknown>;
          changes = fields;
          // Fields the kept version does not have are cleared too.
          for (const k of differing(r, keep.record)) if (!(k in fields)) changes[k] = undefined;
        }
        await saveResolved(store, resolveConflict(r, changes as never));
        this.patch({ message: { tone: 'ok', text: 'Conflict resolved; the choice goes to the office with the next sync.' } });
        await client.refresh();
        await this.reloadConflicts(store);
        void this.recordsChanged();
      } catch (err) {
        this.patch({ message: { tone: 'error', text: `The choice was not saved: ${(err as Error).message}` } });
      }
    });
  }
}

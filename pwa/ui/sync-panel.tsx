/**
 * Office sync and site bundles, on the tablet: the office address and
 * device token (set once), the sync status in plain words (changes waiting,
 * last success, last problem), a sync-now button, records edited in two
 * places (with a choice of which version to keep), and bundle export and
 * import. The sync client runs in the background once this panel has been
 * shown (pwa/sync/client.ts); the bundle code loads only when used.
 */
import { useEffect, useState } from 'preact/hooks';
import type { AnyRecord, ConflictVersion } from '../../core/exchange/records';
import { resolveConflict } from '../../core/exchange/sync';
import { openFieldStore, type FieldStore } from '../store';
import { SyncClient, SyncError, type SyncStatus } from '../sync/client';
import './sync-panel.css';

let shared: Promise<{ store: FieldStore; client: SyncClient }> | undefined;

/** The panel's own store connection and the one background sync client, made once. */
function syncParts(): Promise<{ store: FieldStore; client: SyncClient }> {
  shared ??= openFieldStore().then((store) => {
    const client = new SyncClient(store);
    client.start();
    return { store, client };
  });
  return shared;
}

export interface SyncPanelProps {
  /** Called after a sync or an import brought records in, so the app can re-read its lists. */
  onRecordsChanged?: () => void;
}

function when(iso: string | undefined): string {
  if (!iso) return 'never';
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toLocaleString();
}

const SKIP_FIELDS = new Set(['history', 'conflicts', 'rev', 'updatedAt', 'id', 'type']);

/** Fields whose values differ between the shown record and a kept version. */
function differing(shown: AnyRecord, other: ConflictVersion['record']): string[] {
  const a = shown as unknown as Record<string, unknown>;
  const b = other as unknown as Record<string, unknown>;
  return [...new Set([...Object.keys(a), ...Object.keys(b)])].filter((k) => !SKIP_FIELDS.has(k) && JSON.stringify(a[k]) !== JSON.stringify(b[k])).sort();
}

function show(v: unknown): string {
  if (v === undefined) return '(empty)';
  return typeof v === 'string' ? v : JSON.stringify(v);
}

function recordLabel(r: AnyRecord, sites: Map<string, string>): string {
  if (r.type === 'site') return `Site “${r.name}”`;
  const site = sites.get(r.siteId) ?? 'an unknown site';
  return r.type === 'pick' ? `Pick at ${r.frequency} Hz of “${site}”` : `Estimate of “${site}”`;
}

async function saveResolved(store: FieldStore, r: AnyRecord): Promise<void> {
  if (r.type === 'site') await store.saveSite(r);
  else if (r.type === 'pick') await store.savePick(r);
  else await store.saveEstimate(r);
}

export function SyncPanel({ onRecordsChanged }: SyncPanelProps) {
  const [parts, setParts] = useState<{ store: FieldStore; client: SyncClient }>();
  const [status, setStatus] = useState<SyncStatus>();
  const [editing, setEditing] = useState(false);
  const [url, setUrl] = useState('');
  const [token, setToken] = useState('');
  const [formError, setFormError] = useState('');
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string }>();
  const [busy, setBusy] = useState(false);
  const [conflicted, setConflicted] = useState<AnyRecord[]>([]);
  const [siteNames, setSiteNames] = useState(new Map<string, string>());

  const reloadConflicts = async (store: FieldStore) => {
    const all = await store.allRecords();
    setConflicted(all.filter((r) => (r.conflicts?.length ?? 0) > 0 && !r.deleted));
    setSiteNames(new Map(all.filter((r) => r.type === 'site').map((r) => [r.id, (r as { name: string }).name])));
  };

  useEffect(() => {
    let unsubscribe: (() => void) | undefined;
    let lastConflicts = -1;
    syncParts()
      .then((p) => {
        setParts(p);
        unsubscribe = p.client.subscribe((s) => {
          setStatus(s);
          if (s.conflicts !== lastConflicts) {
            lastConflicts = s.conflicts;
            void reloadConflicts(p.store);
          }
        });
        void p.client.refresh().then((s) => {
          // Installed from the office server itself? Then its address is this page's origin.
          if (s.serverUrl || typeof location === 'undefined') return;
          fetch(`${location.origin}/api/v1/status`, { cache: 'no-store' })
            .then((res) => {
              if (res.status === 401 && (res.headers.get('www-authenticate') ?? '').includes('shearfield-office')) setUrl((u) => u || location.origin);
            })
            .catch(() => undefined);
        });
      })
      .catch((e: unknown) => setMessage({ tone: 'error', text: `Sync is unavailable: ${(e as Error).message}` }));
    return () => unsubscribe?.();
  }, []);

  if (!parts || !status) {
    return (
      <section class="panel sync" aria-labelledby="sync-h">
        <h2 id="sync-h">Office sync and bundles</h2>
        <p class="status" role="status">
          {message?.text ?? 'Opening…'}
        </p>
      </section>
    );
  }
  const { store, client } = parts;
  const configured = status.state !== 'not-set-up' && !!status.serverUrl;

  const saveSettings = async (e: Event) => {
    e.preventDefault();
    setBusy(true);
    setFormError('');
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
      setEditing(false);
      setToken('');
      if (!reached) {
        setMessage({ tone: 'ok', text: 'Saved. The office cannot be reached just now; sync will try again when it can.' });
        return;
      }
      setMessage({ tone: 'ok', text: `Connected to the office as “${device}”. Syncing now.` });
      const report = await client.syncNow();
      setMessage({ tone: report.ok ? 'ok' : 'error', text: report.message });
      if (report.pulled > 0) onRecordsChanged?.();
    } catch (err) {
      setFormError(err instanceof SyncError ? err.message : `The settings were not saved: ${(err as Error).message}`);
    } finally {
      setBusy(false);
    }
  };

  const syncNow = async () => {
    setBusy(true);
    const report = await client.syncNow();
    setBusy(false);
    setMessage({ tone: report.ok ? 'ok' : 'error', text: report.message });
    await reloadConflicts(store);
    if (report.pulled > 0) onRecordsChanged?.();
  };

  const exportAll = async () => {
    setBusy(true);
    try {
      const io = await import('../sync/bundle-io');
      const file = await io.exportBundle(store);
      const how = await io.deliverBundle(file);
      setMessage({
        tone: 'ok',
        text: how === 'cancelled' ? 'Sharing was cancelled; nothing was sent.' : `${how === 'shared' ? 'Shared' : 'Saved'} ${file.name}: ${file.sites} sites, ${file.picks} picks.`,
      });
    } catch (err) {
      setMessage({ tone: 'error', text: `The bundle could not be made: ${(err as Error).message}` });
    } finally {
      setBusy(false);
    }
  };

  const importFile = async (input: HTMLInputElement) => {
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    setBusy(true);
    try {
      const io = await import('../sync/bundle-io');
      const outcome = await io.importBundleText(store, await file.text());
      setMessage({ tone: outcome.ok ? 'ok' : 'error', text: `${file.name}: ${outcome.message}` });
      if (outcome.ok) {
        await client.refresh();
        await reloadConflicts(store);
        onRecordsChanged?.();
      }
    } catch (err) {
      setMessage({ tone: 'error', text: `${file.name}: nothing was imported (${(err as Error).message}).` });
    } finally {
      setBusy(false);
    }
  };

  const resolve = async (r: AnyRecord, keep: ConflictVersion | undefined) => {
    setBusy(true);
    try {
      let changes: Record<string, unknown> = {};
      if (keep) {
        const { id: _i, rev: _r, updatedAt: _u, history: _h, type: _t, ...fields } = keep.record as unknown as Record<string, unknown>;
        changes = fields;
        // Fields the kept version does not have are cleared too.
        for (const k of differing(r, keep.record)) if (!(k in fields)) changes[k] = undefined;
      }
      await saveResolved(store, resolveConflict(r, changes as never));
      setMessage({ tone: 'ok', text: 'Conflict resolved; the choice goes to the office with the next sync.' });
      await client.refresh();
      await reloadConflicts(store);
      onRecordsChanged?.();
    } catch (err) {
      setMessage({ tone: 'error', text: `The choice was not saved: ${(err as Error).message}` });
    } finally {
      setBusy(false);
    }
  };

  const stateText =
    status.state === 'syncing'
      ? 'Syncing…'
      : status.state === 'offline'
        ? 'Offline: changes wait on this tablet.'
        : status.state === 'error'
          ? 'The last sync did not finish; it will be tried again.'
          : status.state === 'not-set-up'
            ? 'Not set up: enter the office address and this tablet’s token.'
            : 'Up to date as of the last sync.';

  return (
    <section class="panel sync" aria-labelledby="sync-h">
      <h2 id="sync-h">Office sync and bundles</h2>
      <dl class="sync-status" aria-live="polite">
        <div>
          <dt>State</dt>
          <dd data-testid="sync-state">{stateText}</dd>
        </div>
        <div>
          <dt>Changes waiting to be sent</dt>
          <dd data-testid="sync-pending">{status.pending}</dd>
        </div>
        <div>
          <dt>Last successful sync</dt>
          <dd data-testid="sync-last-success">{when(status.lastSuccess)}</dd>
        </div>
        {status.lastError ? (
          <div>
            <dt>Last problem</dt>
            <dd class="error" data-testid="sync-last-error">
              {status.lastError}
            </dd>
          </div>
        ) : null}
        <div>
          <dt>Records edited in two places</dt>
          <dd data-testid="sync-conflicts">{status.conflicts}</dd>
        </div>
      </dl>

      {configured && !editing ? (
        <div class="row-form">
          <p class="caption">
            Office: <span data-testid="sync-server">{status.serverUrl}</span>
          </p>
          <button type="button" class="primary" disabled={busy || status.state === 'syncing'} onClick={() => void syncNow()}>
            Sync now
          </button>
          <button
            type="button"
            onClick={() => {
              setUrl(status.serverUrl ?? '');
              setEditing(true);
            }}
          >
            Change office or token
          </button>
        </div>
      ) : (
        <form class="form-grid" onSubmit={(e) => void saveSettings(e)} aria-describedby={formError ? 'sync-form-err' : undefined}>
          <label class="field wide">
            <span>Office server address</span>
            <input name="sync-url" inputMode="url" autoComplete="off" placeholder="http://192.168.1.20:8750" value={url} onInput={(e) => setUrl(e.currentTarget.value)} />
          </label>
          <label class="field wide">
            <span>Device token (from “shearfield device add”)</span>
            <input name="sync-token" type="password" autoComplete="off" value={token} onInput={(e) => setToken(e.currentTarget.value)} />
          </label>
          <button type="submit" class="primary" disabled={busy}>
            Save and connect
          </button>
          {configured ? (
            <button type="button" onClick={() => setEditing(false)}>
              Cancel
            </button>
          ) : null}
          {formError ? (
            <p id="sync-form-err" class="error wide" role="alert">
              {formError}
            </p>
          ) : null}
        </form>
      )}

      {message ? (
        <p class={message.tone === 'ok' ? 'ok' : 'error'} role={message.tone === 'ok' ? 'status' : 'alert'} data-testid="sync-message">
          {message.text}
        </p>
      ) : null}

      {conflicted.length > 0 ? (
        <section class="conflicts" aria-labelledby="conflicts-h">
          <h3 id="conflicts-h">Edited in two places: choose the version to keep</h3>
          <ul>
            {conflicted.map((r) => (
              <li key={r.id} data-testid="sync-conflict">
                <p>
                  <strong>{recordLabel(r, siteNames)}</strong>
                </p>
                {(r.conflicts ?? []).map((c) => (
                  <div key={c.key} class="conflict-versions">
                    <table>
                      <caption class="sr-only">Differences between the two versions</caption>
                      <thead>
                        <tr>
                          <th scope="col">Field</th>
                          <th scope="col">Shown now (saved {when(r.updatedAt)})</th>
                          <th scope="col">Other version{c.from ? ` (from ${c.from})` : ''}, saved {when(c.record.updatedAt)}</th>
                        </tr>
                      </thead>
                      <tbody>
                        {differing(r, c.record).map((k) => (
                          <tr key={k}>
                            <th scope="row">{k}</th>
                            <td>{show((r as unknown as Record<string, unknown>)[k])}</td>
                            <td>{show((c.record as unknown as Record<string, unknown>)[k])}</td>
                          </tr>
                        ))}
                      </tbody>
                    </table>
                    <div class="row-form">
                      <button type="button" disabled={busy} onClick={() => void resolve(r, undefined)}>
                        Keep the shown version
                      </button>
                      <button type="button" disabled={busy} onClick={() => void resolve(r, c)}>
                        Use the other version
                      </button>
                    </div>
                  </div>
                ))}
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      <div class="row-form bundles">
        <button type="button" disabled={busy} onClick={() => void exportAll()}>
          Export all sites as a bundle file
        </button>
        <label class="button">
          Import a bundle file
          <input type="file" accept=".json,application/json" class="sr-only" disabled={busy} onChange={(e) => void importFile(e.currentTarget)} />
        </label>
      </div>
      <p class="caption">
        A bundle (JSON) carries sites with their picks, estimates and notes, for moving them without a network. Importing
        never duplicates a record and never replaces a newer version with an older one.
      </p>
    </section>
  );
}

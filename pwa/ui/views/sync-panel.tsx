/**
 * Office sync and site bundles, on the tablet: the office address and
 * device token (set once), the sync status in plain words (changes waiting,
 * last success, last problem), a sync-now button, records edited in two
 * places (with a choice of which version to keep), and bundle export and
 * import. The sync client runs in the background once this panel has been
 * shown (pwa/sync/client.ts); the bundle code loads only when used. The
 * async work lives in controllers/sync-controller.ts; the panel keeps only
 * the form's typed text.
 */
import { useEffect, useState } from 'preact/hooks';
import type { AnyRecord, SiteLayeredModel } from '../../../core/exchange/records';
import type { SyncPanelState } from '../controllers/app-state';
import { differing, type SyncController } from '../controllers/sync-controller';
import { syncWords } from '../../sync/sync-state';
import '../styles/sync-panel.css';

export interface SyncPanelProps {
  /** What the panel shows (the `sync` slice of the app state). */
  state: SyncPanelState;
  sync: SyncController;
  /** The device's own view of the network. */
  online: boolean;
}

function when(iso: string | undefined): string {
  if (!iso) return 'never';
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toLocaleString();
}

function show(v: unknown, field?: string): string {
  if (v === undefined) return '(empty)';
  if (field === 'layeredModel') return modelWords(v as SiteLayeredModel);
  return typeof v === 'string' ? v : JSON.stringify(v);
}

/** A site's layer-builder model in words, for the conflict table: "2 layers: 4 m at 180 m/s, 10 m at 300 m/s; half-space 600 m/s". */
function modelWords(m: SiteLayeredModel): string {
  const layers = m.model.layers.map((l) => `${l.thickness_m} m at ${l.vs_m_s} m/s`).join(', ');
  const n = m.model.layers.length;
  return `${n} layer${n === 1 ? '' : 's'}: ${layers}; half-space ${m.model.halfspace.vs_m_s} m/s`;
}

/** A field's name in the conflict table. */
function fieldName(k: string): string {
  return k === 'layeredModel' ? 'layer builder model' : k;
}

function recordLabel(r: AnyRecord, sites: Readonly<Record<string, string>>): string {
  if (r.type === 'site') return `Site “${r.name}”`;
  const site = sites[r.siteId] ?? 'an unknown site';
  return r.type === 'pick' ? `Pick at ${r.frequency} Hz of “${site}”` : `Estimate of “${site}”`;
}

export function SyncPanel({ state, sync, online }: SyncPanelProps) {
  const { status, message, busy, formError, conflicted, siteNames } = state;
  const [editing, setEditing] = useState(false);
  const [url, setUrl] = useState('');
  const [token, setToken] = useState('');
  const [exportDemo, setExportDemo] = useState(false);

  // Shown: the background sync client starts (once) and the status is re-read.
  useEffect(() => sync.attach(), [sync]);
  // Installed from the office server itself: offer its address in an empty form.
  useEffect(() => {
    if (state.suggestedUrl) setUrl((u) => u || state.suggestedUrl!);
  }, [state.suggestedUrl]);

  if (!status) {
    return (
      <section class="panel sync" aria-labelledby="sync-h">
        <h2 id="sync-h">Office sync and bundles</h2>
        <p class="status" role="status">
          {message?.text ?? 'Opening…'}
        </p>
      </section>
    );
  }
  const configured = status.state !== 'not-set-up' && !!status.serverUrl;

  const saveSettings = (e: Event) => {
    e.preventDefault();
    void sync.connect(url, token, () => {
      setEditing(false);
      setToken('');
    });
  };

  const importFile = (input: HTMLInputElement) => {
    const file = input.files?.[0];
    input.value = '';
    if (file) void sync.importBundle(file);
  };

  // The words come from one pure rule (pwa/sync/sync-state.ts): never "up to date" while anything waits.
  const words = syncWords(status, online, (iso) => when(iso));

  return (
    <section class="panel sync" aria-labelledby="sync-h">
      <h2 id="sync-h">Office sync and bundles</h2>
      <dl class="sync-status" aria-live="polite">
        <div>
          <dt>State</dt>
          <dd data-testid="sync-state">{words.headline}</dd>
        </div>
        <div>
          <dt>Changes waiting to be sent</dt>
          <dd>
            <span class="sr-only">{words.waiting}</span>
            <span aria-hidden="true" data-testid="sync-pending">
              {status.pending}
            </span>
            {status.heldDemo > 0 ? <span class="hint"> (the invented demo site’s {status.heldDemo} stay on this tablet)</span> : null}
          </dd>
        </div>
        {words.lastAttempt ? (
          <div>
            <dt>Last attempt</dt>
            <dd class={words.lastAttemptFailed ? 'error' : undefined} data-testid="sync-last-attempt">
              {words.lastAttempt}
            </dd>
          </div>
        ) : null}
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
          <button
            type="button"
            class="primary"
            disabled={busy || !words.canSyncNow}
            aria-describedby={words.canSyncNow ? undefined : 'sync-now-why'}
            onClick={() => void sync.syncNow()}
          >
            Sync now
          </button>
          {words.canSyncNow ? null : (
            <p id="sync-now-why" class="hint" data-testid="sync-now-why">
              {words.syncNowBlocked}
            </p>
          )}
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
        <form class="form-grid" onSubmit={saveSettings} aria-describedby={formError ? 'sync-form-err' : undefined}>
          <label class="field wide">
            <span>Office server address</span>
            <input name="sync-url" inputMode="url" autoComplete="off" placeholder="http://192.168.1.20:8750" value={url} onInput={(e) => setUrl(e.currentTarget.value)} />
          </label>
          <label class="field wide">
            <span>Device token (the office gives one to each tablet, once; paste it whole)</span>
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
                            <th scope="row">{fieldName(k)}</th>
                            <td>{show((r as unknown as Record<string, unknown>)[k], k)}</td>
                            <td>{show((c.record as unknown as Record<string, unknown>)[k], k)}</td>
                          </tr>
                        ))}
                      </tbody>
                    </table>
                    <div class="row-form">
                      <button type="button" disabled={busy} onClick={() => void sync.resolve(r, undefined)}>
                        Keep the shown version
                      </button>
                      <button type="button" disabled={busy} onClick={() => void sync.resolve(r, c)}>
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

      {status.heldDemo > 0 || status.includeDemo ? (
        <label class="check">
          <input type="checkbox" checked={status.includeDemo} disabled={busy} onChange={(e) => void sync.setIncludeDemo(e.currentTarget.checked)} />
          Send the invented demo site to the office too
        </label>
      ) : null}

      <div class="row-form bundles">
        <button type="button" disabled={busy} onClick={() => void sync.exportAll(exportDemo)}>
          Export all sites as a bundle file
        </button>
        <label class="check">
          <input type="checkbox" checked={exportDemo} onChange={(e) => setExportDemo(e.currentTarget.checked)} />
          Include the invented demo site
        </label>
        <label class="button">
          Import a bundle file
          <input type="file" accept=".json,application/json" class="sr-only" disabled={busy} onChange={(e) => importFile(e.currentTarget)} />
        </label>
      </div>
      <p class="caption">
        A bundle (JSON) carries sites with their picks, estimates and notes, for moving them without a network. Importing
        never duplicates a record and never replaces a newer version with an older one.
      </p>
    </section>
  );
}

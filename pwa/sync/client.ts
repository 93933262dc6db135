/**
 * The tablet's side of sync with the office server (protocol:
 * core/exchange/sync-protocol.ts; merge rules: core/exchange/sync.ts).
 *
 * One sync = push, then pull:
 * 1. Push: the current version of every record named in the outbox, in
 *    batches (at most PUSH_BATCH_RECORDS records, about 8 MB). Outbox
 *    entries are acknowledged (removed) only after the server answers 200,
 *    which it does only once the batch is committed; an edit made during
 *    the push keeps its own, newer entry. Records the server reports as
 *    conflicts come back merged and are stored at once.
 * 2. Pull: every change after the saved cursor, page by page; each page is
 *    merged locally with the same rules and written in one transaction (a
 *    record edited on the tablet meanwhile is left alone; the office merges
 *    that edit when it is pushed). The cursor is saved after each page, and
 *    never past a record the tablet could not store: sync stops there and
 *    says which record it is and whether retrying can help.
 *
 * When: on demand (`syncNow`), when the browser comes back online, and on a
 * timer while online: every INTERVAL_MS after a success, and after a
 * failure after 5 s, 10 s, 20 s … up to MAX_BACKOFF_MS.
 *
 * The invented demo site (core/exchange/demo.ts isDemoSite) and its picks
 * and estimates stay on the tablet: their outbox entries wait, are not sent
 * and are not counted as waiting, until the crew turns on
 * `setIncludeDemo(true)`.
 *
 * Every attempt (success or failure) is remembered with its time and
 * outcome (`lastAttempt`), so the panel never has to guess.
 *
 * Nothing here touches the DOM; it runs in the page and in Node tests alike
 * (given `fetch`, an IndexedDB and, optionally, online/offline events).
 */
import { isDemoSite } from '../../core/exchange/records';
import type { AnyRecord } from '../../core/exchange/records';
import { recordLabel } from '../../core/exchange/record-limits';
import { InputError } from '../../core/shared/errors';
import { hasConflicts, planMerge } from '../../core/exchange/sync';
import type { ErrorResponse, PullResponse, PushResponse, StatusResponse } from '../../core/exchange/sync-protocol';
import { StoreError, type FieldStore } from '../store';
import { pullRecordings, pushRecordings, RECORDINGS_CURSOR_KEY } from './recording-sync';
import { checkRecord as checkFieldRecord, loadSiteModelCheck, needsSiteModelCheck } from '../store/validate';

/** Settings keys in the field store. */
export const SYNC_KEYS = {
  serverUrl: 'sync.serverUrl',
  token: 'sync.token',
  cursor: 'sync.cursor',
  lastSuccess: 'sync.lastSuccess',
  lastError: 'sync.lastError',
  /** JSON of the last attempt: {at, ok, message}. */
  lastAttempt: 'sync.lastAttempt',
  /** 'yes' when the crew asked to send the invented demo site too. */
  includeDemo: 'sync.includeDemo',
} as const;

/** One sync attempt's outcome. */
export interface SyncAttempt {
  /** ISO time the attempt ended. */
  at: string;
  ok: boolean;
  /** What happened, in plain words. */
  message: string;
}

/** Ids of the demo site(s) and of every pick and estimate of them, among `records`. */
export function demoRecordIds(records: readonly AnyRecord[]): Set<string> {
  const sites = new Set(records.filter((r) => r.type === 'site' && isDemoSite(r)).map((r) => r.id));
  const ids = new Set(sites);
  for (const r of records) if (r.type !== 'site' && sites.has(r.siteId)) ids.add(r.id);
  return ids;
}

/** Most records in one push. */
export const PUSH_BATCH_RECORDS = 5000;
/** Rough byte budget of one push (the server's limit is 16 MiB). */
export const PUSH_BATCH_BYTES = 8 * 1024 * 1024;
/** Records per pull page asked for. */
export const PULL_PAGE = 2000;

export interface SyncClientOptions {
  /** The fetch to use. @default globalThis.fetch */
  fetch?: typeof fetch;
  /** Where online/offline events come from. @default globalThis when it has addEventListener */
  events?: Pick<EventTarget, 'addEventListener' | 'removeEventListener'>;
  /** Whether the device thinks it is online. @default navigator.onLine, else true */
  isOnline?: () => boolean;
  /** Time between syncs while all is well, ms. @default 60000 */
  intervalMs?: number;
  /** First retry delay after a failure, ms; doubles each failure. @default 5000 */
  firstBackoffMs?: number;
  /** Longest retry delay, ms. @default 600000 */
  maxBackoffMs?: number;
  /** Time limit of one request, ms. @default 30000 */
  requestTimeoutMs?: number;
  /** Clock. @default () => new Date() */
  now?: () => Date;
  /** Most records per push. @default PUSH_BATCH_RECORDS */
  batchRecords?: number;
}

export type SyncState = 'not-set-up' | 'idle' | 'syncing' | 'offline' | 'error';

export interface SyncStatus {
  state: SyncState;
  /** Records waiting to be sent to the office (the demo site's are not counted unless included). */
  pending: number;
  /** Records of the invented demo site kept on this tablet (not sent). */
  heldDemo: number;
  /** Whether the crew asked to send the demo site too. */
  includeDemo: boolean;
  /** The last attempt, successful or not. */
  lastAttempt?: SyncAttempt;
  /** Records carrying versions edited elsewhere, waiting for review. */
  conflicts: number;
  serverUrl?: string;
  /** ISO time of the last complete sync. */
  lastSuccess?: string;
  /** The last failure, in plain words (cleared by a success). */
  lastError?: string;
  /** When the timer will try next, ISO time. */
  nextAttempt?: string;
}

export interface SyncReport {
  ok: boolean;
  pushed: number;
  pulled: number;
  conflicts: number;
  message: string;
}

/** A failure with a plain-words message for the crew. */
export class SyncError extends Error {
  constructor(
    message: string,
    readonly retry: boolean,
  ) {
    super(message);
    this.name = 'SyncError';
  }
}

/** Checks and normalises an office address typed by the crew; throws SyncError in plain words. */
export function normaliseServerUrl(text: string): string {
  const t = text.trim();
  if (t === '') throw new SyncError('Enter the office server address, e.g. http://192.168.1.20:8750.', false);
  if (/^[a-z][a-z0-9+.-]*:\/\//i.test(t) && !/^https?:\/\//i.test(t)) {
    throw new SyncError('The office address must start with http:// or https://.', false);
  }
  let url: URL;
  try {
    url = new URL(/^https?:\/\//i.test(t) ? t : `http://${t}`);
  } catch {
    throw new SyncError(`"${t.slice(0, 60)}" is not a web address; enter it like http://192.168.1.20:8750.`, false);
  }
  if (url.protocol !== 'http:' && url.protocol !== 'https:') throw new SyncError('The office address must start with http:// or https://.', false);
  return `${url.protocol}//${url.host}${url.pathname.replace(/\/+$/, '')}`;
}

function parseAttempt(text: string | undefined): SyncAttempt | undefined {
  if (!text) return undefined;
  try {
    const a = JSON.parse(text) as SyncAttempt;
    return typeof a?.at === 'string' && typeof a.ok === 'boolean' && typeof a.message === 'string' ? a : undefined;
  } catch {
    return undefined;
  }
}

function approxBytes(r: AnyRecord): number {
  return JSON.stringify(r).length + 1;
}

function randomId(): string {
  const c = globalThis.crypto;
  if (c?.randomUUID) return c.randomUUID();
  return `b${Date.now().toString(36)}${Math.random().toString(36).slice(2)}`;
}

export class SyncClient {
  private readonly fetchFn: typeof fetch;
  private readonly opts: Required<Pick<SyncClientOptions, 'intervalMs' | 'firstBackoffMs' | 'maxBackoffMs' | 'requestTimeoutMs' | 'batchRecords'>>;
  private readonly now: () => Date;
  private readonly isOnline: () => boolean;
  private readonly events?: Pick<EventTarget, 'addEventListener' | 'removeEventListener'>;
  private running: Promise<SyncReport> | undefined;
  private timer: ReturnType<typeof setTimeout> | undefined;
  private failures = 0;
  private started = false;
  private status: SyncStatus = { state: 'idle', pending: 0, conflicts: 0, heldDemo: 0, includeDemo: false };
  private readonly listeners = new Set<(s: SyncStatus) => void>();
  private readonly onOnline = () => {
    this.failures = 0;
    void this.syncNow();
  };
  private readonly onOffline = () => {
    void this.refresh();
  };

  constructor(
    private readonly store: FieldStore,
    options: SyncClientOptions = {},
  ) {
    this.fetchFn = options.fetch ?? ((...a: Parameters<typeof fetch>) => globalThis.fetch(...a));
    this.opts = {
      intervalMs: options.intervalMs ?? 60_000,
      firstBackoffMs: options.firstBackoffMs ?? 5_000,
      maxBackoffMs: options.maxBackoffMs ?? 600_000,
      requestTimeoutMs: options.requestTimeoutMs ?? 30_000,
      batchRecords: options.batchRecords ?? PUSH_BATCH_RECORDS,
    };
    this.now = options.now ?? (() => new Date());
    const nav = (globalThis as { navigator?: { onLine?: boolean } }).navigator;
    this.isOnline = options.isOnline ?? (() => nav?.onLine ?? true);
    const g = globalThis as unknown as Partial<EventTarget>;
    this.events = options.events ?? (typeof g.addEventListener === 'function' ? (g as EventTarget) : undefined);
  }

  /** Starts the automatic syncs (online event + timer) and a first sync. */
  start(): void {
    if (this.started) return;
    this.started = true;
    this.events?.addEventListener('online', this.onOnline);
    this.events?.addEventListener('offline', this.onOffline);
    void this.refresh().then(() => this.syncNow());
  }

  /** Stops the automatic syncs; a sync already running finishes. */
  stop(): void {
    this.started = false;
    this.events?.removeEventListener('online', this.onOnline);
    this.events?.removeEventListener('offline', this.onOffline);
    if (this.timer !== undefined) clearTimeout(this.timer);
    this.timer = undefined;
  }

  /** Follows status changes; returns the unsubscribe function. The listener gets the current status at once. */
  subscribe(listener: (s: SyncStatus) => void): () => void {
    this.listeners.add(listener);
    listener(this.status);
    return () => this.listeners.delete(listener);
  }

  getStatus(): SyncStatus {
    return this.status;
  }

  private emit(patch: Partial<SyncStatus>): void {
    this.status = { ...this.status, ...patch };
    for (const l of this.listeners) l(this.status);
  }

  /** Re-reads the counts and saved settings into the status. */
  async refresh(): Promise<SyncStatus> {
    const [outbox, records, serverUrl, token, lastSuccess, lastError, lastAttempt, includeDemo] = await Promise.all([
      this.store.outbox(),
      this.store.allRecords(),
      this.store.getSetting<string>(SYNC_KEYS.serverUrl),
      this.store.getSetting<string>(SYNC_KEYS.token),
      this.store.getSetting<string>(SYNC_KEYS.lastSuccess),
      this.store.getSetting<string>(SYNC_KEYS.lastError),
      this.store.getSetting<string>(SYNC_KEYS.lastAttempt),
      this.store.getSetting<string>(SYNC_KEYS.includeDemo),
    ]);
    const withDemo = includeDemo === 'yes';
    const demo = withDemo ? new Set<string>() : demoRecordIds(records);
    const waiting = new Set(outbox.map((e) => e.recordId));
    let held = 0;
    for (const id of waiting) if (demo.has(id)) held += 1;
    const configured = Boolean(serverUrl && token);
    let state: SyncState = this.status.state === 'syncing' ? 'syncing' : configured ? (lastError ? 'error' : 'idle') : 'not-set-up';
    if (configured && state !== 'syncing' && !this.isOnline()) state = 'offline';
    this.emit({
      state,
      pending: waiting.size - held,
      heldDemo: held,
      includeDemo: withDemo,
      conflicts: records.filter(hasConflicts).length,
      serverUrl: serverUrl || undefined,
      lastSuccess: lastSuccess || undefined,
      lastError: lastError || undefined,
      lastAttempt: parseAttempt(lastAttempt),
    });
    return this.status;
  }

  /**
   * Saves the office address and device token (checking them against the
   * server first when `verify` is set). A new server starts pulling from
   * the beginning.
   */
  async configure(serverUrlText: string, token: string, verify = true): Promise<string> {
    const serverUrl = normaliseServerUrl(serverUrlText);
    const t = token.trim();
    if (!/^[A-Za-z0-9_-]{16,200}$/.test(t)) {
      throw new SyncError('The device token is the line of letters, digits, - and _ that "shearfield device add" printed; paste it whole.', false);
    }
    let device = '';
    if (verify) {
      const status = await this.request<StatusResponse>(serverUrl, t, 'GET', '/api/v1/status');
      if (status.server !== 'shearfield-office') throw new SyncError(`${serverUrl} does not answer like a Shearfield office server.`, false);
      device = status.device;
    }
    const previous = await this.store.getSetting<string>(SYNC_KEYS.serverUrl);
    await this.store.putSetting(SYNC_KEYS.serverUrl, serverUrl);
    await this.store.putSetting(SYNC_KEYS.token, t);
    if (previous !== serverUrl) {
      await this.store.putSetting(SYNC_KEYS.cursor, '0');
      await this.store.putSetting(RECORDINGS_CURSOR_KEY, '0');
    }
    await this.store.putSetting(SYNC_KEYS.lastError, '');
    await this.refresh();
    return device;
  }

  /** Sends the invented demo site to the office too (on), or keeps it on this tablet (off, the default). */
  async setIncludeDemo(on: boolean): Promise<SyncStatus> {
    await this.store.putSetting(SYNC_KEYS.includeDemo, on ? 'yes' : '');
    return this.refresh();
  }

  private async recordAttempt(ok: boolean, message: string): Promise<void> {
    const attempt: SyncAttempt = { at: this.now().toISOString(), ok, message };
    await this.store.putSetting(SYNC_KEYS.lastAttempt, JSON.stringify(attempt));
  }

  /** Forgets the office address and token (queued changes stay queued). */
  async forget(): Promise<void> {
    await this.store.putSetting(SYNC_KEYS.serverUrl, '');
    await this.store.putSetting(SYNC_KEYS.token, '');
    await this.store.putSetting(SYNC_KEYS.cursor, '0');
    await this.store.putSetting(RECORDINGS_CURSOR_KEY, '0');
    await this.refresh();
  }

  /** Syncs now (or joins the sync already running). Never rejects: the report says what happened. */
  syncNow(): Promise<SyncReport> {
    if (!this.running) {
      this.running = this.runOnce().finally(() => {
        this.running = undefined;
      });
    }
    return this.running;
  }

  private schedule(ok: boolean): void {
    if (this.timer !== undefined) clearTimeout(this.timer);
    this.timer = undefined;
    if (!this.started) return;
    const delay = ok ? this.opts.intervalMs : Math.min(this.opts.maxBackoffMs, this.opts.firstBackoffMs * 2 ** Math.max(0, this.failures - 1));
    this.emit({ nextAttempt: new Date(this.now().getTime() + delay).toISOString() });
    this.timer = setTimeout(() => {
      this.timer = undefined;
      if (this.isOnline()) void this.syncNow();
      else this.schedule(false);
    }, delay);
  }

  private async runOnce(): Promise<SyncReport> {
    const serverUrl = await this.store.getSetting<string>(SYNC_KEYS.serverUrl);
    const token = await this.store.getSetting<string>(SYNC_KEYS.token);
    if (!serverUrl || !token) {
      await this.refresh();
      return { ok: false, pushed: 0, pulled: 0, conflicts: 0, message: 'Sync is not set up: enter the office address and this tablet\'s token.' };
    }
    this.emit({ state: 'syncing' });
    let pushed = 0;
    let pulled = 0;
    let conflicts = 0;
    try {
      // Marked as a send, so that no site revision it reads is amended afterwards (field-store.ts whileSending).
      const push = await this.store.whileSending(() => this.push(serverUrl, token));
      pushed = push.pushed;
      conflicts += push.conflicts;
      // Seismograph recordings after the records (their sites must reach the office first); see recording-sync.ts.
      const call = <T>(method: 'GET' | 'POST', path: string, body?: unknown) => this.request<T | undefined>(serverUrl, token, method, path, body, true);
      const all = await this.store.allRecords();
      const held = (await this.store.getSetting<string>(SYNC_KEYS.includeDemo)) === 'yes' ? new Set<string>() : demoRecordIds(all);
      const pushedRecordings = await pushRecordings(this.store, call, held);
      pushed += pushedRecordings.pushed;
      conflicts += pushedRecordings.conflicts;
      const pull = await this.pull(serverUrl, token);
      pulled = pull.pulled;
      conflicts += pull.conflicts;
      const pulledRecordings = await pullRecordings(this.store, call);
      pulled += pulledRecordings.pulled;
      conflicts += pulledRecordings.conflicts;
      this.failures = 0;
      await this.store.putSetting(SYNC_KEYS.lastSuccess, this.now().toISOString());
      await this.store.putSetting(SYNC_KEYS.lastError, '');
      const message = `Synced: ${pushed} sent, ${pulled} received${conflicts > 0 ? `, ${conflicts} conflict(s) kept for review` : ''}.`;
      await this.recordAttempt(true, message);
      this.emit({ state: 'idle' });
      await this.refresh();
      this.schedule(true);
      return { ok: true, pushed, pulled, conflicts, message };
    } catch (e) {
      const message = e instanceof SyncError ? e.message : `Sync failed: ${(e as Error)?.message ?? String(e)}`;
      this.failures += 1;
      try {
        await this.store.putSetting(SYNC_KEYS.lastError, message);
        await this.recordAttempt(false, message);
      } catch {
        /* the status below still shows it */
      }
      this.emit({ state: 'error' });
      await this.refresh().catch(() => this.emit({ lastError: message }));
      if (!this.isOnline()) this.emit({ state: 'offline' });
      this.schedule(false);
      return { ok: false, pushed, pulled, conflicts, message };
    }
  }

  /** One HTTP call; turns every failure into a SyncError in plain words. */
  private async request<T>(serverUrl: string, token: string, method: 'GET' | 'POST', path: string, body?: unknown, optional = false): Promise<T> {
    const controller = new AbortController();
    const timer = setTimeout(() => controller.abort(), this.opts.requestTimeoutMs);
    let res: Response;
    try {
      res = await this.fetchFn(serverUrl + path, {
        method,
        headers: body === undefined ? { Authorization: `Bearer ${token}` } : { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
        body: body === undefined ? undefined : JSON.stringify(body),
        signal: controller.signal,
        cache: 'no-store',
      });
    } catch {
      throw new SyncError(
        controller.signal.aborted
          ? `The office server at ${serverUrl} did not answer within ${Math.round(this.opts.requestTimeoutMs / 1000)} s. Changes stay queued on this tablet; sync will try again.`
          : `The office server at ${serverUrl} could not be reached (no network, or the server is not running). Changes stay queued on this tablet; sync will try again.`,
        true,
      );
    } finally {
      clearTimeout(timer);
    }
    let data: unknown;
    try {
      data = await res.json();
    } catch {
      throw new SyncError(`${serverUrl} answered, but not like a Shearfield office server (HTTP ${res.status}). Check the address.`, res.status >= 500);
    }
    if (res.ok) return data as T;
    // An office from before a call was added answers 404: an optional call then has nothing to do.
    if (optional && res.status === 404) return undefined as T;
    const said = (data as ErrorResponse | null)?.error;
    if (res.status === 401) {
      throw new SyncError('The office did not accept this tablet\'s token (unknown or revoked). Ask the office for a new one (shearfield device add) and enter it in the sync settings.', false);
    }
    if (res.status >= 500) throw new SyncError(`The office server had a problem: ${said ?? `HTTP ${res.status}`} It will be tried again.`, true);
    throw new SyncError(`The office refused the data: ${said ?? `HTTP ${res.status}`}`, false);
  }

  private async push(serverUrl: string, token: string): Promise<{ pushed: number; conflicts: number }> {
    const entries = await this.store.outbox();
    if (entries.length === 0) return { pushed: 0, conflicts: 0 };
    const all = await this.store.allRecords();
    const byId = new Map(all.map((r) => [r.id, r]));
    // The invented demo site stays on the tablet unless the crew asked to send it: its entries wait, unsent.
    const held = (await this.store.getSetting<string>(SYNC_KEYS.includeDemo)) === 'yes' ? new Set<string>() : demoRecordIds(all);
    // The current version of each queued record, in queue order.
    const order: string[] = [];
    const seqsOf = new Map<string, number[]>();
    const orphanSeqs: number[] = [];
    for (const e of entries) {
      if (held.has(e.recordId)) continue;
      // Recordings go by their own call after the records (pushRecordings); they are not dropped as orphans here.
      if (e.type === 'recording') continue;
      const rec = byId.get(e.recordId);
      if (!rec || rec.rev < e.rev) {
        // Only possible if the record vanished; nothing to send for this entry.
        if (!rec) orphanSeqs.push(e.seq);
        continue;
      }
      if (!seqsOf.has(e.recordId)) {
        seqsOf.set(e.recordId, []);
        order.push(e.recordId);
      }
      seqsOf.get(e.recordId)!.push(e.seq);
    }
    // Sites first so that a fresh office meets a site before its picks (not required, but tidy).
    const rank = { site: 0, pick: 1, estimate: 2 } as const;
    const records = order.map((id) => byId.get(id)!).sort((a, b) => rank[a.type] - rank[b.type]);
    let pushed = 0;
    let conflicts = 0;
    let batch: AnyRecord[] = [];
    let bytes = 0;
    const flush = async () => {
      if (batch.length === 0) return;
      const reply = await this.request<PushResponse>(serverUrl, token, 'POST', '/api/v1/push', { batchId: randomId(), records: batch });
      // The batch is committed at the office: acknowledge exactly the entries it covered.
      const acked: number[] = [];
      for (const r of batch) for (const seq of seqsOf.get(r.id) ?? []) acked.push(seq);
      await this.store.ackOutbox(acked);
      pushed += batch.length;
      conflicts += reply.conflicts;
      if (reply.conflicted.length > 0) await this.mergeIncoming(reply.conflicted);
      batch = [];
      bytes = 0;
    };
    for (const r of records) {
      const size = approxBytes(r);
      if (batch.length >= this.opts.batchRecords || (batch.length > 0 && bytes + size > PUSH_BATCH_BYTES)) await flush();
      batch.push(r);
      bytes += size;
    }
    await flush();
    if (orphanSeqs.length > 0) await this.store.ackOutbox(orphanSeqs);
    return { pushed, conflicts };
  }

  /** Merges records from the office into the tablet store; returns how many ended in conflict. Throws SyncError naming the first record it could not store. */
  private async mergeIncoming(incoming: AnyRecord[]): Promise<number> {
    const { conflicts, failed } = await this.storeIncoming(incoming);
    if (failed) throw refusedRecord(failed);
    return conflicts;
  }

  /**
   * Merges and stores records from the office, as many as can be stored:
   * each is first checked with the store's own rules (the shared depth and
   * size bound included), the good ones are written in one transaction, and
   * if that fails, one by one. Returns the conflicts and, if any record
   * could not be stored, the first such (by its place in `incoming`).
   */
  private async storeIncoming(incoming: AnyRecord[]): Promise<{ conflicts: number; failed?: RefusedRecord }> {
    let failed: RefusedRecord | undefined;
    const note = (index: number, e: unknown) => {
      if (failed === undefined || index < failed.index) failed = { index, record: incoming[index], ...refusalOf(e) };
    };
    const good: AnyRecord[] = [];
    const indexOf = new Map<string, number>();
    if (incoming.some(needsSiteModelCheck)) await loadSiteModelCheck();
    incoming.forEach((r, i) => {
      try {
        checkFieldRecord(r);
        good.push(r);
        if (!indexOf.has(r.id)) indexOf.set(r.id, i);
      } catch (e) {
        note(i, e);
      }
    });
    const all = await this.store.allRecords();
    const byId = new Map(all.map((r) => [r.id, r]));
    const plan = planMerge(good, (id) => byId.get(id));
    if (plan.writes.length > 0) {
      const expectedRevs = new Map(plan.writes.map((w) => [w.id, byId.get(w.id)?.rev ?? 0]));
      try {
        await this.store.putIncoming(plan.writes, { expectedRevs });
      } catch {
        // One record the tablet cannot store must not block the rest: write them one by one.
        for (const w of plan.writes) {
          try {
            await this.store.putIncoming([w], { expectedRevs });
          } catch (err) {
            note(indexOf.get(w.id) ?? 0, err);
          }
        }
      }
    }
    return { conflicts: plan.conflicts, failed };
  }

  private async pull(serverUrl: string, token: string): Promise<{ pulled: number; conflicts: number }> {
    let cursor = (await this.store.getSetting<string>(SYNC_KEYS.cursor)) || '0';
    let pulled = 0;
    let conflicts = 0;
    for (let page = 0; page < 10_000; page++) {
      const reply = await this.request<PullResponse>(serverUrl, token, 'GET', `/api/v1/pull?since=${encodeURIComponent(cursor)}&limit=${PULL_PAGE}`);
      if (!Array.isArray(reply.records) || typeof reply.cursor !== 'string') {
        throw new SyncError(`${serverUrl} answered the pull in an unknown form; check that it is a Shearfield office server.`, false);
      }
      const stored = await this.storeIncoming(reply.records);
      conflicts += stored.conflicts;
      if (stored.failed) {
        // Never move the cursor past a record that is not stored: the next
        // pull starts at it again. Records before it are stored; with the
        // per-record cursors the cursor moves up to just before it.
        const seqs = Array.isArray(reply.seqs) && reply.seqs.length === reply.records.length ? reply.seqs : undefined;
        const i = stored.failed.index;
        if (seqs && i > 0) await this.store.putSetting(SYNC_KEYS.cursor, seqs[i - 1]);
        pulled += i;
        throw refusedRecord(stored.failed);
      }
      pulled += reply.records.length;
      cursor = reply.cursor;
      await this.store.putSetting(SYNC_KEYS.cursor, cursor);
      if (!reply.more) break;
    }
    return { pulled, conflicts };
  }
}

/** A record from the office this tablet could not store, and why. */
interface RefusedRecord {
  /** Its place in the page. */
  index: number;
  record: AnyRecord;
  reason: string;
  /** Whether a later try can succeed (storage full, an interrupted write) or not (the record itself is refused). */
  retryHelps: boolean;
}

/** Reason and retry hint of a store failure: bad records and data IndexedDB cannot hold do not get better by retrying. */
function refusalOf(e: unknown): { reason: string; retryHelps: boolean } {
  const reason = (e as Error)?.message ?? String(e);
  if (e instanceof InputError) return { reason, retryHelps: false };
  if (e instanceof StoreError) {
    if (e.field !== undefined) return { reason, retryHelps: false };
    const name = (e.cause as { name?: string } | undefined)?.name ?? '';
    return { reason, retryHelps: name !== 'DataError' && name !== 'DataCloneError' };
  }
  const name = (e as { name?: string } | null)?.name ?? '';
  return { reason, retryHelps: name !== 'DataError' && name !== 'DataCloneError' };
}

function refusedRecord(f: RefusedRecord): SyncError {
  const label = recordLabel(f.record, '');
  const reason = f.reason.trim().replace(/\.$/, '');
  return new SyncError(
    f.retryHelps
      ? `This tablet could not store the ${label} from the office: ${reason}. Sync will try it again; nothing after it is skipped.`
      : `This tablet cannot store the ${label} from the office: ${reason}. Retrying will not help: the office must correct or delete that record. Sync stops at it, so nothing after it is skipped.`,
    f.retryHelps,
  );
}

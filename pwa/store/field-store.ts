/**
 * The field app's store: sites, picks, estimates and settings in IndexedDB
 * (through idb), with an outbox for sync.
 *
 * Rules every write keeps:
 * - The input is checked first (pwa/store/validate.ts, on the core's rules);
 *   a bad value rejects with a StoreError naming the field, and nothing is
 *   written.
 * - A save writes the record and its outbox entry in ONE transaction. Inside
 *   a transaction only IndexedDB requests are awaited (anything else would
 *   let the transaction commit half-way).
 * - Revisions: rev 1 creates a record; any other rev must be exactly one
 *   above the stored one, else the edit is stale and is refused.
 * - A site revision saved with `amendUnsent` folds into the stored one when
 *   that one never left the device (no push or bundle export has read it
 *   since it was saved, and none is under way: `whileSending`): the new
 *   revision's history then leaves the folded revision's key out, so a long
 *   run of edits between syncs stays one step from what the office holds
 *   (core/exchange/revision.ts keeps at most 64 ancestors). A revision that
 *   may have left keeps its key in the history, so it is superseded, never
 *   set beside the new one as a conflict.
 * - A failed write (full storage, an aborted transaction, a closed
 *   database) rejects with a StoreError in plain words, and the transaction
 *   is rolled back, so nothing changes.
 */
import { openDB, type IDBPDatabase, type IDBPTransaction, type StoreNames } from 'idb';
import { InputError } from '../../core/shared/errors';
import { checkPickSet } from '../../core/picks/picks';
import {
  nextRevision,
  type AnyRecord,
  type EstimateRecord,
  type PickRecord,
  type RecordingGeometryJson,
  type RecordingRecord,
  type SiteRecord,
  type StoredRecord,
} from '../../core/exchange/records';
import type { GeometryOverrides } from '../../core/recordings/recording';
import { HISTORY_LIMIT, revisionKey } from '../../core/exchange/revision';
import { SCHEMA_VERSION, upgradeTo, type FieldDB, type OutboxEntry } from './schema';
import { checkEstimate, checkPick, checkRecord, checkRecording, checkSite, loadSiteModelCheck, needsSiteModelCheck, pickOf } from './validate';
import { recordingOfInput, roomFor, sha256Hex, type StorageEstimate } from './recordings';

/** A store failure, in plain words; `field` names the bad field when the input was at fault. */
export class StoreError extends Error {
  /** The field at fault (e.g. `name`, `velocity_m_s`, `rev`), when the input was the cause. */
  field?: string;

  constructor(message: string, options: { field?: string; cause?: unknown } = {}) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.name = 'StoreError';
    if (options.field !== undefined) this.field = options.field;
  }
}

export interface FieldStore {
  /** Sites that are not deleted, most recently changed first. */
  listSites(): Promise<SiteRecord[]>;
  /** A site by id (deleted ones too: check `deleted`). */
  getSite(id: string): Promise<SiteRecord | undefined>;
  /** Saves a site revision (rev 1 creates; else the stored rev must be rev − 1). Returns what was stored. */
  saveSite(site: SiteRecord, options?: SaveSiteOptions): Promise<SiteRecord>;
  /** Deletes a site as tombstones: the site, its picks and its estimates each get a deleted revision. */
  deleteSite(id: string): Promise<void>;
  /** The site's picks that are not deleted, by `order`. */
  listPicks(siteId: string): Promise<PickRecord[]>;
  /** Saves a pick revision; its site must exist. Returns the stored (normalised) record. */
  savePick(pick: PickRecord): Promise<PickRecord>;
  /** Saves many picks in one transaction: all or nothing (CSV import). */
  savePicks(picks: PickRecord[]): Promise<void>;
  /** Deletes a pick as a tombstone revision. */
  deletePick(id: string): Promise<void>;
  /** Saves an estimate revision. */
  saveEstimate(estimate: EstimateRecord): Promise<void>;
  /** The site's most recently computed estimate that is not deleted. */
  latestEstimate(siteId: string): Promise<EstimateRecord | undefined>;
  getSetting<T>(key: string): Promise<T | undefined>;
  putSetting(key: string, value: unknown): Promise<void>;
  /** Every queued change, oldest first. */
  outbox(): Promise<OutboxEntry[]>;
  /** Removes acknowledged entries from the outbox. */
  ackOutbox(seqs: number[]): Promise<void>;
  /**
   * Runs `send` (a push, a bundle export: anything that reads records to
   * send them off the device) marked as a send, so that no site revision it
   * may read is amended afterwards (see `SaveSiteOptions.amendUnsent`).
   */
  whileSending<T>(send: () => Promise<T>): Promise<T>;
  /** Every record, tombstones included (for export and sync). */
  allRecords(): Promise<AnyRecord[]>;
  /**
   * Writes records received from sync or an import, in one transaction,
   * without queueing them in the outbox. The caller has already decided the
   * merge; this only checks each record's shape.
   * Options (pwa/sync): `expectedRevs` maps a record id to the rev the merge
   * was based on (0 = absent); a record whose stored rev differs by the time
   * the transaction runs (edited meanwhile) is skipped, and its id returned.
   * `queue` also queues each written record in the outbox (a bundle import,
   * whose records the office may not have yet).
   */
  putIncoming(records: StoredRecord[], options?: IncomingOptions): Promise<string[]>;
  /** Every recording record, tombstones included (for export and sync). */
  allRecordings(): Promise<RecordingRecord[]>;
  /**
   * Keeps a seismograph file with its site: the record (name, format, size,
   * SHA-256, the parsed geometry, the crew's overrides, whether the bytes
   * travel) and the raw bytes, in one transaction with its outbox entry.
   * Checks the input and the device's free storage first; a refusal names
   * the field (or says how much room is missing) and writes nothing.
   * `attach` defaults to the site's choice (its other recordings), else false.
   */
  saveRecording(input: SaveRecordingInput): Promise<RecordingRecord>;
  /** The site's recordings that are not deleted, oldest first. */
  listRecordings(siteId: string): Promise<RecordingRecord[]>;
  /** The raw bytes of a recording, or undefined when this device does not hold them. */
  recordingBytes(id: string): Promise<Uint8Array | undefined>;
  /** Deletes a recording: a tombstone revision of the record, and its bytes removed, in one transaction. */
  deleteRecording(id: string): Promise<void>;
  /** The site's choice whether raw files travel: every live recording of the site gets it (a revision where it changes). Returns how many changed. */
  setRecordingAttach(siteId: string, attach: boolean): Promise<number>;
  close(): void;
}

/** @see FieldStore.saveRecording */
export interface SaveRecordingInput {
  siteId: string;
  /** The file name. */
  name: string;
  /** The raw file. */
  bytes: Uint8Array;
  /** What the reader found (core/recordings/recording.ts geometrySummary). */
  geometry: RecordingGeometryJson;
  /** The crew's corrections of the file's geometry. @default none */
  overrides?: GeometryOverrides;
  /** Whether the raw bytes travel. @default the site's choice, else false */
  attach?: boolean;
}

/** @see FieldStore.saveSite */
export interface SaveSiteOptions {
  /**
   * Fold this revision into the stored one when the stored one never left
   * the device (saved here in the current send generation, with no send
   * under way): the new revision's history leaves the stored revision's key
   * out. For edits that come in long runs (the layer builder's cells), so
   * that more than 64 of them between syncs do not outgrow the history the
   * office needs to see the edit as made from its own revision.
   * @default false
   */
  amendUnsent?: boolean;
}

/** How openFieldStore opens the store. */
export interface FieldStoreOptions {
  /** How much storage the device reports (navigator.storage.estimate in the app; tests pass their own). */
  storageEstimate?: () => Promise<StorageEstimate>;
}

export type { OutboxEntry } from './schema';

/** @see FieldStore.putIncoming */
export interface IncomingOptions {
  /** Record id → the stored rev the merge saw (0 = none). @default no check */
  expectedRevs?: ReadonlyMap<string, number>;
  /** Queue the written records in the outbox too. @default false */
  queue?: boolean;
  /**
   * Raw files of recordings, by recording id, already checked against their
   * SHA-256 by the caller. A file is kept when its recording (written here or
   * already stored) states the same hash and this device lacks its bytes;
   * the device's free storage is checked first. @default none
   */
  files?: ReadonlyMap<string, { sha256: string; bytes: Uint8Array }>;
}

/** A new site record (rev 1, fresh UUID). Fields not given take empty or default values. */
export function newSite(fields: Partial<Omit<SiteRecord, 'id' | 'rev' | 'type' | 'updatedAt'>> = {}, now = new Date()): SiteRecord {
  return {
    name: '',
    date: now.toISOString().slice(0, 10),
    crew: '',
    notes: '',
    axisUnit: 'hz',
    settings: {},
    ...fields,
    id: crypto.randomUUID(),
    rev: 1,
    updatedAt: now.toISOString(),
    type: 'site',
  };
}

/** The pick fields a new pick needs: the core's pick values (kind and mode default to group, 0). */
export type NewPickFields = Partial<Omit<PickRecord, 'id' | 'rev' | 'type' | 'updatedAt' | 'siteId' | 'order'>> &
  Pick<PickRecord, 'velocity'>;

/** A new pick record (rev 1, fresh UUID) for a site, at table position `order`. */
export function newPick(siteId: string, fields: NewPickFields, order: number, now = new Date()): PickRecord {
  const pick = {
    kind: 'group',
    mode: 0,
    ...fields,
    id: crypto.randomUUID(),
    rev: 1,
    updatedAt: now.toISOString(),
    type: 'pick',
    siteId,
    order,
  } as PickRecord;
  if (pick.frequency === undefined && pick.period !== undefined && pick.period > 0) pick.frequency = 1 / pick.period;
  return pick;
}

/** A new estimate record (rev 1, fresh UUID) for a site: the settings it ran with and its JSON summary. */
export function newEstimate(
  siteId: string,
  settings: EstimateRecord['settings'],
  summary: Record<string, unknown>,
  now = new Date(),
): EstimateRecord {
  return {
    type: 'estimate',
    id: crypto.randomUUID(),
    rev: 1,
    updatedAt: now.toISOString(),
    siteId,
    settings,
    summary,
    computedAt: now.toISOString(),
  };
}

/**
 * What the crew is told about a failed write (or read); `what` names the
 * thing, e.g. "the site" or "the 4 picks".
 */
function storeErrorFrom(error: unknown, what: string, action: 'write' | 'read' = 'write'): StoreError {
  if (error instanceof StoreError) return error;
  if (error instanceof InputError) {
    return new StoreError(error.message, { field: error.field, cause: error });
  }
  const plural = /^the \d+ /.test(what) && !what.startsWith('the 1 ');
  const failed = action === 'write' ? `${what} ${plural ? 'were' : 'was'} not saved` : `${what} could not be read`;
  const after = action === 'write' ? ' Nothing was changed;' : '';
  const name = (error as { name?: string } | null)?.name ?? '';
  if (name === 'QuotaExceededError') {
    return new StoreError(
      `The device's storage is full, so ${failed}.${after} free some space (for example delete old sites after exporting them) and try again.`,
      { cause: error },
    );
  }
  if (name === 'AbortError') {
    return new StoreError(`The database stopped the ${action}, so ${failed}.${after} try again.`, { cause: error });
  }
  if (name === 'InvalidStateError') {
    return new StoreError(
      `The database is closed (the app may have been updated in another tab), so ${failed}. Reload the page to keep working.`,
      { cause: error },
    );
  }
  const detail = error instanceof Error ? `${error.name}: ${error.message}` : String(error);
  const lead = `${what.charAt(0).toUpperCase()}${what.slice(1)}`;
  return new StoreError(
    `${lead} could not be ${action === 'write' ? 'saved' : 'read'} (${detail}).${after} try again.`,
    { cause: error },
  );
}

/** Runs a validation step; an InputError becomes a StoreError (`prefix` is cut from the field name). */
function check<T>(fn: () => T, prefix = ''): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof InputError) {
      const field = prefix && e.field.startsWith(prefix) ? e.field.slice(prefix.length) : e.field;
      throw new StoreError(e.message, { field, cause: e });
    }
    throw e;
  }
}

type Stores = StoreNames<FieldDB>;
type WriteTx<S extends Stores[]> = IDBPTransaction<FieldDB, S, 'readwrite'>;

/**
 * The revision rule, checked against what is stored, inside the transaction.
 * `label` names the record for the message, e.g. "This site".
 */
function checkRevision(stored: AnyRecord | undefined, incoming: AnyRecord, label: string): void {
  if (incoming.rev === 1) {
    if (stored) {
      throw new StoreError(
        `${label} already exists (revision ${stored.rev}); a revision-1 record is only for creating it. ` +
          'Reload it and make the change again.',
        { field: 'rev' },
      );
    }
    return;
  }
  if (!stored) {
    throw new StoreError(`${label} is not in the store, so revision ${incoming.rev} of it cannot be saved.`, { field: 'id' });
  }
  if (stored.rev !== incoming.rev - 1) {
    throw new StoreError(
      `${label} was changed elsewhere since this edit began (stored revision ${stored.rev}, this edit follows revision ` +
        `${incoming.rev - 1}), so the edit was not saved. Reload it and make the change again.`,
      { field: 'rev' },
    );
  }
}

function outboxEntry(r: StoredRecord, queuedAt: string): OutboxEntry {
  // seq is assigned by the store (auto-increment key path).
  return { recordId: r.id, type: r.type, rev: r.rev, queuedAt } as OutboxEntry;
}

/** Settings key of the send state: `{ gen, active }` (see `whileSending`). */
export const SENDING_KEY = 'outbox.sending';
/** A send marked longer ago than this is taken as abandoned (the page closed during it). */
const SEND_LEASE_MS = 60 * 60 * 1000;

/** The send generation and the sends under way (id → start, ms since 1970). */
interface SendingState {
  gen: number;
  active: Record<string, number>;
}

function sendingStateOf(value: unknown, now = Date.now()): SendingState {
  const v = value as Partial<SendingState> | undefined;
  const gen = typeof v?.gen === 'number' && Number.isInteger(v.gen) ? v.gen : 0;
  const active: Record<string, number> = {};
  for (const [id, at] of Object.entries(v?.active ?? {})) if (typeof at === 'number' && now - at < SEND_LEASE_MS) active[id] = at;
  return { gen, active };
}

/**
 * The history of a revision that folds into the stored one: the stored
 * revision's own history and any further keys the new one names (e.g. a
 * resolved conflict's), without the stored revision's key, newest 64 kept.
 */
function amendedHistory(stored: SiteRecord, storedKey: string, incoming: SiteRecord): string[] {
  const keys = [...new Set([...(stored.history ?? []), ...(incoming.history ?? [])])].filter((k) => k !== storedKey);
  return keys.length > HISTORY_LIMIT ? keys.slice(keys.length - HISTORY_LIMIT) : keys;
}

class IdbFieldStore implements FieldStore {
  constructor(
    private readonly db: IDBPDatabase<FieldDB>,
    private readonly storageEstimate: () => Promise<StorageEstimate>,
  ) {}

  /**
   * Runs `body` in one read-write transaction. Any failure aborts the
   * transaction (nothing is written) and rejects with a StoreError.
   */
  private async write<S extends Stores[], T>(stores: S, what: string, body: (tx: WriteTx<S>) => Promise<T>): Promise<T> {
    let tx: WriteTx<S>;
    try {
      tx = this.db.transaction(stores, 'readwrite');
    } catch (e) {
      throw storeErrorFrom(e, what);
    }
    const done = tx.done;
    let aborted = false;
    tx.addEventListener('abort', () => {
      aborted = true;
    });
    try {
      const result = await body(tx);
      await done;
      return result;
    } catch (e) {
      done.catch(() => undefined);
      try {
        tx.abort();
      } catch {
        /* already finished or aborted */
      }
      if (e instanceof StoreError || e instanceof InputError) throw storeErrorFrom(e, what);
      // If the transaction itself failed, its error is the clearer cause.
      if (tx.error) throw storeErrorFrom(tx.error, what);
      const name = (e as { name?: string } | null)?.name;
      if (aborted || name === 'TransactionInactiveError') {
        throw storeErrorFrom(new DOMException('The transaction was aborted.', 'AbortError'), what);
      }
      throw storeErrorFrom(e, what);
    }
  }

  private async read<T>(what: string, fn: () => Promise<T>): Promise<T> {
    try {
      return await fn();
    } catch (e) {
      throw storeErrorFrom(e, what, 'read');
    }
  }

  async listSites(): Promise<SiteRecord[]> {
    const all = await this.read('the site list', () => this.db.getAll('sites'));
    return all.filter((s) => !s.deleted).sort((a, b) => (a.updatedAt < b.updatedAt ? 1 : a.updatedAt > b.updatedAt ? -1 : 0));
  }

  getSite(id: string): Promise<SiteRecord | undefined> {
    return this.read('the site', () => this.db.get('sites', id));
  }

  async saveSite(site: SiteRecord, options: SaveSiteOptions = {}): Promise<SiteRecord> {
    if (needsSiteModelCheck(site)) await loadSiteModelCheck();
    check(() => checkSite(site));
    let record: SiteRecord = { ...site };
    await this.write(['sites', 'outbox', 'settings'], 'the site', async (tx) => {
      const stored = await tx.objectStore('sites').get(record.id);
      checkRevision(stored, record, 'This site');
      const sending = sendingStateOf(await tx.objectStore('settings').get(SENDING_KEY));
      const outbox = tx.objectStore('outbox');
      if (options.amendUnsent && stored && Object.keys(sending.active).length === 0) {
        // The stored revision's own entry (not one a sync or an import has since replaced), queued in this generation: no send has read it.
        const storedKey = revisionKey(stored);
        const unsent = (await outbox.index('by-record').getAll(stored.id)).find((e) => e.key === storedKey && e.gen === sending.gen);
        if (unsent) {
          record = { ...record, history: amendedHistory(stored, storedKey, record) };
          await outbox.delete(unsent.seq);
        }
      }
      await tx.objectStore('sites').put(record);
      await outbox.add({ ...outboxEntry(record, record.updatedAt), gen: sending.gen, key: revisionKey(record) });
    });
    return record;
  }

  async deleteSite(id: string): Promise<void> {
    const now = new Date();
    await this.write(['sites', 'picks', 'estimates', 'recordings', 'recordingBytes', 'outbox', 'settings'], 'the deletion of the site', async (tx) => {
      const site = await tx.objectStore('sites').get(id);
      if (!site) throw new StoreError('This site is not in the store, so it cannot be deleted.', { field: 'id' });
      if (site.deleted) return;
      const queuedAt = now.toISOString();
      const tombstones: StoredRecord[] = [nextRevision(site, { deleted: true } as Partial<SiteRecord>, now)];
      for (const p of await tx.objectStore('picks').index('by-site').getAll(id)) {
        if (!p.deleted) tombstones.push(nextRevision(p, { deleted: true } as Partial<PickRecord>, now));
      }
      for (const e of await tx.objectStore('estimates').index('by-site').getAll(id)) {
        if (!e.deleted) tombstones.push(nextRevision(e, { deleted: true } as Partial<EstimateRecord>, now));
      }
      for (const r of await tx.objectStore('recordings').index('by-site').getAll(id)) {
        if (!r.deleted) tombstones.push(nextRevision(r, { deleted: true } as Partial<RecordingRecord>, now));
        await tx.objectStore('recordingBytes').delete(r.id);
      }
      for (const t of tombstones) {
        const store = t.type === 'site' ? 'sites' : t.type === 'pick' ? 'picks' : t.type === 'recording' ? 'recordings' : 'estimates';
        await tx.objectStore(store).put(t as never);
        await tx.objectStore('outbox').add(outboxEntry(t, queuedAt));
      }
      // This device's per-site settings (keys ending in ".SITE_ID": the survey
      // depth, the layer builder's model) go with the site.
      for (const key of await tx.objectStore('settings').getAllKeys()) {
        if (typeof key === 'string' && key.endsWith(`.${id}`)) await tx.objectStore('settings').delete(key);
      }
    });
  }

  async listPicks(siteId: string): Promise<PickRecord[]> {
    const range = IDBKeyRange.bound([siteId, -Infinity], [siteId, Infinity]);
    const picks = await this.read('the picks', () => this.db.getAllFromIndex('picks', 'by-site-order', range));
    return picks.filter((p) => !p.deleted);
  }

  async savePick(pick: PickRecord): Promise<PickRecord> {
    const record = check(() => checkPick(pick, 'this pick'), 'this pick, ');
    await this.write(['sites', 'picks', 'outbox'], 'the pick', async (tx) => {
      await this.pickWrites(tx, [record], (i) => (i === 0 ? 'this pick' : `the pick in row ${i + 1}`));
    });
    return record;
  }

  async savePicks(picks: PickRecord[]): Promise<void> {
    if (!Array.isArray(picks)) throw new StoreError('The picks to save must be a list.', { field: 'picks' });
    if (picks.length === 0) return;
    const records = check(() => picks.map((p, i) => checkPick(p, `pick ${i + 1}`)));
    const ids = new Set<string>();
    for (const [i, r] of records.entries()) {
      if (ids.has(r.id)) {
        throw new StoreError(`Pick ${i + 1} repeats the id of an earlier pick in the same batch; ids must be unique.`, {
          field: `pick ${i + 1}, id`,
        });
      }
      ids.add(r.id);
    }
    await this.write(['sites', 'picks', 'outbox'], `the ${records.length} picks`, async (tx) => {
      await this.pickWrites(tx, records, (i) => `pick ${i + 1}`);
    });
  }

  /**
   * The body of a pick save, inside its transaction: each pick's site must
   * exist, revisions must follow, and a site's live picks must stay
   * distinct (core/picks/picks.ts checkPickSet: one pick per frequency, kind and mode).
   */
  private async pickWrites(
    tx: WriteTx<['sites', 'picks', 'outbox']>,
    records: PickRecord[],
    whereOf: (index: number) => string,
  ): Promise<void> {
    const picks = tx.objectStore('picks');
    const sites = new Map<string, SiteRecord | undefined>();
    for (const [i, r] of records.entries()) {
      if (!sites.has(r.siteId)) sites.set(r.siteId, await tx.objectStore('sites').get(r.siteId));
      const site = sites.get(r.siteId);
      if (!site || site.deleted) {
        throw new StoreError(
          `${capital(whereOf(i))} belongs to a site that is ${site ? 'deleted' : 'not in the store'}, so it was not saved.`,
          { field: 'siteId' },
        );
      }
      checkRevision(await picks.get(r.id), r, capital(whereOf(i)));
    }
    // The distinctness rule over each touched site: stored live picks, replaced by the incoming ones.
    for (const siteId of sites.keys()) {
      const incoming = records.map((r, i) => ({ r, i })).filter(({ r }) => r.siteId === siteId);
      const replaced = new Set(incoming.map(({ r }) => r.id));
      const stored = (await picks.index('by-site').getAll(siteId)).filter((p) => !p.deleted && !replaced.has(p.id));
      const live = incoming.filter(({ r }) => !r.deleted);
      // Stored picks first, so that a clash is reported on the incoming pick.
      const set = [...stored.map(pickOf), ...live.map(({ r }) => pickOf(r))];
      const n = stored.length;
      checkPickSet(set, (k) => (k >= n ? whereOf(live[k - n].i) : `the stored pick in row ${rowOf(stored, k)}`));
    }
    const queuedAt = new Date().toISOString();
    for (const r of records) {
      await picks.put(r);
      await tx.objectStore('outbox').add(outboxEntry(r, queuedAt));
    }
  }

  async deletePick(id: string): Promise<void> {
    await this.write(['picks', 'outbox'], 'the deletion of the pick', async (tx) => {
      const pick = await tx.objectStore('picks').get(id);
      if (!pick) throw new StoreError('This pick is not in the store, so it cannot be deleted.', { field: 'id' });
      if (pick.deleted) return;
      const tomb = nextRevision(pick, { deleted: true } as Partial<PickRecord>);
      await tx.objectStore('picks').put(tomb);
      await tx.objectStore('outbox').add(outboxEntry(tomb, tomb.updatedAt));
    });
  }

  async saveEstimate(estimate: EstimateRecord): Promise<void> {
    check(() => checkEstimate(estimate));
    const record: EstimateRecord = { ...estimate };
    await this.write(['sites', 'estimates', 'outbox'], 'the estimate', async (tx) => {
      const site = await tx.objectStore('sites').get(record.siteId);
      if (!site || site.deleted) {
        throw new StoreError(`This estimate belongs to a site that is ${site ? 'deleted' : 'not in the store'}, so it was not saved.`, {
          field: 'siteId',
        });
      }
      checkRevision(await tx.objectStore('estimates').get(record.id), record, 'This estimate');
      await tx.objectStore('estimates').put(record);
      await tx.objectStore('outbox').add(outboxEntry(record, record.updatedAt));
    });
  }

  async latestEstimate(siteId: string): Promise<EstimateRecord | undefined> {
    return this.read('the estimate', async () => {
      const range = IDBKeyRange.bound([siteId, ''], [siteId, '\uffff']);
      let cursor = await this.db.transaction('estimates').store.index('by-site-computed').openCursor(range, 'prev');
      while (cursor) {
        if (!cursor.value.deleted) return cursor.value;
        cursor = await cursor.continue();
      }
      return undefined;
    });
  }

  getSetting<T>(key: string): Promise<T | undefined> {
    return this.read('the setting', () => this.db.get('settings', key) as Promise<T | undefined>);
  }

  async putSetting(key: string, value: unknown): Promise<void> {
    if (typeof key !== 'string' || key === '') throw new StoreError('The setting key must be non-empty text.', { field: 'key' });
    await this.write(['settings'], `the setting "${key}"`, async (tx) => {
      await tx.objectStore('settings').put(value, key);
    });
  }

  outbox(): Promise<OutboxEntry[]> {
    return this.read('the outbox', () => this.db.getAll('outbox'));
  }

  async ackOutbox(seqs: number[]): Promise<void> {
    if (!Array.isArray(seqs) || seqs.some((s) => !Number.isInteger(s))) {
      throw new StoreError('The outbox entries to acknowledge must be a list of whole sequence numbers.', { field: 'seqs' });
    }
    await this.write(['outbox'], 'the outbox acknowledgement', async (tx) => {
      for (const s of seqs) await tx.objectStore('outbox').delete(s);
    });
  }

  async whileSending<T>(send: () => Promise<T>): Promise<T> {
    const id = crypto.randomUUID();
    // A new generation at the start and at the end: a site revision saved before or during the send is never amended.
    const step = (mark: boolean) =>
      this.write(['settings'], 'the send mark', async (tx) => {
        const state = sendingStateOf(await tx.objectStore('settings').get(SENDING_KEY));
        if (mark) state.active[id] = Date.now();
        else delete state.active[id];
        await tx.objectStore('settings').put({ gen: state.gen + 1, active: state.active }, SENDING_KEY);
      });
    await step(true);
    try {
      return await send();
    } finally {
      // Should the end fail to be written, the mark stays until its lease runs out: nothing is amended meanwhile.
      await step(false).catch(() => undefined);
    }
  }

  async allRecords(): Promise<AnyRecord[]> {
    return this.read('the records', async () => {
      const tx = this.db.transaction(['sites', 'picks', 'estimates']);
      const [sites, picks, estimates] = await Promise.all([
        tx.objectStore('sites').getAll(),
        tx.objectStore('picks').getAll(),
        tx.objectStore('estimates').getAll(),
      ]);
      return [...sites, ...picks, ...estimates];
    });
  }

  async putIncoming(records: StoredRecord[], options: IncomingOptions = {}): Promise<string[]> {
    if (!Array.isArray(records)) throw new StoreError('The incoming records must be a list.', { field: 'records' });
    if (records.some(needsSiteModelCheck)) await loadSiteModelCheck();
    const clean = records.map((r, i) => {
      try {
        return checkRecord(r);
      } catch (e) {
        if (e instanceof InputError) {
          throw new StoreError(`Incoming record ${i + 1}: ${e.message}`, { field: `record ${i + 1}, ${e.field}`, cause: e });
        }
        throw e;
      }
    });
    const files = options.files ?? new Map<string, { sha256: string; bytes: Uint8Array }>();
    if (clean.length === 0 && files.size === 0) return [];
    if (files.size > 0) {
      const total = [...files.values()].reduce((n, f) => n + f.bytes.byteLength, 0);
      const room = await roomFor(total, this.storageEstimate);
      if (room) throw new StoreError(`${room} Nothing was imported.`, { field: 'bytes' });
    }
    const skipped: string[] = [];
    const expected = options.expectedRevs;
    const queuedAt = new Date().toISOString();
    const stores: ['sites', 'picks', 'estimates', 'recordings', 'recordingBytes', 'outbox'] = ['sites', 'picks', 'estimates', 'recordings', 'recordingBytes', 'outbox'];
    await this.write(stores, `the ${clean.length} incoming records`, async (tx) => {
      for (const r of clean) {
        const name = r.type === 'site' ? 'sites' : r.type === 'pick' ? 'picks' : r.type === 'recording' ? 'recordings' : 'estimates';
        if (expected?.has(r.id)) {
          const current = await tx.objectStore(name).get(r.id);
          if ((current?.rev ?? 0) !== expected.get(r.id)) {
            skipped.push(r.id);
            continue;
          }
        }
        await tx.objectStore(name).put(r as never);
        if (r.type === 'recording' && r.deleted) await tx.objectStore('recordingBytes').delete(r.id);
        if (options.queue) await tx.objectStore('outbox').add(outboxEntry(r, queuedAt));
      }
      for (const [id, f] of files) {
        const rec = await tx.objectStore('recordings').get(id);
        if (!rec || rec.deleted || rec.sha256 !== f.sha256) continue;
        if (await tx.objectStore('recordingBytes').get(id)) continue;
        await tx.objectStore('recordingBytes').put({ id, sha256: f.sha256, bytes: f.bytes });
      }
    });
    return skipped;
  }

  allRecordings(): Promise<RecordingRecord[]> {
    return this.read('the recordings', () => this.db.getAll('recordings'));
  }

  async saveRecording(input: SaveRecordingInput): Promise<RecordingRecord> {
    // Everything that is not IndexedDB happens before the transaction: the checks, the hash, the room.
    const now = new Date();
    const draft = check(() => recordingOfInput(input, now));
    // A private copy: the caller's array may change after the call returns.
    const bytes = input.bytes.slice();
    let sha256: string;
    try {
      sha256 = await sha256Hex(bytes);
    } catch (e) {
      throw new StoreError(`The file "${draft.name}" could not be hashed (${(e as Error)?.message ?? String(e)}), so it was not saved. Nothing was changed.`, { cause: e });
    }
    check(() => checkRecording({ ...draft, sha256, attach: input.attach ?? false }));
    const room = await roomFor(input.bytes.byteLength, this.storageEstimate);
    if (room) throw new StoreError(`${room} The file "${draft.name}" was not saved; nothing was changed.`, { field: 'bytes' });
    let saved!: RecordingRecord;
    await this.write(['sites', 'recordings', 'recordingBytes', 'outbox'], `the recording "${draft.name}"`, async (tx) => {
      const site = await tx.objectStore('sites').get(draft.siteId);
      if (!site || site.deleted) {
        throw new StoreError(`This recording belongs to a site that is ${site ? 'deleted' : 'not in the store'}, so it was not saved.`, {
          field: 'siteId',
        });
      }
      let attach = input.attach;
      if (attach === undefined) {
        const others = (await tx.objectStore('recordings').index('by-site').getAll(draft.siteId)).filter((r) => !r.deleted);
        attach = others.some((r) => r.attach);
      }
      saved = { ...draft, sha256, attach };
      await tx.objectStore('recordings').put(saved);
      await tx.objectStore('recordingBytes').put({ id: saved.id, sha256, bytes });
      await tx.objectStore('outbox').add(outboxEntry(saved, saved.updatedAt));
    });
    return saved;
  }

  async listRecordings(siteId: string): Promise<RecordingRecord[]> {
    const all = await this.read('the recordings', () => this.db.getAllFromIndex('recordings', 'by-site', siteId));
    return all
      .filter((r) => !r.deleted)
      .sort((a, b) => (a.addedAt < b.addedAt ? -1 : a.addedAt > b.addedAt ? 1 : a.name.localeCompare(b.name)));
  }

  async recordingBytes(id: string): Promise<Uint8Array | undefined> {
    const entry = await this.read('the recording file', () => this.db.get('recordingBytes', id));
    return entry?.bytes;
  }

  async deleteRecording(id: string): Promise<void> {
    await this.write(['recordings', 'recordingBytes', 'outbox'], 'the deletion of the recording', async (tx) => {
      const rec = await tx.objectStore('recordings').get(id);
      if (!rec) throw new StoreError('This recording is not in the store, so it cannot be deleted.', { field: 'id' });
      if (rec.deleted) return;
      const tomb = nextRevision(rec, { deleted: true } as Partial<RecordingRecord>);
      await tx.objectStore('recordings').put(tomb);
      await tx.objectStore('recordingBytes').delete(id);
      await tx.objectStore('outbox').add(outboxEntry(tomb, tomb.updatedAt));
    });
  }

  async setRecordingAttach(siteId: string, attach: boolean): Promise<number> {
    if (typeof attach !== 'boolean') {
      throw new StoreError('attach must be true or false (whether raw files travel to the office).', { field: 'attach' });
    }
    let changed = 0;
    await this.write(['sites', 'recordings', 'outbox'], "the site's choice for raw files", async (tx) => {
      const site = await tx.objectStore('sites').get(siteId);
      if (!site || site.deleted) {
        throw new StoreError(`This site is ${site ? 'deleted' : 'not in the store'}, so its choice for raw files was not saved.`, { field: 'siteId' });
      }
      const now = new Date();
      for (const r of await tx.objectStore('recordings').index('by-site').getAll(siteId)) {
        if (r.deleted || r.attach === attach) continue;
        const next = nextRevision(r, { attach }, now);
        await tx.objectStore('recordings').put(next);
        await tx.objectStore('outbox').add(outboxEntry(next, next.updatedAt));
        changed++;
      }
    });
    return changed;
  }

  close(): void {
    this.db.close();
  }
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

function rowOf(stored: PickRecord[], k: number): number {
  const sorted = [...stored].sort((a, b) => a.order - b.order);
  return sorted.indexOf(stored[k]) + 1;
}

/**
 * Opens (creating or migrating as needed) the field store. Rejects with a
 * StoreError in plain words when the browser cannot open IndexedDB.
 */
export async function openFieldStore(name = 'shearfield', options: FieldStoreOptions = {}): Promise<FieldStore> {
  let db: IDBPDatabase<FieldDB>;
  try {
    db = await openDB<FieldDB>(name, SCHEMA_VERSION, {
      upgrade: upgradeTo(SCHEMA_VERSION),
      blocking() {
        // A newer version of the app wants to upgrade the database: let it.
        db.close();
      },
    });
  } catch (e) {
    const detail = e instanceof Error ? `${e.name}: ${e.message}` : String(e);
    throw new StoreError(
      `The app could not open its on-device database (${detail}). Check that the browser allows site storage ` +
        '(private browsing may block it), then reload.',
      { cause: e },
    );
  }
  return new IdbFieldStore(db, options.storageEstimate ?? deviceStorageEstimate);
}

/** The device's own answer (StorageManager.estimate(), WHATWG Storage Standard); empty where the browser has none. */
async function deviceStorageEstimate(): Promise<StorageEstimate> {
  const storage = (globalThis as { navigator?: Navigator }).navigator?.storage;
  if (!storage || typeof storage.estimate !== 'function') return {};
  return storage.estimate();
}

/** The answer to the persistent-storage request. */
export type PersistenceAnswer = 'granted' | 'denied' | 'unsupported';

/**
 * Asks the browser to keep this app's storage even under storage pressure
 * (StorageManager.persist(), WHATWG Storage Standard). Already-persistent
 * storage answers 'granted' without asking again.
 */
export async function requestPersistentStorage(): Promise<PersistenceAnswer> {
  const storage = (globalThis as { navigator?: Navigator }).navigator?.storage;
  if (!storage || typeof storage.persist !== 'function') return 'unsupported';
  try {
    if (typeof storage.persisted === 'function' && (await storage.persisted())) return 'granted';
    return (await storage.persist()) ? 'granted' : 'denied';
  } catch {
    return 'denied';
  }
}

/**
 * The field app's IndexedDB schema and its migrations.
 *
 * The database is versioned; each version's shape is written down here as
 * a typed schema (idb's DBSchema) and each step from one version to the
 * next is a migration function. Opening the database at SCHEMA_VERSION runs
 * every step above the version the device already holds, inside the one
 * `versionchange` transaction: if any step fails, the whole upgrade is
 * rolled back and the device keeps its old database untouched.
 *
 * Version history
 * - v1: object stores `sites`, `picks` (index `by-site`), `estimates`
 *   (index `by-site`) and `settings` (key-value, out-of-line keys).
 * - v2: adds the `outbox` store (auto-incremented `seq`, index
 *   `by-record`) that the sync engine drains, the `by-site-order` index on
 *   picks (a site's rows in the crew's order) and the `by-site-computed`
 *   index on estimates (latest estimate first). Every record already held
 *   from v1 is queued in the outbox, because it was never sent anywhere.
 * - v3: adds `recordings` (seismograph files kept with a site: the record,
 *   index `by-site`) and `recordingBytes` (the raw file of each recording,
 *   keyed by the recording's id, kept apart so that lists and sync read
 *   only the small records). Nothing else changes.
 */
import type { DBSchema, IDBPDatabase, IDBPTransaction, StoreNames } from 'idb';
import type { EstimateRecord, PickRecord, RecordingRecord, SiteRecord, StoredRecord } from '../../core/exchange/records';

/** The current schema version. */
export const SCHEMA_VERSION = 3;

/** An entry in the outbox: one saved revision waiting to be sent. */
export interface OutboxEntry {
  /** Queue position, assigned by the database (auto-increment). */
  seq: number;
  /** The id of the record that changed. */
  recordId: string;
  type: StoredRecord['type'];
  /** The revision that was saved. */
  rev: number;
  /** When it was queued, ISO 8601 (UTC). */
  queuedAt: string;
  /**
   * The send generation it was queued in (field-store.ts `whileSending`):
   * a site revision whose entry still carries the current generation has
   * not been read by any push or bundle export. Absent on entries queued by
   * an import or by versions before it (never amended).
   */
  gen?: number;
  /** The revision key of the site revision it queued (so a fold can tell it is still the stored one). */
  key?: string;
}

/** Schema version 1 (kept so that migrations and their tests are honest). */
export interface FieldDBv1 extends DBSchema {
  sites: { key: string; value: SiteRecord };
  picks: { key: string; value: PickRecord; indexes: { 'by-site': string } };
  estimates: { key: string; value: EstimateRecord; indexes: { 'by-site': string } };
  settings: { key: string; value: unknown };
}

/** The raw bytes of one kept recording. */
export interface RecordingBytesEntry {
  /** The recording record's id. */
  id: string;
  /** SHA-256 of `bytes`, as the record states it. */
  sha256: string;
  bytes: Uint8Array;
}

/** Schema version 3, the current one (version 2 is the same without the two recording stores). */
export interface FieldDB extends DBSchema {
  sites: { key: string; value: SiteRecord };
  picks: {
    key: string;
    value: PickRecord;
    indexes: { 'by-site': string; 'by-site-order': [string, number] };
  };
  estimates: {
    key: string;
    value: EstimateRecord;
    indexes: { 'by-site': string; 'by-site-computed': [string, string] };
  };
  settings: { key: string; value: unknown };
  outbox: { key: number; value: OutboxEntry; indexes: { 'by-record': string } };
  recordings: { key: string; value: RecordingRecord; indexes: { 'by-site': string } };
  recordingBytes: { key: string; value: RecordingBytesEntry };
}

type UpgradeTx = IDBPTransaction<FieldDB, StoreNames<FieldDB>[], 'versionchange'>;
type Migration = (db: IDBPDatabase<FieldDB>, tx: UpgradeTx) => void;

/** MIGRATIONS[v - 1] takes a database from version v - 1 to version v. */
const MIGRATIONS: readonly Migration[] = [
  // 0 → 1: the first schema.
  (db) => {
    db.createObjectStore('sites', { keyPath: 'id' });
    const picks = db.createObjectStore('picks', { keyPath: 'id' });
    picks.createIndex('by-site', 'siteId');
    const estimates = db.createObjectStore('estimates', { keyPath: 'id' });
    estimates.createIndex('by-site', 'siteId');
    db.createObjectStore('settings');
  },
  // 1 → 2: the outbox and the ordering indexes; queue what v1 held.
  (db, tx) => {
    const outbox = db.createObjectStore('outbox', { keyPath: 'seq', autoIncrement: true });
    outbox.createIndex('by-record', 'recordId');
    tx.objectStore('picks').createIndex('by-site-order', ['siteId', 'order']);
    tx.objectStore('estimates').createIndex('by-site-computed', ['siteId', 'computedAt']);
    const queuedAt = new Date().toISOString();
    // Only IndexedDB requests are awaited here, so the upgrade transaction stays alive.
    for (const name of ['sites', 'picks', 'estimates'] as const) {
      void (async () => {
        let cursor = await tx.objectStore(name).openCursor();
        while (cursor) {
          const r = cursor.value;
          void tx.objectStore('outbox').add({ recordId: r.id, type: r.type, rev: r.rev, queuedAt } as OutboxEntry);
          cursor = await cursor.continue();
        }
      })().catch(() => {
        // A failed step aborts the upgrade; the device keeps its v1 database.
        try {
          tx.abort();
        } catch {
          /* already aborted */
        }
      });
    }
  },
  // 2 → 3: the recordings and their raw bytes; nothing held changes.
  (db) => {
    const recordings = db.createObjectStore('recordings', { keyPath: 'id' });
    recordings.createIndex('by-site', 'siteId');
    db.createObjectStore('recordingBytes', { keyPath: 'id' });
  },
];

/**
 * The `upgrade` callback for idb's openDB that brings a database from any
 * older version up to `target` (default: the current version). Tests use
 * it with a lower target to build an older database on purpose.
 */
export function upgradeTo(target = SCHEMA_VERSION) {
  if (!Number.isInteger(target) || target < 1 || target > MIGRATIONS.length) {
    throw new RangeError(`target must be a schema version from 1 to ${MIGRATIONS.length}, but it is ${target}.`);
  }
  return (db: IDBPDatabase<FieldDB>, oldVersion: number, _newVersion: number | null, tx: UpgradeTx): void => {
    for (let v = oldVersion + 1; v <= target; v++) MIGRATIONS[v - 1](db, tx);
  };
}

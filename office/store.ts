/**
 * The office store: one SQLite file (better-sqlite3) in the data folder,
 * WAL mode, a schema with numbered migrations (PRAGMA user_version).
 *
 * Tables (version 1):
 * - `devices`: id, name, SHA-256 of the token (the token itself is never
 *   stored), created and revoked times.
 * - `records`: the current version of every record (sites, picks,
 *   estimates, tombstones), its revision key, whether it carries kept
 *   conflicts, and `seq`, the change counter that pull cursors follow.
 * - `versions`: every distinct version ever received (record id + revision
 *   key), with where it came from. Nothing received is ever dropped, and a
 *   version seen before is recognised even when it has left every history.
 * - `batches`: one row per push or import (its id, source, counts), for the
 *   review trail.
 *
 * Version 2 scopes batch ids by device: a batch is known by (scope, batch
 * id, SHA-256 of its records), the scope being `device:ID` for a push and
 * `import` for a bundle. Only an identical batch from the same device is a
 * replay; a reused id with other records is a batch of its own in the trail.
 *
 * Every batch is merged with the core rules (core/exchange/sync.ts) and written in
 * ONE `BEGIN IMMEDIATE` transaction: all of it or none of it, and a writer
 * that finds another one busy waits for it (the busy timeout here, plus the
 * server's own retries) instead of failing half-way with "database is
 * locked". A batch seen before changes nothing.
 *
 * Every version of a record that a batch carries, its own and the versions
 * its `conflicts` list passes on, goes into `versions` stamped with the
 * batch's source (the authenticated device or the bundle file), never with
 * a name the sender claims: a passed-on version reads "passed on by NAME".
 *
 * Durability: WAL with `synchronous = FULL`, so an acknowledged batch
 * survives a power cut, not only a crash of the process.
 *
 * Files: the data folder is created 0700 and the SQLite files 0600.
 */
import Database from 'better-sqlite3';
import { createHash, randomBytes } from 'node:crypto';
import { chmodSync, closeSync, existsSync, mkdirSync, openSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { InputError, describeValue } from '../core/shared/errors';
import type { AnyRecord, RecordingRecord } from '../core/exchange/records';
import type { RecordingFile } from '../core/exchange/bundle';
import { MAX_ATTACHED_FILE_BYTES, MAX_RECORDINGS_PAGE_BYTES, MAX_RECORDINGS_PER_PUSH } from '../core/exchange/recording-sync';
import { revisionKey } from '../core/exchange/revision';
import { planMerge, type MergePlan } from '../core/exchange/sync';
import { checkSiteReferences } from '../core/exchange/bundle';
import { DEFAULT_BUSY_TIMEOUT_MS } from './store-busy';

export { busyMessage, DEFAULT_BUSY_TIMEOUT_MS, isBusyError } from './store-busy';

/** Default data folder (relative to the working directory); gitignored. */
export const DEFAULT_DATA_DIR = '.office-data';
/** The SQLite file inside the data folder. */
export const DB_FILE_NAME = 'shearfield-office.sqlite';

/** The schema, one entry per version; entry i upgrades from version i to i + 1. Never edit a shipped entry; add one. */
const MIGRATIONS: readonly string[] = [
  `
  CREATE TABLE devices (
    id INTEGER PRIMARY KEY AUTOINCREMENT,
    name TEXT NOT NULL UNIQUE,
    token_sha256 TEXT NOT NULL UNIQUE,
    created_at TEXT NOT NULL,
    revoked_at TEXT
  );
  CREATE TABLE records (
    id TEXT PRIMARY KEY,
    type TEXT NOT NULL CHECK (type IN ('site', 'pick', 'estimate')),
    site_id TEXT,
    rev INTEGER NOT NULL,
    rev_key TEXT NOT NULL,
    updated_at TEXT NOT NULL,
    deleted INTEGER NOT NULL DEFAULT 0,
    conflicts INTEGER NOT NULL DEFAULT 0,
    seq INTEGER NOT NULL UNIQUE,
    body TEXT NOT NULL
  );
  CREATE INDEX records_by_site ON records (site_id);
  CREATE INDEX records_with_conflicts ON records (conflicts) WHERE conflicts > 0;
  CREATE TABLE versions (
    record_id TEXT NOT NULL,
    rev_key TEXT NOT NULL,
    source TEXT NOT NULL,
    received_at TEXT NOT NULL,
    body TEXT NOT NULL,
    PRIMARY KEY (record_id, rev_key)
  ) WITHOUT ROWID;
  CREATE TABLE batches (
    batch_id TEXT PRIMARY KEY,
    device_id INTEGER REFERENCES devices (id),
    source TEXT NOT NULL,
    received_at TEXT NOT NULL,
    records INTEGER NOT NULL,
    accepted INTEGER NOT NULL,
    ignored INTEGER NOT NULL,
    conflicts INTEGER NOT NULL
  );
  `,
  `
  CREATE TABLE batches_v2 (
    scope TEXT NOT NULL,
    batch_id TEXT NOT NULL,
    content_sha256 TEXT NOT NULL,
    device_id INTEGER REFERENCES devices (id),
    source TEXT NOT NULL,
    received_at TEXT NOT NULL,
    records INTEGER NOT NULL,
    accepted INTEGER NOT NULL,
    ignored INTEGER NOT NULL,
    conflicts INTEGER NOT NULL,
    PRIMARY KEY (scope, batch_id, content_sha256)
  ) WITHOUT ROWID;
  INSERT INTO batches_v2 (scope, batch_id, content_sha256, device_id, source, received_at, records, accepted, ignored, conflicts)
    SELECT CASE WHEN device_id IS NULL THEN 'import' ELSE 'device:' || device_id END, batch_id, '', device_id, source, received_at, records, accepted, ignored, conflicts
    FROM batches;
  DROP TABLE batches;
  ALTER TABLE batches_v2 RENAME TO batches;
  `,
  `
  CREATE TABLE recordings (
    id TEXT PRIMARY KEY,
    site_id TEXT NOT NULL,
    rev INTEGER NOT NULL,
    rev_key TEXT NOT NULL,
    deleted INTEGER NOT NULL DEFAULT 0,
    seq INTEGER NOT NULL UNIQUE,
    body TEXT NOT NULL
  );
  CREATE TABLE recording_files (
    id TEXT PRIMARY KEY,
    sha256 TEXT NOT NULL,
    bytes BLOB NOT NULL
  );
  `,
];

/** The schema version this code writes. */
export const STORE_SCHEMA_VERSION = MIGRATIONS.length;

export interface DeviceRow {
  id: number;
  name: string;
  createdAt: string;
  revokedAt: string | null;
  /** When its last batch arrived, if any. */
  lastBatchAt: string | null;
}

export interface PullPage {
  records: AnyRecord[];
  /** Pass back as `since` to continue. */
  cursor: number;
  /** True when more changes wait after this page. */
  more: boolean;
  /** The change counter of each record (the cursor just after it). */
  seqs: number[];
}

export interface BatchResult {
  plan: MergePlan;
  /** The store's change cursor after the batch. */
  cursor: number;
  /** True when this batch id had been received before. */
  replay: boolean;
}

/** SHA-256 of a device token, hex. */
export function tokenHash(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

const DEVICE_NAME = /^[A-Za-z0-9][A-Za-z0-9 ._-]{0,59}$/;

function checkDeviceName(name: unknown): string {
  if (typeof name !== 'string' || !DEVICE_NAME.test(name)) {
    throw new InputError(
      'NAME',
      `The device name ${describeValue(name)} is not usable: use 1–60 letters, digits, spaces, dots, dashes or underscores, starting with a letter or digit.`,
    );
  }
  return name;
}

export interface StoreOpenOptions {
  /** Create the folder and the file when missing. @default false */
  create?: boolean;
  /**
   * How long one statement waits for another writer, ms (SQLite's busy
   * timeout; the wait blocks the thread). The server keeps this short and
   * retries without blocking (office/server.ts). @default DEFAULT_BUSY_TIMEOUT_MS
   */
  busyTimeoutMs?: number;
}

/** Makes the store file and its -wal and -shm files readable by their owner only, where they exist and we may. */
function tightenModes(file: string): void {
  for (const f of [file, `${file}-wal`, `${file}-shm`]) {
    try {
      if ((statSync(f).mode & 0o077) !== 0) chmodSync(f, 0o600);
    } catch {
      /* missing, or not ours to change: SQLite reports what matters when it opens */
    }
  }
}

export class OfficeStore {
  private constructor(
    readonly db: Database.Database,
    readonly file: string,
  ) {}

  /**
   * Opens (and with `create`, makes) the store in `dir`, migrating it to
   * the current schema. Throws InputError when it is missing and `create`
   * is false, or when it was written by a newer version.
   */
  static open(dir: string, options: StoreOpenOptions = {}): OfficeStore {
    const folder = resolve(dir);
    const file = join(folder, DB_FILE_NAME);
    if (!existsSync(file)) {
      if (!options.create) {
        throw new InputError('--data', `There is no office store in ${folder} yet; add a device (shearfield device add NAME --data ${dir}) or start the server there first.`);
      }
      // Only this user may read the store: the folder 0700 when we make it,
      // the file 0600 (an empty file is an empty SQLite database; SQLite gives
      // its -wal and -shm files the mode of the database file).
      mkdirSync(folder, { recursive: true, mode: 0o700 });
      try {
        closeSync(openSync(file, 'wx', 0o600));
      } catch (e) {
        if ((e as { code?: string }).code !== 'EEXIST') throw e;
      }
    }
    const db = new Database(file);
    try {
      db.pragma('journal_mode = WAL');
    } catch (e) {
      db.close();
      if ((e as { code?: string }).code === 'SQLITE_NOTADB') {
        throw new InputError('--data', `The file ${file} is not an office store (not an SQLite database); move it away or choose another --data folder.`);
      }
      throw e;
    }
    tightenModes(file);
    // FULL: an acknowledged batch is on disk before the answer goes out, even across a power cut.
    db.pragma('synchronous = FULL');
    db.pragma(`busy_timeout = ${Math.max(0, Math.round(options.busyTimeoutMs ?? DEFAULT_BUSY_TIMEOUT_MS))}`);
    db.pragma('foreign_keys = ON');
    const version = db.pragma('user_version', { simple: true }) as number;
    if (version > MIGRATIONS.length) {
      db.close();
      throw new InputError('--data', `The office store in ${folder} has schema version ${version}, newer than this Shearfield (${MIGRATIONS.length}); update Shearfield.`);
    }
    for (let v = version; v < MIGRATIONS.length; v++) {
      db.transaction(() => {
        db.exec(MIGRATIONS[v]);
        db.pragma(`user_version = ${v + 1}`);
      })();
    }
    return new OfficeStore(db, file);
  }

  close(): void {
    if (this.db.open) this.db.close();
  }

  // --- devices -------------------------------------------------------------

  /** Registers a device; returns its new token, which is shown once and never stored. */
  addDevice(name: string, now = new Date()): { id: number; name: string; token: string } {
    const clean = checkDeviceName(name);
    const existing = this.db.prepare('SELECT id, revoked_at AS revokedAt FROM devices WHERE name = ?').get(clean) as { id: number; revokedAt: string | null } | undefined;
    if (existing?.revokedAt) {
      throw new InputError('NAME', `A device named ${JSON.stringify(clean)} was revoked and its name stays on record; add the device under a new name.`);
    }
    if (existing) throw new InputError('NAME', `A device named ${JSON.stringify(clean)} already exists; choose another name.`);
    const token = randomBytes(32).toString('base64url');
    const info = this.db
      .prepare('INSERT INTO devices (name, token_sha256, created_at) VALUES (?, ?, ?)')
      .run(clean, tokenHash(token), now.toISOString());
    return { id: Number(info.lastInsertRowid), name: clean, token };
  }

  listDevices(): DeviceRow[] {
    return this.db
      .prepare(
        `SELECT d.id, d.name, d.created_at AS createdAt, d.revoked_at AS revokedAt,
                (SELECT MAX(received_at) FROM batches b WHERE b.device_id = d.id) AS lastBatchAt
         FROM devices d ORDER BY d.id`,
      )
      .all() as DeviceRow[];
  }

  /**
   * Finds the device a revoke (or any command) names: `{ id }`, `{ name }`,
   * or a bare word that may be either. A bare word that is the id of one
   * device and the name of another is refused (nothing is chosen for the
   * user); so is a word that names no device.
   */
  findDevice(which: string | { id?: string; name?: string }): DeviceRow {
    const rows = this.listDevices();
    const describe = (d: DeviceRow) => `device ${d.id} (${JSON.stringify(d.name)})`;
    if (typeof which === 'string') {
      const byId = /^\d{1,15}$/.test(which) ? rows.find((d) => d.id === Number(which)) : undefined;
      const byName = rows.find((d) => d.name === which);
      if (byId && byName && byId.id !== byName.id) {
        throw new InputError(
          'NAME',
          `${JSON.stringify(which)} is the id of ${describe(byId)} and the name of ${describe(byName)}; say which with --id ${which} or --name ${JSON.stringify(which)}. Nothing was changed.`,
        );
      }
      const found = byId ?? byName;
      if (!found) throw new InputError('NAME', `No device is named or numbered ${describeValue(which)}; see shearfield device list.`);
      return found;
    }
    if (which.id !== undefined) {
      const found = /^\d{1,15}$/.test(which.id) ? rows.find((d) => d.id === Number(which.id)) : undefined;
      if (!found) throw new InputError('--id', `No device has the id ${describeValue(which.id)}; see shearfield device list.`);
      return found;
    }
    const found = rows.find((d) => d.name === which.name);
    if (!found) throw new InputError('--name', `No device is named ${describeValue(which.name)}; see shearfield device list.`);
    return found;
  }

  /** Revokes one device (see findDevice for how it is named); its token stops working at once. Returns it as it now is. */
  revokeDevice(which: string | { id?: string; name?: string }, now = new Date()): DeviceRow {
    const row = this.findDevice(which);
    this.db.prepare('UPDATE devices SET revoked_at = COALESCE(revoked_at, ?) WHERE id = ?').run(now.toISOString(), row.id);
    return this.listDevices().find((d) => d.id === row.id)!;
  }

  /** The live device holding this token, or undefined (unknown or revoked). Reads only. */
  authenticate(token: string): { id: number; name: string } | undefined {
    if (token.length < 16 || token.length > 200) return undefined;
    return this.db.prepare('SELECT id, name FROM devices WHERE token_sha256 = ? AND revoked_at IS NULL').get(tokenHash(token)) as
      | { id: number; name: string }
      | undefined;
  }

  // --- records -------------------------------------------------------------

  get(id: string): AnyRecord | undefined {
    const row = this.db.prepare('SELECT body FROM records WHERE id = ?').get(id) as { body: string } | undefined;
    return row ? (JSON.parse(row.body) as AnyRecord) : undefined;
  }

  /** The current change counter (0 for an empty store). */
  cursor(): number {
    return (this.db.prepare('SELECT COALESCE(MAX(seq), 0) AS c FROM records').get() as { c: number }).c;
  }

  private cached?: ReturnType<OfficeStore['prepareStatements']>;

  private statements(): ReturnType<OfficeStore['prepareStatements']> {
    this.cached ??= this.prepareStatements();
    return this.cached;
  }

  private prepareStatements() {
    const getBody = this.db.prepare('SELECT body FROM records WHERE id = ?');
    const seen = this.db.prepare('SELECT 1 FROM versions WHERE record_id = ? AND rev_key = ?');
    const sourceOf = this.db.prepare('SELECT source FROM versions WHERE record_id = ? AND rev_key = ?');
    const isSite = this.db.prepare("SELECT 1 FROM records WHERE id = ? AND type = 'site'");
    const upsert = this.db.prepare(
      `INSERT INTO records (id, type, site_id, rev, rev_key, updated_at, deleted, conflicts, seq, body)
       VALUES (@id, @type, @siteId, @rev, @key, @updatedAt, @deleted, @conflicts, @seq, @body)
       ON CONFLICT (id) DO UPDATE SET type = excluded.type, site_id = excluded.site_id, rev = excluded.rev,
         rev_key = excluded.rev_key, updated_at = excluded.updated_at, deleted = excluded.deleted,
         conflicts = excluded.conflicts, seq = excluded.seq, body = excluded.body`,
    );
    const keepVersion = this.db.prepare(
      'INSERT OR IGNORE INTO versions (record_id, rev_key, source, received_at, body) VALUES (?, ?, ?, ?, ?)',
    );
    const logBatch = this.db.prepare(
      `INSERT OR IGNORE INTO batches (scope, batch_id, content_sha256, device_id, source, received_at, records, accepted, ignored, conflicts)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    const batchKnown = this.db.prepare('SELECT 1 FROM batches WHERE scope = ? AND batch_id = ? AND content_sha256 = ?');
    return { getBody, seen, sourceOf, isSite, upsert, keepVersion, logBatch, batchKnown };
  }

  /**
   * Merges a batch of checked records with the core rules and writes the
   * outcome in one `BEGIN IMMEDIATE` transaction. `source` names where it
   * came from (the authenticated device's name, or a bundle) for the review
   * trail and kept conflicts; `deviceId` scopes the batch id (a push), its
   * absence marks an import.
   *
   * Checks first, inside the transaction so that they see what is stored:
   * every pick and estimate must belong to a site in the batch or in the
   * store (core/exchange/bundle.ts checkSiteReferences), the same rule for
   * a push and a bundle. A refused batch writes nothing.
   *
   * The `conflicts` list a record carries is not taken on trust: each
   * version in it is merged as a version passed on by `source` (its claimed
   * `from` is dropped) and written into the trail like every other version.
   *
   * Throws InputError for a bad batch, and SQLite's SQLITE_BUSY error when
   * another writer kept the store locked past the busy timeout (nothing is
   * written then either; see isBusyError).
   */
  applyBatch(records: readonly AnyRecord[], meta: { batchId: string; source: string; deviceId?: number }, now = new Date()): BatchResult {
    const { getBody, seen, sourceOf, isSite, upsert, keepVersion, logBatch, batchKnown } = this.statements();
    const at = now.toISOString();
    const scope = meta.deviceId === undefined ? 'import' : `device:${meta.deviceId}`;
    const contentHash = createHash('sha256').update(JSON.stringify(records), 'utf8').digest('hex');
    const passedOn = `passed on by ${meta.source}`.slice(0, 200);
    const incoming = records.map((rec) => (rec.conflicts === undefined ? rec : ({ ...rec, conflicts: rec.conflicts.map((c) => ({ key: c.key, from: passedOn, record: c.record })) } as AnyRecord)));

    return this.db
      .transaction((): BatchResult => {
        checkSiteReferences(incoming, (id) => isSite.get(id) !== undefined);
        const replay = batchKnown.get(scope, meta.batchId, contentHash) !== undefined;
        const lookup = (id: string): AnyRecord | undefined => {
          const row = getBody.get(id) as { body: string } | undefined;
          return row ? (JSON.parse(row.body) as AnyRecord) : undefined;
        };
        const plan = planMerge(incoming, lookup, {
          from: meta.source,
          seen: (key, id) => seen.get(id, key) !== undefined,
          sourceOf: (key, id) => (sourceOf.get(id, key) as { source: string } | undefined)?.source,
        });
        let seq = this.cursor();
        for (const rec of plan.writes) {
          seq += 1;
          upsert.run({
            id: rec.id,
            type: rec.type,
            siteId: rec.type === 'site' ? rec.id : rec.siteId,
            rev: rec.rev,
            key: revisionKey(rec),
            updatedAt: rec.updatedAt,
            deleted: rec.deleted ? 1 : 0,
            conflicts: rec.conflicts?.length ?? 0,
            seq,
            body: JSON.stringify(rec),
          });
        }
        // Every version received goes into the trail; the first source to deliver a version keeps it.
        for (const rec of incoming) {
          const { conflicts: carried, ...own } = rec;
          keepVersion.run(rec.id, revisionKey(rec), meta.source, at, JSON.stringify(own));
          for (const c of carried ?? []) keepVersion.run(rec.id, c.key, passedOn, at, JSON.stringify(c.record));
        }
        if (!replay) {
          logBatch.run(scope, meta.batchId, contentHash, meta.deviceId ?? null, meta.source, at, records.length, plan.accepted, plan.ignored, plan.conflicts);
        }
        return { plan, cursor: seq, replay };
      })
      .immediate();
  }

  /** Changes after `since`, oldest first, at most `limit`. */
  pull(since: number, limit: number): PullPage {
    const rows = this.db.prepare('SELECT seq, body FROM records WHERE seq > ? ORDER BY seq LIMIT ?').all(since, limit + 1) as {
      seq: number;
      body: string;
    }[];
    const more = rows.length > limit;
    const page = more ? rows.slice(0, limit) : rows;
    return {
      records: page.map((r) => JSON.parse(r.body) as AnyRecord),
      seqs: page.map((r) => r.seq),
      cursor: page.length > 0 ? page[page.length - 1].seq : since,
      more,
    };
  }

  /** Every current record (tombstones included), sites first. */
  allRecords(): AnyRecord[] {
    const rows = this.db.prepare("SELECT body FROM records ORDER BY CASE type WHEN 'site' THEN 0 WHEN 'pick' THEN 1 ELSE 2 END, seq").all() as {
      body: string;
    }[];
    return rows.map((r) => JSON.parse(r.body) as AnyRecord);
  }

  /** Records that carry kept conflicts, waiting for review. */
  conflicted(): AnyRecord[] {
    const rows = this.db.prepare('SELECT body FROM records WHERE conflicts > 0 ORDER BY seq').all() as { body: string }[];
    return rows.map((r) => JSON.parse(r.body) as AnyRecord);
  }

  // --- recordings (core/exchange/recording-sync.ts) --------------------------

  /**
   * Merges pushed recording records with the core rules and keeps their raw
   * files, in one `BEGIN IMMEDIATE` transaction. Each recording's site must
   * be in the store; a file is kept only when its SHA-256 (checked here) is
   * the one its stored recording states. A refused push writes nothing.
   */
  applyRecordings(
    recordings: readonly RecordingRecord[],
    files: readonly { id: string; sha256: string; bytes: Uint8Array }[],
    source: string,
  ): { accepted: number; ignored: number; conflicts: number; cursor: number } {
    files.forEach((f, i) => {
      if (createHash('sha256').update(f.bytes).digest('hex') !== f.sha256) {
        throw new InputError(`files[${i}]`, `files[${i}] does not have the SHA-256 its recording states; the file was changed on the way.`);
      }
    });
    const isSite = this.db.prepare("SELECT 1 FROM records WHERE id = ? AND type = 'site' AND deleted = 0");
    const getBody = this.db.prepare('SELECT body FROM recordings WHERE id = ?');
    const upsert = this.db.prepare(
      `INSERT INTO recordings (id, site_id, rev, rev_key, deleted, seq, body) VALUES (@id, @siteId, @rev, @key, @deleted, @seq, @body)
       ON CONFLICT (id) DO UPDATE SET site_id = excluded.site_id, rev = excluded.rev, rev_key = excluded.rev_key,
         deleted = excluded.deleted, seq = excluded.seq, body = excluded.body`,
    );
    const hasFile = this.db.prepare('SELECT 1 FROM recording_files WHERE id = ?');
    const putFile = this.db.prepare('INSERT INTO recording_files (id, sha256, bytes) VALUES (?, ?, ?)');
    const dropFile = this.db.prepare('DELETE FROM recording_files WHERE id = ?');
    return this.db
      .transaction(() => {
        recordings.forEach((r, i) => {
          if (isSite.get(r.siteId) === undefined) {
            throw new InputError(`recordings[${i}].siteId`, `The recording recordings[${i}] (${JSON.stringify(r.id)}) belongs to site ${describeValue(r.siteId)}, which is not in the office store; sync the site first.`);
          }
        });
        const lookup = (id: string) => {
          const row = getBody.get(id) as { body: string } | undefined;
          return row ? (JSON.parse(row.body) as AnyRecord) : undefined;
        };
        const plan = planMerge(recordings as unknown as AnyRecord[], lookup, { from: source });
        let seq = (this.db.prepare('SELECT COALESCE(MAX(seq), 0) AS c FROM recordings').get() as { c: number }).c;
        for (const w of plan.writes as unknown as RecordingRecord[]) {
          seq += 1;
          upsert.run({ id: w.id, siteId: w.siteId, rev: w.rev, key: revisionKey(w), deleted: w.deleted ? 1 : 0, seq, body: JSON.stringify(w) });
          if (w.deleted) dropFile.run(w.id);
        }
        for (const f of files) {
          const stored = lookup(f.id) as unknown as RecordingRecord | undefined;
          if (!stored || stored.deleted || stored.sha256 !== f.sha256 || hasFile.get(f.id) !== undefined) continue;
          putFile.run(f.id, f.sha256, Buffer.from(f.bytes.buffer, f.bytes.byteOffset, f.bytes.byteLength));
        }
        return { accepted: plan.accepted, ignored: plan.ignored, conflicts: plan.conflicts, cursor: seq };
      })
      .immediate();
  }

  /**
   * Recordings changed after `since`, oldest first, with the raw file of
   * each live recording whose site chose to send it (attach) and that the
   * office holds, up to MAX_RECORDINGS_PAGE_BYTES of files per page (the
   * first file always goes; a file over MAX_ATTACHED_FILE_BYTES never does).
   */
  pullRecordings(since: number): { recordings: RecordingRecord[]; files: RecordingFile[]; cursor: number; more: boolean } {
    const rows = this.db.prepare('SELECT seq, body FROM recordings WHERE seq > ? ORDER BY seq LIMIT ?').all(since, MAX_RECORDINGS_PER_PUSH + 1) as {
      seq: number;
      body: string;
    }[];
    const getFile = this.db.prepare('SELECT sha256, bytes FROM recording_files WHERE id = ?');
    const recordings: RecordingRecord[] = [];
    const files: RecordingFile[] = [];
    let bytes = 0;
    let cursor = since;
    let more = rows.length > MAX_RECORDINGS_PER_PUSH;
    for (const row of rows.slice(0, MAX_RECORDINGS_PER_PUSH)) {
      const rec = JSON.parse(row.body) as RecordingRecord;
      const file = rec.attach && !rec.deleted && rec.byteLength <= MAX_ATTACHED_FILE_BYTES ? (getFile.get(rec.id) as { sha256: string; bytes: Buffer } | undefined) : undefined;
      if (file && recordings.length > 0 && bytes + file.bytes.length > MAX_RECORDINGS_PAGE_BYTES) {
        more = true;
        break;
      }
      recordings.push(rec);
      if (file) {
        files.push({ id: rec.id, sha256: file.sha256, bytes_base64: file.bytes.toString('base64') });
        bytes += file.bytes.length;
      }
      cursor = row.seq;
    }
    return { recordings, files, cursor, more };
  }

  /**
   * What a site bundle carries of the stored seismograph files (as the app's
   * bundles do, core/exchange/bundle.ts): every recording record of the
   * given sites (all sites when none are given), deletions included so they
   * travel, and the raw file of each live recording whose site chose to send
   * it (attach) and that the office holds, in base64. Ordered by id.
   */
  recordingsForBundle(siteIds?: readonly string[]): { recordings: RecordingRecord[]; files: RecordingFile[] } {
    const recordings = this.recordingRecords(siteIds);
    const files: RecordingFile[] = [];
    for (const rec of recordings) {
      if (!rec.attach || rec.deleted) continue;
      const bytes = this.recordingFile(rec);
      if (bytes) files.push({ id: rec.id, sha256: rec.sha256, bytes_base64: bytes.toString('base64') });
    }
    return { recordings, files };
  }

  /** The stored recording records of the given sites (all sites when none are given), deletions included, ordered by id. */
  recordingRecords(siteIds?: readonly string[]): RecordingRecord[] {
    const only = siteIds ? new Set(siteIds) : undefined;
    const rows = this.db.prepare('SELECT site_id, body FROM recordings ORDER BY id').all() as { site_id: string; body: string }[];
    return rows.filter((r) => !only || only.has(r.site_id)).map((r) => JSON.parse(r.body) as RecordingRecord);
  }

  /** The raw file the office holds for a recording, when it holds one that has the SHA-256 the record states. */
  recordingFile(rec: RecordingRecord): Buffer | undefined {
    const file = this.db.prepare('SELECT sha256, bytes FROM recording_files WHERE id = ?').get(rec.id) as { sha256: string; bytes: Buffer } | undefined;
    return file && file.sha256 === rec.sha256 ? file.bytes : undefined;
  }

  /** Counts for status lines. */
  counts(): { records: number; versions: number; conflicts: number; batches: number } {
    const one = (sql: string) => (this.db.prepare(sql).get() as { n: number }).n;
    return {
      records: one('SELECT COUNT(*) AS n FROM records'),
      versions: one('SELECT COUNT(*) AS n FROM versions'),
      conflicts: one('SELECT COUNT(*) AS n FROM records WHERE conflicts > 0'),
      batches: one('SELECT COUNT(*) AS n FROM batches'),
    };
  }
}

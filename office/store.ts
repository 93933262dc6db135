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
 * Every batch is merged with the core rules (core/exchange/sync.ts) and written in
 * ONE transaction: all of it or none of it. A batch seen before changes
 * nothing (its records merge as "already have", its batch row exists).
 */
import Database from 'better-sqlite3';
import { createHash, randomBytes } from 'node:crypto';
import { existsSync, mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { InputError, describeValue } from '../core/shared/errors';
import type { AnyRecord } from '../core/exchange/records';
import { revisionKey } from '../core/exchange/revision';
import { planMerge, type MergePlan } from '../core/exchange/sync';

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
  static open(dir: string, options: { create?: boolean } = {}): OfficeStore {
    const folder = resolve(dir);
    const file = join(folder, DB_FILE_NAME);
    if (!existsSync(file)) {
      if (!options.create) {
        throw new InputError('--data', `There is no office store in ${folder} yet; add a device (shearfield device add NAME --data ${dir}) or start the server there first.`);
      }
      mkdirSync(folder, { recursive: true });
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
    db.pragma('synchronous = NORMAL');
    db.pragma('busy_timeout = 5000');
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

  /** Revokes a device by name or numeric id; its token stops working at once. */
  revokeDevice(nameOrId: string, now = new Date()): DeviceRow {
    const row = (/^\d+$/.test(nameOrId)
      ? this.db.prepare('SELECT id, name FROM devices WHERE id = ? OR name = ?').get(Number(nameOrId), nameOrId)
      : this.db.prepare('SELECT id, name FROM devices WHERE name = ?').get(nameOrId)) as { id: number; name: string } | undefined;
    if (!row) throw new InputError('NAME', `No device is named or numbered ${describeValue(nameOrId)}; see shearfield device list.`);
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
      `INSERT OR IGNORE INTO batches (batch_id, device_id, source, received_at, records, accepted, ignored, conflicts)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    const batchKnown = this.db.prepare('SELECT 1 FROM batches WHERE batch_id = ?');
    return { getBody, seen, sourceOf, upsert, keepVersion, logBatch, batchKnown };
  }

  /**
   * Merges a batch of checked records with the core rules and writes the
   * outcome in one transaction. `source` names where it came from (a device
   * name or a bundle) for kept conflicts and the review trail.
   */
  applyBatch(records: readonly AnyRecord[], meta: { batchId: string; source: string; deviceId?: number }, now = new Date()): BatchResult {
    const { getBody, seen, sourceOf, upsert, keepVersion, logBatch, batchKnown } = this.statements();
    const at = now.toISOString();

    return this.db.transaction((): BatchResult => {
      const replay = batchKnown.get(meta.batchId) !== undefined;
      const lookup = (id: string): AnyRecord | undefined => {
        const row = getBody.get(id) as { body: string } | undefined;
        return row ? (JSON.parse(row.body) as AnyRecord) : undefined;
      };
      const seenPlan = planMerge(records, lookup, {
        from: meta.source,
        seen: (key, id) => seen.get(id, key) !== undefined,
        sourceOf: (key, id) => (sourceOf.get(id, key) as { source: string } | undefined)?.source,
      });
      let seq = this.cursor();
      for (const rec of seenPlan.writes) {
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
      for (const rec of records) {
        const { conflicts: _c, ...version } = rec;
        keepVersion.run(rec.id, revisionKey(rec), meta.source, at, JSON.stringify(version));
      }
      if (!replay) {
        logBatch.run(meta.batchId, meta.deviceId ?? null, meta.source, at, records.length, seenPlan.accepted, seenPlan.ignored, seenPlan.conflicts);
      }
      return { plan: seenPlan, cursor: seq, replay };
    })();
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

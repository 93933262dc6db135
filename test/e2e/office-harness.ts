/**
 * Test helpers for the office side, with real parts: the office server as
 * its own process, started as `npm run office` starts it
 * (`bin/office-server.mjs`: the plain JavaScript build while it is newer
 * than the sources, which `npm test` makes sure of, else the TypeScript
 * sources through tsx), on a free port of 127.0.0.1, a real SQLite file in
 * a temporary folder, and the shearfield command line run in-process
 * through office/cli.ts.
 */
import Database from 'better-sqlite3';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main } from '../../office/cli';
import { DB_FILE_NAME } from '../../office/store';

export const REPO_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');

export interface OfficeProcess {
  url: string;
  port: number;
  child: ChildProcess;
  /** Output so far (stdout + stderr). */
  output(): string;
  /** SIGKILL: no chance to finish anything. */
  kill(): Promise<void>;
  /** SIGTERM and wait. */
  stop(): Promise<void>;
}

const madeDirs: string[] = [];

/** A fresh temporary data folder (removed by removeTempDataDirs). */
export function tempDataDir(): string {
  const d = mkdtempSync(join(tmpdir(), 'shearfield-office-'));
  madeDirs.push(d);
  return d;
}

/** Removes every folder tempDataDir made (call after the servers are stopped). */
export function removeTempDataDirs(): void {
  for (const d of madeDirs.splice(0)) rmSync(d, { recursive: true, force: true });
}

/** Starts the office server on `port` (0 = a free one) with `dataDir` (and any further server options); resolves when it listens. */
export async function startOffice(dataDir: string, port = 0, distDir = join(REPO_ROOT, 'dist'), extraArgs: readonly string[] = []): Promise<OfficeProcess> {
  const child = spawn(process.execPath, ['bin/office-server.mjs', '--port', String(port), '--data', dataDir, '--dist', distDir, ...extraArgs], {
    cwd: REPO_ROOT,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, NO_COLOR: '1' },
  });
  let out = '';
  child.stdout!.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr!.on('data', (d: Buffer) => (out += d.toString()));
  let exited = false;
  const exit = new Promise<void>((ok) => child.once('exit', () => ((exited = true), ok())));
  const deadline = Date.now() + 20_000;
  let url = '';
  while (!url) {
    const m = /listening on (http:\/\/127\.0\.0\.1:(\d+))/.exec(out);
    if (m) url = m[1];
    else if (exited) throw new Error(`The office server exited before listening:\n${out}`);
    else if (Date.now() > deadline) throw new Error(`The office server did not start within 20 s:\n${out}`);
    else await new Promise((r) => setTimeout(r, 50));
  }
  const signal = async (sig: NodeJS.Signals) => {
    if (exited || child.pid === undefined) return;
    try {
      process.kill(-child.pid, sig);
    } catch {
      /* gone */
    }
    await exit;
  };
  return { url, port: Number(new URL(url).port), child, output: () => out, kill: () => signal('SIGKILL'), stop: () => signal('SIGTERM') };
}

/** Runs `shearfield ARGS` in-process; returns the exit code and the output. */
export async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const code = await main(args, { out: (t) => (out += t), err: (t) => (err += t) });
  return { code, out, err };
}

/** Adds a device with the real command and returns its token. */
export async function addDevice(dataDir: string, name: string): Promise<string> {
  const r = await cli(['device', 'add', name, '--data', dataDir]);
  if (r.code !== 0) throw new Error(r.err);
  const token = r.out.split('\n').map((l) => l.trim()).find((l) => /^[A-Za-z0-9_-]{40,}$/.test(l));
  if (!token) throw new Error(`No token in: ${r.out}`);
  return token;
}

/** Every row of the store's data tables, as text: equal text = nothing changed. */
export function snapshot(dataDir: string): string {
  const db = new Database(join(dataDir, DB_FILE_NAME), { readonly: true });
  try {
    const parts: string[] = [];
    for (const t of ['devices', 'records', 'versions', 'batches']) {
      parts.push(`${t}:${JSON.stringify(db.prepare(`SELECT * FROM ${t} ORDER BY 1, 2`).all())}`);
    }
    return parts.join('\n');
  } finally {
    db.close();
  }
}

/** Reads rows straight from the SQLite file. */
export function query<T = Record<string, unknown>>(dataDir: string, sql: string, ...params: unknown[]): T[] {
  const db = new Database(join(dataDir, DB_FILE_NAME), { readonly: true });
  try {
    return db.prepare(sql).all(...params) as T[];
  } finally {
    db.close();
  }
}

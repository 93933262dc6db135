/**
 * What the in-process office tests share: temporary folders and running
 * servers that are closed and removed after the file's tests, and the office
 * command line run in this process with both output streams collected.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';
import { main } from '../../../office/cli';
import type { RunningOffice } from '../../../office/server';

export interface OfficeScratch {
  /** A fresh temporary folder, removed after the file's tests. */
  dir(): string;
  /** Servers pushed here are closed after the file's tests. */
  running: RunningOffice[];
}

/** Registers the clean-up with the calling test file; `prefix` names its temporary folders. */
export function officeScratch(prefix: string): OfficeScratch {
  const running: RunningOffice[] = [];
  const dirs: string[] = [];
  afterAll(async () => {
    for (const r of running) await r.close();
    for (const d of dirs) rmSync(d, { recursive: true, force: true });
  });
  return {
    running,
    dir() {
      const d = mkdtempSync(join(tmpdir(), prefix));
      dirs.push(d);
      return d;
    },
  };
}

/** Runs `shearfield ARGS…` in this process: its exit code and what it wrote to each stream. */
export async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const code = await main(args, { out: (t) => (out += t), err: (t) => (err += t) });
  return { code, out, err };
}

/**
 * The office command line as a real process, for the CLI tests that check
 * what a user sees: bin/shearfield.mjs run by this Node, its exit code and
 * both output streams collected whole.
 */
import { spawn } from 'node:child_process';
import { join } from 'node:path';

export const REPO_ROOT = join(import.meta.dirname, '..', '..', '..');

export interface CliRun {
  code: number | null;
  out: string;
  err: string;
}

/** Runs `shearfield ARGS…` in `cwd` and resolves when it exits. */
export function spawnShearfield(args: readonly string[], cwd: string): Promise<CliRun> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [join(REPO_ROOT, 'bin', 'shearfield.mjs'), ...args], { cwd });
    let out = '';
    let err = '';
    child.stdout.on('data', (d) => (out += d));
    child.stderr.on('data', (d) => (err += d));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, out, err }));
  });
}

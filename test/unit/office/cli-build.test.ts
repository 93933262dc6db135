/**
 * The plain JavaScript build of the office command line and server
 * (scripts/build-office.mjs, run by npm ci and npm run build): built into a
 * scratch folder inside the repository (so that packages resolve), it lists
 * every command, answers --help exactly as the TypeScript sources do, and
 * runs a command against a real SQLite store in a new process.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../../office/cli';

const ROOT = resolve(__dirname, '../../..');
const scratch: string[] = [];
afterAll(() => {
  for (const d of scratch) rmSync(d, { recursive: true, force: true });
});

async function inProcess(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const code = await main(args, { out: (t) => (out += t), err: (t) => (err += t) });
  return { code, out, err };
}

describe('office build', () => {
  it('builds every command into plain JavaScript that answers as the sources do', async () => {
    const out = join(ROOT, 'build', `test-${process.pid}-${Date.now()}`);
    scratch.push(out);
    const built = spawnSync(process.execPath, ['scripts/build-office.mjs', '--out', out], { cwd: ROOT, encoding: 'utf8' });
    expect(built.status, built.stderr).toBe(0);
    for (const f of ['cli.js', 'server.js', 'push-check-worker.js', 'BUILT', 'commands.json']) expect(existsSync(join(out, f)), f).toBe(true);
    const sources = readdirSync(join(ROOT, 'office', 'commands')).filter((f) => f.endsWith('.ts')).map((f) => f.replace(/\.ts$/, '.js')).sort();
    const manifest = JSON.parse(readFileSync(join(out, 'commands.json'), 'utf8')) as { name: string; file: string }[];
    expect(manifest.map((c) => c.file)).toEqual(sources);
    expect(readFileSync(join(out, 'cli.js'), 'utf8')).not.toMatch(/better-sqlite3|from "ajv"/);

    const run = (args: string[]) =>
      spawnSync(process.execPath, ['--input-type=module', '-e', `const { main } = await import(${JSON.stringify(join(out, 'cli.js'))}); process.exitCode = await main(process.argv.slice(1));`, '--', ...args], {
        cwd: ROOT,
        encoding: 'utf8',
      });
    const help = run(['--help']);
    expect(help.status).toBe(0);
    expect(help.stdout).toBe((await inProcess(['--help'])).out);
    const one = run(['bundle-import', '--help']);
    expect(one.stdout).toBe((await inProcess(['bundle-import', '--help'])).out);
    const data = mkdtempSync(join(tmpdir(), 'shearfield-build-'));
    scratch.push(data);
    const add = run(['device', 'add', 'Built tablet', '--data', data]);
    expect(add.status, add.stderr).toBe(0);
    expect(run(['device', 'list', '--data', data]).stdout).toMatch(/^1 +Built tablet /m);
    const bad = run(['device', 'revoke', 'nobody', '--data', data]);
    expect({ status: bad.status, err: bad.stderr }).toEqual({ status: 1, err: 'shearfield device: No device is named or numbered "nobody"; see shearfield device list.\n' });
  }, 120_000);
});

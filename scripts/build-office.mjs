#!/usr/bin/env node
// Builds the office command line and server (office/*.ts and what they import from core/) into
// plain JavaScript in build/office/, so that `npx shearfield` and `npm run office` start without
// compiling TypeScript. Runs as the `prepare` script (npm ci, npm install) and in `npm run build`.
// esbuild arrives with vite and tsx. bin/launch.mjs uses this build while it is newer than the
// sources, and tsx otherwise (while developing).
import { build } from 'esbuild';
import { readdirSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
// `--out DIR` builds elsewhere (the build test uses a folder inside the repository, so packages resolve).
const outAt = process.argv.indexOf('--out');
const out = outAt > 0 ? resolve(process.argv[outAt + 1]) : join(root, 'build', 'office');
const commands = readdirSync(join(root, 'office', 'commands'))
  .filter((f) => f.endsWith('.ts') && !f.endsWith('.d.ts'))
  .map((f) => join('office', 'commands', f));

rmSync(out, { recursive: true, force: true });
const started = Date.now();
await build({
  absWorkingDir: root,
  entryPoints: ['office/cli.ts', 'office/server.ts', 'office/push-check-worker.ts', ...commands],
  outdir: out,
  outbase: 'office',
  entryNames: '[dir]/[name]',
  chunkNames: 'chunks/[name]-[hash]',
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  packages: 'external',
  logLevel: 'warning',
  legalComments: 'none',
});
// The command list for `shearfield --help` and the dispatcher, so that they load one command, not all.
const manifest = [];
for (const file of readdirSync(join(out, 'commands')).filter((f) => f.endsWith('.js')).sort()) {
  const command = (await import(pathToFileURL(join(out, 'commands', file)).href)).default;
  if (command) manifest.push({ name: command.name, summary: command.summary, file });
}
writeFileSync(join(out, 'commands.json'), JSON.stringify(manifest, null, 2) + '\n');
// Written last: bin/launch.mjs compares the sources with this file's time.
writeFileSync(join(out, 'BUILT'), `office build of ${new Date().toISOString()}\n`);
console.log(`office: built ${out} (${manifest.length} commands) in ${Date.now() - started} ms`);

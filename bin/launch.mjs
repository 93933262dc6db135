// Loads an office entry (cli or server) for bin/shearfield.mjs and `npm run office`: the plain
// JavaScript build in build/office/ (made by `npm ci` and `npm run build`, scripts/build-office.mjs)
// when it is newer than every source it was made from, else the TypeScript sources through tsx
// (a runtime dependency), as while developing. SHEARFIELD_FROM_SOURCE=1 forces the sources.
import { existsSync, readdirSync, statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';

const root = fileURLToPath(new URL('..', import.meta.url));
const SOURCE_DIRS = ['office', 'core', 'schema'];

/** The newest modification time of the .ts and .json files under `dir`, ms. */
function newest(dir) {
  let t = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) t = Math.max(t, newest(p));
    else if (e.name.endsWith('.ts') || e.name.endsWith('.json')) t = Math.max(t, statSync(p).mtimeMs);
  }
  return t;
}

function buildIsFresh() {
  if (process.env.SHEARFIELD_FROM_SOURCE === '1') return false;
  const stamp = join(root, 'build', 'office', 'BUILT');
  if (!existsSync(stamp)) return false;
  const built = statSync(stamp).mtimeMs;
  return SOURCE_DIRS.every((d) => !existsSync(join(root, d)) || newest(join(root, d)) <= built);
}

/** The module of `name` ('cli' or 'server'). */
export async function load(name) {
  if (buildIsFresh()) return import(new URL(`../build/office/${name}.js`, import.meta.url).href);
  const { register } = await import('tsx/esm/api');
  register();
  return import(new URL(`../office/${name}.ts`, import.meta.url).href);
}

/**
 * The design card, checked: core/ is grouped by subdomain and its imports run
 * one way, as core/README.md writes them down. Fails on a source file in
 * core/'s root (other than an index), a folder missing from the table, an
 * import against the table's direction, an import circle between files, and
 * any import of pwa/, office/ or a Node built-in from core/ (the JSON
 * schemas in schema/ are data and may be imported).
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = resolve(import.meta.dirname, '..', '..');
const coreDir = join(root, 'core');
const MAX_FILES_PER_FOLDER = 14; // "about 12" (core/README.md)

function tsFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) return tsFiles(p);
    return p.endsWith('.ts') ? [p] : [];
  });
}

/** Folder → the folders it may import, from the table in core/README.md. */
function readTable(): Map<string, Set<string>> {
  const table = new Map<string, Set<string>>();
  for (const line of readFileSync(join(coreDir, 'README.md'), 'utf8').split('\n')) {
    const cells = line.split('|').map((c) => c.trim());
    if (cells.length < 5 || cells[1] === 'folder' || cells[1].startsWith('---')) continue;
    const allowed = cells[3] === '(nothing)' ? [] : cells[3].split(',').map((s) => s.trim());
    table.set(cells[1], new Set(allowed));
  }
  return table;
}

const IMPORT = /(?:^|\n)\s*(?:import|export)\b[^'"]*?from\s*['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)|(?:^|\n)\s*import\s*['"]([^'"]+)['"]/g;

function importsOf(file: string): string[] {
  const src = readFileSync(file, 'utf8');
  return [...src.matchAll(IMPORT)].map((m) => m[1] ?? m[2] ?? m[3]);
}

function resolveImport(from: string, spec: string): string | null {
  if (!spec.startsWith('.')) return null;
  const base = resolve(dirname(from), spec);
  for (const candidate of [base, `${base}.ts`, join(base, 'index.ts')]) {
    try {
      if (statSync(candidate).isFile()) return candidate;
    } catch {
      /* try the next form */
    }
  }
  return base;
}

const folderOf = (file: string) => relative(coreDir, file).split(sep)[0];

describe('core/ layout and import direction (core/README.md)', () => {
  const table = readTable();
  const files = tsFiles(coreDir);

  it('lists every folder of core/ in the table, and keeps each to about 12 files', () => {
    const folders = readdirSync(coreDir).filter((n) => statSync(join(coreDir, n)).isDirectory());
    for (const folder of folders) {
      expect(table.has(folder), `core/${folder}/ is missing from the table in core/README.md`).toBe(true);
      const count = tsFiles(join(coreDir, folder)).length;
      expect(count, `core/${folder}/ holds ${count} files`).toBeLessThanOrEqual(MAX_FILES_PER_FOLDER);
    }
  });

  it('has no source file in its root other than an index', () => {
    const loose = readdirSync(coreDir).filter((n) => n.endsWith('.ts') && n !== 'index.ts');
    expect(loose).toEqual([]);
  });

  it('writes down a direction with no circle between folders', () => {
    const seen = new Set<string>();
    const visiting = new Set<string>();
    const visit = (folder: string, path: string[]) => {
      expect(visiting.has(folder), `folder circle in core/README.md: ${[...path, folder].join(' → ')}`).toBe(false);
      if (seen.has(folder)) return;
      visiting.add(folder);
      for (const next of table.get(folder) ?? []) {
        expect(table.has(next), `core/README.md: ${folder} may import "${next}", which is not a folder in the table`).toBe(true);
        visit(next, [...path, folder]);
      }
      visiting.delete(folder);
      seen.add(folder);
    };
    for (const folder of table.keys()) visit(folder, []);
  });

  it('imports only down the table, never pwa/, office/ or Node built-ins', () => {
    const problems: string[] = [];
    const builtins = new Set(builtinModules);
    for (const file of files) {
      const from = folderOf(file);
      for (const spec of importsOf(file)) {
        const where = relative(root, file);
        if (spec.startsWith('node:') || builtins.has(spec.split('/')[0])) {
          problems.push(`${where} imports the Node built-in "${spec}"`);
          continue;
        }
        const target = resolveImport(file, spec);
        if (target === null) continue; // a registry package
        const rel = relative(coreDir, target);
        if (rel.startsWith('..') && !relative(root, target).startsWith(`schema${sep}`)) {
          problems.push(`${where} imports "${spec}", outside core/`);
          continue;
        }
        if (rel.startsWith('..')) continue; // the exchange schema in schema/: data, not code
        const to = folderOf(target);
        if (to !== from && !table.get(from)?.has(to)) {
          problems.push(`${where} imports core/${to}/ ("${spec}"), against the direction in core/README.md`);
        }
      }
    }
    expect(problems).toEqual([]);
  });

  it('has no import circle between files', () => {
    const graph = new Map(files.map((f) => [f, importsOf(f).map((s) => resolveImport(f, s)).filter((t): t is string => t !== null)]));
    const state = new Map<string, 'open' | 'done'>();
    const circles: string[] = [];
    const visit = (file: string, stack: string[]) => {
      if (state.get(file) === 'done') return;
      if (state.get(file) === 'open') {
        circles.push([...stack.slice(stack.indexOf(file)), file].map((f) => relative(coreDir, f)).join(' → '));
        return;
      }
      state.set(file, 'open');
      for (const next of graph.get(file) ?? []) visit(next, [...stack, file]);
      state.set(file, 'done');
    };
    for (const file of files) visit(file, []);
    expect(circles).toEqual([]);
  });
});

/**
 * Fuzzing the importers with seeded random mutations (issue 5 §4 item 7):
 * the bundle importer into a real office SQLite store, the same importer
 * into the field store (fake-indexeddb), and the picks CSV reader. Every
 * mutation must end in success or an InputError (never another exception),
 * and a refused file must leave the store exactly as it was (never a
 * partial write). Seeds are fixed, so a failure names a reproducible case.
 */
import 'fake-indexeddb/auto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { bundleRecords, bundleToJson, makeBundle, parseBundle } from '../../../../core/exchange/bundle';
import { demoPicks } from '../../../../core/exchange/demo';
import { InputError } from '../../../../core/shared/errors';
import { parsePicksCsv, picksToCsv } from '../../../../core/picks/picks';
import { mulberry32 } from '../../../../core/shared/random';
import { nextRevision, type AnyRecord, type EstimateRecord, type PickRecord, type SiteRecord } from '../../../../core/exchange/records';
import { canonicalJson } from '../../../../core/exchange/revision';
import { mergeRecord } from '../../../../core/exchange/sync';
import { OfficeStore } from '../../../../office/store';
import { openFieldStore } from '../../../../pwa/store';
import { importBundleText } from '../../../../pwa/sync/bundle-io';

const T = '2026-05-04T08:00:00.000Z';

/** An invented two-site bundle with picks, an estimate, lineage and a kept conflict. */
function baseBundleText(): string {
  const s1: SiteRecord = {
    type: 'site',
    id: 'site-aaaa-0001',
    rev: 1,
    updatedAt: T,
    name: 'Invented fuzz site <b>one</b>',
    date: '2026-05-04',
    crew: 'Invented crew',
    notes: 'Line one\nLine "two", with commas',
    location: { lat: 51.2, lon: -1.4, source: 'device', accuracy_m: 4 },
    axisUnit: 'hz',
    settings: { vs2: 600, thicknessRange: [1, 40] },
  };
  const a = nextRevision(s1, { notes: 'edited on A' }, new Date('2026-05-05T08:00:00Z'));
  const b = nextRevision(s1, { crew: 'edited on B' }, new Date('2026-05-05T09:00:00Z'));
  const s1c = mergeRecord(a, b, { from: 'tablet-b' }).record;
  const s2: SiteRecord = { ...s1, id: 'site-bbbb-0002', name: 'Invented fuzz site two', axisUnit: 's', location: undefined, settings: {} };
  delete (s2 as Partial<SiteRecord>).location;
  const picks: PickRecord[] = demoPicks()
    .slice(0, 6)
    .map((p, i) => ({ ...p, type: 'pick', id: `pick-${i}`, rev: 1, updatedAt: T, siteId: i < 4 ? s1.id : s2.id, order: i }));
  picks[5] = { ...picks[5], period: 1 / picks[5].frequency, frequency: 1 / (1 / picks[5].frequency), note: '<script>x</script>' };
  const est: EstimateRecord = { type: 'estimate', id: 'est-1', rev: 1, updatedAt: T, siteId: s1.id, settings: {}, summary: { thickness_m: 7.4, note: 'invented' }, computedAt: T };
  return bundleToJson(makeBundle([s1c, s2, ...picks, est], { now: new Date(T), exportedBy: 'fuzz' }));
}

const ALPHABET = ['"', '{', '}', '[', ']', ',', ':', '0', '9', '-', '.', 'e', 'a', ' ', '\n', '<', '>', '\\', '\u0001', 'é', '😀', 'null', 'true', '1e999', '"x"'];

function mutateText(text: string, rnd: () => number): string {
  const pos = Math.floor(rnd() * (text.length + 1));
  switch (Math.floor(rnd() * 6)) {
    case 0:
      return text.slice(0, pos);
    case 1:
      return text.slice(0, pos) + text.slice(pos + 1 + Math.floor(rnd() * 20));
    case 2:
      return text.slice(0, pos) + ALPHABET[Math.floor(rnd() * ALPHABET.length)] + text.slice(pos);
    case 3:
      return text.slice(0, pos) + ALPHABET[Math.floor(rnd() * ALPHABET.length)] + text.slice(pos + 1);
    case 4: {
      const len = Math.floor(rnd() * 60);
      return text.slice(0, pos) + text.slice(pos, pos + len) + text.slice(pos);
    }
    default:
      return text.replace(/\d/, () => String(Math.floor(rnd() * 10)));
  }
}

const VALUES: unknown[] = [null, 0, -1, 1.5, 1e308, -1e-9, 2, 7, '', 'x', '<img src=x onerror=alert(1)>', 'group', 'phase', 'site', 'pick', '2026-13-45', '2026-05-04T08:00:00.000Z', true, false, [], [1, 2], {}, { a: 1 }, 'site-aaaa-0001', 'pick-0', '1-0123456789abcdef'];

function paths(value: unknown, prefix: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const key = Array.isArray(value) ? Number(k) : k;
      out.push([...prefix, key]);
      paths(v, [...prefix, key], out);
    }
  }
  return out;
}

function mutateJson(text: string, rnd: () => number): string {
  const data = JSON.parse(text) as Record<string, unknown>;
  const all = paths(data);
  const path = all[Math.floor(rnd() * all.length)];
  let parent: Record<string | number, unknown> = data;
  for (const p of path.slice(0, -1)) parent = parent[p] as Record<string | number, unknown>;
  const last = path[path.length - 1];
  const op = Math.floor(rnd() * 5);
  if (op === 0) delete parent[last];
  else if (op === 1) parent[last] = VALUES[Math.floor(rnd() * VALUES.length)];
  else if (op === 2 && Array.isArray(parent)) parent.push(structuredClone(parent[Math.floor(rnd() * parent.length)]));
  else if (op === 3) (parent as Record<string, unknown>)[`extra${Math.floor(rnd() * 3)}`] = VALUES[Math.floor(rnd() * VALUES.length)];
  else data.version = [1, 2, 0, -1, 1.5, '1'][Math.floor(rnd() * 6)];
  return JSON.stringify(data);
}

function mutateBundle(base: string, rnd: () => number): string {
  let text = base;
  const steps = 1 + Math.floor(rnd() * 3);
  for (let s = 0; s < steps; s++) {
    if (rnd() < 0.6) {
      try {
        text = mutateJson(text, rnd);
        continue;
      } catch {
        /* not JSON any more: mutate the text */
      }
    }
    text = mutateText(text, rnd);
  }
  return text;
}

const toClose: { close(): void }[] = [];
const dirs: string[] = [];
afterAll(() => {
  for (const c of toClose) c.close();
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

describe('importer fuzz (seeded)', () => {
  it('10,000 mutated bundles into a real office SQLite store: success or InputError, never a partial write', () => {
    const folder = mkdtempSync(join(tmpdir(), 'shearfield-fuzz-'));
    dirs.push(folder);
    const store = OfficeStore.open(folder, { create: true });
    toClose.push(store);
    // This test is about all-or-nothing writes, not power cuts: skip the store's per-commit fsync (synchronous = FULL) for its thousands of commits.
    store.db.pragma('synchronous = NORMAL');
    // Every write to records takes a new, higher seq; every version and batch adds a row: these four numbers see any write.
    const counts = store.db.prepare(
      `SELECT (SELECT COUNT(*) FROM records) AS r, (SELECT COALESCE(MAX(seq), 0) FROM records) AS s,
              (SELECT COUNT(*) FROM versions) AS v, (SELECT COUNT(*) FROM batches) AS b`,
    );
    const fingerprint = () => JSON.stringify(counts.get());
    const base = baseBundleText();
    const rnd = mulberry32(20260504);
    let accepted = 0;
    let refused = 0;
    const reasons = new Map<string, number>();
    for (let i = 0; i < 10_000; i++) {
      const text = mutateBundle(base, rnd);
      const before = fingerprint();
      try {
        const bundle = parseBundle(text);
        const records = bundleRecords(bundle);
        store.applyBatch(records, { batchId: `fuzz-${i}`, source: 'fuzz' });
        accepted++;
        // An accepted file imported again changes nothing (checked on every fifth, to keep the run short).
        if (accepted % 5 !== 0) continue;
        const after = fingerprint();
        store.applyBatch(records, { batchId: `fuzz-${i}-again`, source: 'fuzz' });
        const again = JSON.parse(fingerprint());
        const first = JSON.parse(after);
        expect({ ...again, b: 0 }, `case ${i}`).toEqual({ ...first, b: 0 });
      } catch (e) {
        if (!(e instanceof InputError)) throw new Error(`case ${i}: ${String(e)}\n${text.slice(0, 300)}`);
        expect(e.message.length, `case ${i}`).toBeGreaterThan(10);
        expect(fingerprint(), `case ${i} wrote part of a refused file`).toBe(before);
        refused++;
        const kind = e.message.slice(0, 40);
        reasons.set(kind, (reasons.get(kind) ?? 0) + 1);
      }
    }
    expect(accepted + refused).toBe(10_000);
    // Both outcomes are exercised, and refusals come for many different reasons.
    expect(accepted).toBeGreaterThan(200);
    expect(refused).toBeGreaterThan(3000);
    expect(reasons.size).toBeGreaterThan(15);
    // 10,000 parses and SQLite transactions take about 30 s on a busy 2-core machine: more than the default limit.
  }, 120_000);

  it('300 mutated bundles into the field store: a refused file leaves every record as it was', async () => {
    const store = await openFieldStore(`fuzz-${crypto.randomUUID()}`);
    toClose.push(store);
    const base = baseBundleText();
    expect((await importBundleText(store, base)).ok).toBe(true);
    const rnd = mulberry32(4242);
    let refused = 0;
    for (let i = 0; i < 300; i++) {
      const text = mutateBundle(base, rnd);
      const before = canonicalJson(await store.allRecords());
      const outcome = await importBundleText(store, text);
      if (!outcome.ok) {
        refused++;
        expect(outcome.message.startsWith('Nothing was imported. '), `case ${i}: ${outcome.message}`).toBe(true);
        expect(canonicalJson(await store.allRecords()), `case ${i}`).toBe(before);
      }
    }
    expect(refused).toBeGreaterThan(100);
  });

  it('10,000 mutated picks CSV files: the core reader returns every pick or throws one InputError, and what it returns writes back exactly', () => {
    const picks = demoPicks().slice(0, 8);
    picks[2] = { ...picks[2], note: 'a "quoted", note', id: 'p-2' };
    const bases = [picksToCsv(picks), picksToCsv(picks, { separator: ';', decimalComma: true, lineEnding: '\n' })];
    const rnd = mulberry32(777);
    let ok = 0;
    let refused = 0;
    for (let i = 0; i < 10_000; i++) {
      let text = bases[i % 2];
      const steps = 1 + Math.floor(rnd() * 3);
      for (let s = 0; s < steps; s++) text = mutateText(text, rnd);
      let parsed: AnyRecord[] | ReturnType<typeof parsePicksCsv>;
      try {
        parsed = parsePicksCsv(text);
      } catch (e) {
        if (!(e instanceof InputError)) throw new Error(`case ${i}: ${String(e)}\n${JSON.stringify(text.slice(0, 300))}`);
        refused++;
        continue;
      }
      ok++;
      expect(parsed.picks.length, `case ${i}`).toBeGreaterThan(0);
      const again = parsePicksCsv(picksToCsv(parsed.picks)).picks;
      expect(again, `case ${i}`).toEqual(parsed.picks);
    }
    expect(ok).toBeGreaterThan(500);
    expect(refused).toBeGreaterThan(2000);
  });
});

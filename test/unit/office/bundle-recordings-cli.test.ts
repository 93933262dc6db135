/**
 * The office's own bundle-export carries the seismograph files it holds, in
 * the app's bundle format (core/exchange/bundle.ts): every recording record
 * of the exported sites, and the raw file of those whose site chose to send
 * it; bundle-import into another office store gives back the same records
 * and bytes (SHA-256 by Node's crypto, a general-purpose reference). Real
 * SQLite files in a temporary folder; the commands run in this process.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseBundle } from '../../../core/exchange/bundle';
import { fromBase64 } from '../../../core/exchange/base64';
import type { PickRecord, RecordingRecord, SiteRecord } from '../../../core/exchange/records';
import { main } from '../../../office/cli';
import { OfficeStore } from '../../../office/store';

const T = '2026-05-04T08:00:00.000Z';
const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function dir(): string {
  const d = mkdtempSync(join(tmpdir(), 'shearfield-bundle-rec-'));
  dirs.push(d);
  return d;
}

async function cli(args: string[]) {
  let out = '';
  let err = '';
  const code = await main(args, { out: (t) => (out += t), err: (t) => (err += t) });
  return { code, out, err };
}

/** Invented sites, a pick, and invented bytes standing in for seismograph files. */
const site = (id: string): SiteRecord => ({ type: 'site', id, rev: 1, updatedAt: T, name: `Invented site ${id}`, date: '2026-05-04', crew: '', notes: '', axisUnit: 'hz', settings: {} });
const pick: PickRecord = { type: 'pick', id: 'p1', rev: 1, updatedAt: T, siteId: 's1', order: 0, frequency: 12, velocity: 210, kind: 'group', mode: 0 };
const bytesOf = (seed: number, n: number) => Uint8Array.from({ length: n }, (_, i) => (i * 37 + seed) & 255);

function recording(id: string, siteId: string, attach: boolean, bytes: Uint8Array): RecordingRecord {
  return {
    type: 'recording', id, rev: 1, updatedAt: T, siteId, name: `${id}.sg2`, format: 'seg2', byteLength: bytes.length,
    sha256: createHash('sha256').update(bytes).digest('hex'),
    geometry: { format: 'seg2', traces: 2, samples: 100, sample_interval_s: 0.001, delay_s: 0, offsets_m: [2, null], component: 'unknown' },
    overrides: { offsets: { first: 2, spacing: 2 }, component: 'transverse' }, attach, addedAt: T,
  };
}

describe('bundle-export with seismograph files', () => {
  it('writes the held recordings and the raw files their sites send, and bundle-import gives back the same records and bytes', async () => {
    const a = dir();
    const sent = bytesOf(11, 3000);
    const other = bytesOf(5, 700);
    const recs = [recording('r-sent', 's1', true, sent), recording('r-kept-home', 's1', false, bytesOf(3, 500)), recording('r-other', 's2', true, other)];
    const store = OfficeStore.open(a, { create: true });
    store.applyBatch([site('s1'), site('s2'), pick], { batchId: 'b1', source: 'test' });
    const file = (r: RecordingRecord, bytes: Uint8Array) => ({ id: r.id, sha256: r.sha256, bytes });
    store.applyRecordings(recs, [file(recs[0], sent), file(recs[2], other)], 'test');
    const before = store.recordingsForBundle();
    store.close();

    const out = join(a, 'all.json');
    expect(await cli(['bundle-export', out, '--data', a])).toEqual({
      code: 0,
      out: `Wrote 2 sites, 1 picks, 0 estimates and 3 seismograph file records (2 with the raw file) to ${out}.\n`,
      err: '',
    });
    const bundle = parseBundle(readFileSync(out, 'utf8'));
    expect(bundle.recordings!.map((r) => r.id)).toEqual(['r-kept-home', 'r-other', 'r-sent']);
    expect(bundle.recordingFiles!.map((f) => f.id)).toEqual(['r-other', 'r-sent']);
    const sentFile = bundle.recordingFiles!.find((f) => f.id === 'r-sent')!;
    expect(createHash('sha256').update(fromBase64(sentFile.bytes_base64, 'x')).digest('hex')).toBe(recs[0].sha256);

    // --site: only that site's recordings and files.
    const one = join(a, 's2.json');
    expect((await cli(['bundle-export', one, '--site', 's2', '--data', a])).code).toBe(0);
    const b2 = parseBundle(readFileSync(one, 'utf8'));
    expect([b2.recordings!.map((r) => r.id), b2.recordingFiles!.map((f) => f.id)]).toEqual([['r-other'], ['r-other']]);

    // Round trip into a fresh office store.
    const b = dir();
    const imported = await cli(['bundle-import', out, '--data', b]);
    expect(imported.code, imported.err).toBe(0);
    expect(imported.out).toContain('all.json: 3 seismograph file record(s), 2 with the raw file: 3 new or newer, 0 already here or older.');
    const back = OfficeStore.open(b);
    try {
      expect(back.recordingsForBundle()).toEqual(before);
    } finally {
      back.close();
    }
    // Importing the same file again changes nothing.
    expect((await cli(['bundle-import', out, '--data', b])).out).toContain('0 new or newer, 3 already here or older');
  });

  it('a store with no recordings writes the bundle exactly as before, with no recording fields', async () => {
    const a = dir();
    const store = OfficeStore.open(a, { create: true });
    store.applyBatch([site('s1'), pick], { batchId: 'b1', source: 'test' });
    store.close();
    const out = join(a, 'plain.json');
    expect((await cli(['bundle-export', out, '--data', a])).out).toBe(`Wrote 1 sites, 1 picks and 0 estimates to ${out}.\n`);
    expect(Object.keys(JSON.parse(readFileSync(out, 'utf8')))).toEqual(['format', 'version', 'exportedAt', 'caution', 'sites', 'picks', 'estimates', 'exportedBy']);
  });
});

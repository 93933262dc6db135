/**
 * The office's own exports carry the seismograph files it holds. bundle-export:
 * in
 * the app's bundle format (core/exchange/bundle.ts): every recording record
 * of the exported sites, and the raw file of those whose site chose to send
 * it; bundle-import into another office store gives back the same records
 * and bytes (SHA-256 by Node's crypto, a general-purpose reference).
 * sites-export: each held raw file byte for byte, and recordings.csv. Real
 * SQLite files in a temporary folder; the commands run in this process.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseBundle } from '../../../core/exchange/bundle';
import { fromBase64 } from '../../../core/exchange/base64';
import { RECORDINGS_CSV_COLUMNS } from '../../../core/exchange/office-tables';
import { CAUTION } from '../../../core/shared/caution';
import type { PickRecord, RecordingRecord, SiteRecord } from '../../../core/exchange/records';
import { cli, officeScratch } from './office-harness';
import { OfficeStore } from '../../../office/store';

const T = '2026-05-04T08:00:00.000Z';
const { dir } = officeScratch('shearfield-bundle-rec-');

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

describe('sites-export with seismograph files', () => {
  it('writes each held raw file byte for byte under recordings/SITE/, lists every live file in recordings.csv, and names a hostile file name safely', async () => {
    const a = dir();
    const sent = bytesOf(11, 3000);
    const recs = [
      { ...recording('r-sent', 's1', true, sent), name: '../shot 1.sgy' },
      recording('r-home', 's1', false, bytesOf(3, 500)),
      recording('r-late', 's1', true, bytesOf(4, 400)),
    ];
    const store = OfficeStore.open(a, { create: true });
    store.applyBatch([site('s1'), pick], { batchId: 'b1', source: 'test' });
    store.applyRecordings(recs, [{ id: 'r-sent', sha256: recs[0].sha256, bytes: sent }], 'test');
    store.close();

    const out = join(a, 'export');
    const r = await cli(['sites-export', out, '--data', a, '--no-estimate']);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toBe(
      `Wrote 1 sites to ${join(out, 'sites.csv')} and ${join(out, 'sites.geojson')}, and 1 picks files to ${join(out, 'picks')} (for spreadsheets) and 1 to ${join(out, 'picks-raw')} (exact text), ` +
        `and 3 seismograph files to ${join(out, 'recordings.csv')} (1 raw files under ${join(out, 'recordings')}).\n`,
    );
    const written = readFileSync(join(out, 'recordings', 's1', 'r-sent-shot_1.sgy'));
    expect(createHash('sha256').update(written).digest('hex')).toBe(recs[0].sha256);
    expect(existsSync(join(a, 'shot_1.sgy'))).toBe(false);
    const lines = readFileSync(join(out, 'recordings.csv'), 'utf8').trimEnd().split('\r\n');
    expect(lines[0]).toBe(RECORDINGS_CSV_COLUMNS.join(','));
    const byId = new Map(lines.slice(1).map((l) => [l.split(',')[1], l.split(',')]));
    const col = (id: string, c: (typeof RECORDINGS_CSV_COLUMNS)[number]) => byId.get(id)![RECORDINGS_CSV_COLUMNS.indexOf(c)];
    expect([...byId.keys()].sort()).toEqual(['r-home', 'r-late', 'r-sent']);
    expect([col('r-sent', 'raw_file'), col('r-sent', 'file'), col('r-sent', 'name')]).toEqual(['written', 'recordings/s1/r-sent-shot_1.sgy', '../shot 1.sgy']);
    expect([col('r-home', 'raw_file'), col('r-home', 'file')]).toEqual(['kept on tablet', '']);
    expect([col('r-late', 'raw_file'), col('r-late', 'file')]).toEqual(['not received', '']);
    // The crew's geometry over the file's: first offset 2 m, spacing 2 m, transverse component.
    expect([col('r-sent', 'first_offset_m'), col('r-sent', 'spacing_m'), col('r-sent', 'component'), col('r-sent', 'traces')]).toEqual(['2', '2', 'transverse', '2']);
    expect(lines[1].endsWith(CAUTION)).toBe(true);
  });
});

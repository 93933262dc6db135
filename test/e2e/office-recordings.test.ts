/**
 * Seismograph recordings through the real office (issue 12, storage and
 * office): the office server as its own process with its SQLite file, and
 * two tablets running the app's own sync client and store over
 * fake-indexeddb. The record of every recording travels; the raw file only
 * where its site chose to send it, and it arrives byte for byte at the
 * office (SQLite) and on the other tablet; a forged file is refused with a
 * sentence and nothing is saved. The files are invented SEG-2 records
 * written by the core's writer.
 */
import 'fake-indexeddb/auto';
import { createHash } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { toBase64 } from '../../core/exchange/base64';
import { geometrySummary } from '../../core/recordings/recording';
import { readRecording } from '../../core/recordings/read';
import { writeSeg2 } from '../../core/recordings/seg2-write';
import { newSite, openFieldStore, type FieldStore } from '../../pwa/store';
import { exportBundle } from '../../pwa/sync/bundle-io';
import { SyncClient } from '../../pwa/sync/client';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { addDevice, cli, query, removeTempDataDirs, snapshot, startOffice, tempDataDir, type OfficeProcess } from './office-harness';

const stores: FieldStore[] = [];
const offices: OfficeProcess[] = [];

async function tablet(): Promise<FieldStore> {
  const s = await openFieldStore(`rec-tablet-${crypto.randomUUID()}`, { storageEstimate: async () => ({}) });
  stores.push(s);
  return s;
}

function clientFor(store: FieldStore): SyncClient {
  return new SyncClient(store, { isOnline: () => true, events: new EventTarget(), requestTimeoutMs: 15_000 });
}

function shot(seed: number): { bytes: Uint8Array; geometry: ReturnType<typeof geometrySummary> } {
  const traces = [0, 1, 2, 3].map((k) => Array.from({ length: 256 }, (_, i) => Math.sin(i / (4 + seed) - k) * Math.exp(-i / 200)));
  const bytes = writeSeg2({ sampleInterval: 0.0005, delay: 0, traces, offsets: [4, 6, 8, 10] });
  return { bytes, geometry: geometrySummary(readRecording(bytes, `shot-${seed}.sg2`)) };
}

afterAll(async () => {
  for (const o of offices) await o.kill();
  for (const s of stores) s.close();
  removeTempDataDirs();
});

describe('recordings through the office', () => {
  it('carries every record and the raw files of the site that chose to send them, to the office and to another tablet', async () => {
    const data = tempDataDir();
    const tokenA = await addDevice(data, 'tablet-a');
    const tokenB = await addDevice(data, 'tablet-b');
    const srv = await startOffice(data);
    offices.push(srv);

    const a = await tablet();
    const sending = await a.saveSite(newSite({ name: 'Invented site: sends raw files', date: '2026-05-04' }));
    const keeping = await a.saveSite(newSite({ name: 'Invented site: keeps raw files', date: '2026-05-04' }));
    const one = shot(1);
    const two = shot(2);
    const r1 = await a.saveRecording({ siteId: sending.id, name: 'shot-1.sg2', ...one, attach: true });
    const r2 = await a.saveRecording({ siteId: keeping.id, name: 'shot-2.sg2', ...two });
    const clientA = clientFor(a);
    await clientA.configure(srv.url, tokenA);
    const report = await clientA.syncNow();
    expect(report.ok).toBe(true);
    expect(report.pushed).toBe(4); // two sites, two recordings
    expect(await a.outbox()).toEqual([]);

    // The office keeps both records and exactly one raw file, byte for byte.
    const rows = query<{ id: string; body: string }>(data, 'SELECT id, body FROM recordings ORDER BY seq');
    expect(rows.map((r) => JSON.parse(r.body))).toEqual([r1, r2]);
    const files = query<{ id: string; sha256: string; bytes: Buffer }>(data, 'SELECT id, sha256, bytes FROM recording_files');
    expect(files.map((f) => [f.id, f.sha256, createHash('sha256').update(f.bytes).digest('hex')])).toEqual([[r1.id, r1.sha256, r1.sha256]]);

    const b = await tablet();
    const clientB = clientFor(b);
    await clientB.configure(srv.url, tokenB);
    const got = await clientB.syncNow();
    expect(got.ok).toBe(true);
    expect(await b.listRecordings(sending.id)).toEqual([r1]);
    expect(await b.listRecordings(keeping.id)).toEqual([r2]);
    expect(await b.recordingBytes(r1.id)).toEqual(one.bytes);
    expect(await b.recordingBytes(r2.id)).toBeUndefined();

    // Tablet B deletes a recording; after both sync, tablet A has the tombstone and no file.
    await b.deleteRecording(r1.id);
    expect((await clientB.syncNow()).ok).toBe(true);
    expect((await clientA.syncNow()).ok).toBe(true);
    expect(await a.listRecordings(sending.id)).toEqual([]);
    expect(await a.recordingBytes(r1.id)).toBeUndefined();
    expect(query(data, 'SELECT id FROM recording_files')).toEqual([]);
  }, 60_000);

  it('refuses a raw file that is not the one its record names, and saves nothing', async () => {
    const data = tempDataDir();
    const token = await addDevice(data, 'tablet-a');
    const srv = await startOffice(data);
    offices.push(srv);
    const a = await tablet();
    const site = await a.saveSite(newSite({ name: 'Invented site: forged file', date: '2026-05-04' }));
    const clientA = clientFor(a);
    await clientA.configure(srv.url, token);
    expect((await clientA.syncNow()).ok).toBe(true);
    const one = shot(1);
    const rec = await a.saveRecording({ siteId: site.id, name: 'shot-1.sg2', ...one, attach: true });
    const forged = one.bytes.slice();
    forged[100] ^= 1;
    const before = snapshot(data);
    const res = await fetch(`${srv.url}/api/v1/recordings`, {
      method: 'POST',
      headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
      body: JSON.stringify({ recordings: [rec], files: [{ id: rec.id, sha256: rec.sha256, bytes_base64: toBase64(forged) }] }),
    });
    expect(res.status).toBe(400);
    expect(await res.json()).toEqual({ error: 'files[0] does not have the SHA-256 its recording states; the file was changed on the way. Nothing was saved.', field: 'files[0]' });
    const orphan = await fetch(`${srv.url}/api/v1/recordings`, {
      method: 'POST',
      headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
      body: JSON.stringify({ recordings: [{ ...rec, siteId: 'no-such-site' }] }),
    });
    expect(orphan.status).toBe(400);
    expect(((await orphan.json()) as { error: string }).error).toBe(
      `The recording recordings[0] (${JSON.stringify(rec.id)}) belongs to site "no-such-site", which is not in the office store; sync the site first. Nothing was saved.`,
    );
    expect(snapshot(data)).toBe(before);
  }, 60_000);

  it('shearfield bundle-import keeps the seismograph file records of a bundle and the raw files it carries', async () => {
    const a = await tablet();
    const site = await a.saveSite(newSite({ name: 'Invented site: office import', date: '2026-05-04' }));
    const one = shot(3);
    const rec = await a.saveRecording({ siteId: site.id, name: 'shot-3.sg2', ...one, attach: true });
    const data = tempDataDir();
    const file = join(data, 'bundle.json');
    writeFileSync(file, (await exportBundle(a)).text);
    const run = await cli(['bundle-import', file, '--data', data]);
    expect(run.code).toBe(0);
    expect(run.out).toContain('bundle.json: 1 seismograph file record(s), 1 with the raw file: 1 new or newer, 0 already here or older.');
    expect(query<{ body: string }>(data, 'SELECT body FROM recordings').map((r) => JSON.parse(r.body))).toEqual([rec]);
    const files = query<{ bytes: Buffer }>(data, 'SELECT bytes FROM recording_files');
    expect(files.map((f) => new Uint8Array(f.bytes))).toEqual([one.bytes]);
  }, 60_000);
});

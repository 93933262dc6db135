/**
 * The tablet's recordings sync against an office from before recordings
 * travelled (pwa/sync/recording-sync.ts through the sync client): the
 * office answers 404 to /api/v1/recordings, so the recordings stay queued
 * and the sync of the other records still succeeds. The file is an
 * invented SEG-2 record written by the core's writer.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import type { AnyRecord } from '../../../../core/exchange/records';
import { geometrySummary } from '../../../../core/recordings/recording';
import { readRecording } from '../../../../core/recordings/read';
import { writeSeg2 } from '../../../../core/recordings/seg2-write';
import { newSite, openFieldStore, type FieldStore } from '../../../../pwa/store';
import { SyncClient } from '../../../../pwa/sync/client';

let store: FieldStore | undefined;
afterEach(() => store?.close());

/** An office that takes records but has no /recordings call (404, as an older office answers). */
function olderOffice(sent: AnyRecord[], asked: string[]): typeof fetch {
  return async (input, init) => {
    const url = String(input);
    asked.push(`${init?.method ?? 'GET'} ${new URL(url).pathname}`);
    if (url.includes('/api/v1/recordings')) return new Response(JSON.stringify({ error: 'There is no API at /api/v1/recordings.' }), { status: 404 });
    if (url.includes('/api/v1/push')) {
      const body = JSON.parse(String(init?.body)) as { batchId: string; records: AnyRecord[] };
      sent.push(...body.records);
      return new Response(JSON.stringify({ batchId: body.batchId, replay: false, accepted: body.records.length, ignored: 0, conflicts: 0, outcomes: [], conflicted: [], cursor: '1' }), { status: 200 });
    }
    return new Response(JSON.stringify({ records: [], cursor: '1', more: false, seqs: [] }), { status: 200 });
  };
}

describe('recordings and an office without them', () => {
  it('keeps the recordings queued and the sync of the records succeeds', async () => {
    store = await openFieldStore(`rec-sync-${crypto.randomUUID()}`, { storageEstimate: async () => ({}) });
    const site = await store.saveSite(newSite({ name: 'Invented site: older office' }));
    const bytes = writeSeg2({ sampleInterval: 0.001, delay: 0, traces: [Array.from({ length: 32 }, (_, i) => Math.sin(i))], offsets: [5] });
    const rec = await store.saveRecording({ siteId: site.id, name: 'shot.sg2', bytes, geometry: geometrySummary(readRecording(bytes, 'shot.sg2')), attach: true });
    const sent: AnyRecord[] = [];
    const asked: string[] = [];
    const c = new SyncClient(store, { fetch: olderOffice(sent, asked), isOnline: () => true, events: new EventTarget() });
    await c.configure('http://office.invalid:8750', 'a'.repeat(43), false);
    const report = await c.syncNow();
    expect(report).toMatchObject({ ok: true, pushed: 1 });
    expect(sent.map((r) => r.id)).toEqual([site.id]);
    expect(asked).toContain('POST /api/v1/recordings');
    expect(asked).toContain('GET /api/v1/recordings');
    expect((await store.outbox()).map((e) => [e.recordId, e.type])).toEqual([[rec.id, 'recording']]);
  });
});

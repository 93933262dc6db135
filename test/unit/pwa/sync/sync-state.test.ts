/**
 * Sync says the truth (pwa/sync/client.ts, pwa/sync/sync-state.ts): with
 * changes waiting it never says "up to date", it shows "waiting to send: N"
 * and the last attempt's outcome, "Sync now" is refused offline with the
 * reason, and the invented demo site stays on the tablet (not sent, not
 * counted, not in "export all") until the crew asks for it.
 *
 * The office is a fake fetch in the test (no server): one that cannot be
 * reached, and one that accepts every push and has nothing to pull (the
 * reply shapes of core/exchange/sync-protocol.ts). The store is the app's
 * own over fake-indexeddb. The sites are invented.
 */
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { DEMO_SITE, demoPicks } from '../../../../core/exchange/demo';
import type { AnyRecord } from '../../../../core/exchange/records';
import { newPick, newSite, openFieldStore, type FieldStore } from '../../../../pwa/store';
import { exportBundle } from '../../../../pwa/sync/bundle-io';
import { SyncClient, type SyncStatus } from '../../../../pwa/sync/client';
import { syncWords } from '../../../../pwa/sync/sync-state';

const stores: FieldStore[] = [];
afterEach(() => {
  while (stores.length) stores.pop()!.close();
});

async function tabletWithSites(): Promise<{ store: FieldStore; demoId: string }> {
  const store = await openFieldStore(`sync-state-${crypto.randomUUID()}`);
  stores.push(store);
  const mine = await store.saveSite(newSite({ name: 'Invented site 1', date: '2026-05-04', crew: 'Invented crew', notes: '', axisUnit: 'hz' }));
  await store.savePicks([4, 5, 6].map((f, i) => newPick(mine.id, { frequency: f, velocity: 300 - 10 * i, sd: 8 }, i)));
  const demo = await store.saveSite(newSite({ ...DEMO_SITE, location: { ...DEMO_SITE.location } }));
  await store.savePicks(demoPicks().map((p, i) => newPick(demo.id, p, i)));
  return { store, demoId: demo.id };
}

const unreachable: typeof fetch = async () => {
  throw new TypeError('fetch failed');
};

/** A fake office that keeps what it is sent. */
function acceptingOffice(sent: AnyRecord[]): typeof fetch {
  return async (input, init) => {
    const url = String(input);
    if (url.includes('/api/v1/push')) {
      const body = JSON.parse(String(init?.body)) as { batchId: string; records: AnyRecord[] };
      sent.push(...body.records);
      const reply = { batchId: body.batchId, replay: false, accepted: body.records.length, ignored: 0, conflicts: 0, outcomes: [], conflicted: [], cursor: '1' };
      return new Response(JSON.stringify(reply), { status: 200 });
    }
    return new Response(JSON.stringify({ records: [], cursor: '1', more: false }), { status: 200 });
  };
}

const when = (iso: string) => `at ${iso}`;

describe('sync says the truth', () => {
  it('office unreachable with changes waiting: "waiting to send: N", the failed attempt, and never "up to date"', async () => {
    const { store } = await tabletWithSites();
    const c = new SyncClient(store, { fetch: unreachable, isOnline: () => true, events: new EventTarget(), now: () => new Date('2026-05-04T10:00:00Z') });
    await c.configure('http://127.0.0.1:9', 'a'.repeat(43), false);
    // Saved but not yet tried: still not "up to date".
    let words = syncWords(await c.refresh(), true, when);
    expect(words.headline).not.toMatch(/up to date/i);
    expect(words.waiting).toMatch(/^Waiting to send: 4 \(and 24 records of the invented demo site, kept on this tablet\)$/);
    const report = await c.syncNow();
    expect(report.ok).toBe(false);
    const s = await c.refresh();
    expect(s.pending).toBe(4);
    expect(s.lastAttempt).toMatchObject({ at: '2026-05-04T10:00:00.000Z', ok: false });
    words = syncWords(s, true, when);
    expect(words.headline).toBe('Not sent: the last attempt failed, and 4 changes wait on this tablet; sync will try again.');
    expect(words.lastAttempt).toMatch(/^at 2026-05-04T10:00:00\.000Z: failed\. The office server at http:\/\/127\.0\.0\.1:9 could not be reached/);
    expect(words.lastAttemptFailed).toBe(true);
    // Every state with changes waiting: never "up to date".
    for (const state of ['idle', 'error', 'offline', 'syncing', 'not-set-up'] as const) {
      for (const online of [true, false]) {
        const st: SyncStatus = { ...s, state, lastSuccess: '2026-05-03T09:00:00.000Z', lastAttempt: undefined, lastError: undefined };
        expect(syncWords(st, online, when).headline, `${state} ${online}`).not.toMatch(/up to date/i);
      }
    }
  });

  it('"Sync now" is refused offline, while syncing and before set-up, each with its reason', () => {
    const base: SyncStatus = { state: 'idle', pending: 2, conflicts: 0, heldDemo: 0, includeDemo: false, serverUrl: 'http://office:8750' };
    expect(syncWords(base, true, when)).toMatchObject({ canSyncNow: true, syncNowBlocked: '' });
    expect(syncWords({ ...base, state: 'offline' }, false, when)).toMatchObject({
      canSyncNow: false,
      syncNowBlocked: 'This device is offline; sync starts by itself when the connection returns.',
    });
    expect(syncWords({ ...base, state: 'syncing' }, true, when).syncNowBlocked).toBe('A sync is running.');
    expect(syncWords({ ...base, state: 'not-set-up' }, true, when).syncNowBlocked).toBe('Enter the office address and token first.');
  });

  it('says "offline" while the device is offline, even while an attempt started then is still running', () => {
    const base: SyncStatus = { state: 'syncing', pending: 3, conflicts: 0, heldDemo: 0, includeDemo: false, serverUrl: 'http://office:8750' };
    expect(syncWords(base, false, when).headline).toBe('Offline: 3 changes wait on this tablet and will be sent when the office can be reached.');
    expect(syncWords(base, true, when).headline).toBe('Syncing with the office now…');
  });

  it('says "up to date" only with nothing waiting after a successful sync', () => {
    const ok: SyncStatus = { state: 'idle', pending: 0, conflicts: 0, heldDemo: 0, includeDemo: false, lastSuccess: '2026-05-04T10:00:00.000Z' };
    expect(syncWords(ok, true, when).headline).toBe('Up to date: nothing waiting to be sent; last sync at 2026-05-04T10:00:00.000Z.');
    expect(syncWords({ ...ok, lastSuccess: undefined }, true, when).headline).toBe('Nothing waiting to be sent; this tablet has not synced with the office yet.');
  });

  it('keeps the invented demo site on the tablet until asked, then sends it', async () => {
    const { store, demoId } = await tabletWithSites();
    const sent: AnyRecord[] = [];
    const c = new SyncClient(store, { fetch: acceptingOffice(sent), isOnline: () => true, events: new EventTarget() });
    await c.configure('http://office.invalid:8750', 'a'.repeat(43), false);
    const first = await c.syncNow();
    expect(first).toMatchObject({ ok: true, pushed: 4 });
    expect(sent.some((r) => r.id === demoId || (r.type !== 'site' && r.siteId === demoId))).toBe(false);
    let s = await c.refresh();
    expect(s).toMatchObject({ pending: 0, heldDemo: 24, includeDemo: false });
    expect(syncWords(s, true, when).headline).toMatch(/^Up to date/);
    expect(s.lastAttempt).toMatchObject({ ok: true, message: 'Synced: 4 sent, 0 received.' });

    s = await c.setIncludeDemo(true);
    expect(s).toMatchObject({ pending: 24, heldDemo: 0, includeDemo: true });
    expect((await c.syncNow()).pushed).toBe(24);
    expect(sent.filter((r) => r.id === demoId)).toHaveLength(1);
  });

  it('"export all" leaves the demo site out unless asked; naming it exports it', async () => {
    const { store, demoId } = await tabletWithSites();
    const all = await exportBundle(store);
    expect(all).toMatchObject({ sites: 1, picks: 3, demoLeftOut: 1 });
    expect(all.text).not.toContain(DEMO_SITE.name);
    expect(await exportBundle(store, undefined, undefined, { includeDemo: true })).toMatchObject({ sites: 2, picks: 26, demoLeftOut: 0 });
    expect(await exportBundle(store, [demoId])).toMatchObject({ sites: 1, picks: 23, demoLeftOut: 0 });
  });
});

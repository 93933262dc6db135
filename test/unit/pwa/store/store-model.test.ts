/**
 * The field store against a plain in-memory model, over seeded random
 * sequences of edits (fast-check): saves with good, bad or stale input,
 * batch imports with a bad row, deletions and acknowledgements. After every
 * step the store holds exactly what the model says: a refused write changes
 * nothing, and the outbox gains one entry per saved revision.
 */
import 'fake-indexeddb/auto';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { nextRevision, type PickRecord } from '../../../../core/exchange/records';
import { newPick, newSite, openFieldStore, StoreError } from '../../../../pwa/store';

type Op =
  | { kind: 'add'; frequency: number; velocity: number }
  | { kind: 'edit'; slot: number; velocity: number; stale: boolean }
  | { kind: 'bad'; slot: number }
  | { kind: 'batch'; frequencies: number[]; badAt: number | null }
  | { kind: 'delete'; slot: number }
  | { kind: 'ack'; count: number };

const frequency = fc.integer({ min: 1, max: 40 }).map((n) => n * 0.5); // a small set, so clashes happen
const velocity = fc.integer({ min: 120, max: 900 });
const op: fc.Arbitrary<Op> = fc.oneof(
  fc.record({ kind: fc.constant('add' as const), frequency, velocity }),
  fc.record({ kind: fc.constant('edit' as const), slot: fc.nat(20), velocity, stale: fc.boolean() }),
  fc.record({ kind: fc.constant('bad' as const), slot: fc.nat(20) }),
  fc.record({
    kind: fc.constant('batch' as const),
    frequencies: fc.array(frequency, { minLength: 1, maxLength: 5 }),
    badAt: fc.option(fc.nat(4), { nil: null }),
  }),
  fc.record({ kind: fc.constant('delete' as const), slot: fc.nat(20) }),
  fc.record({ kind: fc.constant('ack' as const), count: fc.nat(4) }),
);

describe('the store matches a simple model over random edit sequences', () => {
  it('refused writes change nothing; each saved revision queues one outbox entry', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(op, { minLength: 5, maxLength: 25 }), async (ops) => {
        const store = await openFieldStore(`model-${crypto.randomUUID()}`);
        try {
          const site = newSite({ name: 'Invented site for the model test', date: '2026-05-04' });
          await store.saveSite(site);
          const model = new Map<string, PickRecord>(); // live picks by id
          let outbox = 1;
          let order = 0;
          const live = () => [...model.values()];
          const clash = (f: number, except?: string) => live().some((p) => p.frequency === f && p.id !== except);

          for (const o of ops) {
            if (o.kind === 'add') {
              const p = newPick(site.id, { frequency: o.frequency, velocity: o.velocity }, order++);
              const ok = !clash(o.frequency);
              const r = await store.savePick(p).then(() => true, (e: unknown) => (expect(e).toBeInstanceOf(StoreError), false));
              expect(r).toBe(ok);
              if (ok) (model.set(p.id, p), outbox++);
            } else if (o.kind === 'edit' && model.size > 0) {
              const p = live()[o.slot % model.size];
              const next = nextRevision(p, { velocity: o.velocity });
              const sent = o.stale ? { ...next, rev: p.rev } : next; // stale: built on an older revision
              const r = await store.savePick(sent).then(() => true, (e: unknown) => (expect(e).toBeInstanceOf(StoreError), false));
              expect(r).toBe(!o.stale);
              if (r) (model.set(p.id, next), outbox++);
            } else if (o.kind === 'bad' && model.size > 0) {
              const p = live()[o.slot % model.size];
              const e = await store.savePick(nextRevision(p, { velocity: -5 })).then(() => undefined, (err: unknown) => err);
              expect((e as StoreError).field).toBe('velocity_m_s');
            } else if (o.kind === 'batch') {
              const picks = o.frequencies.map((f, i) =>
                newPick(site.id, { frequency: f, velocity: o.badAt === i ? 0.2 : 300 }, order + i),
              );
              const fs = o.frequencies;
              const ok =
                (o.badAt === null || o.badAt >= picks.length) &&
                new Set(fs).size === fs.length &&
                !fs.some((f) => clash(f));
              const r = await store.savePicks(picks).then(() => true, (e: unknown) => (expect(e).toBeInstanceOf(StoreError), false));
              expect(r).toBe(ok);
              if (ok) {
                order += picks.length;
                for (const p of picks) model.set(p.id, p);
                outbox += picks.length;
              }
            } else if (o.kind === 'delete' && model.size > 0) {
              const p = live()[o.slot % model.size];
              await store.deletePick(p.id);
              model.delete(p.id);
              outbox++;
            } else if (o.kind === 'ack') {
              const q = await store.outbox();
              await store.ackOutbox(q.slice(0, o.count).map((e) => e.seq));
              outbox -= Math.min(o.count, q.length);
            }
            const stored = await store.listPicks(site.id);
            expect(stored.map((p) => [p.id, p.rev, p.velocity])).toEqual(
              live()
                .sort((a, b) => a.order - b.order)
                .map((p) => [p.id, p.rev, p.velocity]),
            );
            expect((await store.outbox()).length).toBe(outbox);
          }
        } finally {
          store.close();
        }
      }),
      { numRuns: 40, seed: 20260504 },
    );
  });
});

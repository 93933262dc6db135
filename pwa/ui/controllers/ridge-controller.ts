/**
 * The dispersion image of the open record, its ridge and the picks taken
 * from it (the image half of the `records` slice; the files are
 * records-controller.ts's).
 *
 * - The image (phase-shift for a gather, multiple-filter for one trace) is
 *   computed in the worker; a tap follows the ridge there too.
 * - The ridge's points can be trimmed from either end, deleted one by one
 *   and given a mode; "Add to picks" checks them with the core's pick
 *   rules together with the site's picks, saves them in one transaction
 *   like typed picks, and undo takes the whole addition back.
 */
import { checkPickSet, type Pick } from '../../../core/picks/picks';
import { nextRevision, type PickRecord } from '../../../core/exchange/records';
import type { ImageMethod } from '../../../core/signal/image';
import type { Ridge } from '../../../core/signal/ridge';
import { newPick } from '../../store';
import { isAbortError, type LatestOnly } from '../../worker/bridge';
import type { EstimateController } from './estimate-controller';
import { storedPicks, type PicksController } from './picks-controller';
import { openRecord, type RecordsCompute, type RecordsState } from './records-state';
import { messageOf, type StateHub } from './state-hub';

/** The ridge and gather code, loaded on first use (ridge-work.ts). */
const ridgeWork = () => import('./ridge-work');

const STOP_WORDS: Record<Ridge['stops']['low'], string> = {
  faded: 'faded',
  'left-reliable-band': 'left the reliable band',
  jumped: 'jumped',
  'image-edge': 'reached the edge of the image',
};

export class RidgeController {
  constructor(
    private readonly hub: StateHub,
    private readonly picks: PicksController,
    private readonly estimates: EstimateController,
    private readonly compute: RecordsCompute,
    /** Shared with the records controller: a new reading aborts a stale image, and back. */
    private readonly latest: LatestOnly,
  ) {}

  private get s(): RecordsState {
    return this.hub.current.records;
  }

  private set(patch: Partial<RecordsState>): void {
    this.hub.set({ records: { ...this.s, ...patch } });
  }

  async setMethod(method: ImageMethod): Promise<void> {
    if (method === this.s.method) return;
    this.set({ method });
    await this.makeImage();
  }

  async setTrace(trace: number | undefined): Promise<void> {
    this.set({ trace });
    await this.makeImage();
  }

  /** Computes the open record's image in the worker. */
  async makeImage(): Promise<void> {
    const rec = openRecord(this.s);
    if (!rec?.recording) {
      this.set({ status: rec ? 'idle' : this.s.status, image: undefined, ridge: undefined });
      return;
    }
    this.set({ status: 'imaging', error: undefined, image: undefined, ridge: undefined, range: undefined, removed: [], ridgeNote: undefined });
    try {
      const gather = (await ridgeWork()).gatherOfRecording(rec.recording);
      const options =
        this.s.method === 'phase-shift'
          ? { method: 'phase-shift' as const }
          : { method: 'multiple-filter' as const, ...(this.s.trace !== undefined ? { trace: this.s.trace } : {}) };
      const image = await this.compute.image(gather, options, this.latest.next());
      this.set({ status: 'ready', image });
    } catch (e) {
      if (isAbortError(e)) return;
      this.set({ status: 'error', error: messageOf(e) });
    }
  }

  /** Follows the ridge through a tapped point (Hz, m/s) in the worker. */
  async tap(frequency: number, velocity: number): Promise<void> {
    const image = this.s.image;
    if (!image) return;
    this.set({ status: 'following', error: undefined });
    try {
      const ridge = await this.compute.ridge(image, { frequency, velocity }, this.latest.next());
      const n = ridge.velocity.length;
      this.set({
        status: 'ready',
        ridge,
        range: n > 0 ? [0, n - 1] : undefined,
        removed: [],
        ridgeNote:
          n === 0
            ? ridge.reason
            : `${n} point(s) from ${ridge.frequency[0].toFixed(1)} to ${ridge.frequency[n - 1].toFixed(1)} Hz; ` +
              `the ridge ${STOP_WORDS[ridge.stops.low]} below and ${STOP_WORDS[ridge.stops.high]} above.`,
      });
    } catch (e) {
      if (isAbortError(e)) return;
      this.set({ status: 'error', error: messageOf(e) });
    }
  }

  /** Follows the strongest fundamental ridge without a tap (the keyboard's way in): its slowest strong peak in the strongest reliable row. */
  async followStrongest(): Promise<void> {
    const image = this.s.image;
    if (!image) return;
    const seed = (await ridgeWork()).strongestRidgeSeed(image);
    if (!seed) {
      this.set({ ridge: undefined, range: undefined, ridgeNote: 'No reliable ridge stands out in this image; tap one if you see it.' });
      return;
    }
    await this.tap(seed.frequency, seed.velocity);
  }

  /** Moves one end of the kept range to the ridge point nearest `frequency` (Hz). */
  dragEnd(end: 'low' | 'high', frequency: number): void {
    const { ridge, range } = this.s;
    if (!ridge || !range) return;
    let k = 0;
    for (let i = 1; i < ridge.frequency.length; i++) {
      if (Math.abs(ridge.frequency[i] - frequency) < Math.abs(ridge.frequency[k] - frequency)) k = i;
    }
    const next: [number, number] = end === 'low' ? [Math.min(k, range[1]), range[1]] : [range[0], Math.max(k, range[0])];
    this.set({ range: next });
  }

  /** Deletes (or brings back) one ridge point. */
  togglePoint(index: number): void {
    const removed = this.s.removed.includes(index) ? this.s.removed.filter((i) => i !== index) : [...this.s.removed, index];
    this.set({ removed });
  }

  setMode(text: string): void {
    this.set({ mode: text });
  }

  /** The picks the kept ridge points make (core/signal/ridge.ts ridgePicks), or throws the core's InputError. */
  async keptPicks(): Promise<Pick[]> {
    const { image, ridge, range, removed } = this.s;
    if (!image || !ridge || !range) return [];
    const modeText = this.s.mode.trim();
    const mode = Number(modeText);
    if (modeText === '' || !Number.isInteger(mode) || mode < 0 || mode > 50) {
      throw new Error(`The mode must be a whole number from 0 (fundamental) to 50, but it is "${modeText}".`);
    }
    const all = (await ridgeWork()).ridgePicks(image, ridge, { mode });
    return all.filter((_, i) => i >= range[0] && i <= range[1] && !removed.includes(i));
  }

  /**
   * Adds the kept ridge points to the site's picks table in one transaction;
   * undo takes them all back. Checked first with the core's pick rules
   * together with the table's picks: a clash is named and nothing is saved.
   */
  async addToPicks(): Promise<void> {
    const site = this.hub.openSite();
    const store = this.hub.store;
    if (!site || !store) return;
    let picks: Pick[];
    try {
      picks = await this.keptPicks();
      if (picks.length === 0) throw new Error('There are no ridge points to add: tap a ridge on the image first.');
      const existing = this.hub.current.picks;
      const all: Pick[] = [...existing, ...picks];
      checkPickSet(all, (i) => (i < existing.length ? `pick ${i + 1} of the table` : `ridge point ${i - existing.length + 1}`));
    } catch (e) {
      this.set({ error: `Nothing was added to the picks. ${messageOf(e)}` });
      return;
    }
    const start = this.hub.current.picks.reduce((m, p) => Math.max(m, p.order + 1), 0);
    const incoming = picks.map((p, i) => newPick(site.id, p, start + i));
    try {
      await store.savePicks(incoming);
    } catch (e) {
      this.set({ error: `Nothing was added to the picks. ${messageOf(e)}` });
      return;
    }
    await this.picks.reload();
    this.set({ ridge: undefined, range: undefined, removed: [], ridgeNote: `Added ${incoming.length} pick(s) to the table.`, error: undefined });
    this.hub.set({
      undo: {
        label: `adding ${incoming.length} pick(s) from the record`,
        revert: async () => {
          const stored = await storedPicks(store, incoming.map((p) => p.id));
          await store.savePicks(incoming.map((p) => nextRevision(stored.get(p.id) ?? p, { deleted: true } as Partial<PickRecord>)));
          await this.picks.reload();
        },
      },
    });
    this.hub.notify('info', `Added ${incoming.length} pick(s) from ${openRecord(this.s)?.name ?? 'the record'}; Undo takes them all back.`);
    this.estimates.scheduleEstimate();
  }
}

/**
 * Seismograph records of the open site, their dispersion image and the
 * picks taken from it (the `records` slice of the state).
 *
 * - A file from the device (SEG-Y, SEG-2, CSV traces) is read in the
 *   compute worker (core/recordings); missing geometry is asked for, never
 *   guessed: the crew types the first offset and the spacing (and may
 *   override the delay), and the record is read again with them.
 * - The image (phase-shift for a gather, multiple-filter for one trace) is
 *   computed in the worker; a tap follows the ridge there too.
 * - The ridge's points can be trimmed from either end, deleted one by one
 *   and given a mode; "Add to picks" checks them with the core's pick
 *   rules together with the site's picks, saves them in one transaction
 *   like typed picks, and undo takes the whole addition back.
 *
 * A file read without error is saved with its site in the on-device store
 * (saveRecording: raw bytes and the geometry read; the store checks the
 * free space first and refuses with a sentence when the device is full;
 * the record then stays open for this session only, and the crew is told).
 * Opening a site lists its stored records; their bytes are read from the
 * store when one is opened. The invented demo record is made on the fly
 * and never stored. Geometry typed over a stored file is used for this
 * session (the store keeps the geometry of the first reading).
 */
import { geometrySummary, type GeometryOverrides, type Recording } from '../../../core/recordings/recording';
import { checkPickSet, type Pick } from '../../../core/picks/picks';
import { nextRevision, type PickRecord } from '../../../core/exchange/records';
import { gatherOfRecording } from '../../../core/signal/gather';
import type { DispersionImage, ImageMethod } from '../../../core/signal/image';
import { ridgePicks, strongestRidgeSeed, type Ridge } from '../../../core/signal/ridge';
import { newPick } from '../../store';
import { computeImage, computeReadRecord, computeRidge, isAbortError, LatestOnly } from '../../worker/bridge';
import type { EstimateController } from './estimate-controller';
import { storedPicks, type PicksController } from './picks-controller';
import type { RecordingsController } from './recordings-controller';
import { messageOf, type StateHub } from './state-hub';

/** One record kept for the session. */
export interface SessionRecord {
  id: string;
  siteId: string;
  name: string;
  /** The file's bytes: null for the invented demo record; undefined for a stored record not read from the store yet. */
  bytes: Uint8Array | null | undefined;
  /** Kept in the on-device store (false: this session only). */
  stored: boolean;
  /** The record as read with the current overrides; undefined while geometry is missing. */
  recording?: Recording;
  /** Why the record cannot be imaged yet (missing geometry), in the reader's words. */
  askFor: string[];
  warnings: string[];
  invented: boolean;
}

export interface RecordsState {
  /** The open site's records this session. */
  list: readonly SessionRecord[];
  openId?: string;
  method: ImageMethod;
  /** Multiple-filter: the trace (0-based); undefined = the farthest. */
  trace?: number;
  /** Geometry overrides as typed (m, m, s). */
  overrides: { first: string; spacing: string; delay: string };
  status: 'idle' | 'reading' | 'imaging' | 'ready' | 'following' | 'error';
  error?: string;
  image?: DispersionImage;
  ridge?: Ridge;
  /** Kept range of the ridge's points [from, to] (inclusive), trimmed by dragging the ends. */
  range?: [number, number];
  /** Indices of deleted ridge points. */
  removed: readonly number[];
  /** The ridge's mode as typed. */
  mode: string;
  /** Where the ridge stopped and why, in words. */
  ridgeNote?: string;
  /** The site whose stored records are listed. */
  loadedSiteId?: string;
}

const STOP_WORDS: Record<Ridge['stops']['low'], string> = {
  faded: 'faded',
  'left-reliable-band': 'left the reliable band',
  jumped: 'jumped',
  'image-edge': 'reached the edge of the image',
};

/** The worker calls the controller makes (the bridge's by default; tests run them in-process). */
export interface RecordsCompute {
  read: typeof computeReadRecord;
  image: typeof computeImage;
  ridge: typeof computeRidge;
}

const BRIDGE: RecordsCompute = { read: computeReadRecord, image: computeImage, ridge: computeRidge };

let seq = 0;

export class RecordsController {
  private readonly latest = new LatestOnly();

  constructor(
    private readonly hub: StateHub,
    private readonly picks: PicksController,
    private readonly estimates: EstimateController,
    private readonly compute: RecordsCompute = BRIDGE,
    /** The site's list of kept files (site details), told when a file is added or removed here. */
    private readonly kept?: RecordingsController,
  ) {}

  private get s(): RecordsState {
    return this.hub.current.records;
  }

  private set(patch: Partial<RecordsState>): void {
    this.hub.set({ records: { ...this.s, ...patch } });
  }

  /** The open record. */
  open(): SessionRecord | undefined {
    return this.s.list.find((r) => r.id === this.s.openId);
  }

  /** Reads a file chosen on the device and opens it. */
  async importFile(file: File): Promise<void> {
    const site = this.hub.openSite();
    if (!site) return;
    let bytes: Uint8Array;
    try {
      bytes = new Uint8Array(await file.arrayBuffer());
    } catch (e) {
      this.set({ status: 'error', error: `The file ${file.name} could not be read: ${messageOf(e)}` });
      return;
    }
    await this.add({ id: `rec-${++seq}`, siteId: site.id, name: file.name, bytes, stored: false, askFor: [], warnings: [], invented: false }, true);
  }

  /** Lists the site's stored records (once per opened site). */
  async loadStored(siteId: string): Promise<void> {
    const store = this.hub.store;
    if (!store || this.s.loadedSiteId === siteId) return;
    this.set({ loadedSiteId: siteId, list: this.s.list.filter((r) => r.siteId === siteId) });
    try {
      const stored = await store.listRecordings(siteId);
      const known = new Set(this.s.list.map((r) => r.id));
      const more: SessionRecord[] = stored
        .filter((r) => !known.has(r.id))
        .map((r) => ({ id: r.id, siteId, name: r.name, bytes: undefined, stored: true, askFor: [], warnings: [], invented: false }));
      if (more.length > 0) this.set({ list: [...this.s.list, ...more] });
    } catch (e) {
      this.set({ error: `The site's records could not be listed: ${messageOf(e)}` });
    }
  }

  /** Deletes the open record (from the store too, when it is kept there). */
  async remove(): Promise<void> {
    const rec = this.open();
    if (!rec) return;
    if (rec.stored && this.hub.store) {
      try {
        await this.hub.store.deleteRecording(rec.id);
        await this.kept?.load(rec.siteId);
      } catch (e) {
        this.set({ error: `${rec.name} was not removed: ${messageOf(e)}` });
        return;
      }
    }
    this.latest.cancel();
    this.set({ list: this.s.list.filter((r) => r.id !== rec.id), openId: undefined, image: undefined, ridge: undefined, range: undefined, removed: [], ridgeNote: undefined, status: 'idle', error: undefined });
  }

  /** Opens the invented demo record (synthetic, marked invented). */
  async loadDemo(): Promise<void> {
    const site = this.hub.openSite();
    if (!site) return;
    await this.add({ id: `rec-${++seq}`, siteId: site.id, name: 'invented demo record', bytes: null, stored: false, askFor: [], warnings: [], invented: true }, false);
  }

  private async add(rec: SessionRecord, keep: boolean): Promise<void> {
    this.set({ status: 'reading', error: undefined, overrides: { first: '', spacing: '', delay: '' } });
    const result = await this.readFull(rec, {});
    if (!result) return;
    let read = result.rec;
    const store = this.hub.store;
    if (keep && store && rec.bytes) {
      try {
        const saved = await store.saveRecording({ siteId: rec.siteId, name: rec.name, bytes: rec.bytes, geometry: geometrySummary(result.recording) });
        read = { ...read, id: saved.id, stored: true };
        await this.kept?.load(rec.siteId);
      } catch (e) {
        this.hub.notify('error', `${rec.name} was not saved on this device: ${messageOf(e)} It stays open for this session only.`);
      }
    }
    const list = [...this.s.list.filter((r) => r.siteId === rec.siteId), read];
    this.set({ list, openId: read.id, method: read.recording && read.recording.traces.length === 1 ? 'multiple-filter' : 'phase-shift', trace: undefined });
    await this.makeImage();
  }

  /** Reads (or re-reads with overrides) a record in the worker; a bad file leaves the list as it was. */
  private async read(rec: SessionRecord, overrides: GeometryOverrides): Promise<SessionRecord | undefined> {
    return (await this.readFull(rec, overrides))?.rec;
  }

  private async readFull(rec: SessionRecord, overrides: GeometryOverrides): Promise<{ rec: SessionRecord; recording: Recording } | undefined> {
    let bytes = rec.bytes;
    if (bytes === undefined) {
      try {
        bytes = await this.hub.store?.recordingBytes(rec.id);
      } catch (e) {
        this.set({ status: 'error', error: `${rec.name} could not be read from this device: ${messageOf(e)}` });
        return undefined;
      }
      if (!bytes) {
        this.set({ status: 'error', error: `This device does not hold the file of ${rec.name} (only its description came here).` });
        return undefined;
      }
      rec = { ...rec, bytes };
    }
    try {
      const recording = await this.compute.read(bytes, rec.name, overrides, this.latest.next());
      return {
        rec: {
          ...rec,
          name: rec.invented ? recording.name : rec.name,
          recording: recording.missingGeometry ? undefined : recording,
          askFor: recording.askFor,
          warnings: recording.warnings,
        },
        recording,
      };
    } catch (e) {
      if (isAbortError(e)) return undefined;
      this.set({ status: 'error', error: `Nothing was added from ${rec.name}. ${messageOf(e)}` });
      return undefined;
    }
  }

  /** Opens another record of the session. */
  async select(id: string): Promise<void> {
    let rec = this.s.list.find((r) => r.id === id);
    if (!rec) return;
    if (rec.bytes === undefined) {
      this.set({ openId: id, status: 'reading', error: undefined, image: undefined, ridge: undefined });
      const read = await this.read(rec, {});
      if (!read) return;
      this.set({ list: this.s.list.map((r) => (r.id === id ? read : r)) });
      rec = read;
    }
    this.set({ openId: id, image: undefined, ridge: undefined, range: undefined, removed: [], trace: undefined, method: rec.recording?.traces.length === 1 ? 'multiple-filter' : 'phase-shift' });
    await this.makeImage();
  }

  setOverride(field: 'first' | 'spacing' | 'delay', text: string): void {
    this.set({ overrides: { ...this.s.overrides, [field]: text } });
  }

  /** Reads the open record again with the typed geometry; a bad value is named and nothing changes. */
  async applyOverrides(): Promise<void> {
    const rec = this.open();
    if (!rec) return;
    const o = this.s.overrides;
    const overrides: GeometryOverrides = {};
    const num = (text: string, what: string): number => {
      const v = Number(text.trim().replace(',', '.'));
      if (text.trim() === '' || !Number.isFinite(v)) throw new Error(`The ${what} must be a number, but it is "${text.trim()}".`);
      return v;
    };
    try {
      if (o.first.trim() !== '' || o.spacing.trim() !== '') {
        overrides.offsets = { first: num(o.first, 'offset of the first receiver (m)'), spacing: num(o.spacing, 'receiver spacing (m)') };
      }
      if (o.delay.trim() !== '') overrides.delay = num(o.delay, 'trigger delay (s)');
    } catch (e) {
      this.set({ status: 'error', error: messageOf(e) });
      return;
    }
    this.set({ status: 'reading', error: undefined });
    const read = await this.read(rec, overrides);
    if (!read) return;
    this.set({ list: this.s.list.map((r) => (r.id === read.id ? read : r)) });
    await this.makeImage();
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
    const rec = this.open();
    if (!rec?.recording) {
      this.set({ status: rec ? 'idle' : this.s.status, image: undefined, ridge: undefined });
      return;
    }
    this.set({ status: 'imaging', error: undefined, image: undefined, ridge: undefined, range: undefined, removed: [], ridgeNote: undefined });
    try {
      const gather = gatherOfRecording(rec.recording);
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
    const seed = strongestRidgeSeed(image);
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
  keptPicks(): Pick[] {
    const { image, ridge, range, removed } = this.s;
    if (!image || !ridge || !range) return [];
    const modeText = this.s.mode.trim();
    const mode = Number(modeText);
    if (modeText === '' || !Number.isInteger(mode) || mode < 0 || mode > 50) {
      throw new Error(`The mode must be a whole number from 0 (fundamental) to 50, but it is "${modeText}".`);
    }
    const all = ridgePicks(image, ridge, { mode });
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
      picks = this.keptPicks();
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
    this.hub.notify('info', `Added ${incoming.length} pick(s) from ${this.open()?.name ?? 'the record'}; Undo takes them all back.`);
    this.estimates.scheduleEstimate();
  }

  /** Forgets the records when another site opens. */
  reset(): void {
    this.latest.cancel();
    this.hub.set({ records: { list: [], method: 'phase-shift', overrides: { first: '', spacing: '', delay: '' }, status: 'idle', mode: '0', removed: [] } });
  }
}

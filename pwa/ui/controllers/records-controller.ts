/**
 * Seismograph records of the open site: the files (the `records` slice of
 * the state, with ridge-controller.ts, which owns the image, the ridge and
 * the picks taken from it; records-state.ts holds the slice's shape).
 *
 * - A file from the device (SEG-Y, SEG-2, CSV traces) is read in the
 *   compute worker (core/recordings); missing geometry is asked for, never
 *   guessed: the crew types the first offset and the spacing (and may
 *   override the delay), and the record is read again with them. Each
 *   reading ends by asking the ridge controller for the record's image.
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
import { isAbortError, type LatestOnly } from '../../worker/bridge';
import type { RecordingsController } from './recordings-controller';
import { emptyRecordsState, openRecord, type RecordsCompute, type RecordsState, type SessionRecord } from './records-state';
import type { RidgeController } from './ridge-controller';
import { messageOf, type StateHub } from './state-hub';

export type { RecordsCompute, RecordsState, SessionRecord } from './records-state';

let seq = 0;

export class RecordsController {
  constructor(
    private readonly hub: StateHub,
    /** The image, ridge and picks of the open record, asked for after each reading. */
    private readonly ridge: RidgeController,
    private readonly compute: RecordsCompute,
    /** Shared with the ridge controller: a new reading aborts a stale image, and back. */
    private readonly latest: LatestOnly,
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
    return openRecord(this.s);
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
    await this.ridge.makeImage();
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
    await this.ridge.makeImage();
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
    await this.ridge.makeImage();
  }

  /** Forgets the records when another site opens. */
  reset(): void {
    this.latest.cancel();
    this.hub.set({ records: emptyRecordsState() });
  }
}

/**
 * Seismograph files kept with the open site (the `recordings` slice of the
 * state): the list with sizes, deleting one, and the site's choice whether
 * raw files travel to the office and in bundles. The files themselves are
 * added where they are read (the record view calls the store's
 * saveRecording, then `load`). A refused write says why and the list stays
 * as stored.
 */
import type { RecordingsState } from './app-state';
import { messageOf, type StateHub } from './state-hub';

export class RecordingsController {
  constructor(private readonly hub: StateHub) {}

  /** Reads the site's recordings (the site just opened, or a file was added). */
  async load(siteId: string): Promise<void> {
    const store = this.hub.store;
    if (!store) return;
    try {
      const list = await store.listRecordings(siteId);
      if (this.hub.current.openSiteId !== siteId) return;
      this.hub.set({ recordings: { siteId, list, busy: false } });
    } catch (e) {
      this.hub.set({ recordings: { siteId, list: [], busy: false, error: messageOf(e) } });
    }
  }

  /** The site's choice: send (or keep back) the raw files of every recording. */
  async setAttach(attach: boolean): Promise<void> {
    const siteId = this.hub.current.openSiteId;
    const store = this.hub.store;
    if (!siteId || !store) return;
    this.patch({ busy: true, error: undefined });
    try {
      await store.setRecordingAttach(siteId, attach);
      await this.load(siteId);
    } catch (e) {
      this.patch({ busy: false, error: `The choice for raw files was not saved: ${messageOf(e)}` });
    }
  }

  /** Deletes one recording (its raw file goes from this device; the deletion syncs). */
  async remove(id: string): Promise<void> {
    const siteId = this.hub.current.openSiteId;
    const store = this.hub.store;
    const rec = this.hub.current.recordings.list.find((r) => r.id === id);
    if (!siteId || !store || !rec) return;
    this.patch({ busy: true, error: undefined });
    try {
      await store.deleteRecording(id);
      await this.load(siteId);
      this.hub.notify('info', `The recording "${rec.name}" was deleted from this site.`);
    } catch (e) {
      this.patch({ busy: false, error: `The recording "${rec.name}" was not deleted: ${messageOf(e)}` });
    }
  }

  private patch(p: Partial<RecordingsState>): void {
    this.hub.set({ recordings: { ...this.hub.current.recordings, ...p } });
  }
}

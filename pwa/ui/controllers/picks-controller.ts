/**
 * The open site's picks table (the `picks`, `drafts`, `selectedPickId` and
 * `undo` slices of the state): typed cells stay as text until a row is
 * committed, a committed row is checked by the core's pick rules and saved
 * at once, a refused or failed write keeps the typed text on screen with its
 * message, and undo takes back the last change. Every saved change asks for
 * a fresh estimate.
 */
import { InputError } from '../../../core/shared/errors';
import { checkPickSet, pickFromCells, picksToCsv, type Pick, type PickCells, type PickKind, type PickWave } from '../../../core/picks/picks';
import { nextRevision, type PickRecord } from '../../../core/exchange/records';
import { newPick, pickOf, type FieldStore } from '../../store';
import { byFrequency, handEntryMessage, NEW_ROW, replaceById, without, type RowDraft } from './app-state';
import type { EstimateController } from './estimate-controller';
import type { PickTextColumn } from './form-text';
import { messageOf, type StateHub } from './state-hub';

/** The stored versions (tombstones included) of some picks, by id. */
export async function storedPicks(store: FieldStore, ids: readonly string[]): Promise<Map<string, PickRecord>> {
  const want = new Set(ids);
  const out = new Map<string, PickRecord>();
  for (const r of await store.allRecords()) {
    if (r.type === 'pick' && want.has(r.id)) out.set(r.id, r);
  }
  return out;
}

/** A live revision of a stored (deleted) pick. */
export function revived(tomb: PickRecord): PickRecord {
  const alive = nextRevision(tomb, {} as Partial<PickRecord>);
  delete (alive as { deleted?: boolean }).deleted;
  return alive;
}

export class PicksController {
  constructor(
    private readonly hub: StateHub,
    private readonly estimates: EstimateController,
  ) {}

  /** Whether any row or site-form text is typed and not saved. */
  hasUnsavedText(): boolean {
    const s = this.hub.current;
    return Object.keys(s.drafts).length > 0 || Object.keys(s.siteDraft).length > 0;
  }

  /** Reads a site's picks into the table (the site just opened) and asks for its estimate. */
  async load(siteId: string): Promise<void> {
    const store = this.hub.store;
    if (!store) return;
    try {
      const picks = await store.listPicks(siteId);
      if (this.hub.current.openSiteId !== siteId) return;
      this.hub.set({ picks });
      this.estimates.scheduleEstimate();
    } catch (e) {
      this.hub.notify('error', messageOf(e));
    }
  }

  /** Re-reads the open site's picks (after an import, a sync or an undo). */
  async reload(): Promise<void> {
    const id = this.hub.current.openSiteId;
    const store = this.hub.store;
    if (!id || !store) return;
    const picks = await store.listPicks(id);
    if (this.hub.current.openSiteId === id) this.hub.set({ picks });
  }

  selectPick(id: string | undefined): void {
    this.hub.set({ selectedPickId: id });
  }

  /** Typing in a cell: kept as text until the row is committed. */
  editCell(rowKey: string, column: PickTextColumn, text: string): void {
    const drafts = this.hub.current.drafts;
    const d = drafts[rowKey] ?? { cells: {} };
    // Typing into the new row while its last pick is still being saved starts
    // the next pick: none of the saving pick's values carry over into it.
    const next = d.saving && rowKey === NEW_ROW && !d.next ? { cells: {}, saving: true, next: true } : d;
    const cells: PickCells = { ...next.cells, [column]: text };
    this.hub.set({ drafts: { ...drafts, [rowKey]: { ...next, cells, error: undefined, errorColumn: undefined } } });
  }

  /** Choosing group or phase (and the mode) commits a stored row at once (the new row waits for its numbers). */
  async setKind(rowKey: string, kind: PickKind, mode?: number): Promise<void> {
    this.setDraft(rowKey, { kind });
    if (mode !== undefined) {
      const d = this.hub.current.drafts[rowKey] ?? { cells: {} };
      this.setDraft(rowKey, { cells: { ...d.cells, mode: String(mode) } });
    }
    if (rowKey !== NEW_ROW) await this.commitRow(rowKey);
  }

  /** Sets a row's wave (Love or Rayleigh); a stored pick is saved at once. */
  async setWave(rowKey: string, wave: PickWave): Promise<void> {
    this.setDraft(rowKey, { wave });
    if (rowKey !== NEW_ROW) await this.commitRow(rowKey);
  }

  /** Clears a row's unsaved text (the stored pick shows again). */
  discardDraft(rowKey: string): void {
    this.hub.set({ drafts: without(this.hub.current.drafts, rowKey) });
  }

  /**
   * The drafts once a row's save has ended: the saved draft goes, unless the
   * crew typed in that row (or changed its kind) while it was saving; then
   * what they typed stays, ready for its own commit.
   */
  private draftsAfterSave(rowKey: string, saved: RowDraft): Record<string, RowDraft> {
    const drafts = this.hub.current.drafts;
    const current = drafts[rowKey];
    if (!current || (current.cells === saved.cells && current.kind === saved.kind && current.wave === saved.wave)) {
      return without(drafts, rowKey);
    }
    return { ...drafts, [rowKey]: { ...current, saving: false, next: undefined } };
  }

  private setDraft(rowKey: string, patch: Partial<RowDraft>): void {
    const drafts = this.hub.current.drafts;
    const d = drafts[rowKey] ?? { cells: {} };
    this.hub.set({ drafts: { ...drafts, [rowKey]: { ...d, ...patch } } });
  }

  /** The row's cells: typed text where the crew typed, else the stored values. */
  private static cellsOf(draft: RowDraft, rec: PickRecord | undefined): PickCells {
    const cells: PickCells = {};
    const typed = draft.cells;
    if (typed.frequency_hz !== undefined || typed.period_s !== undefined) {
      if (typed.frequency_hz !== undefined) cells.frequency_hz = typed.frequency_hz;
      else cells.period_s = typed.period_s;
    } else if (rec) {
      if (rec.period !== undefined) cells.period_s = String(rec.period);
      else cells.frequency_hz = String(rec.frequency);
    }
    cells.velocity_m_s = typed.velocity_m_s ?? (rec ? String(rec.velocity) : undefined);
    const sdText = typed.sd_m_s ?? (rec?.sd !== undefined ? String(rec.sd) : '');
    if (sdText.trim() !== '') cells.sd_m_s = sdText;
    const modeText = typed.mode ?? (rec ? String(rec.mode) : '');
    if (modeText.trim() !== '') cells.mode = modeText;
    cells.kind = draft.kind ?? rec?.kind ?? 'group';
    const wave = draft.wave ?? rec?.wave;
    if (wave !== undefined) cells.wave = wave;
    return cells;
  }

  /**
   * Checks and saves one row. The new row waits until it has a frequency (or
   * period) and a velocity, unless `force` (Enter) asks for the check now.
   */
  async commitRow(rowKey: string, force = false): Promise<void> {
    const site = this.hub.openSite();
    const store = this.hub.store;
    const state = this.hub.current;
    const draft = state.drafts[rowKey];
    if (!site || !store || !draft) return;
    if (draft.saving) {
      // The row's last save is still running: commit again when it ends, so nothing typed meanwhile is lost.
      this.setDraft(rowKey, { pendingCommit: { force: force || (draft.pendingCommit?.force ?? false) } });
      return;
    }
    const unit = site.axisUnit;
    const absCol = unit === 's' ? 'period_s' : 'frequency_hz';
    const isNew = rowKey === NEW_ROW;
    const rec = isNew ? undefined : state.picks.find((p) => p.id === rowKey);
    if (!isNew && !rec) {
      this.discardDraft(rowKey);
      return;
    }
    const index = isNew ? state.picks.length : state.picks.indexOf(rec!);
    const where = `pick ${index + 1}`;
    const cells = PicksController.cellsOf(draft, rec);

    if (isNew) {
      const hasAbs = (cells[absCol] ?? cells.frequency_hz ?? cells.period_s ?? '').trim() !== '';
      const hasVel = (cells.velocity_m_s ?? '').trim() !== '';
      const anything = Object.values(draft.cells).some((t) => t !== undefined && t.trim() !== '');
      if (!anything) {
        if (!draft.kind && !draft.wave) this.discardDraft(rowKey);
        return;
      }
      if (!force && !(hasAbs && hasVel)) return;
      if (!hasAbs) {
        const column = unit === 's' ? 'period_s' : 'frequency_hz';
        this.setDraft(rowKey, {
          error: `Pick ${index + 1}: the ${unit === 's' ? 'period is empty; give it in s' : 'frequency is empty; give it in Hz'}.`,
          errorColumn: column,
        });
        return;
      }
    }

    let pick: Pick;
    try {
      pick = pickFromCells(cells, where);
      const rest = state.picks.filter((p) => p.id !== rowKey);
      const all = [...rest.map(pickOf), pick];
      checkPickSet(all, (i) => (i === all.length - 1 ? where : `pick ${state.picks.indexOf(rest[i]) + 1}`));
    } catch (e) {
      const column = e instanceof InputError ? e.field.split(', ').pop() : undefined;
      this.setDraft(rowKey, { error: handEntryMessage(messageOf(e)), errorColumn: column });
      return;
    }

    this.setDraft(rowKey, { saving: true, error: undefined, errorColumn: undefined });
    try {
      if (isNew) {
        const order = this.hub.current.picks.reduce((m, p) => Math.max(m, p.order + 1), 0);
        const saved = await store.savePick(newPick(site.id, pick, order));
        this.hub.set({
          picks: [...this.hub.current.picks, saved],
          drafts: this.draftsAfterSave(rowKey, draft),
          undo: { label: `adding pick ${index + 1}`, revert: () => this.removePick(saved.id) },
        });
      } else {
        const changes: Partial<PickRecord> = { ...pick, period: pick.period, sd: pick.sd, wave: pick.wave };
        const saved = await store.savePick(nextRevision(rec!, changes));
        const before = rec!;
        this.hub.set({
          picks: replaceById(this.hub.current.picks, saved),
          drafts: this.draftsAfterSave(rowKey, draft),
          undo: { label: `the change to pick ${index + 1}`, revert: () => this.restorePick(before) },
        });
      }
      this.estimates.scheduleEstimate();
      const pending = this.hub.current.drafts[rowKey]?.pendingCommit;
      if (pending) {
        this.setDraft(rowKey, { pendingCommit: undefined });
        await this.commitRow(rowKey, pending.force);
      }
    } catch (e) {
      this.setDraft(rowKey, { saving: false, next: undefined, pendingCommit: undefined, error: `${messageOf(e)} Your input is kept on screen.` });
      this.hub.notify('error', `Pick ${index + 1} was not saved: ${messageOf(e)}`);
    }
  }

  /** Puts the table in frequency order (saved: every moved pick gets a new order); undo puts the old order back. */
  async sortByFrequency(): Promise<void> {
    const store = this.hub.store;
    const before = this.hub.current.picks;
    if (!store || before.length < 2) return;
    if (Object.keys(this.hub.current.drafts).length > 0) {
      this.hub.notify('error', 'Finish or clear the rows being typed before sorting.');
      return;
    }
    const reorder = async (target: readonly PickRecord[]) => {
      const now = this.hub.current.picks;
      const byId = new Map(now.map((p) => [p.id, p]));
      const changed: PickRecord[] = [];
      const out: PickRecord[] = [];
      target.forEach((t, i) => {
        const cur = byId.get(t.id);
        if (!cur) return;
        if (cur.order !== i) {
          const next = nextRevision(cur, { order: i } as Partial<PickRecord>);
          changed.push(next);
          out.push(next);
        } else out.push(cur);
      });
      if (changed.length > 0) await store.savePicks(changed);
      this.hub.set({ picks: out });
    };
    try {
      await reorder(byFrequency(before));
      this.hub.set({ undo: { label: 'sorting by frequency', revert: () => reorder(before) } });
    } catch (e) {
      this.hub.notify('error', `The picks were not sorted: ${messageOf(e)}`);
    }
  }

  /**
   * The open site's picks as a CSV file (the picks CSV that the app and
   * `shearfield estimate` read back exactly), shared or downloaded. The
   * file is named after the site in whole words.
   */
  async exportPicksCsv(): Promise<void> {
    const site = this.hub.openSite();
    const picks = this.hub.current.picks;
    if (!site || picks.length === 0) return;
    try {
      const text = picksToCsv(picks.map(pickOf));
      let slug = site.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '');
      if (slug.length > 40) slug = slug.slice(0, 41).includes('-') ? slug.slice(0, 41).replace(/-[^-]*$/, '') : slug.slice(0, 40);
      const name = `shearfield-picks-${slug || 'site'}-${site.date || new Date().toISOString().slice(0, 10)}.csv`;
      const io = await import('../../sync/bundle-io');
      const how = await io.deliverBundle({ name, text }, 'text/csv');
      if (how !== 'cancelled') this.hub.notify('info', `${how === 'shared' ? 'Shared' : 'Saved'} ${name}: ${picks.length} ${picks.length === 1 ? 'pick' : 'picks'}.`);
    } catch (e) {
      this.hub.notify('error', `The picks file could not be made: ${messageOf(e)}`);
    }
  }

  /** Deletes a pick (a tombstone revision in the store); undo brings it back. */
  async deletePick(id: string): Promise<void> {
    const s = this.hub.current;
    const rec = s.picks.find((p) => p.id === id);
    const store = this.hub.store;
    if (!rec || !store) return;
    const index = s.picks.indexOf(rec);
    try {
      await store.deletePick(id);
      const now = this.hub.current;
      this.hub.set({
        picks: now.picks.filter((p) => p.id !== id),
        drafts: without(now.drafts, id),
        selectedPickId: now.selectedPickId === id ? undefined : now.selectedPickId,
        undo: {
          label: `deleting pick ${index + 1}`,
          revert: () => this.revivePick(rec),
        },
      });
      this.estimates.scheduleEstimate();
    } catch (e) {
      this.hub.notify('error', `Pick ${index + 1} was not deleted: ${messageOf(e)}`);
    }
  }

  /** Takes back the last change. */
  async undo(): Promise<void> {
    const u = this.hub.current.undo;
    if (!u) return;
    try {
      await u.revert();
      this.hub.set({ undo: undefined });
      this.hub.notify('info', `Undone: ${u.label}.`);
      this.estimates.scheduleEstimate();
    } catch (e) {
      this.hub.notify('error', `Could not undo ${u.label}: ${messageOf(e)}`);
    }
  }

  private async removePick(id: string): Promise<void> {
    await this.hub.store!.deletePick(id);
    this.hub.set({ picks: this.hub.current.picks.filter((p) => p.id !== id) });
  }

  /** Writes the earlier values of a pick back as a new revision. */
  private async restorePick(before: PickRecord): Promise<void> {
    const now = this.hub.current.picks.find((p) => p.id === before.id);
    if (!now) throw new Error('the pick is no longer in the table');
    const { id: _i, rev: _r, updatedAt: _u, type: _t, ...values } = before;
    const saved = await this.hub.store!.savePick(nextRevision(now, { ...values, period: before.period, sd: before.sd }));
    this.hub.set({ picks: replaceById(this.hub.current.picks, saved) });
  }

  /** Brings a deleted pick back (the tombstone gets a live revision). */
  private async revivePick(rec: PickRecord): Promise<void> {
    const store = this.hub.store!;
    const tomb = (await storedPicks(store, [rec.id])).get(rec.id);
    if (!tomb) throw new Error('the pick is no longer in the store');
    const saved = await store.savePick(revived(tomb));
    const picks = [...this.hub.current.picks, saved].sort((a, b) => a.order - b.order);
    this.hub.set({ picks });
  }
}

/**
 * CSV import of picks into the open site (the `importState` slice): all or
 * nothing. The whole text is checked by the core reader first; a refused
 * text stays on screen with every bad row listed, and nothing is written;
 * a good text is written in one transaction (replacing the table's picks
 * when asked), and undo takes the whole import back.
 */
import { checkPicksCsv } from '../../../core/picks/picks';
import { nextRevision, type PickRecord } from '../../../core/exchange/records';
import { newPick } from '../../store';
import { mergeByFrequency } from './app-state';
import type { EstimateController } from './estimate-controller';
import { revived, storedPicks, type PicksController } from './picks-controller';
import { messageOf, type StateHub } from './state-hub';

export class ImportController {
  constructor(
    private readonly hub: StateHub,
    private readonly picks: PicksController,
    private readonly estimates: EstimateController,
  ) {}

  setImportText(text: string): void {
    this.hub.set({
      importState: { ...this.hub.current.importState, text, error: undefined, problems: undefined, moreProblems: undefined, info: undefined },
    });
  }

  setImportReplace(replace: boolean): void {
    this.hub.set({ importState: { ...this.hub.current.importState, replace } });
  }

  /** Reads a chosen CSV file and imports it (all or nothing). */
  async importFile(file: File): Promise<void> {
    let text: string;
    try {
      text = await file.text();
    } catch (e) {
      this.hub.set({
        importState: {
          ...this.hub.current.importState,
          info: undefined,
          problems: undefined,
          moreProblems: undefined,
          error: `The file ${file.name} could not be read: ${messageOf(e)}`,
        },
      });
      return;
    }
    await this.importCsv(text, `the file ${file.name}`);
  }

  /**
   * Imports picks from CSV text through the core reader. All or nothing: the
   * whole file is checked first, every bad row is listed (row, line, column
   * and reason; checkPicksCsv caps the list) and nothing is written, the
   * text staying on screen to be fixed; a good file is written in one
   * transaction (replacing the table's picks when asked).
   */
  async importCsv(text: string, source = 'the pasted text'): Promise<void> {
    const site = this.hub.openSite();
    const store = this.hub.store;
    if (!site || !store) return;
    const check = checkPicksCsv(text);
    const parsed = check.parsed;
    if (!parsed) {
      const single = check.problems.length === 1 && check.moreProblems === 0;
      const rows = check.problems.length + check.moreProblems;
      this.hub.set({
        importState: {
          ...this.hub.current.importState,
          text,
          info: undefined,
          error: single
            ? `Nothing was imported from ${source}. ${check.problems[0].message}`
            : `Nothing was imported from ${source}. ${rows} rows have problems; fix them and import again.`,
          problems: single ? undefined : check.problems,
          moreProblems: single ? undefined : check.moreProblems,
        },
      });
      return;
    }
    const replace = this.hub.current.importState.replace;
    const old = this.hub.current.picks;
    const start = replace ? 0 : old.reduce((m, p) => Math.max(m, p.order + 1), 0);
    let incoming = parsed.picks.map((p, i) => {
      const { id: _drop, ...values } = p;
      return newPick(site.id, values, start + i);
    });
    const tombs = replace ? old.map((p) => nextRevision(p, { deleted: true } as Partial<PickRecord>)) : [];
    // Added picks merge into frequency order: each goes before the first pick of a higher frequency.
    let moved: PickRecord[] = [];
    if (!replace && old.length > 0) {
      const merged = mergeByFrequency(old, incoming);
      const fresh = new Set(incoming.map((p) => p.id));
      incoming = merged.flatMap((p, i) => (fresh.has(p.id) ? [{ ...p, order: i }] : []));
      moved = merged.flatMap((p, i) => (!fresh.has(p.id) && p.order !== i ? [nextRevision(p, { order: i } as Partial<PickRecord>)] : []));
    } else {
      incoming = incoming.slice().sort((a, b) => a.frequency - b.frequency).map((p, i) => ({ ...p, order: i }));
    }
    try {
      await store.savePicks([...tombs, ...moved, ...incoming]);
    } catch (e) {
      this.hub.set({
        importState: {
          ...this.hub.current.importState,
          text,
          info: undefined,
          problems: undefined,
          moreProblems: undefined,
          error: `Nothing was imported from ${source}. ${messageOf(e)}`,
        },
      });
      return;
    }
    await this.picks.reload();
    const info =
      `Imported ${incoming.length} pick(s) from ${source}${replace ? `, replacing ${old.length}` : ''}.` +
      (parsed.sdNote ? ` ${parsed.sdNote}` : '');
    this.hub.set({
      importState: { text: '', replace: false, info },
      undo: {
        label: `the import of ${incoming.length} pick(s)`,
        revert: async () => {
          const stored = await storedPicks(store, [...incoming, ...tombs].map((p) => p.id));
          const undoIncoming = incoming.map((p) => nextRevision(stored.get(p.id) ?? p, { deleted: true } as Partial<PickRecord>));
          const back = tombs.map((t) => revived(stored.get(t.id) ?? t));
          await store.savePicks([...undoIncoming, ...back]);
          await this.picks.reload();
        },
      },
    });
    this.estimates.scheduleEstimate();
  }
}

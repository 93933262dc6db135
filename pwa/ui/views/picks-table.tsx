/**
 * The picks table, built for touch and the on-screen keyboard: numeric
 * keypad; in the new row "Next" moves to the next cell and Enter on the last
 * required cell (the velocity, or any cell after it) saves the pick and puts
 * the cursor in the first cell of a fresh row; a half-typed row stays as a
 * draft, not an error; in a saved row Enter saves it and moves down. Kind
 * and mode share one compact control, so the table fits a phone. Every
 * change saves at once, a refused change stays on screen with its message
 * (in the column words of the table). Below it, CSV paste or file import.
 */
import { Fragment } from 'preact';
import { useEffect, useRef } from 'preact/hooks';
import { morePickProblemsNote, type PickKind, type PickWave } from '../../../core/picks/picks';
import type { PickRecord } from '../../../core/exchange/records';
import { cellText, type PickTextColumn } from '../controllers/form-text';
import { NEW_ROW, type ImportState, type RowDraft, type UndoEntry } from '../controllers/app-state';

export interface PicksTableProps {
  picks: readonly PickRecord[];
  drafts: Readonly<Record<string, RowDraft>>;
  unit: 'hz' | 's';
  selectedId?: string;
  undo?: UndoEntry;
  onEdit: (row: string, column: PickTextColumn, text: string) => void;
  onCommit: (row: string, force?: boolean) => void;
  onKind: (row: string, kind: PickKind, mode?: number) => void;
  /** Puts the table in frequency order (saved). */
  onSort?: () => void;
  /** Shares or downloads the site's picks as a CSV file. */
  onExport?: () => void;
  onWave: (row: string, wave: PickWave) => void;
  onDelete: (id: string) => void;
  onDiscard: (row: string) => void;
  onSelect: (id: string | undefined) => void;
  onUnit: (unit: 'hz' | 's') => void;
  onUndo: () => void;
}

const COLUMNS: PickTextColumn[] = ['frequency_hz', 'velocity_m_s', 'sd_m_s'];
/** Modes offered in the kind-and-mode control (a pick's own mode is always offered too). */
const MODES_OFFERED = [0, 1, 2, 3];
/** Index of the last required cell of a row (the velocity): Enter there (or after) saves the new row. */
const LAST_REQUIRED = 1;

export function PicksTable(props: PicksTableProps) {
  const table = useRef<HTMLTableElement>(null);
  const absCol: PickTextColumn = props.unit === 's' ? 'period_s' : 'frequency_hz';
  const absLabel = props.unit === 's' ? 'Period (s)' : 'Frequency (Hz)';
  const cols = COLUMNS.map((c) => (c === 'frequency_hz' ? absCol : c));
  const names: Record<PickTextColumn, string> = {
    frequency_hz: 'frequency (Hz)',
    period_s: 'period (s)',
    velocity_m_s: 'velocity (m/s)',
    sd_m_s: 'standard deviation (m/s)',
    mode: 'mode number',
  };

  // Tapping a pick on the plot brings its row into view.
  useEffect(() => {
    if (!props.selectedId || !table.current) return;
    const row = table.current.querySelector<HTMLElement>(`tr[data-id="${props.selectedId}"]`);
    row?.scrollIntoView({ block: 'nearest' });
  }, [props.selectedId]);

  const focusCell = (row: number, col: number) => {
    const el = table.current?.querySelector<HTMLInputElement>(`input[data-row="${row}"][data-col="${col}"]`);
    el?.focus();
    el?.select();
  };
  /** The text now in the new row's cells, read from the screen (the keyboard may be ahead of the last render). */
  const newRowFilled = (row: number, col: number): boolean => {
    const el = table.current?.querySelector<HTMLInputElement>(`input[data-row="${row}"][data-col="${col}"]`);
    return (el?.value ?? '').trim() !== '';
  };

  const rows: { key: string; rec?: PickRecord }[] = props.picks.map((p) => ({ key: p.id, rec: p }));
  rows.push({ key: NEW_ROW });

  return (
    <section class="panel" aria-labelledby="picks-h">
      <div class="panel-head">
        <h2 id="picks-h">Picks ({props.picks.length})</h2>
        <span class="seg-label" aria-hidden="true">
          Type as
        </span>
        <div class="seg" role="group" aria-label="Enter and show picks as">
          <button type="button" aria-pressed={props.unit === 'hz'} onClick={() => props.onUnit('hz')}>
            Frequency, Hz
          </button>
          <button type="button" aria-pressed={props.unit === 's'} onClick={() => props.onUnit('s')}>
            Period, s
          </button>
        </div>
        {props.onSort ? (
          <button type="button" disabled={props.picks.length < 2} onClick={props.onSort}>
            Sort by frequency
          </button>
        ) : null}
        {props.onExport ? (
          <button type="button" disabled={props.picks.length === 0} onClick={props.onExport}>
            Export picks (CSV)
          </button>
        ) : null}
        <button type="button" disabled={!props.undo} onClick={props.onUndo}>
          {props.undo ? `Undo ${props.undo.label}` : 'Nothing to undo'}
        </button>
      </div>
      <p class="hint">
        Type picks in as: frequency, Next, velocity, Enter (the sd is optional: an empty sd uses 3 % of the velocity, common
        practice). Kind, mode: G0 is a group velocity on the fundamental mode, P1 a phase velocity on the first higher
        mode; the wave below it is L for Love, R for Rayleigh. Every change is saved on this device at once; a half-typed row waits as a draft.
      </p>
      <div class="table-wrap">
        <table class="picks" ref={table}>
          <thead>
            <tr>
              <th scope="col">No.</th>
              <th scope="col">
                <span class="long-label">{absLabel}</span>
                <span class="short-label">{props.unit === 's' ? 'T (s)' : 'f (Hz)'}</span>
              </th>
              <th scope="col">
                <span class="long-label">Velocity (m/s)</span>
                <span class="short-label">v (m/s)</span>
              </th>
              <th scope="col">sd (m/s)</th>
              <th scope="col">Kind, mode, wave</th>
              <th scope="col" aria-label="Remove"></th>
            </tr>
          </thead>
          <tbody>
            {rows.map(({ key, rec }, r) => {
              const d = props.drafts[key];
              const label = rec ? `Pick ${r + 1}` : 'New pick';
              const selected = rec && rec.id === props.selectedId;
              const kind = d?.kind ?? rec?.kind ?? 'group';
              const modeText = d?.cells.mode ?? (rec ? String(rec.mode) : '0');
              const mode = /^\d+$/.test(modeText.trim()) ? Number(modeText.trim()) : 0;
              const modes = MODES_OFFERED.includes(mode) ? MODES_OFFERED : [...MODES_OFFERED, mode].sort((a, b) => a - b);
              const wave = d?.wave ?? rec?.wave ?? 'love';
              const errId = `err-${key}`;
              /** One text cell of this row; Enter saves and moves to column `enterTo` of the next row. */
              const cellInput = (
                c: PickTextColumn,
                ci: number,
                o: { look: string; inputMode: 'decimal' | 'numeric'; invalid: boolean; placeholder?: string; enterTo: number; escapeDiscards: boolean },
              ) => (
                <input
                  class={o.look}
                  inputMode={o.inputMode}
                  enterKeyHint={rec || ci < LAST_REQUIRED ? 'next' : 'enter'}
                  autoComplete="off"
                  data-row={r}
                  data-col={ci}
                  aria-label={`${label}, ${names[c]}`}
                  aria-invalid={o.invalid ? 'true' : undefined}
                  aria-describedby={d?.error ? errId : undefined}
                  value={d?.cells[c] ?? (rec ? cellText(rec, c) : '')}
                  placeholder={o.placeholder}
                  onInput={(e) => props.onEdit(key, c, e.currentTarget.value)}
                  onChange={rec ? () => props.onCommit(key) : undefined}
                  onKeyDown={(e) => {
                    if (e.key === 'Enter') {
                      e.preventDefault();
                      if (rec) {
                        // A saved row: save it and move down the same column.
                        props.onCommit(key, true);
                        focusCell(r + 1, o.enterTo);
                        return;
                      }
                      // The new row: before the last required cell, or with a required cell still empty, Enter is "Next".
                      const complete = newRowFilled(r, 0) && newRowFilled(r, LAST_REQUIRED);
                      if (ci < LAST_REQUIRED || !complete) {
                        const next = ci < LAST_REQUIRED ? ci + 1 : !newRowFilled(r, 0) ? 0 : LAST_REQUIRED;
                        focusCell(r, next);
                        return;
                      }
                      // Complete: save it; the cursor goes to the first cell of the fresh row (this row's inputs, which stay the new row).
                      props.onCommit(key, true);
                      focusCell(r, 0);
                    } else if (o.escapeDiscards && e.key === 'Escape' && d) {
                      props.onDiscard(key);
                    }
                  }}
                />
              );
              return (
                <Fragment key={key}>
                <tr
                  data-id={rec?.id}
                  class={`${selected ? 'selected' : ''} ${d?.error ? 'bad' : ''} ${rec ? '' : 'new-row'}`}
                  onFocusOut={
                    rec
                      ? undefined
                      : (e) => {
                          // The new row is saved when focus leaves the whole row (or on Enter).
                          const to = e.relatedTarget as Node | null;
                          if (!to || !e.currentTarget.contains(to)) props.onCommit(key);
                        }
                  }
                >
                  <th scope="row">
                    {rec ? (
                      <button
                        type="button"
                        class="rowsel"
                        aria-pressed={!!selected}
                        aria-label={`Select pick ${r + 1} on the plot`}
                        onClick={() => props.onSelect(selected ? undefined : rec.id)}
                      >
                        {r + 1}
                      </button>
                    ) : (
                      <>
                        <span aria-hidden="true">+</span>
                        <span class="sr-only">New</span>
                      </>
                    )}
                  </th>
                  {cols.slice(0, 3).map((c, ci) => (
                    <td key={c}>
                      {cellInput(c, ci, {
                        look: c === 'sd_m_s' ? 'cell sd' : 'cell',
                        inputMode: 'decimal',
                        invalid: d?.errorColumn === c || (d?.errorColumn === 'frequency_hz' && c === absCol),
                        placeholder: !rec && c === 'mode' ? '0' : !rec && c === 'sd_m_s' ? '3 %' : undefined,
                        enterTo: ci,
                        escapeDiscards: true,
                      })}
                    </td>
                  ))}
                  <td>
                    <select
                      class="cell kindmode"
                      aria-label={`${label}, kind of velocity and mode`}
                      aria-invalid={d?.errorColumn === 'mode' || d?.errorColumn === 'kind' ? 'true' : undefined}
                      value={`${kind}:${mode}`}
                      onChange={(e) => {
                        const [k, m] = e.currentTarget.value.split(':');
                        props.onKind(key, k as PickKind, Number(m));
                      }}
                    >
                      {(['group', 'phase'] as const).flatMap((k) =>
                        modes.map((m) => (
                          <option key={`${k}${m}`} value={`${k}:${m}`} aria-label={`${k} velocity, mode ${m}${m === 0 ? ' (fundamental)' : ''}`}>
                            {k === 'group' ? 'G' : 'P'}
                            {m}
                          </option>
                        )),
                      )}
                    </select>
                    <select
                      class={`cell wavesel wave-${wave}`}
                      aria-label={`${label}, wave`}
                      value={wave}
                      onChange={(e) => props.onWave(key, e.currentTarget.value as PickWave)}
                    >
                      <option value="love" aria-label="Love">
                        L
                      </option>
                      <option value="rayleigh" aria-label="Rayleigh">
                        R
                      </option>
                    </select>
                  </td>
                  <td>
                    {rec ? (
                      <button type="button" class="icon" aria-label={`Remove pick ${r + 1}`} onClick={() => props.onDelete(rec.id)}>
                        <svg viewBox="0 0 24 24" width="22" height="22" aria-hidden="true">
                          <path d="M5 7h14M9 7V4h6v3M7 7l1 13h8l1-13" fill="none" stroke="currentColor" stroke-width="2" />
                        </svg>
                      </button>
                    ) : d ? (
                      <button type="button" class="icon" aria-label="Clear the new pick" onClick={() => props.onDiscard(key)}>
                        <svg viewBox="0 0 24 24" width="22" height="22" aria-hidden="true">
                          <path d="M6 6l12 12M18 6L6 18" fill="none" stroke="currentColor" stroke-width="2" />
                        </svg>
                      </button>
                    ) : null}
                  </td>
                </tr>
                {d?.error ? (
                  <tr class="row-error">
                    <td colSpan={6}>
                      <p id={errId} class="error" role="alert">
                        {d.error}
                        {rec ? (
                          <button type="button" class="link" onClick={() => props.onDiscard(key)}>
                            Show the saved values again
                          </button>
                        ) : null}
                      </p>
                    </td>
                  </tr>
                ) : null}
                </Fragment>
              );
            })}
          </tbody>
        </table>
      </div>
    </section>
  );
}

export interface ImportPanelProps {
  state: ImportState;
  onText: (text: string) => void;
  onReplace: (replace: boolean) => void;
  onImport: (text: string, source?: string) => void;
  onFile: (file: File) => void;
}

/** Paste or pick a CSV file; the core reader checks every row before anything is written, and every bad row is listed. */
export function ImportPanel(props: ImportPanelProps) {
  const s = props.state;
  const onFile = (e: Event) => {
    const input = e.currentTarget as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (file) props.onFile(file);
  };
  return (
    <section class="panel" aria-labelledby="import-h">
      <h2 id="import-h">Paste or import picks (CSV)</h2>
      <p class="hint">
        A header row names the columns, units in the names: <code>frequency_hz</code> or <code>period_s</code>,{' '}
        <code>velocity_m_s</code>, and optionally <code>sd_m_s</code>, <code>kind</code>, <code>mode</code>, <code>wave</code>. Comma or
        semicolon separated. A file with any bad row is not imported at all.
      </p>
      <label class="field">
        <span>CSV text</span>
        <textarea
          rows={4}
          value={s.text}
          spellcheck={false}
          aria-invalid={s.error ? 'true' : undefined}
          aria-describedby={s.error ? 'import-err' : undefined}
          onInput={(e) => props.onText(e.currentTarget.value)}
        />
      </label>
      <div class="row-form">
        <label class="check">
          <input type="checkbox" checked={s.replace} onChange={(e) => props.onReplace(e.currentTarget.checked)} />
          Replace the current picks
        </label>
        <button type="button" class="primary" disabled={s.text.trim() === ''} onClick={() => props.onImport(s.text)}>
          Import pasted text
        </button>
        <label class="button file">
          Choose a CSV file
          <input type="file" accept=".csv,text/csv,text/plain" class="sr-only" onChange={onFile} />
        </label>
      </div>
      {s.error && s.problems ? (
        <div id="import-err" class="error" role="alert">
          <p>{s.error}</p>
          <ul class="problem-list">
            {s.problems.map((p) => (
              <li key={p.row}>{p.message}</li>
            ))}
            {s.moreProblems ? <li>{morePickProblemsNote(s.moreProblems)}</li> : null}
          </ul>
        </div>
      ) : s.error ? (
        <p id="import-err" class="error" role="alert">
          {s.error}
        </p>
      ) : null}
      {s.info ? (
        <p class="info" role="status">
          {s.info}
        </p>
      ) : null}
    </section>
  );
}

/**
 * The app's state: one immutable object, replaced (never mutated) on every
 * change (state-hub.ts). Each concern's controller in this folder owns its
 * slices and their async work. Pure helpers here.
 */
import type { PickCells, PickKind, PickProblem, PickWave } from '../../../core/picks/picks';
import type { AnyRecord, PickRecord, RecordingRecord, SiteRecord } from '../../../core/exchange/records';
import type { SyncStatus } from '../../sync/client';
import type { AxisQuantity } from '../charts/chart-data';
import type { MisfitSlice } from '../../../core/estimate/misfit-slice';
import type { EstimateOutcome } from './compute';
import type { RecordsState } from './records-controller';
import { emptyRecordsState } from './records-state';
import type { ProfileResult } from '../../../core/profile/profile-estimate';
import type { LayeredModel } from '../../../core/dispersion/model';
import type { TrialResult } from '../../worker/model-trial';
import type { LayerRowText, PInput, WaveChoice } from './layered-form';

/** Every view of an open site (one list, so a kept place can name any of them). */
export const VIEW_NAMES = ['picks', 'records', 'estimate', 'profile', 'figures', 'whatif', 'survey', 'details'] as const;
export type ViewName = (typeof VIEW_NAMES)[number];
export type SiteSort = 'recent' | 'name' | 'date';
export type Theme = 'standard' | 'sun';

/** Text the crew has typed into a row and that is not saved yet (or failed to save). */
export interface RowDraft {
  cells: PickCells;
  kind?: PickKind;
  /** The wave chosen in the row's wave box, not saved yet. */
  wave?: PickWave;
  /** The message of the last failed check or write; the input stays on screen. */
  error?: string;
  /** The column the error is about, for aria-invalid. */
  errorColumn?: string;
  saving?: boolean;
  /** A commit asked for while this row was still saving: run it when the save ends. */
  pendingCommit?: { force: boolean };
  /** The new row's next pick, begun while the previous pick was still saving. */
  next?: boolean;
}

export interface Notice {
  id: number;
  tone: 'error' | 'info';
  text: string;
}

/** The last change, and how to take it back. */
export interface UndoEntry {
  label: string;
  revert: () => Promise<void>;
}

export interface PlotSettings {
  axis: AxisQuantity;
  xLog: boolean;
  yLog: boolean;
}

/** The what-if model: strings as typed in the number boxes are not kept; sliders give numbers. */
export interface WhatIfModel {
  h: number;
  vs1: number;
  vs2: number;
  rho1: number;
  rho2: number;
}

export interface ImportState {
  text: string;
  replace: boolean;
  error?: string;
  /** Every bad row of the last refused file when it had more than one (capped by checkPicksCsv); error then leads the list. */
  problems?: readonly PickProblem[];
  /** How many further bad rows the capped list leaves out. */
  moreProblems?: number;
  info?: string;
}

export interface SiteFormError {
  field: string;
  text: string;
}

/** What the sync panel shows (sync-controller.ts). */
export interface SyncPanelState {
  /** The sync client's status; undefined while the panel's connection opens. */
  status?: SyncStatus;
  /** The outcome of the panel's last action, in plain words. */
  message?: { tone: 'ok' | 'error'; text: string };
  /** An action of the panel is running: its buttons wait. */
  busy: boolean;
  /** Why the office address and token were not saved. */
  formError: string;
  /** Records edited in two places, waiting for a choice. */
  conflicted: readonly AnyRecord[];
  /** Site names by id, to name the site of a conflicted pick or estimate. */
  siteNames: Readonly<Record<string, string>>;
  /** The office address this page was installed from, offered in the form. */
  suggestedUrl?: string;
}

/** The open site's kept seismograph files (recordings-controller.ts). */
export interface RecordingsState {
  /** The site the list belongs to. */
  siteId?: string;
  list: readonly RecordingRecord[];
  /** A change is being saved: the buttons wait. */
  busy: boolean;
  /** Why the last change was refused (the list shows what is stored). */
  error?: string;
}

/** What a site card shows beside the site's own fields (sites-controller.ts loadFacts). */
export interface SiteFacts {
  /** Live picks. */
  picks: number;
  /** The kept estimate's thickness, when there is one. */
  thickness?: { best: number; low95: number; high95: number; openLow: boolean; openHigh: boolean };
  /** Its verdict; undefined for an estimate kept before verdicts existed. */
  verdict?: { level: 'resolved' | 'rough' | 'unresolved'; text: string };
  /** The latest change to the site or its picks, ISO time. */
  lastChange: string;
}

export interface AppState {
  ready: boolean;
  /** A failure that stops the app (the database could not open). */
  fatal?: string;
  online: boolean;
  theme: Theme;
  sites: SiteRecord[];
  /** Pick counts, thickness with verdict and last change, by site id. */
  siteFacts: Readonly<Record<string, SiteFacts>>;
  siteQuery: string;
  siteSort: SiteSort;
  openSiteId?: string;
  view: ViewName;
  /** The open site's live picks, in table order. */
  picks: PickRecord[];
  /** Unsaved row text by row key (pick id, or NEW_ROW). */
  drafts: Readonly<Record<string, RowDraft>>;
  selectedPickId?: string;
  undo?: UndoEntry;
  notices: readonly Notice[];
  plot: PlotSettings;
  whatif?: WhatIfModel;
  surveyDepth: string;
  importState: ImportState;
  siteError?: SiteFormError;
  /** Site-form text not yet saved (or refused): field name → text. */
  siteDraft: Readonly<Record<string, string>>;
  estimate: EstimateState;
  /** Set when a new version of the app is ready: calling it reloads into the new version. */
  updateReady?: () => void;
  locating: boolean;
  sync: SyncPanelState;
  /** Seismograph records of the open site, the dispersion image and its ridge (records-controller.ts). */
  records: RecordsState;
  recordings: RecordingsState;
  profile: ProfileState;
  /** The layer builder and its what-if, and the layered estimate's best-fit curves (layered-controller.ts). */
  layered: LayeredState;
}

/** A model's curves, misfit and figures from the worker, and how far that computation is. */
export interface TrialState {
  status: 'idle' | 'running' | 'done' | 'error';
  /** The model computed (or being computed). */
  model?: LayeredModel;
  /** The plot's band the curves were computed on, Hz. */
  band?: Float64Array;
  result?: TrialResult;
  error?: string;
}

/** Settings key of the What-if view's last tab (one layer or the layer builder), kept on this device. */
export const WHATIF_TAB_KEY = 'whatif.tab';

/** The layer builder of the open site (layered-controller.ts). */
export interface LayeredState {
  /** Which what-if the What-if view shows: one layer (sliders) or the layer builder. */
  tab: 'one' | 'layers';
  pInput: PInput;
  /** Rows as typed: N layers, then the half-space. */
  rows: LayerRowText[];
  waves: WaveChoice;
  /** Modes drawn per wave, from the fundamental up. */
  modes: number;
  /** One sentence per bad value; the stored model is unchanged while any stands. */
  errors: string[];
  /** Fields still empty. */
  empty: number;
  warnings: string[];
  /** Where the rows came from, or why the stored model was not changed. */
  note?: string;
  /** The kept model could not be written. */
  saveError?: string;
  /** The builder's model against the picks. */
  trial: TrialState;
  /** The layered estimate's best-fit curves, for the picks plot. */
  best: TrialState & {
    verdict?: { level: 'resolved' | 'rough' | 'unresolved'; text: string };
    layers?: number;
    /** The picks plot's caption for these curves, with the verdict (an unresolved estimate's curves are for reference only). */
    caption?: string;
  };
}

/** The layered estimate of the open site (profile-controller.ts): run on request, with progress and cancel. */
export interface ProfileState {
  status: 'idle' | 'running' | 'done' | 'error';
  /** Fraction done, 0–1, while running. */
  progress: number;
  result?: ProfileResult;
  error?: string;
  /** Layers above the half-space, or let the picks decide. */
  layers: number | 'auto';
  /** Poisson's ratio as typed ('' = the default, warned about). */
  poissonText: string;
  /** Water-table depth in m as typed ('' = none given). */
  waterTableText: string;
}

/** The estimate of the open site, as the worker last answered. */
export interface EstimateState {
  status: 'idle' | 'running' | 'done' | 'error';
  result?: EstimateOutcome;
  /** The fine misfit picture around the best fit, once the worker has drawn it up. */
  slice?: MisfitSlice;
  /** Plain-words failure (too few picks, a bad setting, a worker failure). */
  error?: string;
}

/** The key of the always-present empty row at the end of the picks table. */
export const NEW_ROW = 'new';

export const initialState: AppState = {
  ready: false,
  online: true,
  theme: 'standard',
  sites: [],
  siteFacts: {},
  siteQuery: '',
  siteSort: 'recent',
  view: 'picks',
  picks: [],
  drafts: {},
  notices: [],
  plot: { axis: 'frequency', xLog: true, yLog: false },
  surveyDepth: '30',
  importState: { text: '', replace: false },
  siteDraft: {},
  estimate: { status: 'idle' },
  locating: false,
  sync: { busy: false, formError: '', conflicted: [], siteNames: {} },
  records: emptyRecordsState(),
  recordings: { list: [], busy: false },
  profile: { status: 'idle', progress: 0, layers: 2, poissonText: '', waterTableText: '' },
  layered: {
    tab: 'one',
    pInput: 'vp',
    rows: [
      { thickness: '', vs: '', p: '', density: '' },
      { thickness: '', vs: '', p: '', density: '' },
    ],
    waves: { love: true, rayleigh: false },
    modes: 3,
    errors: [],
    empty: 0,
    warnings: [],
    trial: { status: 'idle' },
    best: { status: 'idle' },
  },
};

/** Sites matching the search text (name, crew, notes, date), in the chosen order. */
export function visibleSites(sites: readonly SiteRecord[], query: string, sort: SiteSort): SiteRecord[] {
  const q = query.trim().toLowerCase();
  const hits = q
    ? sites.filter((s) => `${s.name}\n${s.crew}\n${s.notes}\n${s.date}`.toLowerCase().includes(q))
    : [...sites];
  const by = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);
  if (sort === 'name') hits.sort((a, b) => a.name.localeCompare(b.name) || by(a.id, b.id));
  else if (sort === 'date') hits.sort((a, b) => by(b.date, a.date) || a.name.localeCompare(b.name));
  else hits.sort((a, b) => by(b.updatedAt, a.updatedAt));
  return hits;
}

/**
 * Table order after adding `incoming` picks to `old` (table order): each
 * incoming pick goes before the first pick of a higher frequency, so a table
 * in frequency order stays so, and the crew's own order of `old` is kept.
 * Returns every pick with its new position.
 */
export function mergeByFrequency<T extends { frequency: number }>(old: readonly T[], incoming: readonly T[]): T[] {
  const out = old.slice();
  const sorted = incoming.slice().sort((a, b) => a.frequency - b.frequency);
  for (const p of sorted) {
    const at = out.findIndex((q) => q.frequency > p.frequency);
    if (at < 0) out.push(p);
    else out.splice(at, 0, p);
  }
  return out;
}

/** The picks sorted by frequency, lowest first (ties keep their table order). */
export function byFrequency<T extends { frequency: number }>(picks: readonly T[]): T[] {
  return picks.slice().sort((a, b) => a.frequency - b.frequency);
}

/**
 * A pick message for hand entry: the CSV column names (velocity_m_s, sd_m_s,
 * …) become the words on the table's column headings.
 */
export function handEntryMessage(message: string): string {
  const words: Record<string, string> = {
    frequency_hz: 'frequency',
    period_s: 'period',
    velocity_m_s: 'velocity',
    sd_m_s: 'sd',
    kind: 'kind',
    mode: 'mode',
  };
  return message
    .replace(/column (frequency_hz|period_s|velocity_m_s|sd_m_s|kind|mode)\b/g, (_m, c: string) => words[c])
    .replace(/\b(frequency_hz|period_s|velocity_m_s|sd_m_s)\b/g, (_m, c: string) => words[c]);
}

/** A copy of the record map without one key. */
export function without<T>(map: Readonly<Record<string, T>>, key: string): Record<string, T> {
  const out: Record<string, T> = { ...map };
  delete out[key];
  return out;
}

/** Replaces (or appends) a record with the same id in a list, keeping the order. */
export function replaceById<T extends { id: string }>(list: readonly T[], item: T): T[] {
  const i = list.findIndex((x) => x.id === item.id);
  if (i < 0) return [...list, item];
  const out = list.slice();
  out[i] = item;
  return out;
}

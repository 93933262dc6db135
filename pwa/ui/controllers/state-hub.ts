/**
 * The one state object of the app and the things every concern shares: the
 * listeners that re-render the views, the notices, and the on-device store
 * once it is open. Each concern's controller (sites, picks, import,
 * estimate runs, settings, sync) changes only its own slice of the state
 * through `set`; the state is replaced on every change, never mutated.
 */
import type { SiteRecord } from '../../../core/exchange/records';
import type { FieldStore } from '../../store';
import { initialState, type AppState } from './app-state';

type Listener = (s: AppState) => void;

/** How long an info notice stays, ms. */
const INFO_NOTICE_MS = 6000;

/** The plain message of anything thrown. */
export function messageOf(e: unknown): string {
  if (e instanceof Error) return e.message;
  return String(e);
}

export class StateHub {
  private state: AppState = initialState;
  private listeners = new Set<Listener>();
  private noticeSeq = 0;
  /** The on-device store, once the app has opened it. */
  store?: FieldStore;

  get current(): AppState {
    return this.state;
  }

  subscribe(fn: Listener): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }

  /** Replaces the state with a patched copy and tells every listener. */
  set(patch: Partial<AppState>): void {
    this.state = { ...this.state, ...patch };
    for (const fn of this.listeners) fn(this.state);
  }

  /** The open site's record, if a site is open. */
  openSite(): SiteRecord | undefined {
    return this.state.sites.find((s) => s.id === this.state.openSiteId);
  }

  /** Shows a message (at most four at a time); info messages go by themselves. */
  notify(tone: 'error' | 'info', text: string): void {
    const id = ++this.noticeSeq;
    this.set({ notices: [...this.state.notices, { id, tone, text }].slice(-4) });
    if (tone === 'info') setTimeout(() => this.dismiss(id), INFO_NOTICE_MS);
  }

  dismiss(id: number): void {
    this.set({ notices: this.state.notices.filter((n) => n.id !== id) });
  }
}

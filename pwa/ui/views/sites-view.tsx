/**
 * The list of sites: search, sort, create, the demo site; a site opens to
 * its work. Each card shows the pick count, the kept thickness with its
 * verdict (an unresolved one as such, with a way to the survey plan) and
 * the last change, in the device's local time.
 */
import { useState } from 'preact/hooks';
import type { SiteRecord } from '../../../core/exchange/records';
import type { SiteFacts, SiteFormError, SiteSort, ViewName } from '../controllers/app-state';
import { num } from './format';
import { LEVEL_WORDS } from './verdict-text';
import { visibleSites } from '../controllers/app-state';

export interface SitesViewProps {
  sites: readonly SiteRecord[];
  facts?: Readonly<Record<string, SiteFacts>>;
  query: string;
  sort: SiteSort;
  error?: SiteFormError;
  onQuery: (q: string) => void;
  onSort: (s: SiteSort) => void;
  onCreate: (name: string) => Promise<boolean>;
  onOpen: (id: string, view?: ViewName) => void;
  onDemo: () => void;
}

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** The card's line about the thickness: never a bare number when it is not resolved. */
export function thicknessLine(f: SiteFacts): string {
  const t = f.thickness;
  if (!t) return f.picks > 0 ? 'no estimate kept yet' : 'no picks yet';
  const v = f.verdict;
  if (!v) return `H = ${num(t.best)} m (estimate kept before verdicts; open the site to judge it)`;
  if (v.level === 'unresolved') {
    if (t.openHigh && !t.openLow && Number.isFinite(t.low95)) return `H not resolved: more than ${num(t.low95)} m`;
    if (t.openLow && !t.openHigh && Number.isFinite(t.high95)) return `H not resolved: less than ${num(t.high95)} m`;
    return 'H not resolved';
  }
  return `H ${v.level === 'rough' ? '≈' : '='} ${num(t.best)} m (${LEVEL_WORDS[v.level]})`;
}

function localTime(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toLocaleString();
}

export function SitesView(props: SitesViewProps) {
  const [name, setName] = useState('');
  const shown = visibleSites(props.sites, props.query, props.sort);
  const nameError = props.error?.field === 'new-name' ? props.error.text : undefined;
  const create = async (e: Event) => {
    e.preventDefault();
    if (await props.onCreate(name)) setName('');
  };
  return (
    <div class="sites">
      <section class="panel" aria-labelledby="new-site-h">
        <h2 id="new-site-h">Start a site</h2>
        <form class="row-form" onSubmit={create}>
          <label class="field grow">
            <span>Site name</span>
            <input
              name="site-name"
              value={name}
              autoComplete="off"
              aria-invalid={nameError ? 'true' : undefined}
              aria-describedby={nameError ? 'new-site-err' : undefined}
              onInput={(e) => setName(e.currentTarget.value)}
            />
          </label>
          <button type="submit" class="primary">Create site</button>
          <button type="button" onClick={props.onDemo}>Load demo site (invented)</button>
        </form>
        {nameError ? (
          <p id="new-site-err" class="error" role="alert">
            {nameError}
          </p>
        ) : null}
      </section>

      <section class="panel" aria-labelledby="site-list-h">
        <div class="panel-head">
          <h2 id="site-list-h">Sites ({props.sites.length})</h2>
          <label class="field">
            <span>Search sites</span>
            <input type="search" value={props.query} onInput={(e) => props.onQuery(e.currentTarget.value)} />
          </label>
          <label class="field">
            <span>Order</span>
            <select value={props.sort} onChange={(e) => props.onSort(e.currentTarget.value as SiteSort)}>
              <option value="recent">Last changed first</option>
              <option value="date">Survey date, newest first</option>
              <option value="name">Name, A to Z</option>
            </select>
          </label>
        </div>
        {shown.length === 0 ? (
          <p class="empty">
            {props.sites.length === 0
              ? 'No sites yet. Create one above, or load the invented demo site to see the whole flow.'
              : 'No site matches the search.'}
          </p>
        ) : (
          <ul class="site-list">
            {shown.map((s) => {
              const f = props.facts?.[s.id];
              const level = f?.verdict?.level;
              return (
                <li key={s.id}>
                  <button type="button" class="site-card" onClick={() => props.onOpen(s.id)}>
                    <span class="site-name">{s.name || '(unnamed site)'}</span>
                    <span class="site-meta">
                      {s.date}
                      {s.crew ? ` · crew: ${s.crew}` : ''}
                      {s.location ? ` · ${s.location.lat.toFixed(5)}°, ${s.location.lon.toFixed(5)}°` : ''}
                    </span>
                    {f ? (
                      <span class="site-facts" data-testid="site-facts">
                        {plural(f.picks, 'pick', 'picks')} ·{' '}
                        <span class={level ? `verdict-word verdict-${level}` : undefined}>{thicknessLine(f)}</span> · last change{' '}
                        {localTime(f.lastChange)}
                      </span>
                    ) : null}
                    {s.notes ? <span class="site-notes">{s.notes}</span> : null}
                  </button>
                  {level && level !== 'resolved' ? (
                    <button type="button" class="link card-action" onClick={() => props.onOpen(s.id, 'survey')}>
                      Survey plan for {s.name || 'this site'}: what to change
                    </button>
                  ) : null}
                </li>
              );
            })}
          </ul>
        )}
      </section>
    </div>
  );
}

/** The list of sites: search, sort, create, the demo site; a site opens to its work. */
import { useState } from 'preact/hooks';
import type { SiteRecord } from '../../../core/exchange/records';
import type { SiteFormError, SiteSort } from '../controllers/app-state';
import { visibleSites } from '../controllers/app-state';

export interface SitesViewProps {
  sites: readonly SiteRecord[];
  query: string;
  sort: SiteSort;
  error?: SiteFormError;
  onQuery: (q: string) => void;
  onSort: (s: SiteSort) => void;
  onCreate: (name: string) => Promise<boolean>;
  onOpen: (id: string) => void;
  onDemo: () => void;
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
            {shown.map((s) => (
              <li key={s.id}>
                <button type="button" class="site-card" onClick={() => props.onOpen(s.id)}>
                  <span class="site-name">{s.name || '(unnamed site)'}</span>
                  <span class="site-meta">
                    {s.date}
                    {s.crew ? ` · crew: ${s.crew}` : ''}
                    {s.location ? ` · ${s.location.lat.toFixed(5)}°, ${s.location.lon.toFixed(5)}°` : ''}
                  </span>
                  {s.notes ? <span class="site-notes">{s.notes}</span> : null}
                </button>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}

/** A site's details: name, date, crew, notes and location. Each field saves when it changes. */
import { useState } from 'preact/hooks';
import type { SiteRecord } from '../../../core/exchange/records';
import type { SiteTextField } from '../controllers/form-text';
import type { SiteFormError } from '../controllers/app-state';

export interface SiteDetailsProps {
  site: SiteRecord;
  drafts: Readonly<Record<string, string>>;
  error?: SiteFormError;
  locating: boolean;
  onEdit: (field: SiteTextField, text: string) => void;
  onCommit: (field: SiteTextField) => void;
  onLocate: () => void;
  onDelete: () => void;
}

function textOf(site: SiteRecord, drafts: Readonly<Record<string, string>>, f: SiteTextField): string {
  const d = drafts[f];
  if (d !== undefined) return d;
  if (f === 'lat') return site.location ? String(site.location.lat) : '';
  if (f === 'lon') return site.location ? String(site.location.lon) : '';
  return site[f];
}

export function SiteDetails(props: SiteDetailsProps) {
  const [confirming, setConfirming] = useState(false);
  const { site } = props;
  const fieldOf = (f: SiteTextField) => {
    const bad = props.error && (props.error.field === f || props.error.field.endsWith(`.${f}`) || props.error.field === f);
    return {
      value: textOf(site, props.drafts, f),
      'aria-invalid': bad ? ('true' as const) : undefined,
      'aria-describedby': bad ? 'site-err' : undefined,
      onInput: (e: Event) => props.onEdit(f, (e.currentTarget as HTMLInputElement).value),
      onChange: () => props.onCommit(f),
    };
  };
  return (
    <section class="panel" aria-labelledby="details-h">
      <h2 id="details-h">Site details</h2>
      <p class="hint">Each field is saved on this device as soon as you leave it.</p>
      <div class="form-grid">
        <label class="field">
          <span>Name</span>
          <input autoComplete="off" {...fieldOf('name')} />
        </label>
        <label class="field">
          <span>Survey date (YYYY-MM-DD)</span>
          <input type="date" {...fieldOf('date')} />
        </label>
        <label class="field">
          <span>Crew</span>
          <input autoComplete="off" {...fieldOf('crew')} />
        </label>
        <label class="field wide">
          <span>Notes (kept as plain text)</span>
          <textarea rows={4} {...fieldOf('notes')} />
        </label>
      </div>
      <fieldset class="choice">
        <legend>Location (WGS 84 degrees)</legend>
        <div class="row-form">
          <label class="field">
            <span>Latitude (°)</span>
            <input inputMode="decimal" autoComplete="off" {...fieldOf('lat')} />
          </label>
          <label class="field">
            <span>Longitude (°)</span>
            <input inputMode="decimal" autoComplete="off" {...fieldOf('lon')} />
          </label>
          <button type="button" onClick={props.onLocate} disabled={props.locating}>
            {props.locating ? 'Finding position…' : "Use this device's position"}
          </button>
        </div>
        <p class="hint">
          {site.location
            ? `Stored: ${site.location.lat.toFixed(6)}°, ${site.location.lon.toFixed(6)}° (${site.location.source === 'device' ? `from the device${site.location.accuracy_m !== undefined ? `, ±${Math.round(site.location.accuracy_m)} m` : ''}` : 'typed'}).`
            : 'No location stored.'}
        </p>
      </fieldset>
      {props.error && !props.error.field.startsWith('set') ? (
        <p id="site-err" class="error" role="alert">
          {props.error.text} Your input is kept on screen.
        </p>
      ) : null}
      <div class="danger">
        {confirming ? (
          <>
            <p>Delete this site and all its picks? The deletion is kept for the office sync.</p>
            <button type="button" class="bad" onClick={props.onDelete}>
              Yes, delete the site
            </button>
            <button type="button" onClick={() => setConfirming(false)}>
              Keep it
            </button>
          </>
        ) : (
          <button type="button" onClick={() => setConfirming(true)}>
            Delete this site…
          </button>
        )}
      </div>
    </section>
  );
}

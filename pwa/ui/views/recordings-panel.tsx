/**
 * The seismograph files kept with the open site: name, format, traces and
 * size, whether this device holds the raw file, deleting one (asked twice),
 * and the site's choice whether raw files go to the office and into
 * bundles (the records themselves always travel).
 */
import { useState } from 'preact/hooks';
import type { RecordingsState } from '../controllers/app-state';
import type { RecordingsController } from '../controllers/recordings-controller';
import { sizeText } from '../../store/recordings';

export interface RecordingsPanelProps {
  state: RecordingsState;
  recordings: RecordingsController;
}

const FORMAT_NAMES = { segy: 'SEG-Y', seg2: 'SEG-2', csv: 'CSV traces' } as const;

export function RecordingsPanel({ state, recordings }: RecordingsPanelProps) {
  const [confirming, setConfirming] = useState<string>();
  const { list, busy } = state;
  const attach = list.some((r) => r.attach);
  const total = list.reduce((s, r) => s + r.byteLength, 0);
  return (
    <section class="panel" aria-labelledby="recordings-h">
      <h2 id="recordings-h">Seismograph files ({list.length})</h2>
      <label class="check">
        <input
          type="checkbox"
          checked={attach}
          disabled={busy || list.length === 0}
          onChange={(e) => void recordings.setAttach(e.currentTarget.checked)}
        />
        <span>Send the raw files to the office and put them in bundles</span>
      </label>
      <p class="hint">
        {list.length === 0
          ? 'No seismograph file is kept with this site yet; the choice applies once one is.'
          : attach
            ? `The raw files (${sizeText(total)}) travel with the site. A file too large for one sync request stays on this device; its record still travels.`
            : 'Only the records (name, size, geometry) travel; the raw files stay on this device.'}
      </p>
      {state.error ? (
        <p class="error" role="alert">
          {state.error}
        </p>
      ) : null}
      {list.length > 0 ? (
        <div class="table-wrap">
          <table>
            <caption class="sr-only">Seismograph files kept with this site</caption>
            <thead>
              <tr>
                <th scope="col">File</th>
                <th scope="col">Format</th>
                <th scope="col">Traces × samples</th>
                <th scope="col">Size</th>
                <th scope="col">Added</th>
                <th scope="col">
                  <span class="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {list.map((r) => (
                <tr key={r.id} data-testid="recording-row">
                  <th scope="row">{r.name}</th>
                  <td>{FORMAT_NAMES[r.format]}</td>
                  <td>
                    {r.geometry.traces} × {r.geometry.samples}
                  </td>
                  <td>{sizeText(r.byteLength)}</td>
                  <td>{new Date(r.addedAt).toLocaleString()}</td>
                  <td>
                    {confirming === r.id ? (
                      <>
                        <button type="button" class="bad" disabled={busy} onClick={() => void recordings.remove(r.id)}>
                          Yes, delete {r.name}
                        </button>
                        <button type="button" onClick={() => setConfirming(undefined)}>
                          Keep it
                        </button>
                      </>
                    ) : (
                      <button type="button" disabled={busy} onClick={() => setConfirming(r.id)}>
                        Delete…
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </section>
  );
}

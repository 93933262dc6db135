/**
 * The records view: a seismograph file from the device (or the invented
 * demo record), its geometry with the overrides the crew may need to give,
 * the dispersion image with the site's picks and best-fit curves over it,
 * the followed ridge's points (trim, delete, mode) and "Add to picks".
 */
import { bestFitCaption } from './verdict-text';
import { useEffect } from 'preact/hooks';
import { CAUTION } from '../../../core/shared/caution';
import { MARGINAL } from '../../../core/signal/image';
import type { LayeredModel } from '../../../core/dispersion/model';
import type { PickRecord } from '../../../core/exchange/records';
import type { EstimateState, PlotSettings } from '../controllers/app-state';
import type { RecordsController, RecordsState } from '../controllers/records-controller';
import type { RidgeController } from '../controllers/ridge-controller';
import { DispersionImageCanvas } from '../charts/dispersion-image';
import { PICK_SHAPE_GLYPH, pickShape } from '../charts/curve-style';
import type { ComputedCurves } from '../charts/chart-data';
import '../styles/records.css';

export interface RecordsViewProps {
  siteId: string;
  state: RecordsState;
  /** Ids of the site's files still kept in the store (a file deleted under Site details leaves this view too); undefined until listed. */
  keptIds?: ReadonlySet<string>;
  picks: readonly PickRecord[];
  model?: LayeredModel;
  estimate: EstimateState;
  /** The layered estimate's best-fit curves (Love and/or Rayleigh), drawn on the image instead of the one-layer model's; `unsupported`: thin and faint. */
  layered?: ComputedCurves & { unsupported?: boolean };
  /** The layered best fit's caption (verdict words; "for reference only" when not resolved). */
  layeredCaption?: string;
  plot: PlotSettings;
  theme: string;
  /** The files: reading, keeping, geometry. */
  records: RecordsController;
  /** The image, the ridge and the picks from it. */
  ridge: RidgeController;
  onPlot: (patch: Partial<PlotSettings>) => void;
}

const fmt = (x: number, digits = 3) => String(Number(x.toPrecision(digits)));

/** The line styles of the layered best fit's waves, in words (the image shows one kind of velocity). */
function layeredKey(c: ComputedCurves): string {
  const waves = new Set(c.curves.map((w) => w.wave));
  const parts: string[] = [];
  if (waves.has('love')) parts.push('Love: mode colours, solid for group velocity, dashed for phase');
  if (waves.has('rayleigh')) parts.push('Rayleigh: its own colour, dash-dot for phase velocity, dash-dot-dot for group');
  return `— Layered best-fit curves (${parts.join('; ')}).`;
}

/** The key of the picks on the image: the picks plot's shapes for the image's kind (charts/curve-style.ts). */
export function picksKey(kind: 'phase' | 'group'): string {
  const glyph = (wave: 'love' | 'rayleigh') => PICK_SHAPE_GLYPH[pickShape(wave, kind)];
  return `The site's ${kind} picks: ${glyph('love')} Love, ${glyph('rayleigh')} Rayleigh.`;
}

export function RecordsView(p: RecordsViewProps) {
  const s = p.state;
  const list = s.list.filter((r) => r.siteId === p.siteId && (!r.stored || !p.keptIds || p.keptIds.has(r.id)));
  const rec = list.find((r) => r.id === s.openId);
  const g = rec?.recording;
  const ridge = s.ridge;
  const range = s.range;
  const busy = s.status === 'reading' || s.status === 'imaging' || s.status === 'following';
  const result = p.estimate.result;
  useEffect(() => {
    void p.records.loadStored(p.siteId);
  }, [p.siteId]);
  return (
    <section class="panel records" aria-labelledby="records-h">
      <div class="panel-head">
        <h2 id="records-h">Seismograph records</h2>
      </div>
      <p class="hint">
        Read a SEG-Y, SEG-2 or CSV-traces file from this device, see its dispersion image, tap a bright ridge, and add its points to the picks.
        Files are kept with the site on this device; geometry you type is used for this session.
      </p>
      <div class="record-actions">
        <label class="file-pick">
          Import a record from this device
          <input
            type="file"
            accept=".sgy,.segy,.sg2,.seg2,.dat,.csv,.txt"
            onChange={(e) => {
              const input = e.currentTarget;
              const file = input.files?.[0];
              if (file) void p.records.importFile(file);
              input.value = '';
            }}
          />
        </label>
        <button type="button" onClick={() => void p.records.loadDemo()}>
          Try the invented demo record
        </button>
      </div>
      {list.length > 1 || (list.length === 1 && list[0].id !== s.openId) ? (
        <div class="seg" role="group" aria-label="Records of this site">
          {list.map((r) => (
            <button type="button" key={r.id} aria-pressed={r.id === s.openId} onClick={() => void p.records.select(r.id)}>
              {r.invented ? `${r.name} (invented)` : r.name}
            </button>
          ))}
        </div>
      ) : null}
      {s.error ? (
        <p class="error" role="alert">
          {s.error}
        </p>
      ) : null}
      {busy ? (
        <p class="status" role="status">
          {s.status === 'reading' ? 'Reading the record…' : s.status === 'imaging' ? 'Computing the dispersion image…' : 'Following the ridge…'}
        </p>
      ) : null}
      {rec ? (
        <>
          <h3>
            {rec.name}
            {rec.invented ? <span class="invented-tag"> INVENTED (synthetic demo, not a real survey)</span> : null}
          </h3>
          <p class="hint">
            {rec.invented ? 'Made on this device for trying the app; not stored.' : rec.stored ? 'Kept with this site on this device.' : 'Open for this session only (not saved on this device).'}{' '}
            <button type="button" onClick={() => void p.records.remove()}>
              Remove this record
            </button>
          </p>
          {g ? (
            <table class="geometry">
              <caption>Geometry as read{s.overrides.first || s.overrides.delay ? ' with your values' : ''}</caption>
              <tbody>
                <tr>
                  <th scope="row">Format</th>
                  <td>{g.format === 'segy' ? 'SEG-Y' : g.format === 'seg2' ? 'SEG-2' : rec.invented ? 'synthetic (invented)' : 'CSV traces'}</td>
                </tr>
                <tr>
                  <th scope="row">Traces × samples</th>
                  <td>
                    {g.traces.length} × {g.samples}, every {fmt(g.sampleInterval * 1000)} ms ({fmt(g.samples * g.sampleInterval)} s)
                  </td>
                </tr>
                <tr>
                  <th scope="row">First sample after the source</th>
                  <td>{fmt(g.delay)} s</td>
                </tr>
                <tr>
                  <th scope="row">Offsets</th>
                  <td>
                    {g.offsets.length === 1
                      ? `${fmt(g.offsets[0])} m`
                      : `${fmt(g.offsets[0])} m to ${fmt(g.offsets[g.offsets.length - 1])} m (${g.offsets.length} receivers)`}
                  </td>
                </tr>
                <tr>
                  <th scope="row">Component</th>
                  <td>{g.component}</td>
                </tr>
              </tbody>
            </table>
          ) : null}
          {rec.askFor.length > 0 ? (
            <ul class="ask" role="alert">
              {rec.askFor.map((a) => (
                <li key={a}>{a}</li>
              ))}
            </ul>
          ) : null}
          {rec.warnings.map((w) => (
            <p key={w} class="hint">
              {w}
            </p>
          ))}
          <fieldset class="overrides">
            <legend>Geometry the file lacks or gets wrong</legend>
            <label>
              First receiver's offset (m)
              <input inputMode="decimal" value={s.overrides.first} onInput={(e) => p.records.setOverride('first', e.currentTarget.value)} />
            </label>
            <label>
              Receiver spacing (m)
              <input inputMode="decimal" value={s.overrides.spacing} onInput={(e) => p.records.setOverride('spacing', e.currentTarget.value)} />
            </label>
            <label>
              Trigger delay (s)
              <input inputMode="decimal" value={s.overrides.delay} onInput={(e) => p.records.setOverride('delay', e.currentTarget.value)} />
            </label>
            <button type="button" onClick={() => void p.records.applyOverrides()}>
              Use this geometry
            </button>
          </fieldset>
          {g ? (
            <div class="image-controls">
              <div class="seg" role="group" aria-label="Image method">
                <button
                  type="button"
                  aria-pressed={s.method === 'phase-shift'}
                  disabled={g.traces.length < 2}
                  onClick={() => void p.ridge.setMethod('phase-shift')}
                >
                  Phase velocity (all traces)
                </button>
                <button type="button" aria-pressed={s.method === 'multiple-filter'} onClick={() => void p.ridge.setMethod('multiple-filter')}>
                  Group velocity (one trace)
                </button>
              </div>
              {s.method === 'multiple-filter' && g.traces.length > 1 ? (
                <label>
                  Trace
                  <select
                    value={s.trace === undefined ? '' : String(s.trace)}
                    onChange={(e) => void p.ridge.setTrace(e.currentTarget.value === '' ? undefined : Number(e.currentTarget.value))}
                  >
                    <option value="">farthest</option>
                    {Array.from(g.offsets, (x, k) => (
                      <option key={k} value={String(k)}>
                        {k + 1} ({fmt(x)} m)
                      </option>
                    ))}
                  </select>
                </label>
              ) : null}
              <div class="seg" role="group" aria-label="Horizontal axis quantity">
                <button type="button" aria-pressed={p.plot.axis === 'frequency'} onClick={() => p.onPlot({ axis: 'frequency' })}>
                  Frequency (Hz)
                </button>
                <button type="button" aria-pressed={p.plot.axis === 'period'} onClick={() => p.onPlot({ axis: 'period' })}>
                  Period (s)
                </button>
              </div>
            </div>
          ) : null}
          {s.image ? (
            <figure class="image-figure">
              <DispersionImageCanvas
                image={s.image}
                ridge={ridge}
                range={range}
                removed={s.removed}
                picks={p.picks}
                model={p.model}
                computed={p.layered}
                settings={p.plot}
                theme={p.theme}
                onTap={(f, v) => void p.ridge.tap(f, v)}
                onDragEnd={(end, f) => p.ridge.dragEnd(end, f)}
              />
              <figcaption>
                <span class="key key-ridge">◆ ridge points</span> <span class="key" data-testid="record-pick-key">{picksKey(s.image.method === 'phase-shift' ? 'phase' : 'group')}</span>{' '}
                {p.layered ? (
                  <span class="key" data-testid="record-layered-fit" data-unsupported={String(!!p.layered.unsupported)}>
                    {layeredKey(p.layered)} {p.layeredCaption} {CAUTION}
                  </span>
                ) : result ? (
                  <span
                    class="key"
                    data-testid="record-fit"
                    data-low95={String(result.thickness.low95)}
                    data-high95={String(result.thickness.high95)}
                  >
                    - - {bestFitCaption(result.thickness, result.verdict)} {CAUTION}
                  </span>
                ) : (
                  <span class="key">Best-fit curves appear once the site has an estimate.</span>
                )}
                <ul class="image-notes">
                  {s.image.notes.map((n) => (
                    <li key={n}>{n}</li>
                  ))}
                  <li>Grey areas are unreliable and washed-out areas marginal; the picker stops at them.</li>
                </ul>
              </figcaption>
            </figure>
          ) : null}
          {s.image ? (
            <p>
              <button type="button" onClick={() => void p.ridge.followStrongest()}>
                Follow the strongest ridge
              </button>{' '}
              <span class="hint">or tap a ridge on the image.</span>
            </p>
          ) : null}
          {s.ridgeNote ? (
            <p class="status" role="status">
              {s.ridgeNote}
            </p>
          ) : null}
          {ridge && range && ridge.velocity.length > 0 ? (
            <div class="ridge">
              <p class="hint">Drag a ringed end along the ridge to trim it; delete single points below.</p>
              <label>
                Mode (0 = fundamental)
                <input inputMode="numeric" value={s.mode} onInput={(e) => p.ridge.setMode(e.currentTarget.value)} />
              </label>
              <div class="ridge-scroll" tabIndex={0} role="region" aria-label="Ridge points">
              <table class="ridge-points">
                <caption>Ridge points ({s.image?.method === 'phase-shift' ? 'phase' : 'group'} velocity)</caption>
                <thead>
                  <tr>
                    <th scope="col">Frequency (Hz)</th>
                    <th scope="col">Velocity (m/s)</th>
                    <th scope="col">sd (m/s)</th>
                    <th scope="col">Band</th>
                    <th scope="col">
                      <span class="sr-only">Delete</span>
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {Array.from(ridge.velocity, (v, k) => {
                    if (k < range[0] || k > range[1]) return null;
                    const gone = s.removed.includes(k);
                    return (
                      <tr key={k} class={gone ? 'removed' : ''}>
                        <td>{fmt(ridge.frequency[k], 4)}</td>
                        <td>{fmt(v, 4)}</td>
                        <td>{fmt(ridge.sd[k], 2)}</td>
                        <td>{ridge.level[k] === MARGINAL ? 'marginal' : 'reliable'}</td>
                        <td>
                          <button type="button" onClick={() => p.ridge.togglePoint(k)}>
                            {gone ? 'Restore' : 'Delete'}
                          </button>
                        </td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
              </div>
              <button type="button" class="primary" onClick={() => void p.ridge.addToPicks()}>
                Add to picks
              </button>
            </div>
          ) : null}
        </>
      ) : null}
    </section>
  );
}

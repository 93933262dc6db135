/**
 * The layered estimate: its settings (number of layers or let the picks
 * decide, Poisson's ratio and water-table depth for Rayleigh picks), a run
 * button with a progress bar and cancel, and the result: the verdict, the
 * profile picture (shear speed against depth with the 68 % and 95 % bands,
 * the depth of investigation marked and the band below it shown as not
 * measured), Vs30 with its range and the site classes, the layers with
 * their intervals, the misfit of each number of layers, other layerings,
 * the warnings and the caution. The numbers all come from core/profile.
 */
import type { ProfileResult } from '../../../core/profile/profile-estimate';
import { profileVerdict } from '../../../core/profile/profile-verdict';
import { DEFAULT_POISSON, WATER_P_SPEED } from '../../../core/profile/p-speed';
import type { ProfileState } from '../controllers/app-state';
import { Caution } from './estimate-view';
import { num, span } from './format';

export interface ProfileViewProps {
  profile: ProfileState;
  pickCount: number;
  rayleighCount: number;
  onSettings: (patch: Partial<{ layers: number | 'auto'; poissonText: string; waterTableText: string }>) => void;
  onRun: () => void;
  onCancel: () => void;
}

const W = 360;
const H = 420;
const M = { left: 54, right: 14, top: 30, bottom: 34 };

/** Round tick values covering [0, max]: 4–6 of them. */
function ticks(max: number): number[] {
  const raw = max / 5;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * p).find((s) => s >= raw) ?? raw;
  const out: number[] = [];
  for (let t = 0; t <= max + 1e-9; t += step) out.push(t);
  return out;
}

/** Shear speed against depth, with the 68/95 % bands and the depth of investigation. */
export function ProfileChart({ r }: { r: ProfileResult }) {
  const b = r.band;
  const n = b.depth.length;
  const zMax = b.depth[n - 1];
  let vMax = 0;
  for (let i = 0; i < n; i++) vMax = Math.max(vMax, i < b.belowFrom ? b.high95[i] : b.best[i]);
  vMax *= 1.15;
  const x = (v: number) => M.left + (Math.min(v, vMax) / vMax) * (W - M.left - M.right);
  const y = (z: number) => M.top + (z / zMax) * (H - M.top - M.bottom);
  const above = Math.max(1, Math.min(n, b.belowFrom));
  const band = (lo: Float64Array, hi: Float64Array) => {
    const pts: string[] = [];
    for (let i = 0; i < above; i++) pts.push(`${x(lo[i]).toFixed(1)},${y(b.depth[i]).toFixed(1)}`);
    for (let i = above - 1; i >= 0; i--) pts.push(`${x(hi[i]).toFixed(1)},${y(b.depth[i]).toFixed(1)}`);
    return pts.join(' ');
  };
  const best: string[] = [];
  for (let i = 0; i < n; i++) {
    if (i > 0 && b.best[i] !== b.best[i - 1]) best.push(`${x(b.best[i - 1]).toFixed(1)},${y(b.depth[i]).toFixed(1)}`);
    best.push(`${x(b.best[i]).toFixed(1)},${y(b.depth[i]).toFixed(1)}`);
  }
  const doi = r.depthOfInvestigation;
  const doiY = y(Math.min(doi, zMax));
  const summary =
    `Shear speed against depth: best fit with 68 % and 95 % bands down to the depth of investigation, about ${num(doi)} m; ` +
    `below it the picks do not constrain the speeds.`;
  return (
    <svg class="profile-chart" viewBox={`0 0 ${W} ${H}`} role="img" aria-label={summary} data-testid="profile-chart">
      <defs>
        <pattern id="unmeasured" width="8" height="8" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
          <line x1="0" y1="0" x2="0" y2="8" class="hatch" />
        </pattern>
      </defs>
      {ticks(vMax).map((t) => (
        <g key={`v${t}`}>
          <line class="grid" x1={x(t)} x2={x(t)} y1={M.top} y2={H - M.bottom} />
          <text class="tick" x={x(t)} y={M.top - 8} text-anchor="middle">
            {num(t)}
          </text>
        </g>
      ))}
      {ticks(zMax).map((t) => (
        <g key={`z${t}`}>
          <line class="grid" x1={M.left} x2={W - M.right} y1={y(t)} y2={y(t)} />
          <text class="tick" x={M.left - 6} y={y(t) + 4} text-anchor="end">
            {num(t)}
          </text>
        </g>
      ))}
      <text class="axis-label" x={(M.left + W - M.right) / 2} y={12} text-anchor="middle">
        Shear speed (m/s)
      </text>
      <text class="axis-label" x={14} y={(M.top + H - M.bottom) / 2} text-anchor="middle" transform={`rotate(-90 14 ${(M.top + H - M.bottom) / 2})`}>
        Depth (m)
      </text>
      <polygon class="band95" points={band(b.low95, b.high95)} />
      <polygon class="band68" points={band(b.low68, b.high68)} />
      {doi < zMax ? (
        <>
          <rect class="unmeasured" x={M.left} y={doiY} width={W - M.left - M.right} height={H - M.bottom - doiY} fill="url(#unmeasured)" />
          <line class="doi" x1={M.left} x2={W - M.right} y1={doiY} y2={doiY} />
          <text class="doi-label" x={W - M.right - 4} y={doiY - 5} text-anchor="end">
            depth of investigation ≈ {num(doi)} m
          </text>
          <text class="doi-label" x={W - M.right - 4} y={Math.min(H - M.bottom - 6, doiY + 16)} text-anchor="end">
            below: not measured
          </text>
        </>
      ) : null}
      <polyline class="best" points={best.join(' ')} />
      <line class="vs30" x1={M.left} x2={W - M.right} y1={y(30)} y2={y(30)} />
      <text class="doi-label" x={M.left + 4} y={y(30) - 5}>
        30 m
      </text>
    </svg>
  );
}

function Interval(props: { iv: { best: number; low68: number; high68: number; low95: number; high95: number }; unit: string }) {
  const v = props.iv;
  return (
    <>
      <strong>{num(v.best)}</strong> {props.unit}
      <span class="sub">
        {' '}
        (68 %: {span(v.low68, v.high68)}; 95 %: {span(v.low95, v.high95)})
      </span>
    </>
  );
}

function Result({ r }: { r: ProfileResult }) {
  const verdict = profileVerdict(r);
  return (
    <div class="result" data-testid="profile-result">
      <p class={`verdict ${verdict.level}`} data-testid="profile-verdict" data-level={verdict.level}>
        <strong>{verdict.level === 'resolved' ? 'Resolved' : verdict.level === 'rough' ? 'Rough' : 'Not resolved'}:</strong> {verdict.text}
      </p>
      <Caution />
      <div class="profile-split">
        <ProfileChart r={r} />
        <div>
          <p class="headline" data-testid="profile-vs30">
            Vs30 <Interval iv={r.vs30} unit="m/s" />
          </p>
          <p class="hint">
            Site classes over the ensemble: EN 1998-1 {r.siteClasses.en1998_1.classes.join(' or ')}; ASCE/SEI 7-16{' '}
            {r.siteClasses.asce7_16.classes.join(' or ')}; ASCE/SEI 7-22 {r.siteClasses.asce7_22.classes.join(' or ')}.
          </p>
          <div class="table-wrap">
            <table class="params">
              <caption>
                {r.layers} layer{r.layers > 1 ? 's' : ''} over a half-space ({r.waves.love} Love, {r.waves.rayleigh} Rayleigh picks)
              </caption>
              <thead>
                <tr>
                  <th scope="col">Layer</th>
                  <th scope="col">Thickness</th>
                  <th scope="col">Shear speed</th>
                </tr>
              </thead>
              <tbody>
                {r.profile.layers.map((l, j) => (
                  <tr key={j}>
                    <th scope="row">{j + 1}</th>
                    <td>
                      <Interval iv={l.thickness} unit="m" />
                      {l.thickness.resolved ? null : <span class="flag"> not resolved</span>}
                    </td>
                    <td>
                      <Interval iv={l.vs} unit="m/s" />
                      {l.vs.resolved ? null : <span class="flag"> not resolved</span>}
                    </td>
                  </tr>
                ))}
                <tr>
                  <th scope="row">Half-space</th>
                  <td>–</td>
                  <td>
                    <Interval iv={r.profile.halfspace.vs} unit="m/s" />
                    {r.profile.halfspace.vs.resolved ? null : <span class="flag"> not resolved</span>}
                  </td>
                </tr>
              </tbody>
            </table>
          </div>
          <div class="table-wrap">
            <table class="params">
              <caption>Misfit of each number of layers tried (recommended: {r.choice.recommended})</caption>
              <thead>
                <tr>
                  <th scope="col">Layers</th>
                  <th scope="col">χ²</th>
                  <th scope="col">BIC</th>
                </tr>
              </thead>
              <tbody>
                {r.choice.tried.map((c) => (
                  <tr key={c.layers}>
                    <th scope="row">{c.layers}</th>
                    <td>{num(c.chi2)}</td>
                    <td>{num(c.bic)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p class="hint">{r.choice.criterion}</p>
        </div>
      </div>
      {r.alternatives.length > 0 ? (
        <>
          <h3>Other layerings that fit</h3>
          <ul class="plain">
            {r.alternatives.map((a, i) => (
              <li key={i}>
                {a.layers} layer{a.layers > 1 ? 's' : ''}: thicknesses {a.thickness.map((h) => num(h)).join(', ')} m; speeds{' '}
                {a.vs.map((v) => num(v)).join(', ')} m/s over {num(a.halfspaceVs)} m/s; Δχ² = {num(a.deltaChi2, 2)}
              </li>
            ))}
          </ul>
        </>
      ) : null}
      <h3>What the picks cannot tell</h3>
      <ul class="plain diag">
        {r.warnings.map((w, i) => (
          <li key={i}>{w}</li>
        ))}
      </ul>
      <p class="hint">{r.method}</p>
    </div>
  );
}

export function ProfileView(props: ProfileViewProps) {
  const p = props.profile;
  const running = p.status === 'running';
  return (
    <div class="estimate">
      <section class="panel" aria-labelledby="layers-h">
        <h2 id="layers-h">Layered profile settings</h2>
        <p class="hint">
          Estimates 1–4 layers over a half-space from Love and Rayleigh picks. Rayleigh waves also depend on the P speed: give Poisson's ratio
          (default {DEFAULT_POISSON}, an assumption the result warns about) and, if known, the water-table depth (below it the P speed is at
          least {WATER_P_SPEED} m/s).
        </p>
        <div class="settings-grid">
          <label class="field">
            <span>Number of layers</span>
            <select
              value={String(p.layers)}
              disabled={running}
              onChange={(e) => props.onSettings({ layers: e.currentTarget.value === 'auto' ? 'auto' : Number(e.currentTarget.value) })}
            >
              <option value="1">1 layer</option>
              <option value="2">2 layers</option>
              <option value="3">3 layers</option>
              <option value="4">4 layers</option>
              <option value="auto">Let the picks decide</option>
            </select>
          </label>
          <label class="field">
            <span>Poisson's ratio</span>
            <input
              inputMode="decimal"
              value={p.poissonText}
              placeholder={String(DEFAULT_POISSON)}
              disabled={running}
              onInput={(e) => props.onSettings({ poissonText: e.currentTarget.value })}
            />
          </label>
          <label class="field">
            <span>Water-table depth (m)</span>
            <input
              inputMode="decimal"
              value={p.waterTableText}
              placeholder="not known"
              disabled={running}
              onInput={(e) => props.onSettings({ waterTableText: e.currentTarget.value })}
            />
          </label>
        </div>
        {props.rayleighCount === 0 ? <p class="hint">All picks are Love picks: the P-speed settings do not change the result.</p> : null}
      </section>
      <section class="panel" aria-labelledby="profile-h">
        <div class="panel-head">
          <h2 id="profile-h">Layered profile</h2>
          <button type="button" class="primary" disabled={running || props.pickCount === 0} onClick={props.onRun}>
            Estimate the profile
          </button>
          {running ? (
            <button type="button" onClick={props.onCancel}>
              Cancel
            </button>
          ) : null}
        </div>
        {running ? (
          <p class="status" role="status">
            <label>
              Computing in the background… {Math.round(p.progress * 100)} %{' '}
              <progress max={1} value={p.progress} data-testid="profile-progress" />
            </label>
          </p>
        ) : null}
        {p.error ? (
          <p class="error" role="alert">
            {p.error}
          </p>
        ) : null}
        {p.result ? (
          <div class={running ? 'stale' : undefined}>
            {running ? <p class="hint">The result below is from the last run.</p> : null}
            <Result r={p.result} />
          </div>
        ) : !running ? (
          <>
            <p class="status">{props.pickCount === 0 ? 'Enter picks first.' : 'Choose the settings and press “Estimate the profile”.'}</p>
            <Caution />
          </>
        ) : null}
      </section>
    </div>
  );
}

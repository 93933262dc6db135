/**
 * A one-page site summary the crew can print or save as PDF from the tablet
 * (the browser's print dialog also shares on most tablets): the site, the
 * thickness with its verdict and intervals, the site figures, a small plot of
 * the picks with the best-fit curves, the picks, the layer builder's model
 * when the site has one (typed by the crew, not fitted), and the caution. Built with
 * DOM calls only (text is set as text, never parsed as markup), in a page of
 * its own, so it works offline.
 */
import { CAUTION } from '../../../core/shared/caution';
import type { EstimateResult } from '../../../core/estimate/estimate';
import type { PickRecord, SiteLayeredModel, SiteRecord } from '../../../core/exchange/records';
import { poissonRatio } from '../../../core/dispersion/model';
import type { SiteFigures } from '../../../core/site/site';
import { curveColumns, curveKeysOf, plotBand } from '../charts/chart-data';
import { num } from './format';
import { LEVEL_WORDS } from './verdict-text';

const STYLE = `
body { font: 12pt/1.35 system-ui, sans-serif; color: #111; margin: 12mm; }
h1 { font-size: 16pt; margin: 0 0 2mm; } h2 { font-size: 12pt; margin: 5mm 0 1mm; }
.meta { color: #333; margin: 0 0 3mm; }
.verdict { border: 1.5pt solid #111; border-left-width: 5pt; padding: 2mm 3mm; }
.verdict.unresolved { border-style: dashed; border-left-style: solid; }
.caution { border: 1.5pt solid #111; padding: 2mm 3mm; margin-top: 4mm; background: #fff3c4; }
table { border-collapse: collapse; font-size: 10pt; } td, th { border-bottom: 0.5pt solid #999; padding: 1pt 6pt 1pt 0; text-align: left; }
.cols { display: flex; gap: 6mm; align-items: flex-start; } .cols > * { flex: 1 1 0; min-width: 0; }
svg { width: 100%; height: auto; border: 0.5pt solid #999; }
@media print { button { display: none; } }
`;

/** The picks and best-fit curves as a small SVG (log frequency across, velocity up). */
function plotSvg(doc: Document, picks: readonly PickRecord[], r: EstimateResult | undefined): SVGSVGElement {
  const NS = 'http://www.w3.org/2000/svg';
  const W = 420;
  const H = 240;
  const L = 44;
  const B = 28;
  const svg = doc.createElementNS(NS, 'svg');
  svg.setAttribute('viewBox', `0 0 ${W} ${H}`);
  svg.setAttribute('role', 'img');
  svg.setAttribute('aria-label', 'Picks (dots, ± 1 sd) and best-fit curves: velocity in m/s against frequency in Hz, log scale');
  const band = plotBand(picks);
  let curves: { x: Float64Array; y: Float64Array[] } | undefined;
  if (r) {
    const model = { layers: [{ thickness: r.thickness.best, vs: r.vs1.best, density: r.density1 }], halfspace: { vs: r.vs2.best, density: r.density2 } };
    try {
      curves = curveColumns(model, band, curveKeysOf(picks), 'frequency');
    } catch {
      curves = undefined;
    }
  }
  const xs = picks.map((p) => p.frequency);
  const ys = picks.flatMap((p) => [p.velocity - (p.sd ?? 0), p.velocity + (p.sd ?? 0)]);
  for (const col of curves?.y ?? []) for (const v of col) if (Number.isFinite(v)) ys.push(v);
  const f0 = Math.min(...xs, band[0]);
  const f1 = Math.max(...xs, band[band.length - 1]);
  const v0 = Math.min(...ys) * 0.95;
  const v1 = Math.max(...ys) * 1.05;
  const px = (f: number) => L + ((Math.log(f) - Math.log(f0)) / (Math.log(f1) - Math.log(f0) || 1)) * (W - L - 8);
  const py = (v: number) => H - B - ((v - v0) / (v1 - v0 || 1)) * (H - B - 8);
  const add = (name: string, attrs: Record<string, string>, text?: string) => {
    const el = doc.createElementNS(NS, name);
    for (const [k, v] of Object.entries(attrs)) el.setAttribute(k, v);
    if (text !== undefined) el.textContent = text;
    svg.append(el);
  };
  add('rect', { x: String(L), y: '8', width: String(W - L - 8), height: String(H - B - 8), fill: 'none', stroke: '#111' });
  for (const col of curves?.y ?? []) {
    let d = '';
    col.forEach((v, i) => {
      if (!Number.isFinite(v)) return;
      d += `${d && Number.isFinite(col[i - 1]) ? 'L' : 'M'}${px(curves!.x[i]).toFixed(1)},${py(v).toFixed(1)}`;
    });
    if (d) add('path', { d, fill: 'none', stroke: '#1f4fa0', 'stroke-width': '1.5' });
  }
  for (const p of picks) {
    const x = px(p.frequency);
    const sd = p.sd ?? 0;
    add('line', { x1: String(x), x2: String(x), y1: String(py(p.velocity - sd)), y2: String(py(p.velocity + sd)), stroke: '#111' });
    add('circle', { cx: String(x), cy: String(py(p.velocity)), r: '2.5', fill: p.kind === 'phase' ? '#fff' : '#111', stroke: '#111' });
  }
  add('text', { x: String((L + W) / 2), y: String(H - 6), 'text-anchor': 'middle', 'font-size': '11' }, `Frequency (Hz, log), ${num(f0)}–${num(f1)} Hz`);
  add('text', { x: '4', y: '16', 'font-size': '11' }, `${num(v1)} m/s`);
  add('text', { x: '4', y: String(H - B), 'font-size': '11' }, `${num(v0)} m/s`);
  return svg;
}

/** The columns of the layer builder's model table. */
export const MODEL_COLUMNS = ['', 'Thickness (m)', 'Shear speed (m/s)', 'P speed (m/s)', "Poisson's ratio", 'Density (kg/m³)'] as const;

/**
 * The layer builder's model as table rows (MODEL_COLUMNS): each layer, then
 * the half-space (no thickness); the P speed and the Poisson's ratio it
 * gives (ν = (r² − 2)/(2(r² − 1)), r = vp/vs), or "—" where the model has no
 * P speeds (Love waves only).
 */
export function modelRows(m: SiteLayeredModel): string[][] {
  const p = (vs: number, vp: number | undefined): [string, string] => (vp === undefined ? ['—', '—'] : [num(vp), String(Number(poissonRatio(vp, vs).toPrecision(3)))]);
  const rows = m.model.layers.map((l, i) => [`Layer ${i + 1}`, num(l.thickness_m), num(l.vs_m_s), ...p(l.vs_m_s, l.vp_m_s), num(l.density_kg_m3)]);
  const h = m.model.halfspace;
  rows.push(['Half-space', '—', num(h.vs_m_s), ...p(h.vs_m_s, h.vp_m_s), num(h.density_kg_m3)]);
  return rows;
}

/** Fills `doc` with the summary of one site. */
export function buildSiteSummary(doc: Document, site: SiteRecord, picks: readonly PickRecord[], r: EstimateResult | undefined, figures: SiteFigures | undefined): void {
  doc.title = `Site summary: ${site.name}`;
  const style = doc.createElement('style');
  style.textContent = STYLE;
  doc.head.append(style);
  const body = doc.body;
  const el = <K extends keyof HTMLElementTagNameMap>(tag: K, text?: string, cls?: string): HTMLElementTagNameMap[K] => {
    const e = doc.createElement(tag);
    if (text !== undefined) e.textContent = text;
    if (cls) e.className = cls;
    return e;
  };
  body.append(el('h1', `Site summary: ${site.name || '(unnamed site)'}`));
  const where = site.location ? `, ${site.location.lat.toFixed(5)}°, ${site.location.lon.toFixed(5)}°` : '';
  body.append(el('p', `Survey date ${site.date}${site.crew ? `, crew ${site.crew}` : ''}${where}. ${picks.length} ${picks.length === 1 ? 'pick' : 'picks'}. Printed ${new Date().toLocaleString()}.`, 'meta'));
  if (r) {
    const v = r.verdict;
    const box = el('div', undefined, `verdict ${v.level}`);
    box.append(
      el('p', v.level === 'unresolved' ? `Layer thickness: not resolved (${v.known}).` : `Layer thickness H ${v.level === 'rough' ? '≈' : '='} ${num(r.thickness.best)} m: ${LEVEL_WORDS[v.level]}.`),
      el('p', v.text),
    );
    body.append(box);
    const t = el('table');
    const head = el('tr');
    for (const h of ['', 'best', '95 % interval']) head.append(el('th', h));
    t.append(head);
    for (const [name, unit, p] of [
      ['Layer thickness H', 'm', r.thickness],
      ['Layer shear speed β1', 'm/s', r.vs1],
      ['Half-space shear speed β2', 'm/s', r.vs2],
    ] as const) {
      const row = el('tr');
      row.append(
        el('th', name),
        el('td', v.level === 'unresolved' && name.startsWith('Layer thickness') ? `(${num(p.best)} ${unit}, not an answer)` : `${num(p.best)} ${unit}`),
        el('td', p.free ? `${p.openLow ? '≤ ' : ''}${num(p.low95)} to ${p.openHigh ? '≥ ' : ''}${num(p.high95)} ${unit}${p.openLow || p.openHigh ? ' (open)' : ''}` : 'given'),
      );
      t.append(row);
    }
    body.append(el('h2', 'Estimate'), t);
  } else {
    body.append(el('p', 'No estimate yet.'));
  }
  const cols = el('div', undefined, 'cols');
  const left = el('div');
  left.append(el('h2', 'Picks and best fit'), plotSvg(doc, picks, r));
  const right = el('div');
  if (figures) {
    right.append(el('h2', r && r.verdict.level === 'unresolved' ? 'Site figures (resting on an unresolved thickness)' : 'Site figures (over the 95 % intervals)'));
    const t = el('table');
    const rows: [string, string][] = [
      ['Vs30', `${num(figures.vs30.best)} m/s (${num(figures.vs30.low)}–${num(figures.vs30.high)})`],
      ['ASCE/SEI 7-16 class', figures.classes.asce7_16.join(' or ')],
      ['ASCE/SEI 7-22 class', figures.classes.asce7_22.join(' or ')],
      ['EN 1998-1 ground type', figures.classes.en1998_1.join(' or ')],
      ['f0', `${num(figures.f0_hz.best)} Hz (${num(figures.f0_hz.low)}–${num(figures.f0_hz.high)})`],
    ];
    for (const [k, v] of rows) {
      const row = el('tr');
      row.append(el('th', k), el('td', v));
      t.append(row);
    }
    right.append(t);
  }
  cols.append(left, right);
  body.append(cols);
  const pt = el('table');
  const ph = el('tr');
  for (const h of ['No.', 'Frequency (Hz)', 'Velocity (m/s)', 'sd (m/s)', 'Kind, mode']) ph.append(el('th', h));
  pt.append(ph);
  picks.forEach((p, i) => {
    const row = el('tr');
    row.append(el('td', String(i + 1)), el('td', String(p.frequency)), el('td', String(p.velocity)), el('td', p.sd === undefined ? '3 %' : String(p.sd)), el('td', `${p.kind} ${p.mode}`));
    pt.append(row);
  });
  body.append(el('h2', 'Picks'), pt);
  if (site.layeredModel) {
    const mt = el('table');
    const mh = el('tr');
    for (const h of MODEL_COLUMNS) mh.append(el('th', h));
    mt.append(mh);
    for (const r of modelRows(site.layeredModel)) {
      const row = el('tr');
      row.append(el('th', r[0]), ...r.slice(1).map((c) => el('td', c)));
      mt.append(row);
    }
    body.append(el('h2', "Layer builder model (typed by the crew, not fitted to the picks)"), mt);
  }
  const caution = el('p', undefined, 'caution');
  caution.append(el('strong', 'Caution. '), doc.createTextNode(CAUTION));
  body.append(caution);
  const print = el('button', 'Print or save as PDF');
  print.type = 'button';
  print.addEventListener('click', () => doc.defaultView?.print());
  body.append(print);
}

/**
 * The misfit map as a picture, on a canvas: χ² over layer thickness and a
 * speed. A long, tilted valley is the trade-off between H and the speed.
 *
 * - With the close-up slice (core/estimate/misfit-slice.ts, computed in the worker
 *   after each estimate), the shading is Δχ² above the best fit: darkest
 *   where Δχ² ≤ 2.30, medium where Δχ² ≤ 6.18 (the joint 68.3 % and 95.4 %
 *   levels for two parameters: Press et al., *Numerical Recipes*, 3rd ed.
 *   2007, §15.6.5), scaled like the estimate's intervals when the fit is
 *   poor; lighter beyond. The other free speed is held at its best value.
 * - Until then, the estimate's coarse map over the whole search box
 *   (core/estimate/estimate.ts MisfitMap), zoomed to its valley and shaded by
 *   log(χ²/χ²min): it shows the shape only.
 * The 95 % intervals from the profile likelihood are drawn as a dashed box.
 */
import { useEffect, useRef } from 'preact/hooks';
import type { MisfitMap } from '../../../core/estimate/estimate';
import type { MisfitSlice } from '../../../core/estimate/misfit-slice';
import { num } from '../views/format';

const SPAN_TEXT = 'six';

/** Δχ² of the joint 68.3 % and 95.4 % regions for two parameters (Numerical Recipes, 3rd ed. 2007, §15.6.5). */
export const JOINT_DELTA_CHI2: readonly [number, number] = [2.3, 6.18];

export interface MisfitMapProps {
  map: MisfitMap;
  /** The close-up slice, when the worker has computed it (then `map` is the slice). */
  slice?: MisfitSlice;
  /** χ² of the best fit (the Δχ² levels of the slice are above it). */
  bestChi2: number;
  bestThickness: number;
  bestSpeed: number;
  /** The estimate's interval scale (1, or χ²/dof when the fit is poor). */
  scale: number;
  correlation: number;
  /** 95 % intervals [H low, H high, speed low, speed high] drawn as a box. */
  box?: [number, number, number, number];
  theme: string;
}

export function MisfitMapView(props: MisfitMapProps) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const speedName = props.map.yName === 'vs1_m_s' ? 'layer shear speed β1 (m/s)' : 'half-space shear speed β2 (m/s)';

  useEffect(() => {
    const c = canvas.current;
    if (!c) return;
    draw(c, props);
    // Redrawn at the new size (and pixel ratio) when its box changes, so text stays sharp and readable.
    if (typeof ResizeObserver === 'undefined') return;
    let last = c.clientWidth;
    const ro = new ResizeObserver(() => {
      if (Math.abs(c.clientWidth - last) < 1) return;
      last = c.clientWidth;
      draw(c, props);
    });
    ro.observe(c);
    return () => ro.disconnect();
  }, [props.map, props.slice, props.theme, props.bestThickness, props.bestSpeed, props.box]);

  const corr = Number.isFinite(props.correlation)
    ? ` The H–β1 correlation at the best fit is ${num(props.correlation, 2)}${
        Math.abs(props.correlation) > 0.8
          ? `: a strong trade-off, where a thicker layer with a ${props.correlation > 0 ? 'faster' : 'slower'} β1 fits almost as well`
          : ''
      }.`
    : '';
  const held = props.slice?.held
    ? ` ${props.slice.held.name === 'vs2_m_s' ? 'β2' : 'β1'} is held at its best value, ${num(props.slice.held.value)} m/s.`
    : '';
  const label =
    `Misfit map: thickness H in m across, ${speedName} up, both on log scales. Darker means a better fit` +
    (props.slice ? ': darkest inside the joint 68 % region, medium inside the joint 95 % region' : '') +
    `; the dashed box spans the 95 % intervals and the cross marks the best fit at H = ${num(props.bestThickness)} m, ${num(props.bestSpeed)} m/s.${held}${corr}`;
  return (
    <figure class="misfit">
      <canvas ref={canvas} width={560} height={360} role="img" aria-label={label} />
      {props.slice ? (
        <figcaption>
          Misfit χ² around the best fit, thickness H (m, across) and {speedName} (up).{held} Darkest: Δχ² ≤ 2.30, the joint
          68 % region; medium: Δχ² ≤ 6.18, the joint 95 % region{props.scale > 1 ? ` (both × χ²/dof = ${num(props.scale, 2)})` : ''};
          lighter beyond. A long tilted valley is the trade-off. Dashed box: the 95 % interval of each parameter on its own;
          cross: the best fit.{corr}
        </figcaption>
      ) : (
        <figcaption>
          Misfit χ² over thickness H (m, across) and {speedName} (up), on the estimate's coarse search grid, zoomed to the
          valley: darker is a better fit, white is {SPAN_TEXT} times the least misfit on the grid or worse (the close-up is
          being computed). Dashed box: the 95 % intervals; cross: the best fit.{corr}
        </figcaption>
      )}
    </figure>
  );
}

/** Fractional index of value v in an ascending positive grid (log interpolation; the grids are log-spaced). */
function indexOf(grid: Float64Array, v: number): number {
  const n = grid.length;
  if (n < 2) return 0;
  const lv = Math.log(v);
  let i = 0;
  while (i < n - 2 && grid[i + 1] < v) i++;
  const a = Math.log(grid[i]);
  const b = Math.log(grid[i + 1]);
  return i + (lv - a) / (b - a || 1);
}

/** Colour of a misfit ratio level t in [0, 1] (0 = the grid's least misfit): dark to light. */
function shade(t: number, dark: [number, number, number]): string {
  const u = Math.min(1, Math.max(0, t));
  const c = dark.map((d) => Math.round(d + (250 - d) * Math.pow(u, 0.7)));
  return `rgb(${c[0]},${c[1]},${c[2]})`;
}

function rgbOf(css: string): [number, number, number] {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(css.trim());
  return m ? [parseInt(m[1], 16), parseInt(m[2], 16), parseInt(m[3], 16)] : [18, 60, 58];
}

function draw(c: HTMLCanvasElement, p: MisfitMapProps): void {
  const { map } = p;
  const ctx = c.getContext('2d');
  if (!ctx) return;
  const cs = getComputedStyle(c);
  const ink = cs.getPropertyValue('--ink').trim() || '#111';
  const bg = cs.getPropertyValue('--panel').trim() || '#fff';
  const dark = rgbOf(cs.getPropertyValue('--map-68').trim() || '#123c3a');
  // Drawn in CSS pixels at the device's pixel ratio, at the size it is shown (at most 560 × 360 CSS px).
  const dpr = (typeof devicePixelRatio === 'number' && devicePixelRatio > 0 ? devicePixelRatio : 1);
  const W = Math.max(260, Math.min(560, Math.round(c.clientWidth || 560)));
  const H = Math.round((W * 360) / 560);
  c.width = Math.round(W * dpr);
  c.height = Math.round(H * dpr);
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  // Labels at least 12 CSS px; larger in Sunlight contrast.
  const sun = document.documentElement.dataset.theme === 'sun';
  const fontPx = sun ? 15 : 13;
  const L = 64;
  const B = 44;
  const T = 10;
  const R = 12;
  const pw = W - L - R;
  const ph = H - T - B;
  ctx.fillStyle = bg;
  ctx.fillRect(0, 0, W, H);
  if (map.rows === 0 || map.cols === 0) return;
  let min = Infinity;
  for (let i = 0; i < map.chi2.length; i++) if (map.chi2[i] < min) min = map.chi2[i];
  // Crop to the valley: cells within a factor SPAN of the least misfit, plus a margin.
  const SPAN = 6;
  let r0 = map.rows;
  let r1 = -1;
  let k0 = map.cols;
  let k1 = -1;
  for (let r = 0; r < map.rows; r++) {
    for (let k = 0; k < map.cols; k++) {
      if (map.chi2[r * map.cols + k] <= min * SPAN) {
        r0 = Math.min(r0, r);
        r1 = Math.max(r1, r);
        k0 = Math.min(k0, k);
        k1 = Math.max(k1, k);
      }
    }
  }
  const margin = 4;
  r0 = Math.max(0, r0 - margin);
  r1 = Math.min(map.rows - 1, r1 + margin);
  k0 = Math.max(0, k0 - margin);
  k1 = Math.min(map.cols - 1, k1 + margin);
  if (p.slice) {
    // the close-up is already framed around the best fit
    r0 = 0;
    r1 = map.rows - 1;
    k0 = 0;
    k1 = map.cols - 1;
  }
  const l68 = JOINT_DELTA_CHI2[0] * p.scale;
  const l95 = JOINT_DELTA_CHI2[1] * p.scale;
  const mid = rgbOf(cs.getPropertyValue('--map-95').trim() || '#6fa59d');
  const nr = r1 - r0 + 1;
  const nk = k1 - k0 + 1;
  // index space → pixels (cell centres at integer indexes)
  const px = (fk: number) => L + ((fk - k0 + 0.5) / nk) * pw;
  const py = (fr: number) => T + ph - ((fr - r0 + 0.5) / nr) * ph;
  const logSpan = Math.log(SPAN);
  for (let r = r0; r <= r1; r++) {
    for (let k = k0; k <= k1; k++) {
      const v = map.chi2[r * map.cols + k];
      let fill: string;
      if (!Number.isFinite(v)) fill = 'rgb(170,170,170)';
      else if (p.slice) {
        const d = v - p.bestChi2;
        fill =
          d <= l68
            ? `rgb(${dark.join(',')})`
            : d <= l95
              ? `rgb(${mid.join(',')})`
              : shade(0.35 + 0.65 * Math.min(1, Math.log10(1 + (d - l95) / l95) / 1.5), dark);
      } else fill = shade(Math.log(v / min) / logSpan, dark);
      ctx.fillStyle = fill;
      const xa = L + ((k - k0) / nk) * pw;
      const ya = T + ph - ((r - r0 + 1) / nr) * ph;
      ctx.fillRect(xa, ya, pw / nk + 1, ph / nr + 1);
    }
  }
  const hx = (h: number) => px(indexOf(map.x, h));
  const vy = (v: number) => (map.rows > 1 ? py(indexOf(map.y, v)) : T + ph / 2);
  ctx.save();
  ctx.beginPath();
  ctx.rect(L, T, pw, ph);
  ctx.clip();
  // the 95 % intervals of the two parameters shown, as a box
  if (p.box) {
    const [h0, h1, v0, v1] = p.box;
    const xa = hx(h0);
    const xb = Number.isFinite(h1) ? hx(h1) : L + pw;
    const ya = map.rows > 1 ? vy(v1) : T;
    const yb = map.rows > 1 ? vy(v0) : T + ph;
    ctx.setLineDash([6, 4]);
    ctx.strokeStyle = '#fff';
    ctx.lineWidth = 4;
    ctx.strokeRect(xa, ya, xb - xa, yb - ya);
    ctx.strokeStyle = ink;
    ctx.lineWidth = 2;
    ctx.strokeRect(xa, ya, xb - xa, yb - ya);
    ctx.setLineDash([]);
  }
  // best fit cross
  const bx = hx(p.bestThickness);
  const by = vy(p.bestSpeed);
  ctx.strokeStyle = '#fff';
  ctx.lineWidth = 5;
  cross(ctx, bx, by);
  ctx.strokeStyle = '#d40000';
  ctx.lineWidth = 2.5;
  cross(ctx, bx, by);
  ctx.restore();
  // frame and ticks
  ctx.strokeStyle = ink;
  ctx.lineWidth = 1;
  ctx.strokeRect(L, T, pw, ph);
  ctx.fillStyle = ink;
  ctx.font = `${sun ? '600 ' : ''}${fontPx}px system-ui, sans-serif`;
  ctx.textAlign = 'center';
  const xt = [k0, Math.round((k0 + k1) / 2), k1];
  for (const k of xt) ctx.fillText(num(map.x[k], 2), px(k), T + ph + 16);
  ctx.fillText('Layer thickness H (m), log scale', L + pw / 2, H - 6);
  ctx.textAlign = 'right';
  if (map.rows > 1) {
    for (const r of [r0, Math.round((r0 + r1) / 2), r1]) ctx.fillText(num(map.y[r], 3), L - 6, py(r) + 4);
  }
  ctx.save();
  ctx.translate(14, T + ph / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.fillText(map.yName === 'vs1_m_s' ? 'β1 (m/s), log scale' : 'β2 (m/s), log scale', 0, 0);
  ctx.restore();
}

function cross(ctx: CanvasRenderingContext2D, x: number, y: number): void {
  ctx.beginPath();
  ctx.moveTo(x - 9, y);
  ctx.lineTo(x + 9, y);
  ctx.moveTo(x, y - 9);
  ctx.lineTo(x, y + 9);
  ctx.stroke();
}

/**
 * The misfit map as a picture: χ² over layer thickness and a speed, from
 * the estimate (core/estimate.ts MisfitMap), drawn on a canvas. The shaded
 * regions are the joint 68 % and 95 % regions for two parameters,
 * Δχ² ≤ 2.30 and ≤ 6.18 (Press et al., Numerical Recipes, 3rd ed. 2007,
 * §15.6.5), scaled like the estimate's intervals when the fit is poor.
 * A long, tilted valley is the trade-off between H and the speed.
 */
import { useEffect, useRef } from 'preact/hooks';
import type { MisfitMap } from '../../core/estimate';
import { num } from './format';

/** Δχ² of the joint 68.3 % and 95.4 % regions, two parameters (Numerical Recipes, 3rd ed., §15.6.5). */
export const JOINT_DELTA_CHI2: readonly [number, number] = [2.3, 6.18];

export interface MisfitMapProps {
  map: MisfitMap;
  bestThickness: number;
  bestSpeed: number;
  /** The estimate's interval scale (1, or χ²/dof when the fit is poor). */
  scale: number;
  correlation: number;
  theme: string;
}

export function MisfitMapView(props: MisfitMapProps) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const speedName = props.map.yName === 'vs1_m_s' ? 'layer shear speed β1 (m/s)' : 'half-space shear speed β2 (m/s)';

  useEffect(() => {
    const c = canvas.current;
    if (!c) return;
    draw(c, props);
  }, [props.map, props.theme, props.bestThickness, props.bestSpeed]);

  const corr = Number.isFinite(props.correlation)
    ? ` The H–β1 correlation at the best fit is ${num(props.correlation, 2)}${Math.abs(props.correlation) > 0.8 ? ': a strong trade-off, where a thicker layer with a faster β1 fits almost as well' : ''}.`
    : '';
  const label =
    `Misfit map: thickness H in m across (log scale), ${speedName} up. Darkest: the joint 68 % region; ` +
    `medium: the joint 95 % region; the cross marks the best fit at H = ${num(props.bestThickness)} m, ${num(props.bestSpeed)} m/s.${corr}`;
  return (
    <figure class="misfit">
      <canvas ref={canvas} width={560} height={360} role="img" aria-label={label} />
      <figcaption>
        Misfit over thickness H (m, across) and {speedName} (up). Dark: joint 68 % region (Δχ² ≤ 2.30); medium: joint 95 %
        (Δχ² ≤ 6.18){props.scale > 1 ? `, both scaled by χ²/dof = ${num(props.scale, 2)}` : ''}. Cross: best fit.{corr}
      </figcaption>
    </figure>
  );
}

function draw(c: HTMLCanvasElement, p: MisfitMapProps): void {
  const { map } = p;
  const ctx = c.getContext('2d');
  if (!ctx) return;
  const cs = getComputedStyle(c);
  const ink = cs.getPropertyValue('--ink').trim() || '#111';
  const bg = cs.getPropertyValue('--panel').trim() || '#fff';
  const strong = cs.getPropertyValue('--map-68').trim() || '#0b3d91';
  const mid = cs.getPropertyValue('--map-95').trim() || '#5b8fd6';
  const W = c.width;
  const H = c.height;
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
  const l68 = JOINT_DELTA_CHI2[0] * p.scale;
  const l95 = JOINT_DELTA_CHI2[1] * p.scale;
  const x0 = Math.log(map.x[0]);
  const x1 = Math.log(map.x[map.cols - 1]);
  const y0 = map.y[0];
  const y1 = map.y[map.rows - 1];
  const px = (h: number) => L + ((Math.log(h) - x0) / (x1 - x0 || 1)) * pw;
  const py = (v: number) => T + ph - ((v - y0) / (y1 - y0 || 1)) * ph;
  const cw = pw / map.cols + 1;
  const ch = ph / Math.max(1, map.rows) + 1;
  for (let r = 0; r < map.rows; r++) {
    for (let k = 0; k < map.cols; k++) {
      const v = map.chi2[r * map.cols + k];
      const d = v - min;
      let fill: string;
      if (!Number.isFinite(d)) fill = 'rgba(128,128,128,0.25)';
      else if (d <= l68) fill = strong;
      else if (d <= l95) fill = mid;
      else {
        // beyond the 95 % region: lighter with growing misfit
        const t = Math.min(1, Math.log10(1 + d / l95) / 2);
        const g = Math.round(200 + 55 * t);
        fill = `rgb(${g},${g},${g})`;
      }
      ctx.fillStyle = fill;
      const xa = L + (k / map.cols) * pw;
      const ya = T + ph - ((r + 1) / Math.max(1, map.rows)) * ph;
      ctx.fillRect(xa, ya, cw, ch);
    }
  }
  // best fit cross
  const bx = px(p.bestThickness);
  const by = map.rows > 1 ? py(p.bestSpeed) : T + ph / 2;
  ctx.strokeStyle = '#fff';
  ctx.lineWidth = 5;
  cross(ctx, bx, by);
  ctx.strokeStyle = ink;
  ctx.lineWidth = 2.5;
  cross(ctx, bx, by);
  // frame and ticks
  ctx.strokeStyle = ink;
  ctx.lineWidth = 1;
  ctx.strokeRect(L, T, pw, ph);
  ctx.fillStyle = ink;
  ctx.font = '13px system-ui, sans-serif';
  ctx.textAlign = 'center';
  for (const f of [0, 0.25, 0.5, 0.75, 1]) {
    const h = Math.exp(x0 + f * (x1 - x0));
    const x = L + f * pw;
    ctx.fillText(num(h, 2), x, T + ph + 16);
  }
  ctx.fillText('Layer thickness H (m)', L + pw / 2, H - 6);
  ctx.textAlign = 'right';
  for (const f of [0, 0.5, 1]) {
    const v = y0 + f * (y1 - y0);
    ctx.fillText(num(v, 3), L - 6, T + ph - f * ph + 4);
  }
  ctx.save();
  ctx.translate(14, T + ph / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.fillText(map.yName === 'vs1_m_s' ? 'β1 (m/s)' : 'β2 (m/s)', 0, 0);
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

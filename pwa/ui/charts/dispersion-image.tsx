/**
 * The dispersion image on a canvas, in the dispersion plot's units and axes
 * (frequency in Hz or period in s across, log or linear as the plot is set;
 * velocity in m/s up), with the site's picks, the best-fit curves and the
 * followed ridge over it. The picks have the picks plot's shapes (Love and
 * Rayleigh apart without colour, curve-style.ts). The best fit is the layered estimate's Love and
 * Rayleigh curves when there is one (drawn as the picks plot draws them,
 * curve-style.ts: colour and line style by wave, thin and faint when the
 * estimate is not resolved), else the one-layer model's Love curves.
 *
 * Colour: power 0–1 on an own ramp (deep blue-green through sand to a
 * bright yellow); cells marked marginal are washed towards grey and
 * unreliable cells are dark grey with only a trace of the power, so a
 * result the data cannot support never looks supported.
 *
 * Pointer: a tap follows the ridge through that point (onTap); pressing on
 * one of the ridge's two end handles and dragging moves that end (onDragEnd).
 * The canvas carries its plot frame in data-frame (CSS pixels and axis
 * ranges) and the shapes of the picks it drew in data-picks, for tests.
 */
import { useEffect, useMemo, useRef } from 'preact/hooks';
import type { PickRecord } from '../../../core/exchange/records';
import type { LayeredModel } from '../../../core/dispersion/model';
import { MARGINAL, UNRELIABLE, type DispersionImage } from '../../../core/signal/image';
import type { Ridge } from '../../../core/signal/ridge';
import type { PlotSettings } from '../controllers/app-state';
import { logBand } from '../../../core/dispersion/curve';
import { computedColumns, curveColumns, type ComputedCurves } from './chart-data';
import { curveDash, faded, modeColour, palette, pickShape, pickShapeFilled, tracePickShape, type PickShape } from './curve-style';

export interface DispersionImageProps {
  image: DispersionImage;
  ridge?: Ridge;
  range?: [number, number];
  removed: readonly number[];
  picks: readonly PickRecord[];
  model?: LayeredModel;
  /** The layered estimate's best-fit curves (computed in the worker), drawn instead of `model`'s; `unsupported`: thin and faint. */
  computed?: ComputedCurves & { unsupported?: boolean };
  settings: PlotSettings;
  theme: string;
  onTap: (frequency: number, velocity: number) => void;
  onDragEnd: (end: 'low' | 'high', frequency: number) => void;
}

const MARGIN = { left: 58, right: 12, top: 12, bottom: 42 };
const HEIGHT = 380;
/** Pixels within which a press takes an end handle instead of tapping. */
const HANDLE_REACH = 16;

/** The own colour ramp: five stops, power 0 → 1. */
const RAMP: readonly [number, number, number][] = [
  [12, 30, 48],
  [18, 84, 96],
  [74, 140, 120],
  [214, 190, 120],
  [255, 236, 80],
];

function rampColour(p: number): [number, number, number] {
  const x = Math.min(Math.max(p, 0), 1) * (RAMP.length - 1);
  const i = Math.min(Math.floor(x), RAMP.length - 2);
  const w = x - i;
  const a = RAMP[i];
  const b = RAMP[i + 1];
  return [a[0] + w * (b[0] - a[0]), a[1] + w * (b[1] - a[1]), a[2] + w * (b[2] - a[2])];
}

interface Frame {
  left: number;
  top: number;
  width: number;
  height: number;
  axis: 'frequency' | 'period';
  xLog: boolean;
  yLog: boolean;
  xMin: number;
  xMax: number;
  vMin: number;
  vMax: number;
}

const fwd = (v: number, log: boolean) => (log ? Math.log(v) : v);
const back = (u: number, log: boolean) => (log ? Math.exp(u) : u);

function xOf(f: Frame, hz: number): number {
  const q = f.axis === 'frequency' ? hz : 1 / hz;
  return f.left + ((fwd(q, f.xLog) - fwd(f.xMin, f.xLog)) / (fwd(f.xMax, f.xLog) - fwd(f.xMin, f.xLog))) * f.width;
}
function yOf(f: Frame, v: number): number {
  return f.top + f.height - ((fwd(v, f.yLog) - fwd(f.vMin, f.yLog)) / (fwd(f.vMax, f.yLog) - fwd(f.vMin, f.yLog))) * f.height;
}
function hzAt(f: Frame, x: number): number {
  const q = back(fwd(f.xMin, f.xLog) + ((x - f.left) / f.width) * (fwd(f.xMax, f.xLog) - fwd(f.xMin, f.xLog)), f.xLog);
  return f.axis === 'frequency' ? q : 1 / q;
}
function vAt(f: Frame, y: number): number {
  return back(fwd(f.vMin, f.yLog) + ((f.top + f.height - y) / f.height) * (fwd(f.vMax, f.yLog) - fwd(f.vMin, f.yLog)), f.yLog);
}

/**
 * Strokes one curve column: velocities y against x, in the frame's axis unit
 * (frequency or period); the pen lifts over gaps (a non-finite y).
 */
function strokeColumn(
  ctx: CanvasRenderingContext2D,
  f: Frame,
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  stroke: string,
  width: number,
  dash: number[],
): void {
  ctx.strokeStyle = stroke;
  ctx.lineWidth = width;
  ctx.setLineDash(dash);
  ctx.beginPath();
  let pen = false;
  for (let i = 0; i < x.length; i++) {
    const v = y[i];
    if (!Number.isFinite(v)) {
      pen = false;
      continue;
    }
    const X = xOf(f, f.axis === 'frequency' ? x[i] : 1 / x[i]);
    const Y = yOf(f, v);
    if (pen) ctx.lineTo(X, Y);
    else ctx.moveTo(X, Y);
    pen = true;
  }
  ctx.stroke();
}

/** Index of the value nearest x in an ascending array. */
function nearest(a: Float64Array, x: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (a[mid] <= x) lo = mid;
    else hi = mid;
  }
  return Math.abs(a[hi] - x) < Math.abs(a[lo] - x) ? hi : lo;
}

function ticks(lo: number, hi: number, log: boolean): number[] {
  if (log) {
    const out: number[] = [];
    for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
      for (const m of [1, 2, 5]) {
        const v = m * 10 ** e;
        if (v >= lo * 0.999 && v <= hi * 1.001) out.push(v);
      }
    }
    return out;
  }
  const raw = (hi - lo) / 6;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? raw;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + 1e-9; v += step) out.push(Number(v.toPrecision(6)));
  return out;
}

export function DispersionImageCanvas(props: DispersionImageProps) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const frame = useRef<Frame | null>(null);
  const drag = useRef<{ end: 'low' | 'high'; x: number } | null>(null);
  const { image, settings } = props;

  const layered = useMemo(() => {
    if (!props.computed) return null;
    return computedColumns(props.computed, [], settings.axis, image.method === 'phase-shift' ? 'phase' : 'group');
  }, [props.computed, image, settings.axis]);

  const curves = useMemo(() => {
    if (!props.model || props.computed) return null;
    const f = image.frequencies;
    const band = logBand(Math.max(f[0], 0.1), f[f.length - 1], 160);
    const kind = image.method === 'phase-shift' ? 'phase' : 'group';
    try {
      return curveColumns(props.model, band, [0, 1, 2].map((mode) => ({ mode, kind })), settings.axis);
    } catch {
      return null;
    }
  }, [props.model, props.computed, image, settings.axis]);

  useEffect(() => {
    const c = canvas.current;
    if (!c) return;
    const draw = () => {
      const cssWidth = Math.max(280, c.clientWidth || c.parentElement?.clientWidth || 600);
      const ratio = globalThis.devicePixelRatio || 1;
      c.width = Math.round(cssWidth * ratio);
      c.height = Math.round(HEIGHT * ratio);
      c.style.height = `${HEIGHT}px`;
      const ctx = c.getContext('2d');
      if (!ctx) return;
      ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
      const f = image.frequencies;
      const v = image.velocities;
      const fr: Frame = {
        left: MARGIN.left,
        top: MARGIN.top,
        width: cssWidth - MARGIN.left - MARGIN.right,
        height: HEIGHT - MARGIN.top - MARGIN.bottom,
        axis: settings.axis,
        xLog: settings.xLog,
        yLog: settings.yLog,
        xMin: settings.axis === 'frequency' ? f[0] : 1 / f[f.length - 1],
        xMax: settings.axis === 'frequency' ? f[f.length - 1] : 1 / f[0],
        vMin: v[0],
        vMax: v[v.length - 1],
      };
      frame.current = fr;
      c.dataset.frame = JSON.stringify(fr);
      const style = getComputedStyle(c);
      const ink = style.getPropertyValue('--ink').trim() || '#1b1b1b';
      const panel = style.getPropertyValue('--panel').trim() || '#fffdf7';
      ctx.fillStyle = panel;
      ctx.fillRect(0, 0, cssWidth, HEIGHT);

      // The image, pixel by pixel in device pixels, nearest cell.
      const px0 = Math.round(fr.left * ratio);
      const py0 = Math.round(fr.top * ratio);
      const pw = Math.round(fr.width * ratio);
      const ph = Math.round(fr.height * ratio);
      const data = ctx.createImageData(pw, ph);
      const cols = v.length;
      const rowOf = new Int32Array(pw);
      for (let x = 0; x < pw; x++) rowOf[x] = nearest(f, hzAt(fr, fr.left + (x + 0.5) / ratio));
      const colOf = new Int32Array(ph);
      for (let y = 0; y < ph; y++) colOf[y] = nearest(v, vAt(fr, fr.top + (y + 0.5) / ratio));
      for (let y = 0; y < ph; y++) {
        for (let x = 0; x < pw; x++) {
          const j = rowOf[x] * cols + colOf[y];
          let [r, g, b] = rampColour(image.power[j]);
          const level = image.reliability[j];
          if (level === UNRELIABLE) {
            const grey = 60 + 40 * image.power[j];
            r = g = b = grey;
          } else if (level === MARGINAL) {
            r = 0.55 * r + 0.45 * 150;
            g = 0.55 * g + 0.45 * 150;
            b = 0.55 * b + 0.45 * 150;
          }
          const o = 4 * (y * pw + x);
          data.data[o] = r;
          data.data[o + 1] = g;
          data.data[o + 2] = b;
          data.data[o + 3] = 255;
        }
      }
      ctx.putImageData(data, px0, py0);

      // Axes and ticks.
      ctx.strokeStyle = ink;
      ctx.fillStyle = ink;
      ctx.lineWidth = 1;
      ctx.strokeRect(fr.left, fr.top, fr.width, fr.height);
      ctx.font = '12px system-ui, sans-serif';
      ctx.textAlign = 'center';
      ctx.textBaseline = 'top';
      for (const t of ticks(fr.xMin, fr.xMax, fr.xLog)) {
        const x = xOf(fr, fr.axis === 'frequency' ? t : 1 / t);
        ctx.beginPath();
        ctx.moveTo(x, fr.top + fr.height);
        ctx.lineTo(x, fr.top + fr.height + 5);
        ctx.stroke();
        ctx.fillText(String(t), x, fr.top + fr.height + 7);
      }
      ctx.fillText(fr.axis === 'frequency' ? 'Frequency (Hz)' : 'Period (s)', fr.left + fr.width / 2, HEIGHT - 16);
      ctx.textAlign = 'right';
      ctx.textBaseline = 'middle';
      for (const t of ticks(fr.vMin, fr.vMax, fr.yLog)) {
        const y = yOf(fr, t);
        ctx.beginPath();
        ctx.moveTo(fr.left - 5, y);
        ctx.lineTo(fr.left, y);
        ctx.stroke();
        ctx.fillText(String(t), fr.left - 7, y);
      }
      ctx.save();
      ctx.translate(14, fr.top + fr.height / 2);
      ctx.rotate(-Math.PI / 2);
      ctx.textAlign = 'center';
      ctx.fillText(`${image.method === 'phase-shift' ? 'Phase' : 'Group'} velocity (m/s)`, 0, 0);
      ctx.restore();

      ctx.save();
      ctx.beginPath();
      ctx.rect(fr.left, fr.top, fr.width, fr.height);
      ctx.clip();
      // Best-fit curves of the image's kind, dashed white over a dark edge.
      if (curves) {
        for (const col of curves.y) {
          for (const [colour, width] of [
            ['rgba(0,0,0,0.7)', 4],
            ['#ffffff', 2],
          ] as const)
            strokeColumn(ctx, fr, curves.x, col, colour, width, [7, 5]);
        }
        ctx.setLineDash([]);
      }
      // The layered best fit: each wave and mode as the picks plot draws it, over a light edge; faint when unsupported.
      if (layered) {
        const pal = palette(c);
        const faint = !!props.computed?.unsupported;
        layered.keys.forEach((k, n) => {
          const col = layered.y[n];
          const colour = k.wave === 'rayleigh' ? pal.rayleigh : modeColour(pal, k.mode);
          const width = faint ? 1.25 : k.mode === 0 ? 2.5 : 1.75;
          for (const [stroke, w] of [
            [faint ? 'rgba(255,255,255,0.35)' : 'rgba(255,255,255,0.85)', width + 2],
            [faint ? faded(colour) : colour, width],
          ] as const)
            strokeColumn(ctx, fr, layered.x, col, stroke, w, curveDash(k.wave, k.kind) ?? []);
        });
        ctx.setLineDash([]);
      }
      // The site's picks of this image's kind, in the picks plot's shapes (curve-style.ts: Love discs or diamonds,
      // Rayleigh squares or triangles), white over a dark edge so that they show on every part of the ramp.
      const kind = image.method === 'phase-shift' ? 'phase' : 'group';
      const drawn: PickShape[] = [];
      ctx.lineJoin = 'round';
      for (const p of props.picks) {
        if (p.kind !== kind) continue;
        const shape = pickShape(p.wave, kind);
        drawn.push(shape);
        ctx.beginPath();
        tracePickShape(ctx, shape, xOf(fr, p.frequency), yOf(fr, p.velocity), 5);
        if (pickShapeFilled(shape)) {
          ctx.fillStyle = '#ffffff';
          ctx.fill();
          ctx.strokeStyle = '#000000';
          ctx.lineWidth = 1.5;
          ctx.stroke();
        } else {
          ctx.strokeStyle = '#000000';
          ctx.lineWidth = 3.5;
          ctx.stroke();
          ctx.strokeStyle = '#ffffff';
          ctx.lineWidth = 1.5;
          ctx.stroke();
        }
      }
      ctx.lineJoin = 'miter';
      c.dataset.picks = drawn.join(' ');
      // The followed ridge: kept points as magenta diamonds, trimmed or deleted ones faint, ends as handles.
      const ridge = props.ridge;
      const range = props.range;
      if (ridge && range) {
        for (let k = 0; k < ridge.velocity.length; k++) {
          const kept = k >= range[0] && k <= range[1] && !props.removed.includes(k);
          const X = xOf(fr, ridge.frequency[k]);
          const Y = yOf(fr, ridge.velocity[k]);
          ctx.fillStyle = kept ? '#ff3fa4' : 'rgba(255,255,255,0.35)';
          ctx.strokeStyle = '#000000';
          ctx.lineWidth = 1;
          ctx.beginPath();
          ctx.moveTo(X, Y - 4);
          ctx.lineTo(X + 4, Y);
          ctx.lineTo(X, Y + 4);
          ctx.lineTo(X - 4, Y);
          ctx.closePath();
          ctx.fill();
          ctx.stroke();
        }
        for (const k of range) {
          const X = xOf(fr, ridge.frequency[k]);
          const Y = yOf(fr, ridge.velocity[k]);
          ctx.strokeStyle = '#ffffff';
          ctx.lineWidth = 3;
          ctx.beginPath();
          ctx.arc(X, Y, 9, 0, 2 * Math.PI);
          ctx.stroke();
          ctx.strokeStyle = '#ff3fa4';
          ctx.lineWidth = 1.5;
          ctx.stroke();
        }
      }
      ctx.restore();
    };
    draw();
    const observer = typeof ResizeObserver !== 'undefined' ? new ResizeObserver(() => draw()) : undefined;
    observer?.observe(c);
    return () => observer?.disconnect();
  }, [image, props.ridge, props.range, props.removed, props.picks, curves, layered, props.computed?.unsupported, settings, props.theme]);

  const local = (e: PointerEvent) => {
    const r = (e.currentTarget as HTMLCanvasElement).getBoundingClientRect();
    return { x: e.clientX - r.left, y: e.clientY - r.top };
  };
  const inside = (fr: Frame, x: number, y: number) => x >= fr.left && x <= fr.left + fr.width && y >= fr.top && y <= fr.top + fr.height;

  const onDown = (e: PointerEvent) => {
    const fr = frame.current;
    if (!fr) return;
    const { x, y } = local(e);
    const { ridge, range } = props;
    if (ridge && range) {
      for (const [end, k] of [
        ['low', range[0]],
        ['high', range[1]],
      ] as const) {
        if (Math.hypot(x - xOf(fr, ridge.frequency[k]), y - yOf(fr, ridge.velocity[k])) <= HANDLE_REACH) {
          drag.current = { end, x };
          (e.currentTarget as HTMLCanvasElement).setPointerCapture?.(e.pointerId);
          return;
        }
      }
    }
  };
  const onMove = (e: PointerEvent) => {
    if (drag.current) drag.current.x = local(e).x;
  };
  const onUp = (e: PointerEvent) => {
    const fr = frame.current;
    if (!fr) return;
    const { x, y } = local(e);
    if (drag.current) {
      const end = drag.current.end;
      drag.current = null;
      props.onDragEnd(end, hzAt(fr, Math.min(Math.max(x, fr.left), fr.left + fr.width)));
      return;
    }
    if (inside(fr, x, y)) props.onTap(hzAt(fr, x), vAt(fr, y));
  };

  const kindWords = image.method === 'phase-shift' ? 'phase velocity (phase-shift method)' : 'group velocity (multiple-filter method)';
  return (
    <canvas
      ref={canvas}
      class="dispersion-image"
      role="img"
      aria-label={`Dispersion image: ${kindWords} against ${settings.axis === 'frequency' ? 'frequency in Hz' : 'period in s'}, brighter where more energy travels; dimmed grey areas are unreliable. Tap a bright ridge to follow it; the points are listed below the image.`}
      onPointerDown={onDown}
      onPointerMove={onMove}
      onPointerUp={onUp}
    />
  );
}

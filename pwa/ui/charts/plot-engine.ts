/**
 * The dispersion plot, drawn with uPlot. Loaded lazily (with the curve
 * computation it needs), so the first screen's JavaScript stays small.
 *
 * One uPlot instance lives as long as the axis settings and the set of
 * drawn curves stay the same; new picks or a new model only call setData,
 * once per animation frame at most (the what-if sliders fire faster).
 * Picks, their error bars (± one sd), the selected pick and the cutoffs are
 * drawn by a small plugin on the same canvas; a tap finds the nearest pick.
 */
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { LayeredModel } from '../../../core/dispersion/model';
import {
  computedColumns,
  curveColumns,
  curveKeysOf,
  extentOf,
  pickColumns,
  plotBand,
  type AxisQuantity,
  type ComputedCurves,
  type ComputedKey,
  type CurveColumns,
  type CurveKey,
  type PickColumns,
  type PlotPick,
} from './chart-data';
import { curveDash, faded, modeColour, palette, pickShape, pickShapeFilled, tracePickShape, type Palette } from './curve-style';

export interface PlotInput {
  picks: readonly PlotPick[];
  /** The model whose curves are drawn (the estimate's best, or the what-if model). */
  model?: LayeredModel;
  /** How the curves are labelled: the fitted model or the what-if model. */
  curveLabel: string;
  /** A second model drawn thin and grey for comparison (the best fit under a what-if model). */
  compare?: LayeredModel;
  /**
   * Curves computed in the worker (Love and/or Rayleigh, several layers),
   * drawn instead of `model`'s; `unsupported` draws them thin and faint (an
   * estimate the picks do not resolve).
   */
  computed?: ComputedCurves & { unsupported?: boolean };
  /** Computed curves drawn thin and grey for comparison under `computed` (on the same band; left out otherwise). */
  computedCompare?: ComputedCurves;
  selectedId?: string;
  axis: AxisQuantity;
  xLog: boolean;
  yLog: boolean;
  theme: string;
}

function signature(input: PlotInput, keys: readonly CurveKey[], hasModel: boolean, hasCompare = false): string {
  const k = keys.map((c) => `${(c as Partial<ComputedKey>).wave ?? ''}${c.mode}${c.kind}`).join(',');
  return [input.axis, input.xLog, input.yLog, input.theme, hasModel, hasCompare, !!input.computed?.unsupported, k].join('|');
}

/** Whether two bands hold the same frequencies (so their curves share the x column). */
function sameBand(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** NaN → null, as uPlot draws gaps only at null. */
function gaps(col: Float64Array): (number | null)[] {
  const out = new Array<number | null>(col.length);
  for (let i = 0; i < col.length; i++) out[i] = Number.isNaN(col[i]) ? null : col[i];
  return out;
}

export class DispersionPlot {
  private u?: uPlot;
  private sig = '';
  private pending?: PlotInput;
  private frame = 0;
  private picks: PickColumns = pickColumns([], 'frequency');
  private ids: (string | undefined)[] = [];
  private curves?: CurveColumns;
  private selected = -1;
  private pal: Palette;
  private xRange: [number, number] = [1, 10];
  private yRange: [number, number] = [100, 500];
  private readonly ro: ResizeObserver;

  constructor(
    private readonly el: HTMLElement,
    private readonly onSelect: (id: string | undefined) => void,
  ) {
    this.pal = palette(el);
    this.ro = new ResizeObserver(() => {
      if (this.u) this.u.setSize(this.size());
    });
    this.ro.observe(el);
  }

  private size(): { width: number; height: number } {
    const w = Math.max(240, Math.floor(this.el.clientWidth));
    const h = Math.max(220, Math.floor(this.el.clientHeight || w * 0.62));
    return { width: w, height: h };
  }

  /** Queues new input; the latest input is drawn on the next animation frame. */
  update(input: PlotInput): void {
    this.pending = input;
    if (!this.frame) this.frame = requestAnimationFrame(() => this.flush());
  }

  /** Draws the pending input now (tests and the first draw). */
  flush(): void {
    this.frame = 0;
    const input = this.pending;
    if (!input) return;
    this.pending = undefined;
    let keys: CurveKey[] = curveKeysOf(input.picks);
    this.picks = pickColumns(input.picks, input.axis);
    this.ids = input.picks.map((p) => p.id);
    this.selected = input.selectedId ? this.ids.indexOf(input.selectedId) : -1;
    let band: Float64Array;
    try {
      band = plotBand(input.picks);
      if (input.computed) {
        const c = computedColumns(input.computed, input.picks, input.axis);
        band = input.computed.band;
        keys = c.keys;
        this.curves = { keys: c.keys, x: c.x, y: c.y, cutoffs: [] };
      } else this.curves = input.model ? curveColumns(input.model, band, keys, input.axis) : undefined;
    } catch {
      this.curves = undefined;
      band = new Float64Array(0);
    }
    // The comparison curves share the band (and so the x column) of the main curves.
    let compare: { keys: CurveKey[]; y: Float64Array[] } | undefined;
    try {
      if (this.curves && input.computed && input.computedCompare && sameBand(input.computedCompare.band, input.computed.band)) {
        compare = computedColumns(input.computedCompare, input.picks, input.axis);
      } else compare = this.curves && input.compare && !input.computed ? curveColumns(input.compare, band, keys, input.axis) : undefined;
    } catch {
      compare = undefined;
    }
    const xCol = this.curves ? this.curves.x : this.sortedX(band, input.axis);
    this.xRange = this.padded(extentOf([this.picks.x, xCol]), input.xLog);
    this.yRange = this.padded(
      extentOf([this.picks.y, ...(this.curves ? this.curves.y : [])], [this.picks.sd]),
      input.yLog,
    );
    const data: uPlot.AlignedData = [xCol, ...(this.curves ? this.curves.y.map(gaps) : []), ...(compare ? compare.y.map(gaps) : [])];
    const sig = `${signature(input, keys, !!this.curves, !!compare)}|${compare ? signature(input, compare.keys, true) : ''}`;
    if (!this.u || sig !== this.sig) {
      this.sig = sig;
      this.pal = palette(this.el);
      this.u?.destroy();
      this.u = new uPlot(this.options(input, keys, compare?.keys), data, this.el);
      this.u.over.addEventListener('click', this.onTap);
    } else {
      this.u.setData(data);
    }
  }

  private sortedX(band: Float64Array, axis: AxisQuantity): Float64Array {
    const x = Float64Array.from(band, (f) => (axis === 'frequency' ? f : 1 / f));
    return x.sort();
  }

  private padded([lo, hi]: [number, number], log: boolean): [number, number] {
    if (!Number.isFinite(lo) || !Number.isFinite(hi)) return log ? [1, 100] : [0, 1];
    if (log) {
      const l = Math.max(lo, 1e-9);
      return [l / 1.15, hi * 1.15];
    }
    const pad = (hi - lo) * 0.06 || Math.abs(hi) * 0.1 || 1;
    return [Math.max(0, lo - pad), hi + pad];
  }

  private options(input: PlotInput, keys: readonly CurveKey[], compareKeys?: readonly CurveKey[]): uPlot.Options {
    const pal = this.pal;
    const xLabel = input.axis === 'frequency' ? 'Frequency (Hz)' : 'Period (s)';
    // Chart text grows with Sunlight contrast.
    const sun = input.theme === 'sun';
    const font = sun ? '600 16px system-ui, sans-serif' : '14px system-ui, sans-serif';
    // On log axes, label 1, 2 and 5 of each decade (uPlot puts ticks at 1–9 × 10^k).
    const logValues = (_u: uPlot, splits: number[]) =>
      splits.map((v) => {
        const decade = 10 ** Math.floor(Math.log10(v) + 1e-9);
        const lead = Math.round(v / decade);
        const round = Math.abs(v - lead * decade) < 1e-6 * v;
        return round && (lead === 1 || lead === 2 || lead === 5) ? String(Number(v.toPrecision(3))) : '';
      });
    const axis = (label: string, log: boolean): uPlot.Axis => ({
      label,
      ...(log ? { values: logValues, filter: (_u: uPlot, splits: number[]) => splits } : {}),
      stroke: pal.text,
      font,
      labelFont: sun ? 'bold 16px system-ui, sans-serif' : 'bold 14px system-ui, sans-serif',
      grid: { stroke: pal.grid, width: 1 },
      ticks: { stroke: pal.grid, width: 1 },
    });
    const series: uPlot.Series[] = [{}];
    if (this.curves) {
      const faint = !!input.computed?.unsupported;
      for (const k of keys) {
        const wave = (k as Partial<ComputedKey>).wave ?? 'love';
        const colour = wave === 'rayleigh' ? pal.rayleigh : modeColour(pal, k.mode);
        series.push({
          label: `${input.curveLabel}: ${wave} mode ${k.mode} ${k.kind}`,
          stroke: faint ? faded(colour) : colour,
          width: faint ? 1.25 : k.mode === 0 ? 2.5 : 1.75,
          dash: curveDash(wave, k.kind),
          points: { show: false },
          spanGaps: false,
        });
      }
      if (compareKeys) {
        for (const k of compareKeys) {
          series.push({
            label: `best fit: mode ${k.mode} ${k.kind}`,
            stroke: pal.text,
            width: 1.25,
            dash: [2, 4],
            points: { show: false },
            spanGaps: false,
          });
        }
      }
    }
    return {
      ...this.size(),
      legend: { show: false },
      cursor: { drag: { x: false, y: false }, points: { show: false }, x: false, y: false },
      scales: {
        x: { time: false, distr: input.xLog ? 3 : 1, range: () => this.xRange },
        y: { distr: input.yLog ? 3 : 1, range: () => this.yRange },
      },
      axes: [axis(xLabel, input.xLog), axis('Velocity (m/s)', input.yLog)],
      series,
      hooks: { draw: [(u) => this.drawOverlay(u)] },
    };
  }

  /** Picks with ± one-sd bars, the selection ring and the cutoffs. */
  private drawOverlay(u: uPlot): void {
    const ctx = u.ctx;
    const pr = devicePixelRatio || 1;
    const { left, top, width, height } = u.bbox;
    ctx.save();
    ctx.beginPath();
    ctx.rect(left, top, width, height);
    ctx.clip();
    // cutoffs
    if (this.curves) {
      ctx.setLineDash([3 * pr, 4 * pr]);
      ctx.lineWidth = 1.5 * pr;
      ctx.font = `${12 * pr}px system-ui, sans-serif`;
      for (const c of this.curves.cutoffs) {
        const x = u.valToPos(c.x, 'x', true);
        ctx.strokeStyle = modeColour(this.pal, c.mode);
        ctx.beginPath();
        ctx.moveTo(x, top);
        ctx.lineTo(x, top + height);
        ctx.stroke();
        ctx.fillStyle = this.pal.text;
        ctx.fillText(`mode ${c.mode} cutoff`, x + 4 * pr, top + 14 * pr);
      }
      ctx.setLineDash([]);
    }
    const p = this.picks;
    const r = 5 * pr;
    for (let i = 0; i < p.x.length; i++) {
      const x = u.valToPos(p.x[i], 'x', true);
      const y = u.valToPos(p.y[i], 'y', true);
      const y0 = u.valToPos(Math.max(p.y[i] - p.sd[i], 1e-9), 'y', true);
      const y1 = u.valToPos(p.y[i] + p.sd[i], 'y', true);
      const rayleigh = p.wave[i] === 1;
      const colour = rayleigh ? this.pal.rayleigh : modeColour(this.pal, p.mode[i]);
      ctx.strokeStyle = colour;
      ctx.fillStyle = colour;
      ctx.lineWidth = 1.5 * pr;
      ctx.beginPath();
      ctx.moveTo(x, y0);
      ctx.lineTo(x, y1);
      ctx.moveTo(x - r * 0.8, y0);
      ctx.lineTo(x + r * 0.8, y0);
      ctx.moveTo(x - r * 0.8, y1);
      ctx.lineTo(x + r * 0.8, y1);
      ctx.stroke();
      // The mark tells wave and kind by shape as well as colour (curve-style.ts pickShape), as the image and the keys do.
      const shape = pickShape(rayleigh ? 'rayleigh' : 'love', p.phase[i] ? 'phase' : 'group');
      ctx.beginPath();
      tracePickShape(ctx, shape, x, y, r);
      if (pickShapeFilled(shape)) ctx.fill();
      else {
        ctx.lineWidth = 2 * pr;
        ctx.stroke();
      }
      if (i === this.selected) {
        ctx.strokeStyle = this.pal.select;
        ctx.lineWidth = 3 * pr;
        ctx.beginPath();
        ctx.arc(x, y, r * 2.4, 0, 2 * Math.PI);
        ctx.stroke();
      }
    }
    ctx.restore();
  }

  private onTap = (ev: MouseEvent): void => {
    const u = this.u;
    if (!u) return;
    const rect = u.over.getBoundingClientRect();
    const px = ev.clientX - rect.left;
    const py = ev.clientY - rect.top;
    let best = -1;
    let bestD = 28 * 28; // a fingertip, CSS px²
    const p = this.picks;
    for (let i = 0; i < p.x.length; i++) {
      const dx = u.valToPos(p.x[i], 'x') - px;
      const dy = u.valToPos(p.y[i], 'y') - py;
      const d = dx * dx + dy * dy;
      if (d < bestD) {
        bestD = d;
        best = i;
      }
    }
    this.onSelect(best >= 0 ? this.ids[best] : undefined);
  };

  destroy(): void {
    cancelAnimationFrame(this.frame);
    this.ro.disconnect();
    this.u?.destroy();
    this.u = undefined;
  }
}

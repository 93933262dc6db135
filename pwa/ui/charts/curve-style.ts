/**
 * How dispersion curves look, shared by the picks plot (plot-engine.ts,
 * uPlot) and the dispersion image (dispersion-image.tsx, canvas), so a
 * curve is drawn the same way on both: the colours from the page's CSS
 * variables (both themes), a colour per mode for Love waves and one of its
 * own for Rayleigh waves, a dash pattern per wave and kind (so the waves
 * differ by line style as well as colour), and half strength for curves
 * the data do not support. Picks are told apart by shape as well as
 * colour (pickShape, tracePickShape): Love group picks filled discs, Love
 * phase picks open diamonds, Rayleigh group picks filled squares, Rayleigh
 * phase picks open triangles, on the plot, on the image and in their keys.
 * No uPlot here, so the image does not load it.
 */

/** Plot colours, read from the page's CSS variables so both themes apply. */
export interface Palette {
  modes: string[];
  text: string;
  grid: string;
  select: string;
  cutoff: string;
  /** Rayleigh picks (told apart from Love by shape as well). */
  rayleigh: string;
}

export function palette(el: HTMLElement): Palette {
  const cs = getComputedStyle(el);
  const v = (name: string, fallback: string) => cs.getPropertyValue(name).trim() || fallback;
  return {
    modes: [v('--mode-0', '#0b4fa8'), v('--mode-1', '#b04a00'), v('--mode-2', '#6b2fa0'), v('--mode-3', '#00695c')],
    text: v('--ink', '#111'),
    grid: v('--grid', '#ccc'),
    select: v('--select', '#d00'),
    cutoff: v('--ink-soft', '#555'),
    rayleigh: v('--rayleigh', '#8a4f00'),
  };
}

/** Colour of a mode, cycling the palette. */
export function modeColour(p: { modes: string[] }, mode: number): string {
  return p.modes[mode % p.modes.length];
}

/**
 * Dash pattern of a curve, so Love and Rayleigh curves differ by line style
 * as well as colour: Love group solid, Love phase dashed; Rayleigh phase
 * dash-dot, Rayleigh group dash-dot-dot.
 */
export function curveDash(wave: 'love' | 'rayleigh', kind: 'phase' | 'group'): number[] | undefined {
  if (wave === 'rayleigh') return kind === 'phase' ? [12, 4, 2, 4] : [12, 4, 2, 4, 2, 4];
  return kind === 'phase' ? [8, 5] : undefined;
}

/** A colour at half strength (for curves the data do not support). */
export function faded(colour: string): string {
  return /^#[0-9a-f]{6}$/i.test(colour) ? `${colour}80` : colour;
}

/** The mark of a pick: its shape tells its wave and kind without colour. */
export type PickShape = 'disc' | 'diamond' | 'square' | 'triangle';

/** A pick's shape: Love group a disc, Love phase a diamond; Rayleigh group a square, Rayleigh phase a triangle. */
export function pickShape(wave: 'love' | 'rayleigh' | undefined, kind: 'phase' | 'group'): PickShape {
  if (wave === 'rayleigh') return kind === 'phase' ? 'triangle' : 'square';
  return kind === 'phase' ? 'diamond' : 'disc';
}

/** Group picks are drawn filled, phase picks open (a stroked outline). */
export function pickShapeFilled(shape: PickShape): boolean {
  return shape === 'disc' || shape === 'square';
}

/** Each shape as a text character, for the keys that explain the marks. */
export const PICK_SHAPE_GLYPH: Readonly<Record<PickShape, string>> = { disc: '●', diamond: '◇', square: '■', triangle: '△' };

/** The path calls a pick's mark needs (a canvas 2D context has them). */
export type ShapePath = Pick<CanvasPath, 'moveTo' | 'lineTo' | 'closePath' | 'arc' | 'rect'>;

/**
 * Adds a pick's mark centred on (x, y) to the current path, `r` the disc's
 * radius (the others are sized to look as big); the caller fills it
 * (pickShapeFilled) or strokes it.
 */
export function tracePickShape(ctx: ShapePath, shape: PickShape, x: number, y: number, r: number): void {
  if (shape === 'disc') {
    ctx.moveTo(x + r, y);
    ctx.arc(x, y, r, 0, 2 * Math.PI);
  } else if (shape === 'square') {
    ctx.rect(x - r * 0.9, y - r * 0.9, r * 1.8, r * 1.8);
  } else if (shape === 'triangle') {
    ctx.moveTo(x, y - r * 1.3);
    ctx.lineTo(x + r * 1.2, y + r * 0.9);
    ctx.lineTo(x - r * 1.2, y + r * 0.9);
    ctx.closePath();
  } else {
    ctx.moveTo(x, y - r * 1.2);
    ctx.lineTo(x + r * 1.2, y);
    ctx.lineTo(x, y + r * 1.2);
    ctx.lineTo(x - r * 1.2, y);
    ctx.closePath();
  }
}

/**
 * How dispersion curves look, shared by the picks plot (plot-engine.ts,
 * uPlot) and the dispersion image (dispersion-image.tsx, canvas), so a
 * curve is drawn the same way on both: the colours from the page's CSS
 * variables (both themes), a colour per mode for Love waves and one of its
 * own for Rayleigh waves, a dash pattern per wave and kind (so the waves
 * differ by line style as well as colour), and half strength for curves
 * the data do not support. No uPlot here, so the image does not load it.
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

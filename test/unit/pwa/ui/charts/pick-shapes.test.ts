/**
 * Pick marks (pwa/ui/charts/curve-style.ts), shared by the picks plot
 * (plot-engine.ts) and the Records view's dispersion image
 * (dispersion-image.tsx): Love and Rayleigh picks differ by shape as well
 * as colour, group picks filled and phase picks open, and the image's key
 * (records-view.tsx picksKey) names the same shapes.
 */
import { describe, expect, it } from 'vitest';
import { PICK_SHAPE_GLYPH, pickShape, pickShapeFilled, tracePickShape, type ShapePath } from '../../../../../pwa/ui/charts/curve-style';
import { picksKey } from '../../../../../pwa/ui/views/records-view';

/** A path that records its calls, in place of a canvas. */
function recorder(): { path: ShapePath; calls: [string, ...number[]][] } {
  const calls: [string, ...number[]][] = [];
  const rec =
    (name: string) =>
    (...a: unknown[]): void =>
      void calls.push([name, ...a.filter((v): v is number => typeof v === 'number')]);
  const path: ShapePath = { moveTo: rec('moveTo'), lineTo: rec('lineTo'), closePath: rec('closePath'), arc: rec('arc'), rect: rec('rect') };
  return { path, calls };
}

describe('pick marks', () => {
  it('give each wave and kind its own shape: Love discs and diamonds, Rayleigh squares and triangles; group filled, phase open', () => {
    const shapes = (['love', 'rayleigh'] as const).flatMap((w) => (['group', 'phase'] as const).map((k) => pickShape(w, k)));
    expect(shapes).toEqual(['disc', 'diamond', 'square', 'triangle']);
    expect(pickShape(undefined, 'group')).toBe('disc'); // a pick without a wave is a Love pick (core/picks/picks.ts)
    expect(shapes.map(pickShapeFilled)).toEqual([true, false, true, false]);
    expect(new Set(shapes.map((s) => PICK_SHAPE_GLYPH[s])).size).toBe(4);
  });

  it('trace each shape around its centre, within 1.3 times the disc radius', () => {
    const [x, y, r] = [100, 50, 5];
    const traced = (['disc', 'diamond', 'square', 'triangle'] as const).map((s) => {
      const p = recorder();
      tracePickShape(p.path, s, x, y, r);
      return p.calls;
    });
    expect(traced[0]).toContainEqual(['arc', x, y, r, 0, 2 * Math.PI]);
    expect(traced[2]).toEqual([['rect', x - 4.5, y - 4.5, 9, 9]]);
    const corners = (calls: [string, ...number[]][]) => calls.filter((c) => c[0] === 'moveTo' || c[0] === 'lineTo');
    expect(corners(traced[1])).toHaveLength(4);
    expect(corners(traced[3])).toHaveLength(3);
    for (const calls of [traced[1], traced[3]]) {
      expect(calls.at(-1)).toEqual(['closePath']);
      for (const [, cx, cy] of corners(calls)) {
        expect(Math.abs(cx - x)).toBeLessThanOrEqual(1.3 * r);
        expect(Math.abs(cy - y)).toBeLessThanOrEqual(1.3 * r);
      }
    }
  });

  it('are named in the image key by the same shapes the image draws for its kind', () => {
    expect(picksKey('group')).toBe("The site's group picks: ● Love, ■ Rayleigh.");
    expect(picksKey('phase')).toBe("The site's phase picks: ◇ Love, △ Rayleigh.");
  });
});

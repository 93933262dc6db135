/**
 * The verdict on a thickness (core/estimate/verdict.ts) in the short forms
 * the screens use: the plot caption, the site card, the headline's first
 * words. Everywhere the thickness shows, it shows with its verdict; an
 * unresolved thickness is never shown as a bare number. Small and pure, so
 * the first screen's chunk can carry it.
 */
import type { EstimateVerdict, VerdictLevel } from '../../../core/estimate/verdict';
import { num } from './format';

/** The words for each level, as a badge. */
export const LEVEL_WORDS: Record<VerdictLevel, string> = {
  resolved: 'resolved',
  rough: 'only roughly known',
  unresolved: 'not resolved',
};

interface ThicknessLike {
  best: number;
  low95: number;
  high95: number;
}

/** "H = 7.49 m (resolved)", "H ≈ 6 m, only roughly known (95 %: 5–8.3 m)" or "H not resolved: more than 4.2 m". */
export function thicknessWithVerdict(h: ThicknessLike, v: Pick<EstimateVerdict, 'level' | 'known'>): string {
  if (v.level === 'unresolved') return `H not resolved: ${v.known}`;
  if (v.level === 'rough') return `H ≈ ${num(h.best)} m, only roughly known (95 %: ${num(h.low95)}–${num(h.high95)} m)`;
  return `H = ${num(h.best)} m (resolved; 95 %: ${num(h.low95)}–${num(h.high95)} m)`;
}

/** The plot caption under the best-fit curve. */
export function bestFitCaption(h: ThicknessLike, v: Pick<EstimateVerdict, 'level' | 'known'>): string {
  if (v.level === 'unresolved') return `Best-fit curve for reference only: layer thickness not resolved (${v.known}); see the survey plan.`;
  return `Best fit: ${thicknessWithVerdict(h, v)}.`;
}

/**
 * The verdict of a stored estimate summary (the JSON of core/estimate/estimate-json.ts),
 * or undefined for an older summary that has none.
 */
export function storedVerdict(summary: Record<string, unknown> | undefined): { level: VerdictLevel; text: string } | undefined {
  const v = summary?.verdict as { level?: unknown; text?: unknown } | undefined;
  if (!v || typeof v.text !== 'string' || (v.level !== 'resolved' && v.level !== 'rough' && v.level !== 'unresolved')) return undefined;
  return { level: v.level, text: v.text };
}

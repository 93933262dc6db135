/**
 * The verdict on a layered estimate: one word and one plain sentence, in
 * the same form as the one-layer estimate's verdict (resolved, rough,
 * unresolved; the sentence holds "not resolved" exactly when the level is
 * `unresolved`).
 *
 * Rules (our own, for this tool; the depth rule is common practice):
 *  - `unresolved`: the picks support fewer layers than were fitted (model
 *    choice), or a layer's thickness or shear speed above the depth of
 *    investigation is not resolved (95 % interval over most of its search
 *    range, profile-types.ts UNRESOLVED_SHARE);
 *  - `rough`: otherwise, when the fit is poor, several layerings fit, the
 *    deepest interface lies below the depth of investigation, or a 95 %
 *    interval is wider than half its best value;
 *  - `resolved`: none of these.
 */
import type { ProfileResult } from './profile-types';

export type ProfileVerdictLevel = 'resolved' | 'rough' | 'unresolved';

export type ProfileVerdictReason =
  | 'fewer-layers-supported'
  | 'unresolved-parameter'
  | 'poor-fit'
  | 'several-layerings'
  | 'beyond-depth'
  | 'wide-interval';

export interface ProfileVerdict {
  level: ProfileVerdictLevel;
  /** One plain sentence; holds "not resolved" exactly when level is `unresolved`. */
  text: string;
  reasons: ProfileVerdictReason[];
}

/** A 95 % interval wider than this fraction of its best value makes the verdict `rough` (our own rule of thumb). */
export const PROFILE_WIDE_FRACTION = 0.5;

export function profileVerdict(r: Pick<ProfileResult, 'layers' | 'profile' | 'choice' | 'intervalScale' | 'alternatives' | 'depthOfInvestigation'>): ProfileVerdict {
  const reasons: ProfileVerdictReason[] = [];
  const N = r.layers;
  if (r.choice.recommended < N) reasons.push('fewer-layers-supported');
  let top = 0;
  let unresolved = false;
  let wide = false;
  for (const l of r.profile.layers) {
    if (top < r.depthOfInvestigation && (!l.thickness.resolved || !l.vs.resolved)) unresolved = true;
    for (const p of [l.thickness, l.vs]) if (p.high95 - p.low95 > PROFILE_WIDE_FRACTION * p.best) wide = true;
    top += l.thickness.best;
  }
  if (unresolved) reasons.push('unresolved-parameter');
  if (r.intervalScale > 1) reasons.push('poor-fit');
  if (r.alternatives.some((a) => a.kind === 'minimum' || a.layers < N)) reasons.push('several-layerings');
  if (top > r.depthOfInvestigation) reasons.push('beyond-depth');
  if (wide) reasons.push('wide-interval');
  const level: ProfileVerdictLevel =
    reasons.includes('fewer-layers-supported') || reasons.includes('unresolved-parameter') ? 'unresolved' : reasons.length > 0 ? 'rough' : 'resolved';
  const plural = (n: number) => `${n} layer${n > 1 ? 's' : ''}`;
  let text: string;
  if (level === 'unresolved') {
    text =
      r.choice.recommended < N
        ? `The ${plural(N)} are not resolved: the picks support only ${plural(r.choice.recommended)}; use that, or pick a wider band of frequencies.`
        : `The ${plural(N)} are not resolved: some thicknesses or speeds above the depth of investigation are barely narrowed by the picks; use fewer layers or pick a wider band.`;
  } else if (level === 'rough') {
    const why: string[] = [];
    if (reasons.includes('poor-fit')) why.push('the fit is poor');
    if (reasons.includes('several-layerings')) why.push('other layerings fit about as well');
    if (reasons.includes('beyond-depth')) why.push('the deepest interface lies below the depth of investigation');
    if (reasons.includes('wide-interval')) why.push('some intervals are wide');
    text = `A rough profile of ${plural(N)}: ${why.join(', ')}; use the band, not the best line.`;
  } else {
    text = `The ${plural(N)} over the half-space are resolved within the stated intervals, down to the depth of investigation.`;
  }
  return { level, text, reasons };
}

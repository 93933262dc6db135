/**
 * The demo site (core/exchange/demo.ts) is an invented scenario: it must say so, its
 * picks must meet the same rules as any typed pick, and the seeded noise
 * must make the same picks every time.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_MODEL, DEMO_SITE, demoPicks } from '../../../../core/exchange/demo';
import { loveVelocities } from '../../../../core/dispersion/love-layer';
import { checkPickSet, validatePick } from '../../../../core/picks/picks';

describe('demo site', () => {
  it('is marked invented in its name and notes', () => {
    expect(DEMO_SITE.name).toMatch(/invented/i);
    expect(DEMO_SITE.notes).toMatch(/INVENTED SCENARIO/);
    expect(DEMO_SITE.crew).toMatch(/invented/i);
  });

  it('makes the same picks for the same seed and different ones for another seed', () => {
    expect(demoPicks(7)).toEqual(demoPicks(7));
    expect(demoPicks(7)).not.toEqual(demoPicks(8));
  });

  it('makes picks that pass the core pick rules, with fundamental and first-mode group picks', () => {
    const picks = demoPicks();
    picks.forEach((p, i) => validatePick(p, `pick ${i + 1}`));
    checkPickSet(picks, (i) => `pick ${i + 1}`);
    expect(new Set(picks.map((p) => p.mode))).toEqual(new Set([0, 1]));
  });

  it('scatters the picks about the invented model by about their stated sd', () => {
    const picks = demoPicks();
    let chi2 = 0;
    for (const p of picks) {
      const u = loveVelocities(DEMO_MODEL, p.frequency, p.mode).group;
      chi2 += ((p.velocity - u) / p.sd!) ** 2;
    }
    const perPick = chi2 / picks.length;
    // 23 unit-variance normals: chi2/n lies in 0.3–2.2 with probability > 99 % (chi-square table, 23 dof).
    expect(perPick).toBeGreaterThan(0.3);
    expect(perPick).toBeLessThan(2.2);
  });
});

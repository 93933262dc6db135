/**
 * The demo site: an INVENTED scenario, so that a new user sees the whole
 * flow in one tap. Nothing here is a real place, survey or crew.
 *
 * The invented ground: a river-terrace fill, 7.5 m of loose sandy gravel
 * (β1 = 190 m/s, ρ1 = 1850 kg/m³) over weathered mudstone (β2 = 560 m/s,
 * ρ2 = 2150 kg/m³). The picks are that model's Love-wave group velocities
 * (fundamental mode 3–40 Hz, first higher mode above its cutoff), computed
 * with the core's closed forms (love-layer.ts), plus seeded Gaussian noise
 * of 3 % of the velocity, which each pick states as its sd.
 */
import type { TwoLayer } from '../dispersion/love-layer';
import { loveCutoffHz, loveVelocities } from '../dispersion/love-layer';
import type { Pick } from '../picks/picks';
import { mulberry32, normals } from '../shared/random';
import { DEMO_SITE, isDemoSite } from './records';

// The demo site's fields and its test live with the records (records.ts),
// so the sync code can tell the demo apart without loading this generator.
export { DEMO_SITE, isDemoSite };

/** The invented model the demo picks come from. */
export const DEMO_MODEL: Readonly<TwoLayer> = Object.freeze({ h: 7.5, vs1: 190, vs2: 560, rho1: 1850, rho2: 2150 });

/** Relative noise (one sd) on the demo picks. */
export const DEMO_NOISE = 0.03;
/** Seed of the demo noise. */
export const DEMO_SEED = 20260414;

const round = (x: number, digits: number) => Number(x.toFixed(digits));

/** The demo picks: deterministic for a given seed. */
export function demoPicks(seed = DEMO_SEED): Pick[] {
  const gauss = normals(mulberry32(seed));
  const picks: Pick[] = [];
  const add = (f: number, mode: number) => {
    const u = loveVelocities(DEMO_MODEL, f, mode).group;
    if (!Number.isFinite(u)) return;
    const sd = round(DEMO_NOISE * u, 1);
    picks.push({ frequency: f, velocity: round(u + sd * gauss(), 1), kind: 'group', mode, sd });
  };
  for (const f of [3, 4, 5, 6, 7, 8, 9, 10, 12, 14, 16, 18, 21, 24, 28, 33, 40]) add(f, 0);
  const f1 = loveCutoffHz(DEMO_MODEL, 1);
  for (const f of [16, 19, 22, 26, 30, 35]) if (f > f1 * 1.05) add(f, 1);
  return picks;
}

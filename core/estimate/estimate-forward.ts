/**
 * The forward model of the estimate: each pick's predicted velocity, for
 * its own kind (group or phase) and mode, from one layer over a half-space.
 *
 * Method: the closed forms of love-layer.ts (Aki & Richards, *Quantitative
 * Seismology*, 2nd ed. 2002, §7.2–7.3): the period equation solved by
 * safeguarded Newton from a starting guess (lovePhaseVelocityNear), the
 * group velocity from the energy integrals (loveGroupVelocityAt).
 *
 * Domain: SI units, β2 > β1. Below the cutoff of the pick's mode the mode
 * does not exist; the prediction is then β2, the value both velocities tend
 * to at the cutoff, which keeps a misfit built on it continuous (documented
 * in estimate.ts). Accuracy: about 1e-15 relative (love-layer.ts).
 */
import { loveGroupVelocityAt, lovePhaseVelocityNear, type TwoLayer } from '../dispersion/love-layer';

/**
 * The model's velocity for pick-like (f, mode, kind), m/s; β2 below the
 * mode's cutoff. `guess` is a phase velocity to start from (NaN: none): the
 * period equation is then solved by safeguarded Newton (lovePhaseVelocityNear),
 * as exact as Brent but a few times faster inside a fit.
 */
export function predictVelocity(m: TwoLayer, f: number, mode: number, phase: boolean, guess = NaN): number {
  const c = phaseVelocityFrom(m, f, mode, guess);
  if (Number.isNaN(c)) return m.vs2;
  return phase ? c : loveGroupVelocityAt(m, f, c);
}

/** Phase velocity of mode `mode` at f from a guess (NaN: none); NaN below the mode's cutoff. */
export function phaseVelocityFrom(m: TwoLayer, f: number, mode: number, guess: number): number {
  const r = lovePhaseVelocityNear(m, f, mode, guess);
  return r.status === 'converged' ? r.x : NaN;
}

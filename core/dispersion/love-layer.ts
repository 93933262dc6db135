/**
 * Love waves in one layer over a half-space: closed forms.
 *
 * Period equation (Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002,
 * §7.2; Stein & Wysession 2003, §2.7):
 *
 *   tan(ω H η1) = μ2 η2 / (μ1 η1),
 *   η1 = √(1/β1² − 1/c²),  η2 = √(1/c² − 1/β2²),  μ = ρβ².
 *
 * Branch n (n = 0, 1, 2, …, arctan in [0, π/2)):
 *
 *   ω_n(c) = [arctan(μ2 η2 / (μ1 η1)) + nπ] / (H η1),
 *
 * strictly decreasing in c on (β1, β2), so each mode has exactly one phase
 * velocity at each frequency above its cutoff f_n = n β1 β2 / (2H √(β2² − β1²)).
 *
 * Group velocity from the energy integrals (Aki & Richards §7.3), with
 * ν1 = ω η1, ν2 = ω η2:
 *
 *   L = H/2 + sin(2ν1H)/(4ν1),  B = cos²(ν1H)/(2ν2),
 *   U = (μ1 L + μ2 B) / (c (ρ1 L + ρ2 B)).
 *
 * Units: SI (m, s, Hz, m/s, kg/m³). These functions do not validate: they
 * sit in hot loops. Validate once with model.ts. Outside a mode's domain
 * they return NaN (documented per function).
 */
import { brent, type RootOutcome } from '../numeric/roots';

/** One layer over a half-space. */
export interface TwoLayer {
  /** Layer thickness H, m. */
  h: number;
  /** Layer shear speed β1, m/s. */
  vs1: number;
  /** Half-space shear speed β2 > β1, m/s. */
  vs2: number;
  /** Layer density ρ1, kg/m³. */
  rho1: number;
  /** Half-space density ρ2, kg/m³. */
  rho2: number;
}

/** η1 = √(1/β1² − 1/c²), written to avoid cancellation as c → β1. */
function eta1(c: number, b1: number): number {
  return Math.sqrt(Math.max(0, (c - b1) * (c + b1))) / (b1 * c);
}

/** η2 = √(1/c² − 1/β2²), written to avoid cancellation as c → β2. */
function eta2(c: number, b2: number): number {
  return Math.sqrt(Math.max(0, (b2 - c) * (b2 + c))) / (b2 * c);
}

/** Cutoff frequency of mode n, Hz. Mode 0 has none (returns 0). */
export function loveCutoffHz(p: TwoLayer, n: number): number {
  return (n * p.vs1 * p.vs2) / (2 * p.h * Math.sqrt((p.vs2 - p.vs1) * (p.vs2 + p.vs1)));
}

/** Number of modes present at frequency f: floor(f/f1) + 1. */
export function loveModeCount(p: TwoLayer, f: number): number {
  if (!(f > 0)) return 0;
  // Guard the case f exactly on a cutoff: that mode starts *above* it.
  const f1 = loveCutoffHz(p, 1);
  const n = Math.floor(f / f1);
  return loveCutoffHz(p, n) >= f ? n : n + 1;
}

/**
 * Angular frequency ω_n(c) of mode n at phase velocity c, rad/s, from the
 * explicit branch form. Defined for β1 < c ≤ β2; NaN outside.
 */
export function loveBranchOmega(p: TwoLayer, c: number, n: number): number {
  if (!(c > p.vs1 && c <= p.vs2)) return NaN;
  const mu1 = p.rho1 * p.vs1 * p.vs1;
  const mu2 = p.rho2 * p.vs2 * p.vs2;
  const e1 = eta1(c, p.vs1);
  const e2 = eta2(c, p.vs2);
  return (Math.atan((mu2 * e2) / (mu1 * e1)) + n * Math.PI) / (p.h * e1);
}

/**
 * Period-equation residual in phase form, g(c) = ωHη1 − arctan(μ2η2/(μ1η1)) − nπ.
 * It is increasing in c, negative at c = β1 and positive at c = β2 above cutoff.
 */
export function lovePhaseResidual(p: TwoLayer, omega: number, c: number, n: number): number {
  const mu1 = p.rho1 * p.vs1 * p.vs1;
  const mu2 = p.rho2 * p.vs2 * p.vs2;
  const e1 = eta1(c, p.vs1);
  const e2 = eta2(c, p.vs2);
  const ratio = e1 === 0 ? Infinity : (mu2 * e2) / (mu1 * e1);
  return omega * p.h * e1 - Math.atan(ratio) - n * Math.PI;
}

/** The classical form's residual, tan(ωHη1) − μ2η2/(μ1η1), for tests of the roots. */
export function lovePeriodEquationResidual(p: TwoLayer, f: number, c: number): number {
  const mu1 = p.rho1 * p.vs1 * p.vs1;
  const mu2 = p.rho2 * p.vs2 * p.vs2;
  const e1 = eta1(c, p.vs1);
  const e2 = eta2(c, p.vs2);
  return Math.tan(2 * Math.PI * f * p.h * e1) - (mu2 * e2) / (mu1 * e1);
}

/**
 * Where the residual at c = β2 is not positive: below the cutoff the mode
 * does not exist ('bracket-lost'). But when loveModeCount counts the mode
 * (f above loveCutoffHz by a few rounding units), the residual at β2 is
 * within rounding of 0: the root is β2 itself to within that rounding
 * (c → β2 as f → f_n⁺, shared/PHYSICS.md §2), so β2 is returned as
 * converged rather than losing a mode the count says is there.
 */
function justAboveCutoff(p: TwoLayer, f: number, n: number, residualAtB2: number): RootOutcome {
  if (f > 0 && f > loveCutoffHz(p, n)) return { status: 'converged', x: p.vs2, fx: residualAtB2, iterations: 0 };
  return { status: 'bracket-lost', x: NaN, fx: NaN, iterations: 0 };
}

/**
 * Phase velocity of mode n at frequency f, with the solver outcome.
 * Brent's method on the phase residual over [β1, β2]; relative accuracy
 * about 1e-15. Below cutoff (the mode does not exist) the outcome has
 * status 'bracket-lost' and x = NaN.
 */
export function lovePhaseVelocitySolve(p: TwoLayer, f: number, n: number): RootOutcome {
  const omega = 2 * Math.PI * f;
  const g = (c: number) => lovePhaseResidual(p, omega, c, n);
  const lo = -Math.PI / 2 - n * Math.PI; // g(β1) exactly
  const hi = g(p.vs2);
  if (!(f > 0) || !(hi > 0)) return justAboveCutoff(p, f, n, hi);
  return brent(g, p.vs1, p.vs2, lo, hi);
}

/**
 * Phase velocity of mode n at frequency f from a starting guess, with the
 * solver outcome: for sweeps, where the previous frequency's root is a
 * close guess.
 *
 * Method: since η1² + η2² = D² = 1/β1² − 1/β2² is fixed, put η1 = D sin φ,
 * η2 = D cos φ, φ ∈ (0, π/2) (c rises with φ). The period equation in phase
 * form becomes smooth and strictly increasing in φ, free of the
 * square-root ends that slow iteration in c:
 *
 *   g(φ) = ωHD sin φ − arctan((μ2/μ1) cot φ) − nπ,
 *   g′(φ) = ωHD cos φ + q / (sin²φ + q² cos²φ),  q = μ2/μ1,
 *
 * with g(0) = −π/2 − nπ and g(π/2) = ωHD − nπ (> 0 above cutoff). Solved by
 * safeguarded Newton iteration (steps that leave the bracket are replaced by
 * bisection; Press et al., *Numerical Recipes*, 3rd ed. 2007, §9.4,
 * "rtsafe"), stopped when a step is below 1e-13 rad, after which the error
 * is at rounding level. Then 1/c² = 1/β2² + D² cos²φ (a sum of positive
 * terms, no cancellation). Relative accuracy about 1e-15, as
 * lovePhaseVelocitySolve. Below cutoff: status 'bracket-lost', x = NaN. A
 * guess outside (β1, β2) (e.g. NaN) starts from the middle. The outcome's
 * fx is the residual g in radians.
 */
export function lovePhaseVelocityNear(p: TwoLayer, f: number, n: number, guess: number): RootOutcome {
  const omega = 2 * Math.PI * f;
  const q = (p.rho2 * p.vs2 * p.vs2) / (p.rho1 * p.vs1 * p.vs1);
  const D = Math.sqrt((p.vs2 - p.vs1) * (p.vs2 + p.vs1)) / (p.vs1 * p.vs2);
  const a = omega * p.h * D;
  const shift = n * Math.PI;
  if (!(f > 0) || !(a - shift > 0)) return justAboveCutoff(p, f, n, a - shift);
  let lo = 0;
  let hi = Math.PI / 2;
  let phi = guess > p.vs1 && guess < p.vs2 ? Math.atan2(eta1(guess, p.vs1), eta2(guess, p.vs2)) : Math.PI / 4;
  let g = NaN;
  let iter = 1;
  for (; iter <= 100; iter++) {
    const sn = Math.sin(phi);
    const cs = Math.cos(phi);
    g = a * sn - Math.atan((q * cs) / sn) - shift;
    if (g === 0) break;
    if (g < 0) lo = phi;
    else hi = phi;
    const dg = a * cs + q / (sn * sn + q * q * cs * cs);
    const step = g / dg;
    if (Math.abs(step) <= 1e-13) {
      phi -= step;
      break;
    }
    const next = phi - step;
    phi = next > lo && next < hi ? next : 0.5 * (lo + hi);
  }
  const cs = Math.cos(phi);
  const c = 1 / Math.sqrt(1 / (p.vs2 * p.vs2) + D * D * cs * cs);
  const status = iter > 100 ? 'max-iterations' : 'converged';
  return { status, x: c, fx: a * Math.sin(phi) - Math.atan((q * cs) / Math.sin(phi)) - shift, iterations: Math.min(iter, 100) };
}

/** Phase velocity of mode n at f, m/s; NaN where the mode does not exist. */
export function lovePhaseVelocity(p: TwoLayer, f: number, n: number): number {
  const r = lovePhaseVelocitySolve(p, f, n);
  return r.status === 'converged' ? r.x : NaN;
}

/**
 * Group velocity U at frequency f and phase velocity c (a root of mode n),
 * m/s, from the energy integrals. At cutoff it tends to β2, at high
 * frequency to β1.
 */
export function loveGroupVelocityAt(p: TwoLayer, f: number, c: number): number {
  if (!(c > p.vs1 && c < p.vs2)) return c === p.vs2 ? p.vs2 : NaN;
  const omega = 2 * Math.PI * f;
  const mu1 = p.rho1 * p.vs1 * p.vs1;
  const mu2 = p.rho2 * p.vs2 * p.vs2;
  const nu1 = omega * eta1(c, p.vs1);
  const nu2 = omega * eta2(c, p.vs2);
  const L = p.h / 2 + Math.sin(2 * nu1 * p.h) / (4 * nu1);
  const cosNu = Math.cos(nu1 * p.h);
  const B = (cosNu * cosNu) / (2 * nu2);
  return (mu1 * L + mu2 * B) / (c * (p.rho1 * L + p.rho2 * B));
}

/** Phase and group velocity of mode n at f; both NaN where the mode does not exist. */
export function loveVelocities(p: TwoLayer, f: number, n: number): { phase: number; group: number } {
  const c = lovePhaseVelocity(p, f, n);
  return { phase: c, group: Number.isNaN(c) ? NaN : loveGroupVelocityAt(p, f, c) };
}

/**
 * Layer thickness H that puts mode n through the phase pick (f, c), m, from
 * the branch form turned around: H = [arctan(μ2η2/(μ1η1)) + nπ] / (ω η1).
 * NaN unless β1 < c < β2.
 */
export function loveThicknessFromPhasePick(
  speeds: Omit<TwoLayer, 'h'>,
  f: number,
  c: number,
  n: number,
): number {
  const omega = 2 * Math.PI * f;
  const w = loveBranchOmega({ ...speeds, h: 1 }, c, n); // ω for H = 1 m; ω scales as 1/H
  return w / omega;
}

/**
 * The dimensionless curve. With β2/β1 and ρ2/ρ1 fixed, c/β1 and U/β1 depend
 * only on x = f·H/β1 (shared/PHYSICS.md §2, scaling). Returns both at x for
 * mode n; NaN where the mode does not exist.
 */
export function loveDimensionless(
  vsRatio: number,
  densityRatio: number,
  x: number,
  n: number,
): { phase: number; group: number } {
  return loveVelocities({ h: 1, vs1: 1, vs2: vsRatio, rho1: 1, rho2: densityRatio }, x, n);
}

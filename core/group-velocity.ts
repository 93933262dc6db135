/**
 * Love-wave group velocity in N layers over a half-space, from the energy
 * integrals.
 *
 * What: U = dω/dk of a Love mode at (ω, c), where c is a root of the
 * secular function (core/love-stack.ts).
 *
 * Method: Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.3:
 * with I1 = ½∫ρ l² dz and I2 = ½∫μ l² dz over the whole depth,
 *
 *   U = I2 / (c I1).
 *
 * The eigenfunction is propagated from the surface with the Thomson–Haskell
 * SH matrices (scaled as in love-stack.ts) and ∫ l² dz is closed-form in
 * each layer. With A = l and b = τ/μ at the top of a layer of thickness d,
 * x = νd (or γd), y = 2x:
 *
 *   oscillatory: ∫l² = A²d(½ + sin y/(2y)) + 2b²d³·(y − sin y)/y³ + A b d²(sin x/x)²
 *   evanescent:  ∫l² = A²d(½ + sinh y/(2y)) + 2b²d³·(sinh y − y)/y³ + A b d²(sinh x/x)²
 *   half-space:  ∫l² = l_H² / (2γ_H)
 *
 * (y − sin y)/y³ and (sinh y − y)/y³ use their Taylor series for small y, so
 * there is no cancellation as c → β; evanescent terms are carried scaled by
 * e^(−y) so nothing overflows. Never a difference of a sampled curve.
 *
 * Domain and units: SI; ω > 0 rad/s, β_min < c ≤ β_H m/s, c a root of the
 * secular function (elsewhere the number has no meaning). At c = β_H the
 * limit U = β_H is returned (the eigenfunction fills the half-space).
 * Accuracy: a few units of 1e-15 relative, plus the root's own error times
 * |dU/dc| (test/unit/group-velocity.test.ts checks 1e-9 against dω/dk).
 */
import type { LoveStack } from './love-stack';

/** (y − sin y)/y³, accurate for all y ≥ 0 (Taylor series below 0.5). */
function ySinY3(y: number): number {
  if (y < 0.5) {
    const y2 = y * y;
    return 1 / 6 - (y2 / 120) * (1 - (y2 / 42) * (1 - (y2 / 72) * (1 - (y2 / 110) * (1 - y2 / 156))));
  }
  return (y - Math.sin(y)) / (y * y * y);
}

/** (sinh y − y)/y³ · e^(−y), accurate for all y ≥ 0 (Taylor series below 0.5). */
function sinhYY3Scaled(y: number): number {
  if (y < 0.5) {
    const y2 = y * y;
    return (1 / 6 + (y2 / 120) * (1 + (y2 / 42) * (1 + (y2 / 72) * (1 + (y2 / 110) * (1 + y2 / 156))))) * Math.exp(-y);
  }
  const e = Math.exp(-y);
  return (0.5 * (1 - e * e) - y * e) / (y * y * y);
}

/**
 * Group velocity U (m/s) of the Love mode with phase velocity c (m/s) at
 * angular frequency ω (rad/s), from the energy integrals.
 */
export function loveStackGroupVelocity(s: LoveStack, omega: number, c: number): number {
  if (!(c < s.vsH)) return c === s.vsH ? s.vsH : NaN;
  const k = omega / c;
  let l = 1;
  let t = 0;
  let i1 = 0; // ∫ρ l², in the current scale
  let i2 = 0; // ∫μ l², in the current scale
  const { thickness, vs, mu, density, count } = s;
  for (let j = 0; j < count; j++) {
    const bj = vs[j];
    const d = thickness[j];
    const u = mu[j];
    const A = l;
    const b = t / u;
    let integral: number;
    if (c > bj) {
      const nu = (k * Math.sqrt((c - bj) * (c + bj))) / bj;
      const x = nu * d;
      const y = 2 * x;
      const cs = Math.cos(x);
      const sn = Math.sin(x);
      // ν > 0 here (c > β and k > 0), so x > 0.
      const sinc = sn / x;
      integral = A * A * d * (0.5 + Math.sin(y) / (2 * y)) + 2 * b * b * d * d * d * ySinY3(y) + A * b * d * d * sinc * sinc;
      l = cs * A + (sn / nu) * b;
      t = cs * t - u * nu * sn * A;
    } else {
      const g = (k * Math.sqrt((bj - c) * (bj + c))) / bj;
      const x = g * d;
      const y = 2 * x;
      const e = Math.exp(-y); // scale² for this layer
      const ch = 0.5 * (1 + e); // cosh x · e^(−x)
      const sh = -0.5 * Math.expm1(-y); // sinh x · e^(−x)
      // A²d(½ + sinh y/(2y))·e^(−y)
      const first = y === 0 ? d : d * (0.5 * e - (0.25 * Math.expm1(-2 * y)) / y);
      const shx = x === 0 ? 1 : sh / x; // (sinh x / x)·e^(−x)
      integral = A * A * first + 2 * b * b * d * d * d * sinhYY3Scaled(y) + A * b * d * d * shx * shx;
      i1 *= e;
      i2 *= e;
      l = ch * A + (g === 0 ? b * d : (sh / g) * b);
      t = ch * t + u * g * sh * A;
    }
    i1 += density[j] * integral;
    i2 += u * integral;
  }
  const gH = (k * Math.sqrt((s.vsH - c) * (s.vsH + c))) / s.vsH;
  const tail = (l * l) / (2 * gH);
  i1 += s.densityH * tail;
  i2 += s.muH * tail;
  return i2 / (c * i1);
}

/**
 * Love-wave group velocity in N layers over a half-space, from the energy
 * integrals.
 *
 * What: U = dω/dk of a Love mode at (ω, c), where c is a root of the
 * secular function (core/dispersion/love-stack.ts).
 *
 * Method: Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.3:
 * with I1 = ½∫ρ l² dz and I2 = ½∫μ l² dz over the whole depth,
 *
 *   U = I2 / (c I1).
 *
 * The eigenfunction is propagated with the Thomson–Haskell SH matrices
 * (scaled as in love-stack.ts), down from the surface and up from the
 * half-space, joined at one interface (see loveStackGroupVelocity), and
 * ∫ l² dz is closed-form in each layer. With A = l and b = τ/μ at the top of a layer of thickness d,
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
 * |dU/dc| (test/unit/core/dispersion/group-velocity.test.ts checks 1e-9 against dω/dk).
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

/** Scratch columns, grown on demand and reused (no per-call allocation). */
let downL = new Float64Array(8);
let downT = new Float64Array(8);
let downI1 = new Float64Array(8);
let downI2 = new Float64Array(8);
let downDrop = new Float64Array(8);
let upL = new Float64Array(8);
let upT = new Float64Array(8);
let upI1 = new Float64Array(8);
let upI2 = new Float64Array(8);
let upDrop = new Float64Array(8);

function ensureScratch(n: number): void {
  if (downL.length >= n) return;
  const size = Math.max(n, 2 * downL.length);
  downL = new Float64Array(size);
  downT = new Float64Array(size);
  downI1 = new Float64Array(size);
  downI2 = new Float64Array(size);
  downDrop = new Float64Array(size);
  upL = new Float64Array(size);
  upT = new Float64Array(size);
  upI1 = new Float64Array(size);
  upI2 = new Float64Array(size);
  upDrop = new Float64Array(size);
}

/** State carried through one layer: (l, τ) and the two integrals, scaled together. */
const st = { l: 0, t: 0, i1: 0, i2: 0 };

/**
 * Carries st through layer j (thickness d, β, μ, ρ) at (k, c): the layer's
 * ∫ρl², ∫μl² are added and the state moves to the layer's far side. The
 * same map serves the upward sweep with (l, −τ), since reversing depth
 * leaves the SH system unchanged.
 */
function carry(d: number, bj: number, u: number, rho: number, k: number, c: number): void {
  const A = st.l;
  const b = st.t / u;
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
    st.l = cs * A + (sn / nu) * b;
    st.t = cs * st.t - u * nu * sn * A;
  } else {
    const g = (k * Math.sqrt((bj - c) * (bj + c))) / bj;
    const x = g * d;
    const y = 2 * x;
    const em = Math.expm1(-y);
    const e = 1 + em; // scale² for this layer, e^(−2x)
    const ch = 1 + 0.5 * em; // cosh x · e^(−x)
    const sh = -0.5 * em; // sinh x · e^(−x)
    // A²d(½ + sinh y/(2y))·e^(−y)
    const first = y === 0 ? d : d * (0.5 * e - (0.25 * Math.expm1(-2 * y)) / y);
    const shx = x === 0 ? 1 : sh / x; // (sinh x / x)·e^(−x)
    integral = A * A * first + 2 * b * b * d * d * d * sinhYY3Scaled(y) + A * b * d * d * shx * shx;
    st.i1 *= e;
    st.i2 *= e;
    st.l = ch * A + (g === 0 ? b * d : (sh / g) * b);
    st.t = ch * st.t + u * g * sh * A;
  }
  st.i1 += rho * integral;
  st.i2 += u * integral;
}

/**
 * Renormalises st so that |l| + |τ|/ref = 1 (the integrals, quadratic in
 * the state, by the square) and returns the natural log of the size
 * removed. Without it, many strong impedance contrasts grow the state by
 * the contrast ratios until it overflows (the exponentials alone are
 * already scaled out).
 */
function normalise(invRef: number): number {
  const size = Math.abs(st.l) + Math.abs(st.t) * invRef;
  const inv = 1 / size;
  st.l *= inv;
  st.t *= inv;
  st.i1 *= inv * inv;
  st.i2 *= inv * inv;
  return Math.log(size);
}

/**
 * Group velocity U (m/s) of the Love mode with phase velocity c (m/s) at
 * angular frequency ω (rad/s), from the energy integrals.
 *
 * The eigenfunction is built from two sweeps: down from the free surface
 * and up from the half-space (where it decays as e^(−γ_H z)), joined at the
 * interface where both are most trustworthy. A sweep loses accuracy where
 * the true solution decays relative to the growing one that the scaling
 * follows; in scaled units that shows as a drop of the state's size from
 * its running maximum, so the join is placed where the larger of the two
 * drops is least. (A single downward sweep would be swamped by rounding for
 * a mode trapped above thick evanescent layers, e.g. high frequency in a
 * soft top layer.)
 */
export function loveStackGroupVelocity(s: LoveStack, omega: number, c: number): number {
  if (!(c < s.vsH)) return c === s.vsH ? s.vsH : NaN;
  const k = omega / c;
  const n = s.count;
  ensureScratch(n + 1);
  const { thickness, vs, mu, density } = s;
  const ref = s.muH * k; // τ/(μ_H k) is dimensionless like l
  // Downward sweep from the free surface: (l, τ) = (1, 0).
  st.l = 1;
  st.t = 0;
  st.i1 = 0;
  st.i2 = 0;
  // Sizes are kept as logs: the state itself is renormalised after every layer.
  const invRef = 1 / ref;
  let logSize = 0;
  let peak = 0;
  for (let j = 0; j <= n; j++) {
    if (j > 0) {
      carry(thickness[j - 1], vs[j - 1], mu[j - 1], density[j - 1], k, c);
      logSize += normalise(invRef);
    }
    downL[j] = st.l;
    downT[j] = st.t;
    downI1[j] = st.i1;
    downI2[j] = st.i2;
    if (logSize > peak) peak = logSize;
    downDrop[j] = peak - logSize;
  }
  // Upward sweep from the half-space, in (l, τ′ = −τ): (1, μ_H γ_H), with the half-space integrals.
  const gH = (k * Math.sqrt((s.vsH - c) * (s.vsH + c))) / s.vsH;
  st.l = 1;
  st.t = s.muH * gH;
  st.i1 = s.densityH / (2 * gH);
  st.i2 = s.muH / (2 * gH);
  logSize = normalise(invRef);
  peak = -Infinity;
  for (let j = n; j >= 0; j--) {
    if (j < n) {
      carry(thickness[j], vs[j], mu[j], density[j], k, c);
      logSize += normalise(invRef);
    }
    upL[j] = st.l;
    upT[j] = -st.t;
    upI1[j] = st.i1;
    upI2[j] = st.i2;
    if (logSize > peak) peak = logSize;
    upDrop[j] = peak - logSize;
  }
  // Join where the worse of the two sweeps has dropped least.
  let best = n;
  let bestDrop = Infinity;
  for (let j = 0; j <= n; j++) {
    const drop = Math.max(downDrop[j], upDrop[j]);
    if (drop < bestDrop) {
      bestDrop = drop;
      best = j;
    }
  }
  // Scale the upward solution onto the downward one at the join (least squares on (l, τ/(μ_H k))).
  const ld = downL[best];
  const td = downT[best] / ref;
  const lu = upL[best];
  const tu = upT[best] / ref;
  const alpha = (ld * lu + td * tu) / (lu * lu + tu * tu);
  const i1 = downI1[best] + alpha * alpha * upI1[best];
  const i2 = downI2[best] + alpha * alpha * upI2[best];
  return i2 / (c * i1);
}

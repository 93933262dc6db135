/**
 * Rayleigh waves (P-SV) in N layers over a half-space: the secular function
 * by compound matrices, with its exact derivatives in c and k.
 *
 * What: F(c, k), a real function whose zeros in c (at fixed ω = ck) are the
 * phase velocities of the Rayleigh modes of a stack of homogeneous isotropic
 * layers over a half-space, for β_min·(lower bound) < c ≤ β_H; and ∂F/∂c,
 * ∂F/∂k at a point, for the group velocity U = c − k·F_k/F_c (implicit
 * differentiation of F(c, k) = 0 with ω = ck; exact, not a difference).
 *
 * Method: compound (delta) matrices, Dunkin 1965, BSSA 55:335–358: the
 * 2×2 minors of the two surface solutions are propagated instead of the
 * solutions, so the growing exponentials that ruin plain Thomson–Haskell at
 * high frequency-thickness cancel analytically. Our derivation of the layer
 * step (equivalent to Dunkin's, organised differently):
 *
 * Motion–stress vector y = (U, W, T, S) with u_x = U e^{i(kx−ωt)},
 * u_z = iW e^{…}, τ_xz = T e^{…}, τ_zz = iS e^{…} (Aki & Richards,
 * *Quantitative Seismology*, 2nd ed. 2002, §7.2, eq. 7.28), in the
 * dimensionless depth ẑ = kz and stresses divided by μ_H k. In a layer with
 * q = μ/μ_H, p = β²/α², x = c²/β²:
 *
 *   dy/dẑ = A y,  A = [[0, 1, 1/q, 0], [−(1−2p), 0, 0, p/q],
 *                      [4q(1−p) − qx, 0, 0, 1−2p], [0, −qx, −1, 0]].
 *
 * A² has the eigenvalues a = 1 − px (P) and b = 1 − x (S), each twice; the
 * spectral projectors are M_a = (A² − b)/(a − b) and M_b = I − M_a, with
 * a − b = x(1 − p) > 0 always. In closed form M_a = [[2u, 0, 0, u/q],
 * [0, 1−2u, −u/q, 0], [0, 2q(2u−1), 2u, 0], [2q(1−2u), 0, 0, 1−2u]], u = 1/x.
 * With L = kd, C_a = cosh(√a L), S_a = sinh(√a L)/√a (cos and sin/√−a for
 * a < 0: both entire in a, so nothing is singular at c = α or c = β), the
 * layer matrix is
 *
 *   P = P_a + P_b,  P_a = (C_a + S_a A) M_a,  P_b = (C_b + S_b A) M_b.
 *
 * The minors of P act on a bivector m (as an antisymmetric matrix) by
 * m ↦ P m Pᵀ. P_a maps the P-wave plane to itself with determinant 1, so
 * P_a m P_aᵀ = M_a m M_aᵀ exactly (no exponentials at all), likewise for b,
 * and the only growing part is the mixed term, which grows like
 * e^{(√a + √b)L}, the true growth of the minors:
 *
 *   P m Pᵀ = M_a m M_aᵀ + M_b m M_bᵀ + (Z − Zᵀ),  Z = P_a m P_bᵀ.
 *
 * The mixed term is evaluated with e^{−√a L}, e^{−√b L} taken out of the
 * evanescent functions, and the constant terms are multiplied by the same
 * factor, so nothing overflows; after every layer the six minors are
 * divided by their largest magnitude (normalisation per layer). Both are
 * positive factors: they change neither the sign nor the zeros of F.
 *
 * Free surface: T = S = 0, so the minors start as m = e_U ∧ e_W. At the
 * half-space top the two decaying solutions (P: (1, r_α, −2r_α, −g),
 * S: (r_β, 1, −g, −2r_β), r = √(1 − c²/v²), g = 2 − c²/β_H²) give n = d_P ∧ d_S
 * and F = det[y₁ y₂ d_P d_S] = Σ ± m_ij n_kl (Laplace expansion). For no
 * layers F = 4 r_α r_β − g², Rayleigh's function.
 *
 * Derivatives: the same recursion carries ∂m/∂c and ∂m/∂k (forward
 * differentiation of every factor; the positive scale factors are held
 * fixed, which multiplies F, F_c and F_k by the same factor at a root).
 * The fast form (rayleighSecularDerivatives) differentiates the five-minor
 * step, whose matrix is linear in the products of the entire functions;
 * the six-minor form (rayleighSecularDerivativesReference) is kept as the
 * readable reference it is tested against.
 *
 * Domain and units: SI in (m, s, m/s, kg/m³, rad/s); 0 < c ≤ β_H, k > 0;
 * the model must carry P speeds (validate with model.ts first: these
 * functions do not validate). Accuracy: F to a few hundred units of
 * rounding relative to its scale (terms in 1/x² lose up to (β/c)⁴ digits in
 * layers much stiffer than c); roots to about 1e-14 relative.
 */
import type { LayeredModel } from './model';

/** A model prepared for the P-SV propagator: columns of layer properties. */
export interface RayleighStack {
  /** Number of layers above the half-space. */
  readonly count: number;
  /** Layer thicknesses, m. */
  readonly thickness: Float64Array;
  /** Layer shear speeds β, m/s. */
  readonly vs: Float64Array;
  /** Layer P speeds α, m/s. */
  readonly vp: Float64Array;
  /** Layer densities ρ, kg/m³. */
  readonly density: Float64Array;
  /** μ/μ_H per layer (dimensionless). */
  readonly q: Float64Array;
  /** β²/α² per layer (dimensionless). */
  readonly p: Float64Array;
  /** Half-space shear speed β_H, m/s. */
  readonly vsH: number;
  /** Half-space P speed α_H, m/s. */
  readonly vpH: number;
  /** Half-space density ρ_H, kg/m³. */
  readonly densityH: number;
  /** Half-space β_H²/α_H². */
  readonly pH: number;
}

/** Copies a validated model with P speeds into columns (a missing P speed gives NaN results: validate first). */
export function prepareRayleighStack(model: LayeredModel): RayleighStack {
  const n = model.layers.length;
  const thickness = new Float64Array(n);
  const vs = new Float64Array(n);
  const vp = new Float64Array(n);
  const density = new Float64Array(n);
  const q = new Float64Array(n);
  const p = new Float64Array(n);
  const h = model.halfspace;
  const muH = h.density * h.vs * h.vs;
  const vpH = h.vp ?? NaN;
  for (let j = 0; j < n; j++) {
    const l = model.layers[j];
    thickness[j] = l.thickness;
    vs[j] = l.vs;
    vp[j] = l.vp ?? NaN;
    density[j] = l.density;
    q[j] = (l.density * l.vs * l.vs) / muH;
    p[j] = (l.vs * l.vs) / (vp[j] * vp[j]);
  }
  return { count: n, thickness, vs, vp, density, q, p, vsH: h.vs, vpH, densityH: h.density, pH: (h.vs * h.vs) / (vpH * vpH) };
}

/** Pair index → (i, j) of the minors m_ij, i < j: 01, 02, 03, 12, 13, 23. */
const PI = [0, 0, 0, 1, 1, 2] as const;
const PJ = [1, 2, 3, 2, 3, 3] as const;

// Scratch (no per-call allocation). 4×4 matrices row-major.
const MA = new Float64Array(16);
const MB = new Float64Array(16);
const AM = new Float64Array(16); // A·M_a
const BM = new Float64Array(16); // A·M_b
const X = new Float64Array(16);
const Y = new Float64Array(16);
const dMA = new Float64Array(16);
const dMB = new Float64Array(16);
const dAM = new Float64Array(16);
const dBM = new Float64Array(16);
const dXc = new Float64Array(16);
const dYc = new Float64Array(16);
const dXk = new Float64Array(16);
const dYk = new Float64Array(16);
const Amat = new Float64Array(16);
const dAmat = new Float64Array(16);
const MM = new Float64Array(16);
const T = new Float64Array(16);
const next = new Float64Array(6);
const nextC = new Float64Array(6);
const nextK = new Float64Array(6);

/** Entire functions of one wave type in one layer, scaled: see `functions`. */
const fa = { C: 0, S: 0, expo: 0, scale: 1, dCa: 0, dSa: 0 };
const fb = { C: 0, S: 0, expo: 0, scale: 1, dCa: 0, dSa: 0 };

/**
 * C = cosh(√a L), S = sinh(√a L)/√a (or cos, sin/√−a), multiplied by
 * e^{−√a L} when a > 0 (expo = √a L, else 0); with their derivatives in a
 * (dC/da = L S/2, dS/da = (L C − S)/(2a), by series for small |a|L²),
 * scaled alike. Derivatives in L are dC/dL = a S, dS/dL = C.
 */
function functions(out: typeof fa, a: number, L: number): void {
  let scale = 1;
  if (a > 0) {
    const r = Math.sqrt(a);
    const x = r * L;
    const em = Math.expm1(-2 * x);
    out.C = 1 + 0.5 * em;
    out.S = x === 0 ? L : (-0.5 * em) / r;
    out.expo = x;
    scale = Math.exp(-x);
  } else if (a < 0) {
    const r = Math.sqrt(-a);
    const x = r * L;
    out.C = Math.cos(x);
    out.S = Math.sin(x) / r;
    out.expo = 0;
  } else {
    out.C = 1;
    out.S = L;
    out.expo = 0;
  }
  out.scale = scale;
  out.dCa = 0.5 * L * out.S;
  const aL2 = a * L * L;
  if (Math.abs(aL2) < 0.1) {
    // Σ_{n≥1} a^{n−1} L^{2n+1} n/(2n+1)!
    const L3 = L * L * L;
    out.dSa = scale * L3 * (1 / 6 + aL2 * (1 / 60 + aL2 * (1 / 1680 + aL2 * (1 / 90720 + aL2 / 7983360))));
  } else {
    out.dSa = (L * out.C - out.S) / (2 * a);
  }
}

/**
 * As `functions`, into V[i…i+5]: C, S, scale, dC/da, dS/da and √a (0 when
 * a ≤ 0): the fast derivative path.
 */
function derivFunctions(V: Float64Array, i: number, a: number, L: number): void {
  let scale = 1;
  let C = 1;
  let S = L;
  let r = 0;
  if (a > 0) {
    // As in `values`.
    r = Math.sqrt(a);
    const x = r * L;
    if (x > 0.5) {
      const ex = Math.exp(-x);
      const E = ex * ex;
      C = 0.5 + 0.5 * E;
      S = (0.5 - 0.5 * E) / r;
      scale = ex;
    } else {
      const em1 = Math.expm1(-x);
      const em = em1 * (2 + em1);
      C = 1 + 0.5 * em;
      S = x === 0 ? L : (-0.5 * em) / r;
      scale = 1 + em1;
    }
  } else if (a < 0) {
    const q = Math.sqrt(-a);
    const x = q * L;
    C = Math.cos(x);
    S = Math.sin(x) / q;
  }
  V[i] = C;
  V[i + 1] = S;
  V[i + 2] = scale;
  V[i + 3] = 0.5 * L * S;
  const aL2 = a * L * L;
  if (Math.abs(aL2) < 0.1) {
    const L3 = L * L * L;
    V[i + 4] = scale * L3 * (1 / 6 + aL2 * (1 / 60 + aL2 * (1 / 1680 + aL2 * (1 / 90720 + aL2 / 7983360))));
  } else {
    V[i + 4] = (L * C - S) / (2 * a);
  }
  V[i + 5] = r;
}

/** Scratch of derivFunctions: P wave at 0, S wave at 6. */
const DF = new Float64Array(12);

/** M_a of one layer (closed form in the header) into MA, M_b = I − M_a into MB. */
function projectors(q: number, u: number): void {
  MA.fill(0);
  MA[0] = 2 * u;
  MA[3] = u / q;
  MA[5] = 1 - 2 * u;
  MA[6] = -u / q;
  MA[9] = 2 * q * (2 * u - 1);
  MA[10] = 2 * u;
  MA[12] = 2 * q * (1 - 2 * u);
  MA[15] = 1 - 2 * u;
  for (let i = 0; i < 16; i++) MB[i] = (i % 5 === 0 ? 1 : 0) - MA[i];
}

/** The system matrix A of one layer (header) into Amat. */
function systemMatrix(q: number, p: number, x: number): void {
  Amat.fill(0);
  Amat[1] = 1;
  Amat[2] = 1 / q;
  Amat[4] = -(1 - 2 * p);
  Amat[7] = p / q;
  Amat[8] = 4 * q * (1 - p) - q * x;
  Amat[11] = 1 - 2 * p;
  Amat[13] = -q * x;
  Amat[14] = -1;
}

/** out = P·Q (4×4). */
function mul(P: Float64Array, Q: Float64Array, out: Float64Array): void {
  for (let i = 0; i < 4; i++) {
    for (let j = 0; j < 4; j++) {
      out[4 * i + j] = P[4 * i] * Q[j] + P[4 * i + 1] * Q[4 + j] + P[4 * i + 2] * Q[8 + j] + P[4 * i + 3] * Q[12 + j];
    }
  }
}

/** out[r] += w·(Z_ij − Z_ji) for Z = P·m·Qᵀ, m the bivector (6 minors) as an antisymmetric matrix. */
function sandwich(P: Float64Array, m: Float64Array, Q: Float64Array, w: number, out: Float64Array): void {
  const M = MM;
  M[0] = 0;
  M[1] = m[0];
  M[2] = m[1];
  M[3] = m[2];
  M[4] = -m[0];
  M[5] = 0;
  M[6] = m[3];
  M[7] = m[4];
  M[8] = -m[1];
  M[9] = -m[3];
  M[10] = 0;
  M[11] = m[5];
  M[12] = -m[2];
  M[13] = -m[4];
  M[14] = -m[5];
  M[15] = 0;
  mul(P, M, T);
  for (let r = 0; r < 6; r++) {
    const i = PI[r];
    const j = PJ[r];
    const zij = T[4 * i] * Q[4 * j] + T[4 * i + 1] * Q[4 * j + 1] + T[4 * i + 2] * Q[4 * j + 2] + T[4 * i + 3] * Q[4 * j + 3];
    const zji = T[4 * j] * Q[4 * i] + T[4 * j + 1] * Q[4 * i + 1] + T[4 * j + 2] * Q[4 * i + 2] + T[4 * j + 3] * Q[4 * i + 3];
    out[r] += w * (zij - zji);
  }
}

/** Divides the minors (and derivative rows, when given) by the largest |m_ij|. */
function normalise(m: Float64Array, dc: Float64Array | null, dk: Float64Array | null): void {
  let big = 0;
  for (let r = 0; r < 6; r++) {
    const v = Math.abs(m[r]);
    if (v > big) big = v;
  }
  if (!(big > 0) || !Number.isFinite(big)) return;
  const s = 1 / big;
  for (let r = 0; r < 6; r++) {
    m[r] *= s;
    if (dc) dc[r] *= s;
    if (dk) dk[r] *= s;
  }
}

/** Minors at the surface: e_U ∧ e_W. */
function start(m: Float64Array): void {
  m.fill(0);
  m[0] = 1;
}

/** Carries the minors m through layer j at (c, k). */
function step(s: RayleighStack, j: number, c: number, k: number, m: Float64Array): void {
  const beta = s.vs[j];
  const x = (c * c) / (beta * beta);
  const u = 1 / x;
  const q = s.q[j];
  const p = s.p[j];
  const L = k * s.thickness[j];
  functions(fa, 1 - p * x, L);
  functions(fb, 1 - x, L);
  projectors(q, u);
  systemMatrix(q, p, x);
  mul(Amat, MA, AM);
  for (let i = 0; i < 16; i++) {
    BM[i] = Amat[i] - AM[i];
    X[i] = fa.C * MA[i] + fa.S * AM[i];
    Y[i] = fb.C * MB[i] + fb.S * BM[i];
  }
  const w = 0.5 * Math.exp(-(fa.expo + fb.expo));
  next.fill(0);
  sandwich(MA, m, MA, w, next);
  sandwich(MB, m, MB, w, next);
  sandwich(X, m, Y, 1, next);
  m.set(next);
  normalise(m, null, null);
}

/** The half-space's bivector n = d_P ∧ d_S at c, into out; with dn/dc into dOut when given. */
function halfspaceMinors(s: RayleighStack, c: number, out: Float64Array, dOut: Float64Array | null): void {
  const xH = (c * c) / (s.vsH * s.vsH);
  const ra = Math.sqrt(Math.max(0, 1 - s.pH * xH));
  const rb = Math.sqrt(Math.max(0, 1 - xH));
  const g = 2 - xH;
  const rr = ra * rb;
  out[0] = 1 - rr;
  out[1] = 2 * rr - g;
  out[2] = -rb * xH;
  out[3] = ra * xH;
  out[4] = g - 2 * rr;
  out[5] = 4 * rr - g * g;
  if (dOut) {
    const dx = (2 * c) / (s.vsH * s.vsH);
    const dra = (-s.pH * dx) / (2 * ra);
    const drb = -dx / (2 * rb);
    const dg = -dx;
    const drr = dra * rb + ra * drb;
    dOut[0] = -drr;
    dOut[1] = 2 * drr - dg;
    dOut[2] = -drb * xH - rb * dx;
    dOut[3] = dra * xH + ra * dx;
    dOut[4] = dg - 2 * drr;
    dOut[5] = 4 * drr - 2 * g * dg;
  }
}

/** det[y₁ y₂ d_P d_S] from the minors m of the surface solutions and n of the decaying ones. */
function pairing(m: Float64Array, n: Float64Array): number {
  return m[0] * n[5] - m[1] * n[4] + m[2] * n[3] + m[3] * n[2] - m[4] * n[1] + m[5] * n[0];
}

const minors = new Float64Array(6);
const nH = new Float64Array(6);

/** Binary exponent of the last rayleighSecular value's scale: the unscaled F is value · 2^exponent · (smooth factors). */
export const secularScale = { exponent: 0 };

/** The five minors are rescaled by an exact power of two when their size leaves [2^−256, 2^256]. */
const RESCALE_ABOVE = 2 ** 256;
const RESCALE_BELOW = 2 ** -256;

/**
 * The secular function at angular frequency ω (rad/s) and phase velocity
 * c (m/s), scaled by a positive factor (its sign and zeros are those of
 * the unscaled F). Continuous in c on (0, β_H]. The factor is smooth in c
 * (the analytic exponentials e^{−√a L}, e^{−√b L} of each layer) times an
 * exact power of two kept in secularScale, used only far from the range
 * of doubles; so a dip of |F| towards zero, the mark of two close roots,
 * stays visible between neighbouring values of c.
 *
 * The fast five-minor step: the surface solutions keep m_13 = −m_02 (a
 * symplectic invariant of the P-SV system), so five minors suffice
 * (Dunkin 1965): w = (m_01, m_02, m_03, m_12, m_23), here with the
 * stresses of layer j divided by μ_j k (so no moduli appear). The 5×5
 * matrix below is P m Pᵀ of the header written out (D = C_aC_b − e, e the
 * scale factor of the constant terms; t = 2u − 1; the same matrix as
 * stepMatrix), checked against `step` in
 * test/unit/core/dispersion/rayleigh-stack.test.ts. Written out with the
 * minors in locals (no scratch arrays, one exponential per evanescent
 * wave): this is the solver's inner loop.
 */
export function rayleighSecular(s: RayleighStack, omega: number, c: number): number {
  const k = omega / c;
  const c2 = c * c;
  const { vs, p: pCol, q: qCol, thickness } = s;
  let w0 = 1;
  let w1 = 0;
  let w2 = 0;
  let w3 = 0;
  let w4 = 0;
  let exponent = 0;
  let qPrev = 1;
  for (let j = 0; j < s.count; j++) {
    // Stresses from μ_{j−1}k to μ_j k units.
    const qj = qCol[j];
    const ratio = qPrev / qj;
    w1 *= ratio;
    w2 *= ratio;
    w3 *= ratio;
    w4 *= ratio * ratio;
    qPrev = qj;
    const beta = vs[j];
    const b2 = beta * beta;
    const x = c2 / b2;
    const u = b2 / c2;
    const p = pCol[j];
    const L = k * thickness[j];
    // C = cosh(√a L)·e^{−√a L}, S = sinh(√a L)/√a·e^{−√a L} and the scale e^{−√a L} (cos, sin/√−a and 1 for
    // a < 0), for the P wave (a = 1 − px) and the S wave (b = 1 − x). For √a L > 0.5, e^{−2√a L} < 0.37 and
    // 1 − e^{−2√a L} has no cancellation; below, e^{−2√a L} − 1 = (e^{−√a L} − 1)(e^{−√a L} + 1), exact.
    const a = 1 - p * x;
    let Ca = 1;
    let Sa = L;
    let ea = 1;
    if (a > 0) {
      const r = Math.sqrt(a);
      const y = r * L;
      if (y > 0.5) {
        ea = Math.exp(-y);
        const E = ea * ea;
        Ca = 0.5 + 0.5 * E;
        Sa = (0.5 - 0.5 * E) / r;
      } else {
        const e1 = Math.expm1(-y);
        const em = e1 * (2 + e1);
        ea = 1 + e1;
        Ca = 1 + 0.5 * em;
        Sa = y === 0 ? L : (-0.5 * em) / r;
      }
    } else if (a < 0) {
      const r = Math.sqrt(-a);
      const y = r * L;
      Ca = Math.cos(y);
      Sa = Math.sin(y) / r;
    }
    const b = 1 - x;
    let Cb = 1;
    let Sb = L;
    let eb = 1;
    if (b > 0) {
      const r = Math.sqrt(b);
      const y = r * L;
      if (y > 0.5) {
        eb = Math.exp(-y);
        const E = eb * eb;
        Cb = 0.5 + 0.5 * E;
        Sb = (0.5 - 0.5 * E) / r;
      } else {
        const e1 = Math.expm1(-y);
        const em = e1 * (2 + e1);
        eb = 1 + e1;
        Cb = 1 + 0.5 * em;
        Sb = y === 0 ? L : (-0.5 * em) / r;
      }
    } else if (b < 0) {
      const r = Math.sqrt(-b);
      const y = r * L;
      Cb = Math.cos(y);
      Sb = Math.sin(y) / r;
    }
    const e = ea * eb;
    const CC = Ca * Cb;
    const CS = Ca * Sb;
    const SC = Sa * Cb;
    const SS = Sa * Sb;
    const D = CC - e;
    const t = 2 * u - 1;
    const u1 = u - 1;
    const pu = p - u;
    const t2u = t * t * x;
    const s00 = 4 * p * u1 - 2 * t * t + 1;
    const s01 = 4 * p * u1 - 2 * u * (4 * u - 3);
    const s04 = u * t - p * u1;
    const s10 = -(8 * p * u * u1 - 16 * u * u * u + 20 * u * u - 6 * u + 1) * x;
    const s40 = -(16 * p * u * u * u1 - 32 * u * u * u * u + 48 * u * u * u - 24 * u * u + 8 * u - 1) * (x * x);
    const d4u1 = 4 * u - 1;
    const diag = CC + 4 * u * t * D + SS * s00;
    const n0 =
      diag * w0 + (2 * u * d4u1 * D + SS * s01) * w1 + (u * CS + pu * SC) * w2 + (u1 * CS - u * SC) * w3 + (-2 * u * u * D + SS * s04) * w4;
    const n1 =
      (-2 * t * d4u1 * D + SS * s10) * w0 +
      (e - 8 * u * t * D - 2 * SS * s00) * w1 +
      (-t * CS - 2 * pu * SC) * w2 +
      (-2 * u1 * CS + t * SC) * w3 +
      (u * d4u1 * D + 0.5 * SS * s01) * w4;
    const n2 = (4 * u1 * CS - t2u * SC) * w0 + (4 * u1 * CS - 2 * t * SC) * w1 + CC * w2 + (-(u1 / u) * SS) * w3 + (-u1 * CS + u * SC) * w4;
    const n3 = (t2u * CS + 4 * pu * SC) * w0 + (2 * t * CS + 4 * pu * SC) * w1 + ((pu / u) * SS) * w2 + CC * w3 + (-u * CS - pu * SC) * w4;
    const n4 =
      (-8 * t * t * D + SS * s40) * w0 +
      (-4 * t * d4u1 * D + 2 * SS * s10) * w1 +
      (-t2u * CS - 4 * pu * SC) * w2 +
      (-4 * u1 * CS + t2u * SC) * w3 +
      diag * w4;
    w0 = n0;
    w1 = n1;
    w2 = n2;
    w3 = n3;
    w4 = n4;
    // Keep the minors within 2^±256 by exact powers of two, counted in the exponent (so |F| stays comparable across c).
    const big = Math.max(Math.abs(w0), Math.abs(w1), Math.abs(w2), Math.abs(w3), Math.abs(w4));
    if (!(big < RESCALE_ABOVE && big > RESCALE_BELOW) && big > 0 && big < Infinity) {
      const ex = Math.round(Math.log2(big));
      const f = 2 ** -ex;
      w0 *= f;
      w1 *= f;
      w2 *= f;
      w3 *= f;
      w4 *= f;
      exponent += ex;
    }
  }
  w1 *= qPrev;
  w2 *= qPrev;
  w3 *= qPrev;
  w4 *= qPrev * qPrev;
  secularScale.exponent = exponent;
  // The half-space's bivector n = d_P ∧ d_S (halfspaceMinors), paired with the five minors (pair5).
  const xH = c2 / (s.vsH * s.vsH);
  const ra = Math.sqrt(Math.max(0, 1 - s.pH * xH));
  const rb = Math.sqrt(Math.max(0, 1 - xH));
  const g = 2 - xH;
  const rr = ra * rb;
  return w0 * (4 * rr - g * g) - w1 * (2 * g - 4 * rr) + w2 * (ra * xH) - w3 * (rb * xH) + w4 * (1 - rr);
}

/**
 * The secular function by the plain 6-minor form (`step`), the same
 * number up to rounding and a positive factor as rayleighSecular: kept as
 * the readable reference that the fast form is tested against.
 */
export function rayleighSecularReference(s: RayleighStack, omega: number, c: number): number {
  const k = omega / c;
  start(minors);
  for (let j = 0; j < s.count; j++) step(s, j, c, k, minors);
  halfspaceMinors(s, c, nH, null);
  return pairing(minors, nH);
}

/** F and its partial derivatives, scaled alike by one positive factor. */
export interface SecularDerivatives {
  value: number;
  /** ∂F/∂c at fixed k. */
  dc: number;
  /** ∂F/∂k at fixed c. */
  dk: number;
}

const dmc = new Float64Array(6);
const dmk = new Float64Array(6);
const dnH = new Float64Array(6);

/**
 * F, ∂F/∂c (fixed k) and ∂F/∂k (fixed c) at (ω, c), k = ω/c, by forward
 * differentiation of the plain 6-minor recursion (see the header): the
 * readable reference that the fast form, rayleighSecularDerivatives, is
 * tested against. Writes into `out` and returns it.
 */
export function rayleighSecularDerivativesReference(
  s: RayleighStack,
  omega: number,
  c: number,
  out: SecularDerivatives = { value: 0, dc: 0, dk: 0 },
): SecularDerivatives {
  const k = omega / c;
  start(minors);
  dmc.fill(0);
  dmk.fill(0);
  for (let j = 0; j < s.count; j++) {
    const beta = s.vs[j];
    const d = s.thickness[j];
    const x = (c * c) / (beta * beta);
    const dx = (2 * c) / (beta * beta); // ∂x/∂c
    const u = 1 / x;
    const du = -u * u * dx;
    const q = s.q[j];
    const p = s.p[j];
    const L = k * d;
    const a = 1 - p * x;
    const b = 1 - x;
    functions(fa, a, L);
    functions(fb, b, L);
    projectors(q, u);
    systemMatrix(q, p, x);
    mul(Amat, MA, AM);
    // ∂M_a/∂c from the closed form; ∂M_b = −∂M_a; ∂A/∂c has −q·dx at (2,0) and (3,1).
    dMA.fill(0);
    dMA[0] = 2 * du;
    dMA[3] = du / q;
    dMA[5] = -2 * du;
    dMA[6] = -du / q;
    dMA[9] = 4 * q * du;
    dMA[10] = 2 * du;
    dMA[12] = -4 * q * du;
    dMA[15] = -2 * du;
    dAmat.fill(0);
    dAmat[8] = -q * dx;
    dAmat[13] = -q * dx;
    mul(Amat, dMA, dAM);
    mul(dAmat, MA, T);
    for (let i = 0; i < 16; i++) dAM[i] += T[i];
    // Function derivatives: along c (through a, b at fixed L) and along k (through L).
    const daC = -p * dx;
    const dbC = -dx;
    const dCaC = fa.dCa * daC;
    const dSaC = fa.dSa * daC;
    const dCbC = fb.dCa * dbC;
    const dSbC = fb.dSa * dbC;
    const dCaK = a * fa.S * d;
    const dSaK = fa.C * d;
    const dCbK = b * fb.S * d;
    const dSbK = fb.C * d;
    for (let i = 0; i < 16; i++) {
      dMB[i] = -dMA[i];
      BM[i] = Amat[i] - AM[i];
      dBM[i] = dAmat[i] - dAM[i];
      X[i] = fa.C * MA[i] + fa.S * AM[i];
      Y[i] = fb.C * MB[i] + fb.S * BM[i];
      dXc[i] = dCaC * MA[i] + fa.C * dMA[i] + dSaC * AM[i] + fa.S * dAM[i];
      dYc[i] = dCbC * MB[i] + fb.C * dMB[i] + dSbC * BM[i] + fb.S * dBM[i];
      dXk[i] = dCaK * MA[i] + dSaK * AM[i];
      dYk[i] = dCbK * MB[i] + dSbK * BM[i];
    }
    const w = 0.5 * Math.exp(-(fa.expo + fb.expo));
    next.fill(0);
    nextC.fill(0);
    nextK.fill(0);
    sandwich(MA, minors, MA, w, next);
    sandwich(MB, minors, MB, w, next);
    sandwich(X, minors, Y, 1, next);
    // ∂/∂c
    sandwich(dMA, minors, MA, 2 * w, nextC);
    sandwich(MA, dmc, MA, w, nextC);
    sandwich(dMB, minors, MB, 2 * w, nextC);
    sandwich(MB, dmc, MB, w, nextC);
    sandwich(dXc, minors, Y, 1, nextC);
    sandwich(X, dmc, Y, 1, nextC);
    sandwich(X, minors, dYc, 1, nextC);
    // ∂/∂k
    sandwich(MA, dmk, MA, w, nextK);
    sandwich(MB, dmk, MB, w, nextK);
    sandwich(dXk, minors, Y, 1, nextK);
    sandwich(X, dmk, Y, 1, nextK);
    sandwich(X, minors, dYk, 1, nextK);
    minors.set(next);
    dmc.set(nextC);
    dmk.set(nextK);
    normalise(minors, dmc, dmk);
  }
  halfspaceMinors(s, c, nH, dnH);
  out.value = pairing(minors, nH);
  out.dc = pairing(dmc, nH) + pairing(minors, dnH);
  out.dk = pairing(dmk, nH);
  return out;
}

/**
 * The 5×5 matrix of the fast layer step (fastStep, row-major into G) as a
 * function of the products CC = C_aC_b, CS = C_aS_b, SC = S_aC_b,
 * SS = S_aS_b, D and e (the matrix is linear in these six, with
 * coefficients in u = β²/c² and p = β²/α²).
 */
function stepMatrix(G: Float64Array, u: number, p: number, CC: number, CS: number, SC: number, SS: number, D: number, e: number): void {
  const t = 2 * u - 1;
  const u1 = u - 1;
  const pu = p - u;
  const t2u = (t * t) / u;
  const s00 = 4 * p * u1 - 2 * t * t + 1;
  const s01 = 4 * p * u1 - 2 * u * (4 * u - 3);
  const s04 = u * t - p * u1;
  const s10 = -(8 * p * u * u1 - 16 * u * u * u + 20 * u * u - 6 * u + 1) / u;
  const s40 = -(16 * p * u * u * u1 - 32 * u * u * u * u + 48 * u * u * u - 24 * u * u + 8 * u - 1) / (u * u);
  const d4u1 = 4 * u - 1;
  G[0] = CC + 4 * u * t * D + SS * s00;
  G[1] = 2 * u * d4u1 * D + SS * s01;
  G[2] = u * CS + pu * SC;
  G[3] = u1 * CS - u * SC;
  G[4] = -2 * u * u * D + SS * s04;
  G[5] = -2 * t * d4u1 * D + SS * s10;
  G[6] = e - 8 * u * t * D - 2 * SS * s00;
  G[7] = -t * CS - 2 * pu * SC;
  G[8] = -2 * u1 * CS + t * SC;
  G[9] = u * d4u1 * D + 0.5 * SS * s01;
  G[10] = 4 * u1 * CS - t2u * SC;
  G[11] = 4 * u1 * CS - 2 * t * SC;
  G[12] = CC;
  G[13] = -(u1 / u) * SS;
  G[14] = -u1 * CS + u * SC;
  G[15] = t2u * CS + 4 * pu * SC;
  G[16] = 2 * t * CS + 4 * pu * SC;
  G[17] = (pu / u) * SS;
  G[18] = CC;
  G[19] = -u * CS - pu * SC;
  G[20] = -8 * t * t * D + SS * s40;
  G[21] = -4 * t * d4u1 * D + 2 * SS * s10;
  G[22] = -t2u * CS - 4 * pu * SC;
  G[23] = -4 * u1 * CS + t2u * SC;
  G[24] = CC + 4 * u * t * D + SS * s00;
}

/**
 * stepMatrix into G and, with the products' derivatives hCC … hD (and 0
 * for e, held fixed), its derivative into H: the matrix is linear in the
 * six products, so its derivative is the same matrix of their derivatives.
 */
function stepMatrixPair(
  G: Float64Array,
  H: Float64Array,
  u: number,
  p: number,
  CC: number,
  CS: number,
  SC: number,
  SS: number,
  D: number,
  e: number,
  hCC: number,
  hCS: number,
  hSC: number,
  hSS: number,
  hD: number,
): void {
  stepMatrix(G, u, p, CC, CS, SC, SS, D, e);
  stepMatrix(H, u, p, hCC, hCS, hSC, hSS, hD, 0);
}

/** ∂/∂u of stepMatrix at fixed products (e's coefficient is constant): adds h·∂G/∂u into G. */
function stepMatrixDu(G: Float64Array, h: number, u: number, p: number, CS: number, SC: number, SS: number, D: number): void {
  const t = 2 * u - 1;
  const iu2 = 1 / (u * u);
  const dt2u = t * (2 * u + 1) * iu2; // d(t²/u)/du
  const ds00 = 4 * p - 8 * t;
  const ds01 = 4 * p - 16 * u + 6;
  const ds04 = t + 2 * u - p;
  const ds10 = -8 * p + 32 * u - 20 + iu2;
  const ds40 = -16 * p + 64 * u - 48 + 8 * iu2 - 2 * iu2 / u;
  const cMs = CS - SC;
  G[0] += h * ((16 * u - 4) * D + ds00 * SS);
  G[1] += h * ((16 * u - 2) * D + ds01 * SS);
  G[2] += h * cMs;
  G[3] += h * cMs;
  G[4] += h * (-4 * u * D + ds04 * SS);
  G[5] += h * (-(32 * u - 12) * D + ds10 * SS);
  G[6] += h * (-(32 * u - 8) * D - 2 * ds00 * SS);
  G[7] += h * (-2 * cMs);
  G[8] += h * (-2 * cMs);
  G[9] += h * ((8 * u - 1) * D + 0.5 * ds01 * SS);
  G[10] += h * (4 * CS - dt2u * SC);
  G[11] += h * (4 * cMs);
  G[13] += h * (-iu2 * SS);
  G[14] += h * -cMs;
  G[15] += h * (dt2u * CS - 4 * SC);
  G[16] += h * (4 * cMs);
  G[17] += h * (-p * iu2 * SS);
  G[19] += h * -cMs;
  G[20] += h * (-32 * t * D + ds40 * SS);
  G[21] += h * (-(64 * u - 24) * D + 2 * ds10 * SS);
  G[22] += h * (-dt2u * CS + 4 * SC);
  G[23] += h * (-4 * CS + dt2u * SC);
  G[24] += h * ((16 * u - 4) * D + ds00 * SS);
}

const G5 = new Float64Array(25);
const G5c = new Float64Array(25);
const G5k = new Float64Array(25);
const t5 = new Float64Array(5);
const t5c = new Float64Array(5);
const t5k = new Float64Array(5);

/** v ← G·v + H·x (5×5 row-major; x is not v). */
function tangentStep(G: Float64Array, v: Float64Array, H: Float64Array, x: Float64Array): void {
  const v0 = v[0];
  const v1 = v[1];
  const v2 = v[2];
  const v3 = v[3];
  const v4 = v[4];
  const x0 = x[0];
  const x1 = x[1];
  const x2 = x[2];
  const x3 = x[3];
  const x4 = x[4];
  for (let i = 0; i < 5; i++) {
    const r = 5 * i;
    v[i] =
      G[r] * v0 + G[r + 1] * v1 + G[r + 2] * v2 + G[r + 3] * v3 + G[r + 4] * v4 +
      H[r] * x0 + H[r + 1] * x1 + H[r + 2] * x2 + H[r + 3] * x3 + H[r + 4] * x4;
  }
}

/** v ← G·v (5×5 row-major). */
function valueStep(G: Float64Array, v: Float64Array): void {
  const v0 = v[0];
  const v1 = v[1];
  const v2 = v[2];
  const v3 = v[3];
  const v4 = v[4];
  for (let i = 0; i < 5; i++) {
    const r = 5 * i;
    v[i] = G[r] * v0 + G[r + 1] * v1 + G[r + 2] * v2 + G[r + 3] * v3 + G[r + 4] * v4;
  }
}

/**
 * d/dc of ln(scale), where scale is the positive factor
 * Π_j e^{−(√a_j + √b_j)L_j} that the fast recursion takes out (so
 * d ln|F̃|/dc = F_c/F + this, F̃ the scaled value rayleighSecular returns,
 * apart from its exact power of two): at fixed k after
 * rayleighSecularDerivatives, along the scan (fixed ω) after
 * rayleighSecularSlope. Infinite as c → α_j or β_j from below (√a is not
 * smooth at a = 0).
 */
export const secularSlope = { scale: 0 };

/**
 * F, ∂F/∂c (fixed k) and, when wantK, ∂F/∂k (fixed c) by forward
 * differentiation of the fast five-minor step (fastStep): the matrix is
 * linear in the products of the entire functions (stepMatrix), so its
 * derivative is stepMatrix of the products' derivatives plus ∂G/∂u·du.
 * The smooth positive factors e^{−√a L}, e^{−√b L} and the powers of two
 * are held fixed, as in the reference (they multiply F, F_c and F_k alike
 * at a root). Also sets secularScale.exponent and secularSlope.scale.
 */
function fastDerivatives(s: RayleighStack, omega: number, c: number, out: SecularDerivatives, wantK: boolean): SecularDerivatives {
  const k = omega / c;
  const w = t5;
  const wc = t5c;
  const wk = t5k;
  for (let i = 0; i < 5; i++) {
    w[i] = 0;
    wc[i] = 0;
    wk[i] = 0;
  }
  w[0] = 1;
  secularScale.exponent = 0;
  let slope = 0;
  let qPrev = 1;
  for (let j = 0; j < s.count; j++) {
    const r = qPrev / s.q[j];
    const r2 = r * r;
    w[1] *= r;
    w[2] *= r;
    w[3] *= r;
    w[4] *= r2;
    wc[1] *= r;
    wc[2] *= r;
    wc[3] *= r;
    wc[4] *= r2;
    wk[1] *= r;
    wk[2] *= r;
    wk[3] *= r;
    wk[4] *= r2;
    qPrev = s.q[j];
    const beta = s.vs[j];
    const d = s.thickness[j];
    const u = (beta * beta) / (c * c);
    const x = 1 / u;
    const p = s.p[j];
    const L = k * d;
    const a = 1 - p * x;
    const b = 1 - x;
    derivFunctions(DF, 0, a, L);
    derivFunctions(DF, 6, b, L);
    const Ca = DF[0];
    const Sa = DF[1];
    const Cb = DF[6];
    const Sb = DF[7];
    const e = DF[2] * DF[8];
    const CC = Ca * Cb;
    const CS = Ca * Sb;
    const SC = Sa * Cb;
    const SS = Sa * Sb;
    // Along c at fixed k: a and b move (da/dc = −2px/c, db/dc = −2x/c), u too (du/dc = −2u/c).
    const dxc = (2 * x) / c;
    const dac = -p * dxc;
    const dbc = -dxc;
    const dCa = DF[3] * dac;
    const dSa = DF[4] * dac;
    const dCb = DF[9] * dbc;
    const dSb = DF[10] * dbc;
    const dCCc = dCa * Cb + Ca * dCb;
    stepMatrixPair(G5, G5c, u, p, CC, CS, SC, SS, CC - e, e, dCCc, dCa * Sb + Ca * dSb, dSa * Cb + Sa * dCb, dSa * Sb + Sa * dSb, dCCc);
    stepMatrixDu(G5c, (-2 * u) / c, u, p, CS, SC, SS, CC - e);
    if (wantK) {
      // Along k at fixed c: L = kd moves (dC/dL = aS, dS/dL = C).
      const dCaK = a * Sa * d;
      const dSaK = Ca * d;
      const dCbK = b * Sb * d;
      const dSbK = Cb * d;
      const dCCk = dCaK * Cb + Ca * dCbK;
      stepMatrix(G5k, u, p, dCCk, dCaK * Sb + Ca * dSbK, dSaK * Cb + Sa * dCbK, dSaK * Sb + Sa * dSbK, dCCk, 0);
      tangentStep(G5, wk, G5k, w);
    }
    tangentStep(G5, wc, G5c, w);
    valueStep(G5, w);
    if (a > 0) slope += (L * p * x) / (c * DF[5]);
    if (b > 0) slope += (L * x) / (c * DF[11]);
    rescale3(w, wc, wk);
  }
  const q2 = qPrev * qPrev;
  w[1] *= qPrev;
  w[2] *= qPrev;
  w[3] *= qPrev;
  w[4] *= q2;
  wc[1] *= qPrev;
  wc[2] *= qPrev;
  wc[3] *= qPrev;
  wc[4] *= q2;
  wk[1] *= qPrev;
  wk[2] *= qPrev;
  wk[3] *= qPrev;
  wk[4] *= q2;
  halfspaceMinors(s, c, nH, dnH);
  out.value = pair5(w, nH);
  out.dc = pair5(wc, nH) + pair5(w, dnH);
  out.dk = wantK ? pair5(wk, nH) : NaN;
  secularSlope.scale = slope;
  return out;
}

/** det[y₁ y₂ d_P d_S] from the five minors v (m_13 = −m_02) and the half-space bivector n. */
function pair5(v: Float64Array, n: Float64Array): number {
  return v[0] * n[5] - v[1] * (n[4] - n[1]) + v[2] * n[3] + v[3] * n[2] + v[4] * n[0];
}

/** As rescale, applying the same power of two to the derivative rows. */
function rescale3(w: Float64Array, wc: Float64Array, wk: Float64Array): void {
  let big = 0;
  for (let r = 0; r < 5; r++) {
    const v = Math.abs(w[r]);
    if (v > big) big = v;
  }
  if (!(big > 0) || !Number.isFinite(big) || (big < 2 ** 256 && big > 2 ** -256)) return;
  const e = Math.round(Math.log2(big));
  const f = 2 ** -e;
  for (let r = 0; r < 5; r++) {
    w[r] *= f;
    wc[r] *= f;
    wk[r] *= f;
  }
  secularScale.exponent += e;
}

/**
 * F, ∂F/∂c (fixed k) and ∂F/∂k (fixed c) at (ω, c), k = ω/c, by forward
 * differentiation of the fast five-minor step (the same F as
 * rayleighSecular, up to rounding and a positive factor shared by the three
 * at a root; checked against rayleighSecularDerivativesReference). Writes
 * into `out` and returns it.
 */
export function rayleighSecularDerivatives(
  s: RayleighStack,
  omega: number,
  c: number,
  out: SecularDerivatives = { value: 0, dc: 0, dk: 0 },
): SecularDerivatives {
  return fastDerivatives(s, omega, c, out, true);
}

/**
 * F̃ (the scaled value of rayleighSecular, with its power of two in
 * secularScale) and, in dc, dF/dc along the root scan, at fixed ω
 * (k = ω/c, so dF/dc = ∂F/∂c − (k/c)·∂F/∂k), on the same scale; dk is
 * NaN. secularSlope.scale holds d ln(scale)/dc along the same path, so
 * that d ln|F̃(c, ω/c)|/dc = dc/value + secularSlope.scale: the slope of
 * the function the scan samples. For the root scan.
 *
 * The same forward differentiation as rayleighSecularDerivatives, written
 * out with the minors in locals: the step matrix is linear in the six
 * products CC, CS, SC, SS, D and e (stepMatrix), G = Σ π_i A_i(u), so
 * G·w = Σ π_i (A_i w) and, e held fixed and D' = CC',
 * G_c·w = Σ π_i' (A_i w) + u'·(∂G/∂u)·w: the vectors A_i w serve both.
 */
export function rayleighSecularSlope(s: RayleighStack, omega: number, c: number, out: SecularDerivatives): SecularDerivatives {
  const k = omega / c;
  const c2 = c * c;
  const { vs, p: pCol, q: qCol, thickness } = s;
  let w0 = 1;
  let w1 = 0;
  let w2 = 0;
  let w3 = 0;
  let w4 = 0;
  let v0 = 0;
  let v1 = 0;
  let v2 = 0;
  let v3 = 0;
  let v4 = 0;
  let exponent = 0;
  let slope = 0;
  let qPrev = 1;
  for (let j = 0; j < s.count; j++) {
    const qj = qCol[j];
    const ratio = qPrev / qj;
    const ratio2 = ratio * ratio;
    w1 *= ratio;
    w2 *= ratio;
    w3 *= ratio;
    w4 *= ratio2;
    v1 *= ratio;
    v2 *= ratio;
    v3 *= ratio;
    v4 *= ratio2;
    qPrev = qj;
    const beta = vs[j];
    const d = thickness[j];
    const u = (beta * beta) / c2;
    const x = 1 / u;
    const p = pCol[j];
    const L = k * d;
    const a = 1 - p * x;
    const b = 1 - x;
    // The entire functions of each wave and their derivatives in a (derivFunctions), scaled alike.
    let Ca = 1;
    let Sa = L;
    let ea = 1;
    let ra = 0;
    if (a > 0) {
      ra = Math.sqrt(a);
      const y = ra * L;
      if (y > 0.5) {
        ea = Math.exp(-y);
        const E = ea * ea;
        Ca = 0.5 + 0.5 * E;
        Sa = (0.5 - 0.5 * E) / ra;
      } else {
        const e1 = Math.expm1(-y);
        const em = e1 * (2 + e1);
        ea = 1 + e1;
        Ca = 1 + 0.5 * em;
        Sa = y === 0 ? L : (-0.5 * em) / ra;
      }
      slope += (L * p * x) / (c * ra) + (ra * L) / c;
    } else if (a < 0) {
      const r = Math.sqrt(-a);
      const y = r * L;
      Ca = Math.cos(y);
      Sa = Math.sin(y) / r;
    }
    let Cb = 1;
    let Sb = L;
    let eb = 1;
    let rb = 0;
    if (b > 0) {
      rb = Math.sqrt(b);
      const y = rb * L;
      if (y > 0.5) {
        eb = Math.exp(-y);
        const E = eb * eb;
        Cb = 0.5 + 0.5 * E;
        Sb = (0.5 - 0.5 * E) / rb;
      } else {
        const e1 = Math.expm1(-y);
        const em = e1 * (2 + e1);
        eb = 1 + e1;
        Cb = 1 + 0.5 * em;
        Sb = y === 0 ? L : (-0.5 * em) / rb;
      }
      slope += (L * x) / (c * rb) + (rb * L) / c;
    } else if (b < 0) {
      const r = Math.sqrt(-b);
      const y = r * L;
      Cb = Math.cos(y);
      Sb = Math.sin(y) / r;
    }
    const dSada = dSdaOf(a, L, Ca, Sa, ea);
    const dSbdb = dSdaOf(b, L, Cb, Sb, eb);
    // Along the scan (ω fixed, k = ω/c): da/dc = −2px/c, db/dc = −2x/c, du/dc = −2u/c, dL/dc = −L/c;
    // dC/da = L·S/2, dC/dL = a·S, dS/dL = C (the scale factors held fixed, their own slope in `slope`).
    const dxc = (2 * x) / c;
    const dac = -p * dxc;
    const dbc = -dxc;
    const dLc = -L / c;
    const dCa = 0.5 * L * Sa * dac + a * Sa * dLc;
    const dSa = dSada * dac + Ca * dLc;
    const dCb = 0.5 * L * Sb * dbc + b * Sb * dLc;
    const dSb = dSbdb * dbc + Cb * dLc;
    const e = ea * eb;
    const CC = Ca * Cb;
    const CS = Ca * Sb;
    const SC = Sa * Cb;
    const SS = Sa * Sb;
    const D = CC - e;
    const dCC = dCa * Cb + Ca * dCb;
    const dCS = dCa * Sb + Ca * dSb;
    const dSC = dSa * Cb + Sa * dCb;
    const dSS = dSa * Sb + Sa * dSb;
    const du = (-2 * u) / c;
    // Coefficients of the step matrix in u and p (stepMatrix) and their u-derivatives (stepMatrixDu).
    const t = 2 * u - 1;
    const u1 = u - 1;
    const pu = p - u;
    const t2u = t * t * x;
    const s00 = 4 * p * u1 - 2 * t * t + 1;
    const s01 = 4 * p * u1 - 2 * u * (4 * u - 3);
    const s04 = u * t - p * u1;
    const s10 = -(8 * p * u * u1 - 16 * u * u * u + 20 * u * u - 6 * u + 1) * x;
    const s40 = -(16 * p * u * u * u1 - 32 * u * u * u * u + 48 * u * u * u - 24 * u * u + 8 * u - 1) * (x * x);
    const d4u1 = 4 * u - 1;
    const ut4 = 4 * u * t;
    const ud = 2 * u * d4u1;
    const td = 2 * t * d4u1;
    const iu2 = x * x;
    const dt2u = t * (2 * u + 1) * iu2;
    const ds00 = 4 * p - 8 * t;
    const ds01 = 4 * p - 16 * u + 6;
    const ds04 = t + 2 * u - p;
    const ds10 = -8 * p + 32 * u - 20 + iu2;
    const ds40 = -16 * p + 64 * u - 48 + 8 * iu2 - 2 * iu2 * x;
    // A_i·w for the products D, SS, CS, SC (CC's is w with row 1 zero, e's is row 1 alone).
    const Dw0 = ut4 * w0 + ud * w1 - 2 * u * u * w4;
    const Dw1 = -td * w0 - 2 * ut4 * w1 + 0.5 * ud * w4;
    const Dw4 = -8 * t * t * w0 - 2 * td * w1 + ut4 * w4;
    const Sw0 = s00 * w0 + s01 * w1 + s04 * w4;
    const Sw1 = s10 * w0 - 2 * s00 * w1 + 0.5 * s01 * w4;
    const Sw2 = -(u1 * x) * w3;
    const Sw3 = pu * x * w2;
    const Sw4 = s40 * w0 + 2 * s10 * w1 + s00 * w4;
    const Cw0 = u * w2 + u1 * w3;
    const Cw1 = -t * w2 - 2 * u1 * w3;
    const Cw2 = 4 * u1 * (w0 + w1) - u1 * w4;
    const Cw3 = t2u * w0 + 2 * t * w1 - u * w4;
    const Cw4 = -t2u * w2 - 4 * u1 * w3;
    const Xw0 = pu * w2 - u * w3;
    const Xw1 = -2 * pu * w2 + t * w3;
    const Xw2 = -t2u * w0 - 2 * t * w1 + u * w4;
    const Xw3 = pu * (4 * (w0 + w1) - w4);
    const Xw4 = -4 * pu * w2 + t2u * w3;
    // The same for the tangent v = ∂w/∂c.
    const Dv0 = ut4 * v0 + ud * v1 - 2 * u * u * v4;
    const Dv1 = -td * v0 - 2 * ut4 * v1 + 0.5 * ud * v4;
    const Dv4 = -8 * t * t * v0 - 2 * td * v1 + ut4 * v4;
    const Sv0 = s00 * v0 + s01 * v1 + s04 * v4;
    const Sv1 = s10 * v0 - 2 * s00 * v1 + 0.5 * s01 * v4;
    const Sv2 = -(u1 * x) * v3;
    const Sv3 = pu * x * v2;
    const Sv4 = s40 * v0 + 2 * s10 * v1 + s00 * v4;
    const Cv0 = u * v2 + u1 * v3;
    const Cv1 = -t * v2 - 2 * u1 * v3;
    const Cv2 = 4 * u1 * (v0 + v1) - u1 * v4;
    const Cv3 = t2u * v0 + 2 * t * v1 - u * v4;
    const Cv4 = -t2u * v2 - 4 * u1 * v3;
    const Xv0 = pu * v2 - u * v3;
    const Xv1 = -2 * pu * v2 + t * v3;
    const Xv2 = -t2u * v0 - 2 * t * v1 + u * v4;
    const Xv3 = pu * (4 * (v0 + v1) - v4);
    const Xv4 = -4 * pu * v2 + t2u * v3;
    // (∂G/∂u)·w: CC's and e's coefficients are constant.
    const cw = w2 + w3;
    const Uw0 = (16 * u - 4) * w0 + (16 * u - 2) * w1 - 4 * u * w4;
    const Uw1 = -(32 * u - 12) * w0 - (32 * u - 8) * w1 + (8 * u - 1) * w4;
    const Uw4 = -32 * t * w0 - (64 * u - 24) * w1 + (16 * u - 4) * w4;
    const Zw0 = ds00 * w0 + ds01 * w1 + ds04 * w4;
    const Zw1 = ds10 * w0 - 2 * ds00 * w1 + 0.5 * ds01 * w4;
    const Zw4 = ds40 * w0 + 2 * ds10 * w1 + ds00 * w4;
    const cMs = CS - SC;
    const g0 = D * Uw0 + SS * Zw0 + cMs * cw;
    const g1 = D * Uw1 + SS * Zw1 - 2 * cMs * cw;
    const g2 = CS * (4 * (w0 + w1) - w4) - SC * (dt2u * w0 + 4 * w1 - w4) - iu2 * SS * w3;
    const g3 = CS * (dt2u * w0 + 4 * w1 - w4) - SC * (4 * (w0 + w1) - w4) - p * iu2 * SS * w2;
    const g4 = D * Uw4 + SS * Zw4 - CS * (dt2u * w2 + 4 * w3) + SC * (4 * w2 + dt2u * w3);
    // v ← G·v + G_c·w, w ← G·w.
    const nv0 = CC * v0 + D * Dv0 + SS * Sv0 + CS * Cv0 + SC * Xv0 + dCC * (w0 + Dw0) + dSS * Sw0 + dCS * Cw0 + dSC * Xw0 + du * g0;
    const nv1 = e * v1 + D * Dv1 + SS * Sv1 + CS * Cv1 + SC * Xv1 + dCC * Dw1 + dSS * Sw1 + dCS * Cw1 + dSC * Xw1 + du * g1;
    const nv2 = CC * v2 + SS * Sv2 + CS * Cv2 + SC * Xv2 + dCC * w2 + dSS * Sw2 + dCS * Cw2 + dSC * Xw2 + du * g2;
    const nv3 = CC * v3 + SS * Sv3 + CS * Cv3 + SC * Xv3 + dCC * w3 + dSS * Sw3 + dCS * Cw3 + dSC * Xw3 + du * g3;
    const nv4 = CC * v4 + D * Dv4 + SS * Sv4 + CS * Cv4 + SC * Xv4 + dCC * (w4 + Dw4) + dSS * Sw4 + dCS * Cw4 + dSC * Xw4 + du * g4;
    const nw0 = CC * w0 + D * Dw0 + SS * Sw0 + CS * Cw0 + SC * Xw0;
    const nw1 = e * w1 + D * Dw1 + SS * Sw1 + CS * Cw1 + SC * Xw1;
    const nw2 = CC * w2 + SS * Sw2 + CS * Cw2 + SC * Xw2;
    const nw3 = CC * w3 + SS * Sw3 + CS * Cw3 + SC * Xw3;
    const nw4 = CC * w4 + D * Dw4 + SS * Sw4 + CS * Cw4 + SC * Xw4;
    w0 = nw0;
    w1 = nw1;
    w2 = nw2;
    w3 = nw3;
    w4 = nw4;
    v0 = nv0;
    v1 = nv1;
    v2 = nv2;
    v3 = nv3;
    v4 = nv4;
    const big = Math.max(Math.abs(w0), Math.abs(w1), Math.abs(w2), Math.abs(w3), Math.abs(w4));
    if (!(big < RESCALE_ABOVE && big > RESCALE_BELOW) && big > 0 && big < Infinity) {
      const ex = Math.round(Math.log2(big));
      const f = 2 ** -ex;
      w0 *= f;
      w1 *= f;
      w2 *= f;
      w3 *= f;
      w4 *= f;
      v0 *= f;
      v1 *= f;
      v2 *= f;
      v3 *= f;
      v4 *= f;
      exponent += ex;
    }
  }
  const q2 = qPrev * qPrev;
  w1 *= qPrev;
  w2 *= qPrev;
  w3 *= qPrev;
  w4 *= q2;
  v1 *= qPrev;
  v2 *= qPrev;
  v3 *= qPrev;
  v4 *= q2;
  secularScale.exponent = exponent;
  secularSlope.scale = slope;
  // The half-space's bivector and its c-derivative (halfspaceMinors), paired with w and v (pair5).
  halfspaceMinors(s, c, nH, dnH);
  out.value = pairScalars(w0, w1, w2, w3, w4, nH);
  out.dc = pairScalars(v0, v1, v2, v3, v4, nH) + pairScalars(w0, w1, w2, w3, w4, dnH);
  out.dk = NaN;
  return out;
}

/** pair5 of the five minors given one by one. */
function pairScalars(y0: number, y1: number, y2: number, y3: number, y4: number, n: Float64Array): number {
  return y0 * n[5] - y1 * (n[4] - n[1]) + y2 * n[3] + y3 * n[2] + y4 * n[0];
}

/** dS/da of derivFunctions (S = sinh(√a L)/√a, scaled by `scale`), by series for small |a|L². */
function dSdaOf(a: number, L: number, C: number, S: number, scale: number): number {
  const aL2 = a * L * L;
  if (Math.abs(aL2) < 0.1) {
    const L3 = L * L * L;
    return scale * L3 * (1 / 6 + aL2 * (1 / 60 + aL2 * (1 / 1680 + aL2 * (1 / 90720 + aL2 / 7983360))));
  }
  return (L * C - S) / (2 * a);
}

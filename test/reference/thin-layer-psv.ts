/**
 * The thin-layer method for Rayleigh waves (P-SV), written here as an
 * independent numerical reference for the tests (it shares no code with
 * core/).
 *
 * Method: Lysmer 1970, BSSA 60:89–104; Kausel & Roësset 1981, BSSA
 * 71:1743. Displacements u_x = u(z)·e^{i(kx−ωt)}, u_z = i·w(z)·e^{i(kx−ωt)},
 * linear elements in depth down to a fixed base. The strain energy
 * λ(ku + w′)² + 2μ(k²u² + w′²) + μ(u′ − kw)² and the kinetic energy
 * ρω²(u² + w²) give, per element (N the linear shape functions),
 *   A: ∫(λ+2μ)N N (u,u), ∫μ N N (w,w)      (coefficient of k²)
 *   B: ∫(λ N N′ − μ N′ N) (u,w), symmetric  (coefficient of k)
 *   G: ∫μ N′N′ (u,u), ∫(λ+2μ) N′N′ (w,w)   (k⁰)
 *   M: ∫ρ N N on both,
 * and (k²A + kB + G − ω²M)v = 0, all four symmetric. B couples only u and
 * w, so with w = k·ŵ the quadratic problem becomes the generalized linear
 * eigenproblem in k²
 *   [[G_uu − ω²M_uu, 0], [B_wu, G_ww − ω²M_ww]] z = −k² [[A_uu, B_uw], [0, A_ww]] z,
 * solved with ml-matrix's general (non-symmetric) EigenvalueDecomposition.
 * Group velocity from the energy form (differentiating vᵀ(…)v = 0):
 *   U = vᵀ(2kA + B)v / (2ω vᵀMv).
 * The free surface is the natural boundary condition; the base node is
 * fixed. Error: O((h/λ)²) with consistent mass.
 */
import { EigenvalueDecomposition, Matrix, inverse } from 'ml-matrix';
import type { TlmMesh } from './thin-layer';

export interface PsvLayer {
  thickness: number;
  vs: number;
  vp: number;
  density: number;
}

export interface PsvModel {
  layers: readonly PsvLayer[];
  halfspace: { vs: number; vp: number; density: number };
}

export interface PsvMode {
  phase: number;
  group: number;
}

interface Element {
  d: number;
  lam: number;
  mu: number;
  rho: number;
}

function elements(model: PsvModel, mesh: TlmMesh): Element[] {
  const split = mesh.split ?? 1;
  const el: Element[] = [];
  const add = (d: number, vs: number, vp: number, rho: number) => {
    const mu = rho * vs * vs;
    const lam = rho * vp * vp - 2 * mu;
    for (let i = 0; i < split; i++) el.push({ d: d / split, lam, mu, rho });
  };
  let z = 0;
  for (const l of model.layers) {
    const n = Math.ceil(l.thickness / mesh.h - 1e-9);
    for (let i = 0; i < n; i++) add(l.thickness / n, l.vs, l.vp, l.density);
    z += l.thickness;
  }
  const hs = model.halfspace;
  const uniformTo = z + (mesh.uniform ?? 0);
  while (z < uniformTo) {
    add(mesh.h, hs.vs, hs.vp, hs.density);
    z += mesh.h;
  }
  let d = mesh.h;
  while (z < mesh.depth) {
    add(d, hs.vs, hs.vp, hs.density);
    z += d;
    d *= mesh.growth;
  }
  return el;
}

/** Rayleigh modes (c < β_H, real k) at frequency f (Hz) by the thin-layer method on `mesh`. Sorted by c. */
export function thinLayerRayleighModes(model: PsvModel, f: number, mesh: TlmMesh): PsvMode[] {
  const el = elements(model, mesh);
  const n = el.length; // free nodes 0 … n−1; node n (the base) is fixed
  const N = 2 * n; // u block then w block
  const Auu = Matrix.zeros(n, n);
  const Aww = Matrix.zeros(n, n);
  const Guu = Matrix.zeros(n, n);
  const Gww = Matrix.zeros(n, n);
  const Mm = Matrix.zeros(n, n);
  const Buw = Matrix.zeros(n, n);
  const mass = [
    [2, 1],
    [1, 2],
  ];
  const stiff = [
    [1, -1],
    [-1, 1],
  ];
  // E[i][j] = ∫ N_i N_j′ dz over an element (independent of its size).
  const E = [
    [-0.5, 0.5],
    [-0.5, 0.5],
  ];
  el.forEach((e, i) => {
    for (let r = 0; r < 2; r++) {
      for (let c = 0; c < 2; c++) {
        const gi = i + r;
        const gj = i + c;
        if (gi >= n || gj >= n) continue;
        const nn = (e.d * mass[r][c]) / 6;
        const dd = stiff[r][c] / e.d;
        Auu.set(gi, gj, Auu.get(gi, gj) + (e.lam + 2 * e.mu) * nn);
        Aww.set(gi, gj, Aww.get(gi, gj) + e.mu * nn);
        Guu.set(gi, gj, Guu.get(gi, gj) + e.mu * dd);
        Gww.set(gi, gj, Gww.get(gi, gj) + (e.lam + 2 * e.mu) * dd);
        Mm.set(gi, gj, Mm.get(gi, gj) + e.rho * nn);
        Buw.set(gi, gj, Buw.get(gi, gj) + e.lam * E[r][c] - e.mu * E[c][r]);
      }
    }
  });
  const omega = 2 * Math.PI * f;
  const w2 = omega * omega;
  const K = Matrix.zeros(N, N);
  const L = Matrix.zeros(N, N);
  K.setSubMatrix(Guu.clone().sub(Mm.clone().mul(w2)), 0, 0);
  K.setSubMatrix(Buw.transpose(), n, 0);
  K.setSubMatrix(Gww.clone().sub(Mm.clone().mul(w2)), n, n);
  L.setSubMatrix(Auu, 0, 0);
  L.setSubMatrix(Buw, 0, n);
  L.setSubMatrix(Aww, n, n);
  const C = inverse(L).mmul(K).mul(-1);
  const eig = new EigenvalueDecomposition(C);
  const re = eig.realEigenvalues;
  const im = eig.imaginaryEigenvalues;
  const V = eig.eigenvectorMatrix;
  const out: PsvMode[] = [];
  const hs = model.halfspace;
  for (let j = 0; j < re.length; j++) {
    const k2 = re[j];
    if (!(k2 > 0) || Math.abs(im[j]) > 1e-9 * k2) continue;
    const k = Math.sqrt(k2);
    const c = omega / k;
    if (!(c < hs.vs)) continue;
    // v = (u, w) with w = k·ŵ; quadratic forms per element.
    const u = new Float64Array(n + 1);
    const w = new Float64Array(n + 1);
    for (let i = 0; i < n; i++) {
      u[i] = V.get(i, j);
      w[i] = k * V.get(n + i, j);
    }
    let vAv = 0;
    let vBv = 0;
    let vMv = 0;
    el.forEach((e, i) => {
      const u0 = u[i];
      const u1 = u[i + 1];
      const w0 = w[i];
      const w1 = w[i + 1];
      const nnU = (e.d * (2 * u0 * u0 + 2 * u0 * u1 + 2 * u1 * u1)) / 6;
      const nnW = (e.d * (2 * w0 * w0 + 2 * w0 * w1 + 2 * w1 * w1)) / 6;
      vAv += (e.lam + 2 * e.mu) * nnU + e.mu * nnW;
      vMv += e.rho * (nnU + nnW);
      // 2·uᵀ B_uw w over this element.
      const uu = [u0, u1];
      const ww = [w0, w1];
      for (let r = 0; r < 2; r++) {
        for (let c2 = 0; c2 < 2; c2++) vBv += 2 * uu[r] * ww[c2] * (e.lam * E[r][c2] - e.mu * E[c2][r]);
      }
    });
    out.push({ phase: c, group: (2 * k * vAv + vBv) / (2 * omega * vMv) });
  }
  return out.sort((a, b) => a.phase - b.phase);
}

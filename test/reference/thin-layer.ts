/**
 * The thin-layer method for Love waves, written here as an independent
 * numerical reference for the tests (it shares no code with core/).
 *
 * Method: Lysmer 1970, BSSA 60:89–104; Kausel & Roësset 1981, BSSA
 * 71:1743. Depth is cut into linear elements of thickness h down to a fixed
 * base; each element contributes
 *   A_e = μh/6·[[2,1],[1,2]],  G_e = μ/h·[[1,−1],[−1,1]],  M_e = ρh/6·[[2,1],[1,2]],
 * and (k²A + G − ω²M)v = 0 is solved for k² at fixed ω with ml-matrix's
 * Cholesky factorisation (A = LLᵀ) and symmetric EigenvalueDecomposition of
 * L⁻¹(ω²M − G)L⁻ᵀ. Group velocity: U = k·vᵀAv / (ω·vᵀMv). The free surface
 * is the natural boundary condition; the base node is fixed (v = 0).
 * Error: O((h/λ)²) with consistent mass (c comes out slightly high).
 */
import { CholeskyDecomposition, EigenvalueDecomposition, Matrix, inverse } from 'ml-matrix';

export interface TlmLayer {
  thickness: number;
  vs: number;
  density: number;
}

export interface TlmModel {
  layers: readonly TlmLayer[];
  halfspace: { vs: number; density: number };
}

export interface TlmMode {
  phase: number;
  group: number;
}

/** Mesh: element size in the layers, geometric growth below, base depth, and an optional split of every element. */
export interface TlmMesh {
  /** Largest element in the layers and at the top of the half-space, m. */
  h: number;
  /** Thickness of half-space kept at element size h before the growth starts, m. @default 0 */
  uniform?: number;
  /** Growth ratio of successive elements in the half-space below that (1 = uniform). */
  growth: number;
  /** Depth of the fixed base, m. */
  depth: number;
  /** Split every element into this many equal parts (mesh refinement). @default 1 */
  split?: number;
}

/** Love modes (c < β_H) at frequency f (Hz) by the thin-layer method on `mesh`. Sorted by c. */
export function thinLayerModes(model: TlmModel, f: number, mesh: TlmMesh): TlmMode[] {
  const split = mesh.split ?? 1;
  // Element list: thickness, μ, ρ.
  const el: { d: number; mu: number; rho: number }[] = [];
  const add = (d: number, mu: number, rho: number) => {
    for (let i = 0; i < split; i++) el.push({ d: d / split, mu, rho });
  };
  let z = 0;
  for (const l of model.layers) {
    const n = Math.ceil(l.thickness / mesh.h - 1e-9);
    for (let i = 0; i < n; i++) add(l.thickness / n, l.density * l.vs * l.vs, l.density);
    z += l.thickness;
  }
  const hs = model.halfspace;
  const muH = hs.density * hs.vs * hs.vs;
  const uniformTo = z + (mesh.uniform ?? 0);
  while (z < uniformTo) {
    add(mesh.h, muH, hs.density);
    z += mesh.h;
  }
  let d = mesh.h;
  while (z < mesh.depth) {
    add(d, muH, hs.density);
    z += d;
    d *= mesh.growth;
  }
  const nodes = el.length; // the base node (index nodes) is fixed and dropped
  const A = Matrix.zeros(nodes, nodes);
  const B = Matrix.zeros(nodes, nodes); // ω²M − G
  const w2 = (2 * Math.PI * f) ** 2;
  el.forEach((e, i) => {
    const a = [
      [2, 1],
      [1, 2],
    ];
    for (let r = 0; r < 2; r++) {
      for (let c = 0; c < 2; c++) {
        const gi = i + r;
        const gj = i + c;
        if (gi >= nodes || gj >= nodes) continue;
        A.set(gi, gj, A.get(gi, gj) + (e.mu * e.d * a[r][c]) / 6);
        const g = (e.mu / e.d) * (r === c ? 1 : -1);
        const m = (e.rho * e.d * a[r][c]) / 6;
        B.set(gi, gj, B.get(gi, gj) + w2 * m - g);
      }
    }
  });
  const L = new CholeskyDecomposition(A).lowerTriangularMatrix;
  const Li = inverse(L);
  const C = Li.mmul(B).mmul(Li.transpose());
  const S = C.add(C.transpose()).mul(0.5);
  const eig = new EigenvalueDecomposition(S, { assumeSymmetric: true });
  const k2 = eig.realEigenvalues;
  const W = eig.eigenvectorMatrix;
  const omega = Math.sqrt(w2);
  const out: TlmMode[] = [];
  for (let j = 0; j < k2.length; j++) {
    if (!(k2[j] > 0)) continue;
    const k = Math.sqrt(k2[j]);
    const c = omega / k;
    if (!(c < hs.vs)) continue;
    const v = Li.transpose().mmul(W.getColumnVector(j));
    // vᵀAv and vᵀMv (M from ω²M = B + G; build M·v directly per element).
    let vAv = 0;
    let vMv = 0;
    el.forEach((e, i) => {
      const v0 = v.get(i, 0);
      const v1 = i + 1 < nodes ? v.get(i + 1, 0) : 0;
      const q = (2 * v0 * v0 + 2 * v0 * v1 + 2 * v1 * v1) / 6;
      vAv += e.mu * e.d * q;
      vMv += e.rho * e.d * q;
    });
    out.push({ phase: c, group: (k * vAv) / (omega * vMv) });
  }
  return out.sort((a, b) => a.phase - b.phase);
}

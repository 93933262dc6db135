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
  /**
   * When set, each layer gets its own element size: at most its shear
   * wavelength at f divided by this number (and at most `h`), so fast
   * layers are not meshed as finely as slow ones. @default undefined
   */
  perWavelength?: number;
  /** The frequency (Hz) whose wavelengths size the elements with perWavelength; keep it fixed to compare nearby frequencies on one mesh. @default the frequency solved for */
  meshFrequency?: number;
}

/** One linear element: thickness, shear modulus, density. */
interface Element {
  d: number;
  mu: number;
  rho: number;
}

/** The element list of `mesh` at frequency f (Hz), from the surface down to the fixed base. */
function meshElements(model: TlmModel, f: number, mesh: TlmMesh): Element[] {
  const split = mesh.split ?? 1;
  const el: Element[] = [];
  const add = (d: number, mu: number, rho: number) => {
    for (let i = 0; i < split; i++) el.push({ d: d / split, mu, rho });
  };
  let z = 0;
  for (const l of model.layers) {
    const size = mesh.perWavelength === undefined ? mesh.h : Math.min(mesh.h, l.vs / ((mesh.meshFrequency ?? f) * mesh.perWavelength));
    const n = Math.ceil(l.thickness / size - 1e-9);
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
  return el;
}

/** Love modes (c < β_H) at frequency f (Hz) by the thin-layer method on `mesh`. Sorted by c. */
export function thinLayerModes(model: TlmModel, f: number, mesh: TlmMesh): TlmMode[] {
  const el = meshElements(model, f, mesh);
  const hs = model.halfspace;
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

/**
 * The same thin-layer eigenproblem solved without a dense matrix, for long
 * stacks where the O(n³) decomposition is too slow: the matrices A and
 * B = ω²M − G are tridiagonal, and by Sylvester's law of inertia the number
 * of eigenvalues k² above s equals the number of negative pivots of the
 * LDLᵀ factorisation of sA − B (Parlett, *The Symmetric Eigenvalue
 * Problem*, 1980, §3.3; the bisection of Barth, Martin & Wilkinson 1967).
 * Bisection on s then gives each k² to full precision. Returns the phase
 * velocities (ascending) of the lowest `modes` modes with c < β_H, and
 * `present`, how many modes the mesh has with c below `below` (default β_H).
 */
export function thinLayerSturmPhases(
  model: TlmModel,
  f: number,
  mesh: TlmMesh,
  modes: number,
  below: number = model.halfspace.vs,
): { phase: number[]; present: number } {
  const el = meshElements(model, f, mesh);
  const n = el.length; // the base node is fixed and dropped
  const aD = new Float64Array(n);
  const aO = new Float64Array(n); // (i, i+1)
  const bD = new Float64Array(n);
  const bO = new Float64Array(n);
  const w2 = (2 * Math.PI * f) ** 2;
  el.forEach((e, i) => {
    const a = (e.mu * e.d) / 6;
    const m = (e.rho * e.d) / 6;
    const g = e.mu / e.d;
    aD[i] += 2 * a;
    bD[i] += 2 * w2 * m - g;
    if (i + 1 < n) {
      aD[i + 1] += 2 * a;
      bD[i + 1] += 2 * w2 * m - g;
      aO[i] = a;
      bO[i] = w2 * m + g;
    }
  });
  /** Eigenvalues k² above s: negative pivots of sA − B. */
  const above = (s: number): number => {
    let count = 0;
    let p = 1;
    for (let i = 0; i < n; i++) {
      const o = i > 0 ? s * aO[i - 1] - bO[i - 1] : 0;
      p = s * aD[i] - bD[i] - (i > 0 ? (o * o) / p : 0);
      if (p === 0) p = -1e-300;
      if (p < 0) count++;
    }
    return count;
  };
  const vsMin = Math.min(...model.layers.map((l) => l.vs), model.halfspace.vs);
  const sLow = w2 / model.halfspace.vs ** 2;
  let sTop = (4 * w2) / vsMin ** 2;
  while (above(sTop) > 0) sTop *= 2;
  const present = above(w2 / below ** 2);
  const phase: number[] = [];
  for (let j = 0; j < Math.min(modes, above(sLow)); j++) {
    // k² of mode j is the (j+1)-th largest: the s where the count drops from j+1 to j.
    let lo = sLow;
    let hi = sTop;
    for (let it = 0; it < 200 && hi - lo > 1e-15 * hi; it++) {
      const mid = 0.5 * (lo + hi);
      if (above(mid) > j) lo = mid;
      else hi = mid;
    }
    phase.push(Math.sqrt(w2 / (0.5 * (lo + hi))));
  }
  return { phase, present };
}

/**
 * The neighbourhood algorithm: a derivative-free global search for the
 * minimum of a misfit over a box.
 *
 * What: samples of a d-dimensional box (scaled to the unit cube [0, 1]^d),
 * each with its misfit, concentrated where the misfit is low but spread
 * over every low region, not only the deepest.
 *
 * Method: Sambridge (1999), "Geophysical inversion with a neighbourhood
 * algorithm — I. Searching a parameter space", Geophys. J. Int. 138:479–494.
 * Start with `initial` uniform random samples. Then, for `iterations`
 * rounds: rank all samples so far by misfit, take the `cells` best, and
 * draw `perIteration / cells` new samples inside the Voronoi cell of each
 * (the region nearer to it than to any other sample) by a random walk
 * along the axes: each step redraws one coordinate uniformly over the
 * cell's extent on the line through the current point (the boundary with
 * sample j along axis i lies at
 * x = ½[v_k,i + v_j,i + (d_k² − d_j²)/(v_k,i − v_j,i)], with d² the squared
 * distances over the other axes). A new sample is taken after a full sweep
 * over the d axes. Cells are those of the ensemble at the start of the round.
 *
 * Randomness: from the caller's seeded uniform generator (core/shared/random.ts).
 * Misfits that are not finite (models outside the physical domain) rank last.
 * Cost: O(ensemble × d) per axis step; the misfit calls dominate in practice.
 */

/** Sizes of the search. */
export interface NeighbourhoodOptions {
  /** Uniform samples to start with. */
  initial: number;
  /** New samples per round. */
  perIteration: number;
  /** Cells resampled per round (the best so far). */
  cells: number;
  /** Rounds after the initial samples. */
  iterations: number;
}

/** The ensemble: points in the unit cube, row-major (count × d), and their misfits. */
export interface NeighbourhoodEnsemble {
  d: number;
  count: number;
  points: Float64Array;
  misfit: Float64Array;
}

/**
 * Runs the search. `misfit(x)` is called with a point of the unit cube
 * (do not keep the array: it is reused). `uniform` returns numbers in
 * [0, 1). `onRound(done, total)` is called after each round.
 */
export function neighbourhoodSearch(
  d: number,
  misfit: (x: Float64Array) => number,
  uniform: () => number,
  options: NeighbourhoodOptions,
  onRound?: (done: number, total: number) => void,
): NeighbourhoodEnsemble {
  const perCell = Math.max(1, Math.floor(options.perIteration / options.cells));
  const capacity = options.initial + options.iterations * perCell * options.cells;
  const points = new Float64Array(capacity * d);
  const fit = new Float64Array(capacity);
  const x = new Float64Array(d);
  let count = 0;
  const add = (p: Float64Array): void => {
    points.set(p, count * d);
    const m = misfit(p);
    fit[count] = Number.isFinite(m) ? m : Infinity;
    count++;
  };

  for (let s = 0; s < options.initial; s++) {
    for (let i = 0; i < d; i++) x[i] = uniform();
    add(x);
  }
  onRound?.(0, options.iterations);

  const d2 = new Float64Array(capacity);
  const order: number[] = [];
  for (let it = 0; it < options.iterations; it++) {
    const ne = count; // cells of this round's ensemble
    order.length = 0;
    for (let j = 0; j < ne; j++) order.push(j);
    order.sort((a, b) => fit[a] - fit[b]);
    const chosen = order.slice(0, Math.min(options.cells, ne));
    for (const k of chosen) {
      const vk = k * d;
      // Start the walk at the cell's own sample.
      for (let i = 0; i < d; i++) x[i] = points[vk + i];
      for (let j = 0; j < ne; j++) {
        let s = 0;
        const vj = j * d;
        for (let i = 0; i < d; i++) {
          const t = x[i] - points[vj + i];
          s += t * t;
        }
        d2[j] = s;
      }
      for (let n = 0; n < perCell; n++) {
        for (let i = 0; i < d; i++) {
          const xi = x[i];
          const ci = points[vk + i];
          const dk = d2[k] - (xi - ci) * (xi - ci);
          let lo = 0;
          let hi = 1;
          for (let j = 0; j < ne; j++) {
            if (j === k) continue;
            const cj = points[j * d + i];
            if (cj === ci) continue;
            const dj = d2[j] - (xi - cj) * (xi - cj);
            const b = 0.5 * (ci + cj + (dk - dj) / (ci - cj));
            if (cj > ci) {
              if (b < hi) hi = b;
            } else if (b > lo) lo = b;
          }
          const next = hi > lo ? lo + (hi - lo) * uniform() : ci;
          // Keep the squared distances current for the new coordinate.
          for (let j = 0; j < ne; j++) {
            const cj = points[j * d + i];
            d2[j] += (next - cj) * (next - cj) - (xi - cj) * (xi - cj);
          }
          x[i] = next;
        }
        add(x);
      }
    }
    onRound?.(it + 1, options.iterations);
  }
  return { d, count, points: points.subarray(0, count * d), misfit: fit.subarray(0, count) };
}

/**
 * A start for the local refinement of the layered estimate that does not
 * depend on the luck of the global search: a blocky model read off the
 * picks by the wavelength–depth rule.
 *
 * What: for N layers over a half-space, log thicknesses and log shear
 * speeds (the estimate's parameters u) inside its search box.
 *
 * Method: each pick of velocity v at frequency f stands for shear speed
 * about 1.1·v at depth about λ/3 (or λ/2), λ = v/f (the wavelength–depth
 * approximation of surface-wave practice; common practice, factors from
 * memory: depths of λ/3 to λ/2 are in use, so there is a start for each). The interfaces are put at
 * evenly spaced log depths between the shallowest and deepest of these
 * depths, each layer takes the geometric mean of the speeds read inside
 * it (the nearest one when none falls inside), and the half-space the
 * fastest speed read. This is only a starting point for
 * Levenberg–Marquardt, beside the neighbourhood algorithm's own best
 * samples: it adds a chance of finding the basin of a normally dispersive
 * site when the random search missed it, and changes nothing else (the
 * misfit alone ranks the refined models).
 */

/** Shear speed per picked velocity of the wavelength–depth rule (common practice, from memory). */
export const VS_PER_PICKED_VELOCITY = 1.1;
/** Depths per wavelength of the wavelength–depth rule in use (common practice, from memory): one start for each. */
export const DEPTHS_PER_WAVELENGTH: readonly number[] = [1 / 3, 1 / 2];

/**
 * The wavelength–depth start for `layers` layers from picked velocities v
 * (m/s) at frequencies f (Hz), depth = depthPerWavelength·λ, clamped into the box [lower, upper] of the
 * parameters (ln h_1…ln h_N, ln β_1…ln β_N, ln β_H).
 */
export function wavelengthDepthStart(
  velocity: ArrayLike<number>,
  frequency: ArrayLike<number>,
  layers: number,
  lower: ArrayLike<number>,
  upper: ArrayLike<number>,
  depthPerWavelength: number,
): Float64Array {
  const n = velocity.length;
  const z = new Float64Array(n);
  const lv = new Float64Array(n);
  let zmin = Infinity;
  let zmax = 0;
  let fastest = -Infinity;
  for (let i = 0; i < n; i++) {
    z[i] = (depthPerWavelength * velocity[i]) / frequency[i];
    lv[i] = Math.log(VS_PER_PICKED_VELOCITY * velocity[i]);
    zmin = Math.min(zmin, z[i]);
    zmax = Math.max(zmax, z[i]);
    fastest = Math.max(fastest, lv[i]);
  }
  const u = new Float64Array(2 * layers + 1);
  // Interfaces at log depths zmin·(zmax/zmin)^(j/(N+1)), j = 1…N (the top layer reaches the first).
  const span = Math.log(Math.max(zmax, zmin * 1.01) / zmin);
  let top = 0;
  for (let j = 0; j < layers; j++) {
    const bottom = zmin * Math.exp((span * (j + 1)) / (layers + 1));
    u[j] = Math.log(bottom - top);
    let sum = 0;
    let count = 0;
    let nearest = NaN;
    let gap = Infinity;
    for (let i = 0; i < n; i++) {
      if (z[i] >= top && z[i] < bottom) {
        sum += lv[i];
        count++;
      }
      const d = z[i] < top ? top - z[i] : z[i] >= bottom ? z[i] - bottom : 0;
      if (d < gap) {
        gap = d;
        nearest = lv[i];
      }
    }
    u[layers + j] = count > 0 ? sum / count : nearest;
    top = bottom;
  }
  u[2 * layers] = fastest;
  for (let j = 0; j < u.length; j++) u[j] = Math.min(upper[j], Math.max(lower[j], u[j]));
  return u;
}

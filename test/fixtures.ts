/**
 * Models shared by several test and bench files. Each test still names,
 * beside its check, the source of the values it compares with.
 */
import type { TwoLayer } from '../core/love-layer';
import type { LayeredModel } from '../core/model';

/**
 * The crustal layer over mantle of Shearer, *Introduction to Seismology*
 * (2nd ed. 2009), ch. 8 exercises: H = 40 km, β1 = 3.5 km/s, β2 = 4.5 km/s,
 * ρ1 = 2.7 g/cm³, ρ2 = 3.3 g/cm³; here in SI units.
 */
export const SHEARER_CRUST: Readonly<TwoLayer> = Object.freeze({ h: 40_000, vs1: 3500, vs2: 4500, rho1: 2700, rho2: 3300 });

/** SHEARER_CRUST as a LayeredModel (one layer over the half-space). */
export const SHEARER_CRUST_MODEL: LayeredModel = {
  layers: [{ thickness: 40_000, vs: 3500, density: 2700 }],
  halfspace: { vs: 4500, density: 3300 },
};

/** Invented three-layer site with a low-velocity layer at depth. */
export const INVENTED_LVL_SITE: LayeredModel = {
  layers: [
    { thickness: 10, vs: 250, density: 1800 },
    { thickness: 15, vs: 150, density: 1750 },
    { thickness: 20, vs: 350, density: 1900 },
  ],
  halfspace: { vs: 600, density: 2100 },
};

/** Invented five-layer soft-soil site, with a low-velocity layer at depth. */
export const INVENTED_FIVE_LAYER_SITE: LayeredModel = {
  layers: [
    { thickness: 3, vs: 160, density: 1750 },
    { thickness: 5, vs: 220, density: 1850 },
    { thickness: 6, vs: 180, density: 1800 },
    { thickness: 8, vs: 320, density: 1950 },
    { thickness: 12, vs: 450, density: 2050 },
  ],
  halfspace: { vs: 700, density: 2200 },
};

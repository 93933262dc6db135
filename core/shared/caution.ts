/**
 * The caution that travels with every estimate, site figure and export.
 * Keep the wording stable: tests, the README and exports quote it.
 */
export const CAUTION =
  'Screening estimate only. Site characterisation for structures must follow local codes and licensed geotechnical practice.';

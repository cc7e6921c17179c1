/**
 * The screening caution, written once and carried by everything that shows a concentration:
 * summary.json, footprint.geojson, the command line's printout and the README. Change it here only.
 */
export const SCREENING_CAUTION =
  'Screening estimate only. These figures come from a simplified dispersion screening and defer to ' +
  'regulatory dispersion models, to the local authority and to licensed professional practice; they ' +
  'are not a regulatory assessment and must not be used for emergency response. Every figure is a ' +
  'rounded estimate with wide uncertainty.';

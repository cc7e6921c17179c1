/**
 * Plume spreads sigma_y (crosswind) and sigma_z (vertical) [m] as functions of downwind distance x [m],
 * for the Gaussian reference mode.
 *
 * - Briggs (1973) fits, open country and urban, after Gifford (1976) [read: Boubel, Fox, Turner & Stern,
 *   Fundamentals of Air Pollution, 3rd ed., 1994, Tables 19-6/19-7; ../shared/REFERENCES.md].
 *   Stated range 100 m < x < 10 km. Outside it the same formulas are evaluated as they are: below 100 m
 *   they fall off linearly to zero at the source (sigma proportional to x, the short-travel-time limit of
 *   Taylor's diffusion theory: common practice), beyond 10 km they are extrapolated.
 * - Pasquill-Gifford curve fits (x in km) [Boubel et al. 1994, Tables 19-4/19-5; the rows not marked as
 *   read there are from memory, see REFERENCES.md]. Below the first row the first row's power law is
 *   extrapolated to zero; beyond the last row the last row continues; sigma_z never exceeds 5000 m.
 *   At a row boundary the upper row applies (each row covers x < its upper bound).
 * - Constant diffusivities (verification): sigma^2 = 2 K x / u, the slender-plume limit of the
 *   advection-diffusion equation with constant K (Stockie 2011, SIAM Review 53(2):349).
 *
 * None of these defines a spread at x <= 0; callers return zero concentration upwind. Every curve here
 * gives 0 at x = 0 and is finite for x > 0.
 */
import type { Dispersion, LandUse, StabilityClass } from '../../scenarios/format/types.ts';

export interface Sigmas {
  /** crosswind spread [m] */
  sigmaY_m: number;
  /** vertical spread [m] */
  sigmaZ_m: number;
}

/**
 * A dispersion curve: callable as x [m] -> Sigmas, with allocation-free scalar forms for inner loops.
 */
export interface SigmaFunction {
  (x_m: number): Sigmas;
  /** crosswind spread at downwind distance x_m [m] */
  sigmaY_m(x_m: number): number;
  /** vertical spread at downwind distance x_m [m] */
  sigmaZ_m(x_m: number): number;
  /** plain-language name of the curve set, for run notes */
  readonly description: string;
}

/** sigma_z cap of the Pasquill-Gifford fits [m] (Boubel et al. 1994, Table 19-5 [read]). */
export const PASQUILL_GIFFORD_SIGMA_Z_CAP_M = 5000;

// ---------------------------------------------------------------------------------------------------
// Briggs (1973), x in metres.

/**
 * One Briggs term: coefficient * x * (1 + growth * x)^power. Every Briggs sigma has this shape
 * (power 0 for the plain linear rows).
 */
export interface BriggsTerm {
  coefficient: number;
  growth_per_m: number;
  power: number;
}

/** The sigma_y and sigma_z terms of one class and land use. */
export interface BriggsRow {
  sigmaY: BriggsTerm;
  sigmaZ: BriggsTerm;
}

const term = (coefficient: number, growth_per_m: number, power: number): BriggsTerm => ({
  coefficient,
  growth_per_m,
  power,
});

/** Open country (Boubel et al. 1994, Table 19-6, after Gifford 1976 [read]). */
const BRIGGS_OPEN_COUNTRY: Readonly<Record<StabilityClass, BriggsRow>> = {
  A: { sigmaY: term(0.22, 0.0001, -0.5), sigmaZ: term(0.2, 0, 0) },
  B: { sigmaY: term(0.16, 0.0001, -0.5), sigmaZ: term(0.12, 0, 0) },
  C: { sigmaY: term(0.11, 0.0001, -0.5), sigmaZ: term(0.08, 0.0002, -0.5) },
  D: { sigmaY: term(0.08, 0.0001, -0.5), sigmaZ: term(0.06, 0.0015, -0.5) },
  E: { sigmaY: term(0.06, 0.0001, -0.5), sigmaZ: term(0.03, 0.0003, -1) },
  F: { sigmaY: term(0.04, 0.0001, -0.5), sigmaZ: term(0.016, 0.0003, -1) },
};

/** Urban (Boubel et al. 1994, Table 19-7, after Gifford 1976 [read]); A-B and E-F share rows. */
const URBAN_AB: BriggsRow = { sigmaY: term(0.32, 0.0004, -0.5), sigmaZ: term(0.24, 0.001, 0.5) };
const URBAN_EF: BriggsRow = { sigmaY: term(0.11, 0.0004, -0.5), sigmaZ: term(0.08, 0.0015, -0.5) };
const BRIGGS_URBAN: Readonly<Record<StabilityClass, BriggsRow>> = {
  A: URBAN_AB,
  B: URBAN_AB,
  C: { sigmaY: term(0.22, 0.0004, -0.5), sigmaZ: term(0.2, 0, 0) },
  D: { sigmaY: term(0.16, 0.0004, -0.5), sigmaZ: term(0.14, 0.0003, -0.5) },
  E: URBAN_EF,
  F: URBAN_EF,
};

/** A Briggs term at distance x [m]: coefficient x (1 + growth x)^power [m]. */
export function evaluateBriggsTerm(t: BriggsTerm, x_m: number): number {
  return t.power === 0 ? t.coefficient * x_m : t.coefficient * x_m * Math.pow(1 + t.growth_per_m * x_m, t.power);
}

/** d/dx of coefficient x (1 + g x)^p = coefficient (1 + g x)^(p - 1) (1 + (1 + p) g x) [-]. */
export function briggsTermSlope(t: BriggsTerm, x_m: number): number {
  return t.coefficient * Math.pow(1 + t.growth_per_m * x_m, t.power - 1) * (1 + (1 + t.power) * t.growth_per_m * x_m);
}

/**
 * The Briggs (1973) terms of a class and land use: the one table every part of plumeplan uses (the
 * Gaussian mode's curves and the grid closure's horizontal diffusivity).
 * @throws RangeError for an unknown land use or class
 */
export function briggsRow(stability: StabilityClass, landUse: LandUse): BriggsRow {
  const table = landUse === 'urban' ? BRIGGS_URBAN : landUse === 'rural' ? BRIGGS_OPEN_COUNTRY : undefined;
  if (table === undefined) throw new RangeError(`landUse is ${JSON.stringify(landUse)}; allowed: "rural" or "urban"`);
  const row = table[stability];
  if (row === undefined) throw new RangeError(`stability is ${JSON.stringify(stability)}; allowed: one of A..F`);
  return row;
}

function checkDistance(x_m: number): void {
  if (!Number.isFinite(x_m) || x_m < 0) {
    throw new RangeError(`x_m is ${x_m}; allowed: a finite downwind distance >= 0 m`);
  }
}

/**
 * Briggs (1973) sigmas, open country ("rural") or urban.
 *
 * @param x_m downwind distance [m], >= 0 (fit range 100 m to 10 km; formulas used as they are outside it)
 * @param stability Pasquill class A..F
 * @param landUse "rural" (open country) or "urban"
 * @returns { sigmaY_m, sigmaZ_m } [m]
 * @example briggsSigmas(1000, 'D', 'rural') // { sigmaY_m: 76.28, sigmaZ_m: 37.95 }
 */
export function briggsSigmas(x_m: number, stability: StabilityClass, landUse: LandUse): Sigmas {
  checkDistance(x_m);
  const row = briggsRow(stability, landUse);
  return { sigmaY_m: evaluateBriggsTerm(row.sigmaY, x_m), sigmaZ_m: evaluateBriggsTerm(row.sigmaZ, x_m) };
}

// ---------------------------------------------------------------------------------------------------
// Pasquill-Gifford curve fits, x in kilometres.

/** sigma_y = 465.11628 x tan(TH), TH = c - d ln x [deg], x [km] (Boubel et al. 1994, Table 19-4 [read]). */
const PG_SIGMA_Y: Readonly<Record<StabilityClass, { c_deg: number; d_deg: number }>> = {
  A: { c_deg: 24.167, d_deg: 2.5334 },
  B: { c_deg: 18.333, d_deg: 1.8096 },
  C: { c_deg: 12.5, d_deg: 1.0857 },
  D: { c_deg: 8.3333, d_deg: 0.72382 },
  E: { c_deg: 6.25, d_deg: 0.54287 },
  F: { c_deg: 4.1667, d_deg: 0.36191 },
};
const PG_SIGMA_Y_FACTOR_M_PER_KM = 465.11628;

/** One sigma_z row: sigma_z = a x^b [m] for x [km] below upperBound_km. */
export interface PasquillGiffordRow {
  upperBound_km: number;
  a: number;
  b: number;
}

/**
 * sigma_z rows (Boubel et al. 1994, Table 19-5). Rows marked [read] were read there, the rest are from
 * memory of the same published fits (REFERENCES.md); neighbouring rows meet within 0.05 % at every
 * boundary, which the tests check. Class A beyond 3.11 km is the 5000 m cap [read].
 */
export const PASQUILL_GIFFORD_SIGMA_Z_ROWS: Readonly<Record<StabilityClass, readonly PasquillGiffordRow[]>> = {
  A: [
    { upperBound_km: 0.1, a: 122.8, b: 0.9447 },
    { upperBound_km: 0.15, a: 158.08, b: 1.0542 },
    { upperBound_km: 0.2, a: 170.22, b: 1.0932 },
    { upperBound_km: 0.25, a: 179.52, b: 1.1262 },
    { upperBound_km: 0.3, a: 217.41, b: 1.2644 },
    { upperBound_km: 0.4, a: 258.89, b: 1.4094 },
    { upperBound_km: 0.5, a: 346.75, b: 1.7283 },
    { upperBound_km: 3.11, a: 453.85, b: 2.1166 }, // [read]
    // beyond 3.11 km: 5000 m [read], applied through the cap; the last row's value there is 5011 m
    { upperBound_km: Infinity, a: PASQUILL_GIFFORD_SIGMA_Z_CAP_M, b: 0 },
  ],
  B: [
    { upperBound_km: 0.2, a: 90.673, b: 0.93198 },
    { upperBound_km: 0.4, a: 98.483, b: 0.98332 },
    // [read]; the table caps sigma_z at 5000 m beyond 35 km; min(a x^b, 5000) reaches the cap at 32.6 km
    { upperBound_km: Infinity, a: 109.3, b: 1.0971 },
  ],
  C: [{ upperBound_km: Infinity, a: 61.141, b: 0.91465 }], // [read]
  D: [
    { upperBound_km: 0.3, a: 34.459, b: 0.86974 },
    { upperBound_km: 1, a: 32.093, b: 0.81066 }, // [read]
    { upperBound_km: 3, a: 32.093, b: 0.64403 }, // [read]
    { upperBound_km: 10, a: 33.504, b: 0.60486 },
    { upperBound_km: 30, a: 36.65, b: 0.56589 },
    { upperBound_km: Infinity, a: 44.053, b: 0.51179 },
  ],
  E: [
    { upperBound_km: 0.1, a: 24.26, b: 0.8366 },
    { upperBound_km: 0.3, a: 23.331, b: 0.81956 },
    { upperBound_km: 1, a: 21.628, b: 0.7566 },
    { upperBound_km: 2, a: 21.628, b: 0.63077 },
    { upperBound_km: 4, a: 22.534, b: 0.57154 },
    { upperBound_km: 10, a: 24.703, b: 0.50527 },
    { upperBound_km: 20, a: 26.97, b: 0.46713 },
    { upperBound_km: 40, a: 35.42, b: 0.37615 },
    { upperBound_km: Infinity, a: 47.618, b: 0.29592 },
  ],
  F: [
    { upperBound_km: 0.2, a: 15.209, b: 0.81558 },
    { upperBound_km: 0.7, a: 14.457, b: 0.78407 },
    { upperBound_km: 1, a: 13.953, b: 0.68465 },
    { upperBound_km: 2, a: 13.953, b: 0.63227 },
    { upperBound_km: 3, a: 14.823, b: 0.54503 },
    { upperBound_km: 7, a: 16.187, b: 0.4649 },
    { upperBound_km: 15, a: 17.836, b: 0.41507 },
    { upperBound_km: 30, a: 22.651, b: 0.32681 },
    { upperBound_km: 60, a: 27.074, b: 0.27436 },
    { upperBound_km: Infinity, a: 34.219, b: 0.21716 },
  ],
};

const DEGREES_TO_RADIANS = Math.PI / 180;

function pasquillGiffordSigmaY_m(x_m: number, stability: StabilityClass): number {
  if (x_m === 0) return 0;
  const { c_deg, d_deg } = PG_SIGMA_Y[stability];
  const x_km = x_m / 1000;
  // The angle grows without bound as x -> 0 (ln x -> -inf); it stays below 90 degrees for every
  // x above 1e-9 km, and sigma_y = 465 x tan(TH) still tends to zero, so only the limit x = 0 is special.
  const angle_deg = Math.min(c_deg - d_deg * Math.log(x_km), 89.9);
  return PG_SIGMA_Y_FACTOR_M_PER_KM * x_km * Math.tan(angle_deg * DEGREES_TO_RADIANS);
}

function pasquillGiffordSigmaZ_m(x_m: number, rows: readonly PasquillGiffordRow[]): number {
  const x_km = x_m / 1000;
  let r = 0;
  while (x_km >= rows[r].upperBound_km) r++;
  const row = rows[r];
  return Math.min(row.a * Math.pow(x_km, row.b), PASQUILL_GIFFORD_SIGMA_Z_CAP_M);
}

function pasquillGiffordRows(stability: StabilityClass): readonly PasquillGiffordRow[] {
  const rows = PASQUILL_GIFFORD_SIGMA_Z_ROWS[stability];
  if (rows === undefined) throw new RangeError(`stability is ${JSON.stringify(stability)}; allowed: one of A..F`);
  return rows;
}

/**
 * Pasquill-Gifford sigmas from the curve fits, every row, sigma_z capped at 5000 m.
 *
 * @param x_m downwind distance [m], >= 0
 * @param stability Pasquill class A..F
 * @returns { sigmaY_m, sigmaZ_m } [m]
 * @example pasquillGiffordSigmas(1000, 'D') // { sigmaY_m: 68.1, sigmaZ_m: 32.09 }
 */
export function pasquillGiffordSigmas(x_m: number, stability: StabilityClass): Sigmas {
  checkDistance(x_m);
  const rows = pasquillGiffordRows(stability);
  return { sigmaY_m: pasquillGiffordSigmaY_m(x_m, stability), sigmaZ_m: pasquillGiffordSigmaZ_m(x_m, rows) };
}

// ---------------------------------------------------------------------------------------------------
// Constant diffusivities.

function checkPositive(name: string, value: number, unit: string): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${name} is ${value}; allowed: a finite value > 0 ${unit}`);
  }
}

/**
 * Spreads of a plume carried at speed u through constant eddy diffusivities: sigma^2 = 2 K x / u
 * (travel time x / u; Stockie 2011 for the setting).
 *
 * @param x_m downwind distance [m], >= 0
 * @param windSpeed_m_s plume transport speed [m/s], > 0
 * @param horizontal_m2_s horizontal diffusivity [m2/s], > 0
 * @param vertical_m2_s vertical diffusivity [m2/s], > 0
 * @returns { sigmaY_m, sigmaZ_m } [m]
 * @example constantDiffusivitySigmas(500, 5, 10, 10) // both sqrt(2 * 10 * 500 / 5) = 44.72 m
 */
export function constantDiffusivitySigmas(
  x_m: number,
  windSpeed_m_s: number,
  horizontal_m2_s: number,
  vertical_m2_s: number,
): Sigmas {
  checkDistance(x_m);
  checkPositive('windSpeed_m_s', windSpeed_m_s, 'm/s');
  checkPositive('dispersion.horizontal_m2_s', horizontal_m2_s, 'm2/s');
  checkPositive('dispersion.vertical_m2_s', vertical_m2_s, 'm2/s');
  return {
    sigmaY_m: Math.sqrt((2 * horizontal_m2_s * x_m) / windSpeed_m_s),
    sigmaZ_m: Math.sqrt((2 * vertical_m2_s * x_m) / windSpeed_m_s),
  };
}

// ---------------------------------------------------------------------------------------------------
// Chooser.

function makeSigmaFunction(
  sigmaY_m: (x_m: number) => number,
  sigmaZ_m: (x_m: number) => number,
  description: string,
): SigmaFunction {
  const evaluate = (x_m: number): Sigmas => {
    checkDistance(x_m);
    return { sigmaY_m: sigmaY_m(x_m), sigmaZ_m: sigmaZ_m(x_m) };
  };
  return Object.assign(evaluate, { sigmaY_m, sigmaZ_m, description });
}

/**
 * The dispersion curve a scenario asks for, as a function of downwind distance.
 * The scalar forms (`sigmaY_m`, `sigmaZ_m`) skip argument checks for speed: pass x >= 0.
 *
 * @param dispersion the scenario's dispersion: stability curves ("briggs" by land use, or
 *   "pasquill-gifford"), or constant diffusivities
 * @param stability Pasquill class A..F (ignored for constant diffusivities)
 * @param landUse "rural" or "urban" (Briggs only)
 * @param windSpeed_m_s plume transport speed [m/s]; required for constant diffusivities
 * @returns x [m] -> { sigmaY_m, sigmaZ_m } [m]
 * @example sigmasFor({ kind: 'stability', curves: 'briggs' }, 'D', 'rural')(1000).sigmaZ_m // 37.95
 */
export function sigmasFor(
  dispersion: Dispersion,
  stability: StabilityClass,
  landUse: LandUse,
  windSpeed_m_s?: number,
): SigmaFunction {
  if (dispersion.kind === 'constant') {
    if (windSpeed_m_s === undefined) {
      throw new RangeError('windSpeed_m_s is undefined; constant-diffusivity sigmas need the plume speed (> 0 m/s)');
    }
    checkPositive('windSpeed_m_s', windSpeed_m_s, 'm/s');
    checkPositive('dispersion.horizontal_m2_s', dispersion.horizontal_m2_s, 'm2/s');
    checkPositive('dispersion.vertical_m2_s', dispersion.vertical_m2_s, 'm2/s');
    const horizontalScale_m = (2 * dispersion.horizontal_m2_s) / windSpeed_m_s;
    const verticalScale_m = (2 * dispersion.vertical_m2_s) / windSpeed_m_s;
    return makeSigmaFunction(
      (x_m) => Math.sqrt(horizontalScale_m * x_m),
      (x_m) => Math.sqrt(verticalScale_m * x_m),
      `constant diffusivities (horizontal ${dispersion.horizontal_m2_s} m2/s, vertical ${dispersion.vertical_m2_s} m2/s), sigma^2 = 2 K x / u`,
    );
  }
  if (dispersion.kind !== 'stability') {
    throw new RangeError(
      `dispersion.kind is ${JSON.stringify((dispersion as { kind: unknown }).kind)}; allowed: "stability" or "constant"`,
    );
  }
  if (dispersion.curves === 'briggs') {
    const row = briggsRow(stability, landUse);
    return makeSigmaFunction(
      (x_m) => evaluateBriggsTerm(row.sigmaY, x_m),
      (x_m) => evaluateBriggsTerm(row.sigmaZ, x_m),
      `Briggs ${landUse === 'urban' ? 'urban' : 'open-country'} curves, class ${stability}`,
    );
  }
  if (dispersion.curves === 'pasquill-gifford') {
    const rows = pasquillGiffordRows(stability);
    return makeSigmaFunction(
      (x_m) => pasquillGiffordSigmaY_m(x_m, stability),
      (x_m) => pasquillGiffordSigmaZ_m(x_m, rows),
      `Pasquill-Gifford curve fits, class ${stability}`,
    );
  }
  throw new RangeError(
    `dispersion.curves is ${JSON.stringify(dispersion.curves)}; allowed: "briggs" or "pasquill-gifford"`,
  );
}

/**
 * Eddy diffusivities from the stability class, the wind and the mixing height: the grid solver's
 * default closure (dispersion kind "stability").
 *
 * Vertical: the boundary-layer profile of Troen & Mahrt (1986, Boundary-Layer Meteorol. 37:129) in the
 * form of Holtslag & Boville (1993, J. Climate 6:1825), from memory:
 *
 *   K_z(z) = kappa w_t z (1 - z/h)^2            for 0 < z < h (h the mixing height)
 *   w_t    = u* / phi_h(z / L)                  stable and neutral (L > 0 or infinite), at every height,
 *                                               and unstable (L < 0) in the surface layer z < 0.1 h
 *   w_t    = w_m / Pr                           unstable above 0.1 h: Holtslag & Boville's mixed-layer
 *                                               velocity scale and Prandtl number (outerLayerVelocityScale_m_s)
 *
 * with the Businger-Dyer similarity functions (Dyer 1974, Boundary-Layer Meteorol. 7:363, from memory):
 * phi_h = 1 + 5 z/L (stable), phi_h = (1 - 16 z/L)^(-1/2) (unstable). The (1 - z/h)^2 shape takes the
 * turbulence to zero at the top of the mixed layer. Above the mixing height (and as a floor below it)
 * K_z is a small background, BACKGROUND_LENGTH_m times u* (0.05 m x u*: about 0.01 to 0.03 m2/s), so
 * an elevated plume above the lid is nearly sealed off from the ground. It is proportional to u* so
 * that the whole closure stays proportional to the wind speed (plumeplan's choice).
 *
 * The friction velocity u* comes from the measured wind through the Monin-Obukhov log profile,
 *   u(z_a) = (u* / kappa) [ln(z_a / z0) - psi_m(z_a / L) + psi_m(z0 / L)],
 * with psi_m = -5 z/L (stable, Businger-Dyer) and Paulson's (1970, J. Appl. Meteorol. 9:857) form for
 * unstable air, from memory. The Obukhov length L comes from the class and the roughness length by
 * Golder's (1972, Boundary-Layer Meteorol. 3:47) nomogram, in the straight-line fit
 * 1/L = a + b log10(z0) (Myrup & Ranzieri 1976, as tabulated in Seinfeld & Pandis, Atmospheric
 * Chemistry and Physics, from memory). Since L depends on the class only, u* is proportional to the
 * measured wind speed.
 *
 * Horizontal: Taylor's statistical theory makes sigma_y grow as x near the source and as sqrt(x) far
 * from it, while a constant eddy diffusivity can only give sqrt(x). What a plume feels, though, is the
 * diffusivity of the layers it has reached, and it reaches higher layers the farther it travels. So
 * plumeplan takes the Briggs (1973) open-country or urban curves (Boubel et al. 1994, Tables 19-6/19-7;
 * REFERENCES.md; the one table, in ../reference/dispersionCurves.ts, that the Gaussian mode uses too) and
 * gives each layer at height z the diffusivity that reproduces the Briggs growth of the crosswind
 * variance at the travel distance x_z where a ground-level plume's mean height reaches z:
 *
 *   K_h(z) = u(z) (1/2) d(sigma_y^2)/dx at x = x_z,   with sqrt(2/pi) sigma_z(x_z) = z
 *
 * (Taylor: d(sigma_y^2)/dt = 2 K_h, and t = x / u; sqrt(2/pi) sigma_z is the mean height of a
 * ground-reflected Gaussian). x_z is held within [1 m, 10 km], the Briggs range and its near-source
 * limit, so layers above the height a class's curve ever reaches take the 10 km value. This construction
 * is plumeplan's own; the measured agreement with the Briggs reference over 300 m to 5 km, class by
 * class, is recorded in docs/closure-check.md and tests/solver/closures/gridVersusGaussian.test.ts.
 * Both diffusivities are proportional to the wind speed (u* and u(z) are), so the steady field
 * scales exactly as 1 / u when nothing else depends on the speed.
 */
import type { LandUse, StabilityClass } from '../../scenarios/format/types.ts';
import type { ResolvedWeather } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import { briggsRow, briggsTermSlope, evaluateBriggsTerm as evaluateTerm } from '../reference/dispersionCurves.ts';
import type { DiffusivityClosure } from './types.ts';

/** von Karman constant [-] (0.4, common practice). */
export const VON_KARMAN = 0.4;

/**
 * Aerodynamic roughness length by land use [m]: plumeplan's defaults, of the usual magnitude for open
 * farmland with hedges (0.1 m) and a built-up area (1 m) (common practice).
 */
export const ROUGHNESS_LENGTH_m: Readonly<Record<LandUse, number>> = { rural: 0.1, urban: 1 };

/**
 * Golder (1972) nomogram as the fit 1/L = a + b log10(z0) [1/m] (Myrup & Ranzieri 1976, via Seinfeld &
 * Pandis, from memory). D is neutral: 1/L = 0.
 */
const GOLDER_FIT: Readonly<Record<StabilityClass, { a_per_m: number; b_per_m: number }>> = {
  A: { a_per_m: -0.096, b_per_m: 0.029 },
  B: { a_per_m: -0.037, b_per_m: 0.029 },
  C: { a_per_m: -0.002, b_per_m: 0.018 },
  D: { a_per_m: 0, b_per_m: 0 },
  E: { a_per_m: 0.004, b_per_m: -0.018 },
  F: { a_per_m: 0.035, b_per_m: -0.036 },
};

/**
 * Background eddy diffusivity above the mixing height, and its floor below, per unit friction velocity
 * [m]: K_background = BACKGROUND_LENGTH_m * u* (plumeplan's choice; file comment).
 */
export const BACKGROUND_LENGTH_m = 0.05;

/** Fraction of the mixed layer taken as the surface layer in unstable air (Holtslag & Boville 1993). */
export const SURFACE_LAYER_FRACTION = 0.1;

/** Travel distances x_z are held within this range [m] (file comment). */
export const HORIZONTAL_MATCH_RANGE_m = { nearest: 1, farthest: 10_000 } as const;

/** Mean height of a ground-reflected Gaussian plume per unit sigma_z: sqrt(2 / pi) [-]. */
const MEAN_HEIGHT_PER_SIGMA_Z = Math.sqrt(2 / Math.PI);

/** Briggs sigma_y at distance x [m]. */
export function briggsSigmaY_m(stability: StabilityClass, landUse: LandUse, x_m: number): number {
  return evaluateTerm(briggsRow(stability, landUse).sigmaY, x_m);
}

/** Briggs sigma_z at distance x [m]. */
export function briggsSigmaZ_m(stability: StabilityClass, landUse: LandUse, x_m: number): number {
  return evaluateTerm(briggsRow(stability, landUse).sigmaZ, x_m);
}

/**
 * Travel distance x_z [m] at which a ground-level Briggs plume's mean height sqrt(2/pi) sigma_z reaches
 * z, held within HORIZONTAL_MATCH_RANGE_m. Every Briggs sigma_z rises with x, so bisection on log x
 * finds it.
 */
export function travelDistanceToHeight_m(stability: StabilityClass, landUse: LandUse, z_m: number): number {
  const sigmaZ = briggsRow(stability, landUse).sigmaZ;
  const target_m = z_m / MEAN_HEIGHT_PER_SIGMA_Z;
  let low: number = HORIZONTAL_MATCH_RANGE_m.nearest;
  let high: number = HORIZONTAL_MATCH_RANGE_m.farthest;
  if (evaluateTerm(sigmaZ, low) >= target_m) return low;
  if (evaluateTerm(sigmaZ, high) <= target_m) return high;
  for (let iteration = 0; iteration < 60; iteration++) {
    const middle = Math.sqrt(low * high);
    if (evaluateTerm(sigmaZ, middle) < target_m) low = middle;
    else high = middle;
  }
  return Math.sqrt(low * high);
}

/**
 * Crosswind spreading length [m] at height z: (1/2) d(sigma_y^2)/dx = sigma_y dsigma_y/dx at x_z, so
 * that K_h = u(z) times this (file comment).
 */
export function crosswindSpreadingLength_m(stability: StabilityClass, landUse: LandUse, z_m: number): number {
  const x_m = travelDistanceToHeight_m(stability, landUse, z_m);
  const sigmaY = briggsRow(stability, landUse).sigmaY;
  return evaluateTerm(sigmaY, x_m) * briggsTermSlope(sigmaY, x_m);
}

/**
 * Inverse Obukhov length 1/L [1/m] from the class and the roughness length (Golder 1972 fit).
 * Negative in unstable air, zero neutral, positive stable.
 */
export function inverseObukhovLength_per_m(stability: StabilityClass, roughnessLength_m: number): number {
  const fit = GOLDER_FIT[stability];
  if (fit === undefined) throw new RangeError(`stability: ${JSON.stringify(stability)} is not allowed (one of A..F)`);
  if (!(roughnessLength_m > 0 && Number.isFinite(roughnessLength_m))) {
    throw new RangeError(`roughnessLength_m: ${roughnessLength_m} is not allowed (a length > 0 m)`);
  }
  return fit.a_per_m + fit.b_per_m * Math.log10(roughnessLength_m);
}

/** Businger-Dyer phi_h(zeta) [-], zeta = z / L (Dyer 1974, from memory). */
export function phiHeat(zeta: number): number {
  return zeta >= 0 ? 1 + 5 * zeta : 1 / Math.sqrt(1 - 16 * zeta);
}

/** Integrated momentum stability function psi_m(zeta) [-] (Businger-Dyer stable; Paulson 1970 unstable). */
export function psiMomentum(zeta: number): number {
  if (zeta >= 0) return -5 * zeta;
  const x = Math.pow(1 - 16 * zeta, 0.25);
  return 2 * Math.log((1 + x) / 2) + Math.log((1 + x * x) / 2) - 2 * Math.atan(x) + Math.PI / 2;
}

/**
 * Friction velocity u* [m/s] from the measured wind by the Monin-Obukhov log profile.
 *
 * @param windSpeed_m_s wind at the anemometer [m/s]
 * @param anemometerHeight_m [m], above the roughness length
 * @param inverseObukhov_per_m 1/L [1/m]
 * @param roughnessLength_m z0 [m]
 */
export function frictionVelocity_m_s(
  windSpeed_m_s: number,
  anemometerHeight_m: number,
  inverseObukhov_per_m: number,
  roughnessLength_m: number,
): number {
  // An anemometer at or below z0 is outside the log profile; evaluate it no lower than 2 z0.
  const height_m = Math.max(anemometerHeight_m, 2 * roughnessLength_m);
  const profile =
    Math.log(height_m / roughnessLength_m) -
    psiMomentum(height_m * inverseObukhov_per_m) +
    psiMomentum(roughnessLength_m * inverseObukhov_per_m);
  return (VON_KARMAN * windSpeed_m_s) / profile;
}

/** Everything the vertical profile needs, resolved once per weather state. */
export interface VerticalProfileSettings {
  /** friction velocity [m/s] */
  frictionVelocity_m_s: number;
  /** 1/L [1/m] */
  inverseObukhov_per_m: number;
  /** mixing height h [m] */
  mixingHeight_m: number;
}

/** The vertical profile's settings for a weather state and land use. */
export function verticalProfileSettings(weather: ResolvedWeather, landUse: LandUse): VerticalProfileSettings {
  const roughness_m = ROUGHNESS_LENGTH_m[landUse];
  if (roughness_m === undefined) throw new RangeError(`landUse: ${JSON.stringify(landUse)} is not allowed ("rural" or "urban")`);
  if (!(weather.windSpeed_m_s > 0 && Number.isFinite(weather.windSpeed_m_s))) {
    throw new RangeError(`weather.windSpeed_m_s: ${weather.windSpeed_m_s} is not allowed (a finite speed > 0 m/s)`);
  }
  if (!(weather.mixingHeight_m > 0 && Number.isFinite(weather.mixingHeight_m))) {
    throw new RangeError(`weather.mixingHeight_m: ${weather.mixingHeight_m} is not allowed (a finite height > 0 m)`);
  }
  const inverseObukhov_per_m = inverseObukhovLength_per_m(weather.stability, roughness_m);
  return {
    frictionVelocity_m_s: frictionVelocity_m_s(weather.windSpeed_m_s, weather.anemometerHeight_m, inverseObukhov_per_m, roughness_m),
    inverseObukhov_per_m,
    mixingHeight_m: weather.mixingHeight_m,
  };
}

/** Vertical eddy diffusivity K_z at height z [m2/s] (Troen & Mahrt / Holtslag & Boville profile). */
export function verticalDiffusivityAt_m2_s(settings: VerticalProfileSettings, z_m: number): number {
  const { frictionVelocity_m_s: uStar, inverseObukhov_per_m: inverseL, mixingHeight_m: h } = settings;
  const background_m2_s = BACKGROUND_LENGTH_m * uStar;
  if (!(z_m > 0) || z_m >= h) return background_m2_s;
  let velocityScale_m_s: number;
  if (inverseL < 0 && z_m > SURFACE_LAYER_FRACTION * h) {
    velocityScale_m_s = outerLayerVelocityScale_m_s(uStar, inverseL, h);
  } else {
    velocityScale_m_s = uStar / phiHeat(z_m * inverseL);
  }
  const shape = (1 - z_m / h) * (1 - z_m / h);
  return Math.max(background_m2_s, VON_KARMAN * velocityScale_m_s * z_m * shape);
}

/**
 * Velocity scale for heat w_t = w_m / Pr [m/s] in the outer part of an unstable mixed layer
 * (z > 0.1 h), Holtslag & Boville (1993), from memory:
 *
 *   w_m = (u*^3 + 7 epsilon kappa w*^3)^(1/3),   w*^3 = -u*^3 h / (kappa L)  (so w_m = u* / phi_m(epsilon h / L)
 *                                                 with phi_m = (1 - 7 z/L)^(-1/3), their free-convection form)
 *   Pr  = phi_h / phi_m (epsilon h / L) + a kappa epsilon w* / w_m,   epsilon = 0.1, a = 7.2
 *
 * with the Businger-Dyer phi_h and phi_m = (1 - 16 z/L)^(-1/4) (Dyer 1974). Holtslag & Boville pair this
 * with a counter-gradient flux, which plumeplan's grid solver does not carry: the local diffusivity is
 * used alone. The earlier form (u* / phi_h held at 0.1 h) gave two to three times this in classes A-C,
 * and the grid plumes were diluted vertically well beyond Briggs sigma_z (docs/closure-check.md).
 * Proportional to u*, as everything here.
 */
export function outerLayerVelocityScale_m_s(frictionVelocity_m_s: number, inverseObukhov_per_m: number, mixingHeight_m: number): number {
  if (!(inverseObukhov_per_m < 0)) {
    throw new RangeError(`inverseObukhov_per_m: ${inverseObukhov_per_m} is not allowed (the outer-layer scale is for unstable air, 1/L < 0)`);
  }
  const epsilon = SURFACE_LAYER_FRACTION;
  const convectiveVelocityCubed_m3_s3 = (frictionVelocity_m_s ** 3 * mixingHeight_m * -inverseObukhov_per_m) / VON_KARMAN;
  const convectiveVelocity_m_s = Math.cbrt(convectiveVelocityCubed_m3_s3);
  const momentumScale_m_s = Math.cbrt(frictionVelocity_m_s ** 3 + 7 * epsilon * VON_KARMAN * convectiveVelocityCubed_m3_s3);
  const zeta = epsilon * mixingHeight_m * inverseObukhov_per_m;
  const prandtl =
    phiHeat(zeta) / phiMomentum(zeta) + (COUNTER_GRADIENT_CONSTANT * VON_KARMAN * epsilon * convectiveVelocity_m_s) / momentumScale_m_s;
  return momentumScale_m_s / prandtl;
}

/** The constant a = 7.2 of Holtslag & Boville's (1993) mixed-layer Prandtl number [-], from memory. */
export const COUNTER_GRADIENT_CONSTANT = 7.2;

/** Businger-Dyer phi_m(zeta) [-] (Dyer 1974, from memory): 1 + 5 zeta stable, (1 - 16 zeta)^(-1/4) unstable. */
export function phiMomentum(zeta: number): number {
  return zeta >= 0 ? 1 + 5 * zeta : Math.pow(1 - 16 * zeta, -0.25);
}

/**
 * The stability-dependent closure for a land use (see the file comment for the formulas and sources).
 *
 * @param landUse "rural" or "urban": roughness length and Briggs curve set
 * @example
 *   const closure = createStabilityDiffusivity('rural');
 *   const kz = closure.vertical_m2_s(grid, weather, windAtLayers); // length nz + 1, at layer faces
 */
export function createStabilityDiffusivity(landUse: LandUse): DiffusivityClosure {
  if (ROUGHNESS_LENGTH_m[landUse] === undefined) {
    throw new RangeError(`landUse: ${JSON.stringify(landUse)} is not allowed ("rural" or "urban")`);
  }
  return {
    name: `stability-dependent (Troen-Mahrt vertical profile, Briggs-growth horizontal), ${landUse}`,
    horizontal_m2_s(grid: LocalGrid, weather: ResolvedWeather, windSpeedAtLayer_m_s: Float64Array): Float64Array {
      checkLayers(grid, windSpeedAtLayer_m_s);
      const values = new Float64Array(grid.nz);
      for (let k = 0; k < grid.nz; k++) {
        values[k] = crosswindSpreadingLength_m(weather.stability, landUse, grid.zCentres_m[k]) * windSpeedAtLayer_m_s[k];
      }
      return values;
    },
    vertical_m2_s(grid: LocalGrid, weather: ResolvedWeather, windSpeedAtLayer_m_s: Float64Array): Float64Array {
      checkLayers(grid, windSpeedAtLayer_m_s);
      const settings = verticalProfileSettings(weather, landUse);
      const values = new Float64Array(grid.nz + 1);
      for (let k = 0; k <= grid.nz; k++) values[k] = verticalDiffusivityAt_m2_s(settings, grid.zFaces_m[k]);
      return values;
    },
  };
}

function checkLayers(grid: LocalGrid, windSpeedAtLayer_m_s: Float64Array): void {
  if (windSpeedAtLayer_m_s.length !== grid.nz) {
    throw new RangeError(
      `windSpeedAtLayer_m_s has ${windSpeedAtLayer_m_s.length} entries; allowed: one per layer (nz = ${grid.nz})`,
    );
  }
}

/**
 * The steady Gaussian plume of a continuous point source: the reference the grid solver is checked
 * against, and the Gaussian mode's kernel.
 *
 * Coordinates: x downwind from the source [m], y crosswind [m], z height above ground [m].
 *
 *   C(x, y, z) = Q(x) / u * Y(y) * Z(z) * exp(-(k + Lambda) x / u)
 *
 * with Y(y) = exp(-y^2 / 2 sigma_y^2) / (sqrt(2 pi) sigma_y) the crosswind density [1/m] and Z(z) the
 * vertical density [1/m]:
 * - no lid: Z = [exp(-(z - H)^2 / 2 sigma_z^2) + exp(-(z + H)^2 / 2 sigma_z^2)] / (sqrt(2 pi) sigma_z),
 *   the source and its image in the ground (standard result, ../shared/REFERENCES.md);
 * - a mixing lid at h (release below it): the images in ground and lid,
 *   Z = sum over n of [exp(-(z - H + 2 n h)^2 / 2 sigma_z^2) + exp(-(z + H + 2 n h)^2 / 2 sigma_z^2)] / (sqrt(2 pi) sigma_z),
 *   summed outward from n = 0 until a pair of terms adds less than 1e-15 of the sum; once sigma_z >= 1.6 h
 *   the well-mixed value Z = 1 / h is used instead. Why 1.6: the same sum written as a Fourier series is
 *   (1 / h) [1 + 2 sum_m exp(-m^2 pi^2 sigma_z^2 / 2 h^2) cos(m pi z / h) cos(m pi H / h)], so at
 *   sigma_z = 1.6 h the well-mixed value is off by at most 2 exp(-1.28 pi^2) = 6.5e-6 of itself [derived].
 *   Above the lid (z > h) the concentration is zero. A release at or above the lid ignores the lid (only
 *   the ground image), so the plume still reaches the ground: plumeplan's screening choice, reported in
 *   the run notes by the driver.
 * - Q(x): the emission rate, depleted by dry deposition when the deposition velocity v_d > 0 (source
 *   depletion, Chamberlain 1953, from memory): Q(x) = Q exp(-(v_d / u) integral_0^x Z(0; x') dx'), which
 *   for a plume reflected by the ground alone is the familiar
 *   exp(-sqrt(2/pi) (v_d / u) integral_0^x exp(-H^2 / 2 sigma_z^2) / sigma_z dx'); under a lid the same
 *   integral runs over the images' ground-level density, tending to exp(-v_d x / (u h)) when well mixed.
 *   The integral is tabulated once per plume (Simpson's rule on nodes 1 % apart beyond 1 m) and
 *   interpolated linearly.
 * - exp(-(k + Lambda) x / u): first-order decay and washout over the travel time x / u (REFERENCES.md).
 *
 * Choices stated once: C = 0 upwind (x <= 0). The spreads are evaluated at max(x, 1 m): closer than 1 m
 * to the release the plume is taken as wide as at 1 m, which bounds the concentration next to a point
 * release (the formula is singular there) and keeps area-source integrals and the depletion integral of a
 * ground-level release finite (plumeplan's choice). Terms whose crosswind exponent y^2 / 2 sigma_y^2
 * exceeds 50 (a factor below 2e-22) are dropped.
 */
import type { SigmaFunction } from './dispersionCurves.ts';

/** Spreads are evaluated no closer to the release than this [m] (see the module comment). */
export const MINIMUM_SPREAD_DISTANCE_M = 1;

/** sigma_z / mixing height at and above which the well-mixed vertical density 1 / h is used [-]. */
export const WELL_MIXED_SIGMA_Z_RATIO = 1.6;

/** Exponent beyond which a Gaussian factor counts as zero (exp(-50) = 2e-22) [-]. */
const NEGLIGIBLE_EXPONENT = 50;

const SQRT_2PI = Math.sqrt(2 * Math.PI);
const SQRT_2 = Math.SQRT2;

/**
 * Complementary error function, Chebyshev fit with fractional error below 1.2e-7 everywhere
 * (Press et al., Numerical Recipes, 2nd ed., section 6.2, "erfcc"; from memory, checked in the tests
 * against CPython's math.erfc).
 */
export function complementaryErrorFunction(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const value =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t *
          (1.00002368 +
            t *
              (0.37409196 +
                t *
                  (0.09678418 +
                    t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? value : 2 - value;
}

/** What defines one plume. */
export interface PlumeSettings {
  /** emission rate Q [g/s], >= 0 */
  emission_g_s: number;
  /** transport wind speed u [m/s], > 0 */
  windSpeed_m_s: number;
  /** release height above ground at the source [m], >= 0 (a stack top, or an effective height) */
  releaseHeight_m: number;
  /**
   * extra height gained by downwind distance x [m] (gradual plume rise); absent = none. Must be
   * non-decreasing and reach its final value at a finite distance.
   */
  riseAt?: (x_m: number) => number;
  /** mixing height h [m], > 0; Infinity = no lid */
  mixingHeight_m: number;
  /** the dispersion curve: sigma_y(x), sigma_z(x) [m] */
  sigmas: SigmaFunction;
  /** first-order loss rate k + Lambda [1/s], >= 0 */
  lossRate_per_s: number;
  /** dry deposition velocity v_d [m/s], >= 0; 0 = no depletion */
  depositionVelocity_m_s: number;
  /** farthest distance the depletion integral is tabulated to [m]; beyond it the last integrand continues. Default 100 km. */
  maxDistance_m?: number;
}

function checkSetting(name: string, value: number, allowed: string, ok: boolean): void {
  if (Number.isNaN(value) || !ok) throw new RangeError(`${name} is ${value}; allowed: ${allowed}`);
}

/** Geometric spacing of the depletion table beyond 1 m [-]. */
const DEPLETION_TABLE_RATIO = 1.01;
/** Uniform intervals of the depletion table between 0 and 1 m. */
const DEPLETION_NEAR_INTERVALS = 8;

/**
 * One continuous point source's steady plume. Construct once, evaluate many times: the evaluation
 * methods allocate nothing.
 *
 * @example
 * const plume = new GaussianPlume({ emission_g_s: 100, windSpeed_m_s: 5, releaseHeight_m: 50,
 *   mixingHeight_m: Infinity, sigmas: sigmasFor({ kind: 'stability', curves: 'briggs' }, 'D', 'rural'),
 *   lossRate_per_s: 0, depositionVelocity_m_s: 0 });
 * plume.concentration_g_m3(1000, 0, 0); // ground-level centreline at 1 km [g/m3]
 */
export class GaussianPlume {
  readonly emission_g_s: number;
  readonly windSpeed_m_s: number;
  readonly releaseHeight_m: number;
  /** release height plus the final rise [m] */
  readonly finalHeight_m: number;
  readonly mixingHeight_m: number;
  /** false when the final height is at or above the mixing height (the lid is then ignored) */
  readonly lidApplied: boolean;
  readonly lossRate_per_s: number;
  readonly depositionVelocity_m_s: number;
  private readonly sigmas: SigmaFunction;
  private readonly riseAt: ((x_m: number) => number) | undefined;
  /** mixing height used in the image sum [m]; Infinity when no lid applies */
  private readonly lid_m: number;
  /** depletion table: node distances [m] and the cumulative integral of Z(0) [-] */
  private readonly depletionNodes_m: Float64Array | null = null;
  private readonly depletionIntegral: Float64Array | null = null;
  private readonly depletionEndSlope_per_m: number = 0;

  constructor(settings: PlumeSettings) {
    const s = settings;
    checkSetting('emission_g_s', s.emission_g_s, 'a finite rate >= 0 g/s', Number.isFinite(s.emission_g_s) && s.emission_g_s >= 0);
    checkSetting('windSpeed_m_s', s.windSpeed_m_s, 'a finite speed > 0 m/s', Number.isFinite(s.windSpeed_m_s) && s.windSpeed_m_s > 0);
    checkSetting('releaseHeight_m', s.releaseHeight_m, 'a finite height >= 0 m', Number.isFinite(s.releaseHeight_m) && s.releaseHeight_m >= 0);
    checkSetting('mixingHeight_m', s.mixingHeight_m, 'a height > 0 m (Infinity = no lid)', s.mixingHeight_m > 0);
    checkSetting('lossRate_per_s', s.lossRate_per_s, 'a finite rate >= 0 1/s', Number.isFinite(s.lossRate_per_s) && s.lossRate_per_s >= 0);
    checkSetting(
      'depositionVelocity_m_s',
      s.depositionVelocity_m_s,
      'a finite velocity >= 0 m/s',
      Number.isFinite(s.depositionVelocity_m_s) && s.depositionVelocity_m_s >= 0,
    );
    this.emission_g_s = s.emission_g_s;
    this.windSpeed_m_s = s.windSpeed_m_s;
    this.releaseHeight_m = s.releaseHeight_m;
    this.riseAt = s.riseAt;
    this.finalHeight_m = s.releaseHeight_m + (s.riseAt ? s.riseAt(Infinity) : 0);
    checkSetting('final plume height', this.finalHeight_m, 'a finite height >= 0 m', Number.isFinite(this.finalHeight_m));
    this.mixingHeight_m = s.mixingHeight_m;
    this.lidApplied = Number.isFinite(s.mixingHeight_m) && this.finalHeight_m < s.mixingHeight_m;
    this.lid_m = this.lidApplied ? s.mixingHeight_m : Infinity;
    this.lossRate_per_s = s.lossRate_per_s;
    this.depositionVelocity_m_s = s.depositionVelocity_m_s;
    this.sigmas = s.sigmas;

    if (s.depositionVelocity_m_s > 0) {
      const maxDistance_m = s.maxDistance_m ?? 100_000;
      checkSetting('maxDistance_m', maxDistance_m, 'a finite distance > 1 m', Number.isFinite(maxDistance_m) && maxDistance_m > 1);
      const geometricIntervals = Math.ceil(Math.log(maxDistance_m) / Math.log(DEPLETION_TABLE_RATIO));
      const count = DEPLETION_NEAR_INTERVALS + geometricIntervals + 1;
      const nodes = new Float64Array(count);
      const integral = new Float64Array(count);
      for (let n = 0; n <= DEPLETION_NEAR_INTERVALS; n++) nodes[n] = (n * MINIMUM_SPREAD_DISTANCE_M) / DEPLETION_NEAR_INTERVALS;
      for (let n = 1; n <= geometricIntervals; n++) {
        nodes[DEPLETION_NEAR_INTERVALS + n] = Math.pow(DEPLETION_TABLE_RATIO, n);
      }
      let previous = this.groundDensity_per_m(0);
      for (let n = 1; n < count; n++) {
        const a = nodes[n - 1];
        const b = nodes[n];
        const middle = this.groundDensity_per_m(0.5 * (a + b));
        const end = this.groundDensity_per_m(b);
        integral[n] = integral[n - 1] + ((b - a) / 6) * (previous + 4 * middle + end); // Simpson's rule
        previous = end;
      }
      this.depletionNodes_m = nodes;
      this.depletionIntegral = integral;
      this.depletionEndSlope_per_m = previous;
    }
  }

  /** Plume centreline height at downwind distance x [m] (release height plus the rise so far). */
  heightAt_m(x_m: number): number {
    return this.riseAt ? this.releaseHeight_m + this.riseAt(x_m) : this.releaseHeight_m;
  }

  /**
   * Vertical density Z(z) [1/m] at downwind distance x (see the module comment), 0 above the lid.
   * @param x_m downwind distance [m], > 0
   * @param z_m height [m], >= 0
   */
  verticalDensity_per_m(x_m: number, z_m: number): number {
    const sigmaZ = this.sigmas.sigmaZ_m(Math.max(x_m, MINIMUM_SPREAD_DISTANCE_M));
    return this.verticalDensityWith(sigmaZ, this.heightAt_m(x_m), z_m);
  }

  private verticalDensityWith(sigmaZ_m: number, height_m: number, z_m: number): number {
    const h = this.lid_m;
    const twoSigmaSquared = 2 * sigmaZ_m * sigmaZ_m;
    if (h === Infinity) {
      const below = z_m - height_m;
      const above = z_m + height_m;
      return (Math.exp(-(below * below) / twoSigmaSquared) + Math.exp(-(above * above) / twoSigmaSquared)) / (SQRT_2PI * sigmaZ_m);
    }
    if (z_m > h) return 0;
    if (sigmaZ_m >= WELL_MIXED_SIGMA_Z_RATIO * h) return 1 / h;
    const below = z_m - height_m;
    const above = z_m + height_m;
    let sum = Math.exp(-(below * below) / twoSigmaSquared) + Math.exp(-(above * above) / twoSigmaSquared);
    // Images pair off at +-2 n h; with sigma_z < 1.6 h the sum needs at most about 8 pairs.
    for (let n = 1; n < 100; n++) {
      const shift = 2 * n * h;
      const a = below + shift;
      const b = below - shift;
      const c = above + shift;
      const d = above - shift;
      const added =
        Math.exp(-(a * a) / twoSigmaSquared) +
        Math.exp(-(b * b) / twoSigmaSquared) +
        Math.exp(-(c * c) / twoSigmaSquared) +
        Math.exp(-(d * d) / twoSigmaSquared);
      sum += added;
      if (added <= 1e-15 * sum) break;
    }
    return sum / (SQRT_2PI * sigmaZ_m);
  }

  /** Ground-level vertical density Z(0) at x [m] [1/m]: the depletion integrand. */
  private groundDensity_per_m(x_m: number): number {
    return this.verticalDensity_per_m(x_m, 0);
  }

  /**
   * Fraction of the emission still airborne after dry deposition by source depletion at x [-].
   * 1 when v_d = 0 or x <= 0.
   */
  depletionFactor(x_m: number): number {
    const nodes = this.depletionNodes_m;
    const integral = this.depletionIntegral;
    if (nodes === null || integral === null || !(x_m > 0)) return 1;
    const last = nodes.length - 1;
    let accumulated: number;
    if (x_m >= nodes[last]) {
      accumulated = integral[last] + this.depletionEndSlope_per_m * (x_m - nodes[last]);
    } else {
      let n: number;
      if (x_m < MINIMUM_SPREAD_DISTANCE_M) {
        n = Math.floor((x_m / MINIMUM_SPREAD_DISTANCE_M) * DEPLETION_NEAR_INTERVALS);
      } else {
        n = DEPLETION_NEAR_INTERVALS + Math.floor(Math.log(x_m) / Math.log(DEPLETION_TABLE_RATIO));
        // guard against rounding at a node
        if (n > last - 1) n = last - 1;
        while (n > DEPLETION_NEAR_INTERVALS && nodes[n] > x_m) n--;
        while (nodes[n + 1] <= x_m) n++;
      }
      const fraction = (x_m - nodes[n]) / (nodes[n + 1] - nodes[n]);
      accumulated = integral[n] + fraction * (integral[n + 1] - integral[n]);
    }
    return Math.exp(-(this.depositionVelocity_m_s / this.windSpeed_m_s) * accumulated);
  }

  /** First-order loss factor exp(-(k + Lambda) x / u) [-]. */
  lossFactor(x_m: number): number {
    return x_m > 0 ? Math.exp((-this.lossRate_per_s * x_m) / this.windSpeed_m_s) : 1;
  }

  /**
   * Concentration of the point source at (x downwind, y crosswind, z) [g/m3]; 0 upwind.
   * @param x_m downwind distance [m]
   * @param y_m crosswind offset [m]
   * @param z_m height above ground [m], >= 0
   */
  concentration_g_m3(x_m: number, y_m: number, z_m: number): number {
    return this.bandConcentration_g_m3(x_m, y_m, z_m, 0);
  }

  /**
   * Concentration of the same emission spread evenly across a crosswind band of width w centred at
   * crosswind offset y (the Gaussian averaged over the band analytically, by the error function);
   * width 0 is the point source. Used to integrate area sources element by element. [g/m3]
   * @param x_m downwind distance [m]
   * @param y_m crosswind offset of the band's centre from the receptor [m]
   * @param z_m receptor height [m], >= 0
   * @param width_m band width [m], >= 0
   */
  bandConcentration_g_m3(x_m: number, y_m: number, z_m: number, width_m: number): number {
    if (!(x_m > 0)) return 0;
    const spreadDistance_m = x_m > MINIMUM_SPREAD_DISTANCE_M ? x_m : MINIMUM_SPREAD_DISTANCE_M;
    const sigmaY = this.sigmas.sigmaY_m(spreadDistance_m);
    const crosswind = crosswindDensity_per_m(y_m, sigmaY, width_m);
    if (crosswind === 0) return 0;
    const sigmaZ = this.sigmas.sigmaZ_m(spreadDistance_m);
    const vertical = this.verticalDensityWith(sigmaZ, this.heightAt_m(x_m), z_m);
    if (vertical === 0) return 0;
    return (
      ((this.emission_g_s / this.windSpeed_m_s) * crosswind * vertical * this.lossFactor(x_m)) * this.depletionFactor(x_m)
    );
  }
}

/**
 * Crosswind density [1/m] of a unit emission spread across a band of width w centred at offset y, after
 * Gaussian spreading sigma. w = 0 is the point form exp(-y^2 / 2 sigma^2) / (sqrt(2 pi) sigma). A narrow
 * band (w <= 0.2 sigma, near the axis |y| <= 3 sigma, or any |y| when w <= 0.001 sigma) uses the point
 * form with its second-order band correction (1 + (w^2 / 24 sigma^2)(y^2 / sigma^2 - 1)), whose next term
 * is below 3e-5 of the value there; otherwise the exact band average (erfc(a) - erfc(b)) / (2 w), which
 * loses at most a few 1e-6 to cancellation in that range.
 */
export function crosswindDensity_per_m(y_m: number, sigma_m: number, width_m: number): number {
  const offset = Math.abs(y_m);
  const widthRatio = width_m / sigma_m;
  const ratioSquared = (offset * offset) / (sigma_m * sigma_m);
  if (widthRatio <= 0.001 || (widthRatio <= 0.2 && ratioSquared <= 9)) {
    if (0.5 * ratioSquared > NEGLIGIBLE_EXPONENT) return 0;
    const point = Math.exp(-0.5 * ratioSquared) / (SQRT_2PI * sigma_m);
    if (width_m === 0) return point;
    return point * (1 + ((widthRatio * widthRatio) / 24) * (ratioSquared - 1));
  }
  const near = (offset - 0.5 * width_m) / (SQRT_2 * sigma_m);
  if (near * near > NEGLIGIBLE_EXPONENT) return near > 0 ? 0 : 1 / width_m;
  const far = (offset + 0.5 * width_m) / (SQRT_2 * sigma_m);
  return (complementaryErrorFunction(near) - complementaryErrorFunction(far)) / (2 * width_m);
}

/**
 * Convenience: one concentration from one set of plume settings [g/m3]. Builds the plume each call;
 * construct a {@link GaussianPlume} to evaluate many points.
 */
export function gaussianPlumeConcentration_g_m3(x_m: number, y_m: number, z_m: number, settings: PlumeSettings): number {
  return new GaussianPlume(settings).concentration_g_m3(x_m, y_m, z_m);
}

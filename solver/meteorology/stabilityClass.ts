/**
 * Pasquill stability class from observations: wind and sky (the Pasquill-Turner table), or a mast
 * temperature difference (the potential-temperature lapse rate).
 *
 * The table (Pasquill 1961; Turner 1970, Workbook of Atmospheric Dispersion Estimates, Table 1; as
 * printed in Boubel, Fox, Turner & Stern, Fundamentals of Air Pollution, 3rd ed., 1994, Table 19-3):
 *
 *   wind at 10 m | day: strong / moderate / slight sun | night >= 4/8 cloud | night <= 3/8 cloud
 *   < 2 m/s      | A   / A-B      / B                  | (blank) -> E        | (blank) -> F
 *   2 - 3        | A-B / B        / C                  | E                   | F
 *   3 - 5        | B   / B-C      / C                  | D                   | E
 *   5 - 6        | C   / C-D      / D                  | D                   | D
 *   > 6          | C   / D        / D                  | D                   | D
 *   overcast (8/8) day or night, and the hour either side of night: D
 *
 * plumeplan's choices, stated rather than hidden:
 * - Blank cells (night, wind below 2 m/s): E under >= 4/8 cloud and F under <= 3/8, the classes of the
 *   2-3 m/s row (the practice of some services, noted beside the table in REFERENCES.md). Light night
 *   winds are the classic stable case; the blank exists because plume behaviour is poorly defined
 *   there, not because it is less stable.
 * - Split cells (A-B, B-C, C-D) resolve to the MORE stable class of the pair (B, C, D): the tool runs
 *   single classes, and the more stable one gives the higher ground-level concentration from low-level
 *   releases, the usual screening concern.
 * - Row limits: u < 2; 2 <= u < 3; 3 <= u < 5; 5 <= u <= 6; u > 6 [m/s]. The speed used is the one
 *   measured at the anemometer, before the calms rule, taken as the table's 10 m wind as it is
 *   (measurements near 10 m are the norm; no height correction is applied).
 * - Insolation from the solar elevation at the middle of the hour: strong above 60 degrees, moderate
 *   35 to 60, slight below 35 (Turner 1964's solar-altitude limits 60/35/15, from memory; his "weak"
 *   class below 15 degrees has no column in this table and is counted as slight). Cloud of 5 to 7
 *   oktas weakens the insolation one step (strong -> moderate -> slight, slight stays slight): a
 *   simplification of Turner's cloud-and-ceiling rule, from memory, since no ceiling height is given.
 * - Night = the sun at or below the horizon at the middle of the hour. The hour either side of night
 *   = a daytime hour whose neighbouring hour (the one before or after) is night; it gets D.
 * - The night columns use total cloud cover (the table says low cloud; only total cloud is given).
 */
import type { StabilityClass, TemperatureDifference } from '../../scenarios/format/types.ts';

/** Entries of the Pasquill-Turner table, split classes included. */
export type TableEntry = StabilityClass | 'A-B' | 'B-C' | 'C-D';

/** The sky columns of the table. */
export type SkyColumn =
  | 'strongSun'
  | 'moderateSun'
  | 'slightSun'
  | 'nightCloudy' // >= 4/8 cloud
  | 'nightClear'; // <= 3/8 cloud

/** Rows of the table by wind speed, upper limits exclusive except the 5-6 row (see the file comment). */
const TABLE: Record<SkyColumn, readonly TableEntry[]> = {
  //            <2     2-3    3-5    5-6    >6
  strongSun: ['A', 'A-B', 'B', 'C', 'C'],
  moderateSun: ['A-B', 'B', 'B-C', 'C-D', 'D'],
  slightSun: ['B', 'C', 'C', 'D', 'D'],
  nightCloudy: ['E', 'E', 'D', 'D', 'D'], // first entry: blank cell, plumeplan's choice E
  nightClear: ['F', 'F', 'E', 'D', 'D'], // first entry: blank cell, plumeplan's choice F
};

/** Whether the table cell at this speed and column is blank in the published table. */
export function isBlankTableCell(windSpeed_m_s: number, column: SkyColumn): boolean {
  return windRow(windSpeed_m_s) === 0 && (column === 'nightCloudy' || column === 'nightClear');
}

function windRow(windSpeed_m_s: number): number {
  if (windSpeed_m_s < 2) return 0;
  if (windSpeed_m_s < 3) return 1;
  if (windSpeed_m_s < 5) return 2;
  if (windSpeed_m_s <= 6) return 3;
  return 4;
}

/**
 * The table entry for a wind speed and sky column (blank cells filled as the file comment states).
 *
 * @param windSpeed_m_s wind at 10 m [m/s], >= 0
 * @example pasquillTurnerEntry(2.5, 'moderateSun') // 'B'
 */
export function pasquillTurnerEntry(windSpeed_m_s: number, column: SkyColumn): TableEntry {
  if (!(windSpeed_m_s >= 0 && Number.isFinite(windSpeed_m_s))) {
    throw new RangeError(`windSpeed_m_s: ${windSpeed_m_s} is not allowed (a finite speed >= 0 m/s)`);
  }
  return TABLE[column][windRow(windSpeed_m_s)];
}

/** A split entry resolves to the more stable class of its pair (file comment). */
export function classFromEntry(entry: TableEntry): StabilityClass {
  return (entry.length === 3 ? entry[2] : entry) as StabilityClass;
}

/** Insolation steps, weakest first. */
const INSOLATION: readonly SkyColumn[] = ['slightSun', 'moderateSun', 'strongSun'];

/** Solar elevation limits of the insolation classes [deg] (Turner 1964, from memory). */
export const STRONG_INSOLATION_ELEVATION_deg = 60;
export const MODERATE_INSOLATION_ELEVATION_deg = 35;

/** What the sky looks like in one hour, from the sun's elevation and the cloud. */
export interface SkyState {
  /** solar elevation at the middle of the hour [deg] */
  solarElevation_deg: number;
  /** true when the hour before or after is night while this one is not */
  nextToNight: boolean;
  /** total cloud cover [oktas, 0..8] */
  cloudCover_oktas: number;
}

/** The outcome of the sky rule: either a table column or a direct neutral class, with the reason. */
export type SkyVerdict = { column: SkyColumn } | { neutral: 'overcast' | 'nextToNight' };

/**
 * Which column of the table an hour falls in, or D directly for overcast and transitional hours.
 */
export function skyVerdict(sky: SkyState): SkyVerdict {
  const { solarElevation_deg: elevation_deg, nextToNight, cloudCover_oktas } = sky;
  if (!(cloudCover_oktas >= 0 && cloudCover_oktas <= 8)) {
    throw new RangeError(`cloudCover_oktas: ${cloudCover_oktas} is not allowed (0..8 oktas)`);
  }
  if (cloudCover_oktas >= 8) return { neutral: 'overcast' };
  if (elevation_deg <= 0) return { column: cloudCover_oktas >= 4 ? 'nightCloudy' : 'nightClear' };
  if (nextToNight) return { neutral: 'nextToNight' };
  let step =
    elevation_deg > STRONG_INSOLATION_ELEVATION_deg ? 2 : elevation_deg >= MODERATE_INSOLATION_ELEVATION_deg ? 1 : 0;
  if (cloudCover_oktas >= 5) step = Math.max(0, step - 1);
  return { column: INSOLATION[step] };
}

/**
 * Stability class from wind and sky by the Pasquill-Turner table with plumeplan's stated choices.
 *
 * @param windSpeed_m_s measured wind speed, taken as the 10 m wind [m/s]
 * @example stabilityFromSky(1.5, { solarElevation_deg: -20, nextToNight: false, cloudCover_oktas: 1 }) // 'F'
 */
export function stabilityFromSky(windSpeed_m_s: number, sky: SkyState): StabilityClass {
  const verdict = skyVerdict(sky);
  if ('neutral' in verdict) return 'D';
  return classFromEntry(pasquillTurnerEntry(windSpeed_m_s, verdict.column));
}

/** Dry adiabatic lapse rate g / c_p [K/m] (9.8 K/km, common practice). */
export const DRY_ADIABATIC_LAPSE_K_m = 0.0098;

/**
 * Upper limits of the potential-temperature gradient d(theta)/dz for classes A..E [K/m]; above the
 * last limit, F. They are the temperature-gradient ranges of US NRC Regulatory Guide 1.23 (1972)
 * (dT/dz in K per 100 m: A <= -1.9, B <= -1.7, C <= -1.5, D <= -0.5, E <= +1.5, F <= +4.0, and a
 * class G beyond, which plumeplan counts as F), from memory, moved to d(theta)/dz by adding the dry
 * adiabatic lapse rate: d(theta)/dz = dT/dz + g/c_p.
 */
export const POTENTIAL_GRADIENT_UPPER_LIMITS_K_m: Readonly<Record<Exclude<StabilityClass, 'F'>, number>> = {
  A: -0.019 + DRY_ADIABATIC_LAPSE_K_m,
  B: -0.017 + DRY_ADIABATIC_LAPSE_K_m,
  C: -0.015 + DRY_ADIABATIC_LAPSE_K_m,
  D: -0.005 + DRY_ADIABATIC_LAPSE_K_m,
  E: 0.015 + DRY_ADIABATIC_LAPSE_K_m,
};

/**
 * Potential-temperature gradient across a mast [K/m]: d(theta)/dz = dT/dz + g/c_p. Over a mast's few
 * tens of metres this equals theta = T (p0/p)^0.286 differentiated with hydrostatic pressure (common
 * practice).
 */
export function potentialTemperatureGradient_K_m(difference: TemperatureDifference, field = 'temperatureDifference'): number {
  const { lowerHeight_m, upperHeight_m, difference_K } = difference;
  if (!(lowerHeight_m >= 0 && Number.isFinite(lowerHeight_m))) {
    throw new RangeError(`${field}.lowerHeight_m: ${lowerHeight_m} is not allowed (a height >= 0 m)`);
  }
  if (!(upperHeight_m > lowerHeight_m && Number.isFinite(upperHeight_m))) {
    throw new RangeError(
      `${field}.upperHeight_m: ${upperHeight_m} is not allowed (a finite height above lowerHeight_m = ${lowerHeight_m} m)`,
    );
  }
  if (!Number.isFinite(difference_K)) {
    throw new RangeError(`${field}.difference_K: ${difference_K} is not allowed (a finite difference in K)`);
  }
  return difference_K / (upperHeight_m - lowerHeight_m) + DRY_ADIABATIC_LAPSE_K_m;
}

/**
 * Stability class from a mast temperature difference through the potential-temperature gradient.
 *
 * @example stabilityFromTemperatureDifference({ lowerHeight_m: 10, upperHeight_m: 60, difference_K: -0.5 }) // 'D'
 */
export function stabilityFromTemperatureDifference(
  difference: TemperatureDifference,
  field = 'temperatureDifference',
): StabilityClass {
  const gradient_K_m = potentialTemperatureGradient_K_m(difference, field);
  for (const stability of ['A', 'B', 'C', 'D', 'E'] as const) {
    if (gradient_K_m <= POTENTIAL_GRADIENT_UPPER_LIMITS_K_m[stability] + 1e-12) return stability;
  }
  return 'F';
}

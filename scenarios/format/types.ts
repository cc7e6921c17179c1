/**
 * Scenario format 1 (`plumeplan.scenario/1`) as TypeScript types: the contract between the map, the
 * server, the command line and the solver. Field names and units follow
 * `../shared/spec/scenario-format.md`; fields added by plumeplan keep the same habits (unit in the
 * name, SI inside).
 *
 * These are the *parsed* types: defaults have been filled in by the schema in `schema.ts`
 * (`parseScenario`), so optional-with-default fields are present here. The zod schema is checked
 * against these types at compile time.
 *
 * Conventions, stated once:
 * - positions are WGS 84 degrees (lat, lon); polygons are GeoJSON `[lon, lat]` rings, closed;
 * - wind direction is the direction the wind blows FROM, degrees clockwise from north;
 * - an hourly record's `time` marks the START of its hour (ISO 8601 with a time zone offset).
 */

export const SCENARIO_FORMAT = 'plumeplan.scenario/1' as const;
export const RESULT_FORMAT = 'plumeplan.result/1' as const;

/** Pasquill stability classes, A (very unstable) to F (moderately stable). */
export const STABILITY_CLASSES = ['A', 'B', 'C', 'D', 'E', 'F'] as const;
export type StabilityClass = (typeof STABILITY_CLASSES)[number];

export type LandUse = 'rural' | 'urban';

export interface Site {
  lat: number;
  lon: number;
  /** "rural" (default) or "urban": selects wind-profile exponents and dispersion curves. */
  landUse: LandUse;
  /**
   * the site boundary, a GeoJSON [lon, lat] ring, closed; absent = not given. Peaks and footprint
   * figures are reported off the site (where the public can be), the on-site ones kept and labelled.
   */
  boundary?: [number, number][];
}

export interface Domain {
  /** square domain centred on the site [m] */
  halfWidth_m: number;
  /** horizontal cell size [m] */
  spacing_m: number;
  /** top of the grid, a no-flux lid [m] */
  height_m: number;
  /** number of vertical layers, stretched, thinnest at the ground */
  layers: number;
}

export interface Washout {
  /** Lambda = a_per_s * R^b with R in mm/h [1/s] */
  a_per_s: number;
  /** exponent b [-] */
  b: number;
}

export interface Pollutant {
  name: string;
  /** first-order decay half-life [h]; null = conserved */
  halfLife_h: number | null;
  /** below-cloud scavenging; null = no washout */
  washout: Washout | null;
  /** dry deposition velocity at the ground [m/s] */
  depositionVelocity_m_s: number;
}

/** A vertical temperature difference measured on a mast, used to derive the stability class. */
export interface TemperatureDifference {
  lowerHeight_m: number;
  upperHeight_m: number;
  /** T(upper) - T(lower) [K] */
  difference_K: number;
}

/**
 * The weather of one steady period (a steady run, or one hour of a series). Stability is either given
 * or derived: from wind speed and sky (`cloudCover_oktas`, plus `time` for the solar elevation), or from
 * `temperatureDifference`. After `resolveWeather` every state carries a stability class.
 */
export interface WeatherFields {
  /** wind speed at anemometerHeight_m [m/s] */
  windSpeed_m_s: number;
  /** direction the wind blows FROM, clockwise from north [deg] */
  windFrom_deg: number;
  stability?: StabilityClass;
  /** mixing height [m]; absent = plumeplan's screening default for the class */
  mixingHeight_m?: number;
  /** rain rate [mm/h] */
  rain_mm_h: number;
  /** air temperature near the ground [K] */
  airTemperature_K: number;
  /** height of the wind measurement [m] */
  anemometerHeight_m: number;
  /** total cloud cover [oktas, 0..8], used to derive stability */
  cloudCover_oktas?: number;
  /** mast temperature difference, used to derive stability */
  temperatureDifference?: TemperatureDifference;
}

export interface SteadyWeather extends WeatherFields {
  kind: 'steady';
  /** optional ISO 8601 time, needed only to derive stability from sun and sky */
  time?: string;
}

export interface WeatherHour extends WeatherFields {
  /** ISO 8601 with time zone; marks the START of the hour */
  time: string;
}

export interface HourlyWeather {
  kind: 'hourly';
  /** inline hours; exactly one of `hours` and `csv` is given in the file; after loading, `hours` is filled */
  hours: WeatherHour[];
  /** path of a CSV file, relative to the scenario file */
  csv?: string;
}

/** One cell of a wind rose: a sector, a speed class and a stability class, with its frequency. */
export interface WindRoseCell {
  /** centre of the sector the wind blows FROM [deg] */
  windFrom_deg: number;
  /** representative speed of the speed class at anemometerHeight_m [m/s] */
  windSpeed_m_s: number;
  stability: StabilityClass;
  /** fraction of the time in this cell [-]; all cells sum to 1 */
  frequency: number;
  mixingHeight_m?: number;
}

export interface WindRoseWeather {
  kind: 'windRose';
  /** sector width [deg], e.g. 30 for 12 sectors */
  sectorWidth_deg: number;
  cells: WindRoseCell[];
  rain_mm_h: number;
  airTemperature_K: number;
  anemometerHeight_m: number;
}

/**
 * The screening weather set: plumeplan's built-in list of steady states (every stability class with the
 * wind speeds that class occurs with, from every direction sector), run as one job for the highest
 * hourly process contribution. The set itself is in solver/assessment/screeningWeather.ts.
 */
export interface ScreeningSetWeather {
  kind: 'screeningSet';
  /** wind-direction sectors, evenly spaced from north (36 = every 10 deg) */
  sectors: number;
  /** rain rate applied to every state [mm/h] */
  rain_mm_h: number;
  /** air temperature near the ground [K] */
  airTemperature_K: number;
  /** height of the wind speeds of the set [m] */
  anemometerHeight_m: number;
}

export type Weather = SteadyWeather | HourlyWeather | WindRoseWeather | ScreeningSetWeather;

export type GaussianCurves = 'briggs' | 'pasquill-gifford';

export type Dispersion =
  | { kind: 'stability'; curves: GaussianCurves }
  /** verification: constant diffusivities [m2/s]; Gaussian mode then uses sigma^2 = 2 K x / u */
  | { kind: 'constant'; horizontal_m2_s: number; vertical_m2_s: number };

export type SolverMode = 'grid' | 'gaussian';

/** How an hourly series is run: each hour to its own steady state, or one continuous time-march. */
export type HourlyMethod = 'independentHours' | 'continuous';

export interface SolverOptions {
  mode: SolverMode;
  hourlyMethod: HourlyMethod;
}

export type WindProfile = 'powerLaw' | 'uniform';

export interface PointSource {
  kind: 'point';
  id: string;
  name: string;
  lat: number;
  lon: number;
  /** stack height above ground [m] */
  height_m: number;
  /** inner diameter at the exit [m] */
  diameter_m: number;
  exitVelocity_m_s: number;
  exitTemperature_K: number;
  /** emission rate [g/s] */
  emission_g_s: number;
  /** false: release at height_m exactly */
  plumeRise: boolean;
  /** the nearest building beside the stack, for the downwash flag (solver/assessment/downwash.ts) */
  building?: Building;
}

/** A building beside a stack: enough to tell whether the stack stands in its wake. */
export interface Building {
  /** height above ground [m] */
  height_m: number;
  /** width across the wind (the larger horizontal side when unsure) [m] */
  width_m: number;
  /** distance from the stack to the nearest wall [m] */
  distance_m: number;
}

export interface AreaSource {
  kind: 'area';
  id: string;
  name: string;
  /** GeoJSON [lon, lat] ring, closed (first point = last point) */
  polygon: [number, number][];
  releaseHeight_m: number;
  /** total emission rate of the polygon [g/s] */
  emission_g_s: number;
}

export type Source = PointSource | AreaSource;

export interface Receptor {
  id: string;
  name: string;
  lat: number;
  lon: number;
  /** height above ground [m], >= 0; default 1.5 */
  height_m: number;
}

export interface AirQualityStandard {
  name: string;
  limit_ug_m3: number;
  /** averaging period [h]: 1 (hourly means), 24 (calendar-day means), 8760 or more = the period mean */
  averaging_h: number;
  /** number of averaging periods a year allowed above the limit */
  allowedExceedances: number;
  /**
   * true: the statistic is each day's maximum of the running means over averaging_h hours, each mean
   * assigned to the day it ends in (the CO standard: the maximum daily 8-hour running mean); then the
   * periods a year are days and allowedExceedances counts days. Absent or false: calendar-aligned means.
   */
  runningMean?: boolean;
}

/** Pollutants whose standards plumeplan's library holds (solver/assessment/pollutantLibrary.ts). */
export const LIBRARY_POLLUTANTS = ['NOx', 'NO2', 'PM10', 'PM2.5', 'SO2', 'CO', 'benzene', 'NH3'] as const;
export type LibraryPollutant = (typeof LIBRARY_POLLUTANTS)[number];

/** The sets of standards in the library: the instrument each value comes from. */
export const STANDARD_SETS = ['eu-2008-50-ec', 'eu-2024-2881', 'who-2021', 'unece-2007'] as const;
export type StandardSet = (typeof STANDARD_SETS)[number];

/** Fractions of NOx taken as NO2 when NOx is emitted and NO2 is assessed (common practice in screening). */
export interface NoxToNo2 {
  /** for long-term statistics (annual means) [-] */
  longTerm: number;
  /** for short-term statistics (hourly and daily) [-] */
  shortTerm: number;
}

/** Thresholds of the two-stage screen of a process contribution (common practice in permit guidance). */
export interface ScreeningThresholds {
  /** PC below this share of a long-term standard is insignificant [%] */
  pcLongTerm_pct: number;
  /** PC below this share of a short-term standard is insignificant [%] */
  pcShortTerm_pct: number;
  /** second stage: PEC below this share of a long-term standard [%] */
  pecLongTerm_pct: number;
}

export interface Assessment {
  background_ug_m3: number;
  /** user-defined standards, assessed beside the library's */
  standards: AirQualityStandard[];
  /** a pollutant of the library whose standards apply; absent = only `standards` */
  libraryPollutant?: LibraryPollutant;
  /** the library's sets to take standards from; absent = every set that has the pollutant */
  standardSets?: StandardSet[];
  /** NOx to NO2 ratios when libraryPollutant is "NOx"; absent = the defaults in solver/assessment/standards.ts */
  noxToNo2?: NoxToNo2;
  /** thresholds of the screen; absent = the defaults in solver/assessment/verdicts.ts */
  screening?: ScreeningThresholds;
}

export interface Scenario {
  format: typeof SCENARIO_FORMAT;
  name: string;
  site: Site;
  /** absent = derived from the sources and receptors (see solver/grid) */
  domain?: Domain;
  pollutant: Pollutant;
  weather: Weather;
  dispersion: Dispersion;
  solver: SolverOptions;
  windProfile: WindProfile;
  sources: Source[];
  receptors: Receptor[];
  assessment?: Assessment;
}

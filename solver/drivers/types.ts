/**
 * What every run of one steady weather state takes and gives, whichever mode (grid or Gaussian)
 * computes it. Hourly series and wind roses are sequences or weighted sums of these.
 * Everything here is linear in the emission rates: doubling every emission_g_s doubles every field.
 */
import type {
  Dispersion,
  LandUse,
  Pollutant,
  SolverMode,
  StabilityClass,
  WindProfile,
} from '../../scenarios/format/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import type { SiteColumns } from '../grid/siteBoundary.ts';
import type { WindRoseTable } from '../meteorology/windRoseTable.ts';
import type { ScreeningVerdicts } from '../assessment/verdicts.ts';
import type { DownwashFlag } from '../assessment/downwash.ts';

/** Weather of one steady period with every field resolved (stability derived, calms applied). */
export interface ResolvedWeather {
  /** wind speed at anemometerHeight_m after the calms rule [m/s] */
  windSpeed_m_s: number;
  /** direction the wind blows FROM, clockwise from north [deg] */
  windFrom_deg: number;
  stability: StabilityClass;
  /** mixing height [m] */
  mixingHeight_m: number;
  /** rain rate [mm/h] */
  rain_mm_h: number;
  /** air temperature near the ground [K] */
  airTemperature_K: number;
  /** height of the wind measurement [m] */
  anemometerHeight_m: number;
  /** true when the measured speed was below the calms threshold and was raised to it */
  calm: boolean;
}

/** A point source placed on the local grid. */
export interface PlacedPointSource {
  kind: 'point';
  id: string;
  x_m: number;
  y_m: number;
  height_m: number;
  diameter_m: number;
  exitVelocity_m_s: number;
  exitTemperature_K: number;
  emission_g_s: number;
  plumeRise: boolean;
}

/** One grid column's share of an area source: the exact polygon/cell overlap. */
export interface AreaCellShare {
  /** ground index i + nx * j */
  column: number;
  /** overlap area of polygon and cell [m2] */
  overlap_m2: number;
}

/** An area source placed on the local grid. */
export interface PlacedAreaSource {
  kind: 'area';
  id: string;
  /** polygon ring in local metres, closed */
  ring_m: [number, number][];
  /** planar area of the ring in local metres [m2] */
  area_m2: number;
  /** centroid of the ring [m] */
  x_m: number;
  y_m: number;
  releaseHeight_m: number;
  emission_g_s: number;
  /** exact overlap with each grid column it touches; sum of overlap_m2 = area_m2 */
  shares: AreaCellShare[];
}

export type PlacedSource = PlacedPointSource | PlacedAreaSource;

export interface PlacedReceptor {
  id: string;
  x_m: number;
  y_m: number;
  /** height above ground [m] */
  height_m: number;
}

/** Everything one steady solve needs, already placed on the local grid. */
export interface SteadyRunInput {
  grid: LocalGrid;
  sources: PlacedSource[];
  receptors: PlacedReceptor[];
  pollutant: Pollutant;
  weather: ResolvedWeather;
  dispersion: Dispersion;
  landUse: LandUse;
  windProfile: WindProfile;
  /** height of the ground-level field used for footprints [m] (1.5 m, receptor default) */
  groundLevelHeight_m: number;
}

/** Mass budget of a run [g]. emitted = inDomain + decayed + washedOut + dryDeposited + outflow. */
export interface MassBudget {
  /** what the figures cover, e.g. "time-march, 0 to 7200 s" or "steady state, one hour of operation" */
  basis: string;
  emitted: number;
  inDomain: number;
  decayed: number;
  washedOut: number;
  dryDeposited: number;
  outflow: number;
  /** (emitted - the sum of the rest) / emitted */
  relativeImbalance: number;
}

export interface SourceReport {
  id: string;
  x_m: number;
  y_m: number;
  /** release height after plume rise [m] */
  effectiveHeight_m: number;
}

export interface SteadyFieldResult {
  mode: SolverMode;
  /** concentration at groundLevelHeight_m, one value per column, index i + nx * j [ug/m3] */
  groundLevel_ug_m3: Float64Array;
  /** concentration at each receptor's height, in the order of SteadyRunInput.receptors [ug/m3] */
  receptors_ug_m3: Float64Array;
  sources: SourceReport[];
  /** null where the mode has no budget to report (the Gaussian reference) */
  massBudget_g: MassBudget | null;
  /** time steps or sweeps taken */
  steps: number;
  wallSeconds: number;
  /** plain-language notes about what was and was not applied, e.g. "dry deposition not applied" */
  notes: string[];
}

/** Progress and cancellation for anything that may take more than a moment. */
export interface RunControl {
  /** fraction done in [0, 1] and a short message */
  onProgress?: (fractionDone: number, message: string) => void;
  /** aborting stops the run at the next check with an AbortError */
  signal?: AbortSignal;
}

/** One named column of receptor figures, in the order of the scenario's receptors. */
export interface ReceptorColumn {
  /** column name in receptors.csv and key in summary.json, unit in the name, e.g. "mean_ug_m3" */
  key: string;
  values: Float64Array;
}

/** What a ground-level field holds: one steady state, a mean over weather, or the highest hourly value. */
export type FootprintStatistic = 'concentration' | 'mean' | 'maximum';

/** What a whole scenario run (steady, hourly series or wind rose) hands to the result writers. */
export interface ScenarioRunResult {
  mode: SolverMode;
  weatherKind: 'steady' | 'hourly' | 'windRose' | 'screeningSet';
  grid: LocalGrid;
  sources: SourceReport[];
  massBudget_g: MassBudget | null;
  /** time steps or sweeps taken in all */
  steps: number;
  wallSeconds: number;
  /** the ground-level field the footprint is drawn from, index i + nx * j [ug/m3] */
  footprint_ug_m3: Float64Array;
  /** what footprint_ug_m3 is: "concentration" (steady), "mean" (series, rose) or "maximum" (screening set) */
  footprintStatistic: FootprintStatistic;
  receptorColumns: ReceptorColumn[];
  /** plain-language notes about what was and was not applied */
  notes: string[];
  /** extra summary.json entries (weather statistics, standards, stability frequencies), JSON-ready */
  extraSummary: Record<string, unknown>;
  /**
   * the site boundary's ground columns: peaks are reported off the site; null or absent when the
   * scenario gives no site.boundary (the output then says the peak may be on the site)
   */
  site?: SiteColumns | null;
  /** the weather's wind rose (series and rose runs) and a caption for it; the writers draw the picture */
  windRose?: { table: WindRoseTable; caption: string };
  /**
   * each assessed standard's statistic of the assessed pollutant at the receptors and on the ground,
   * where the weather allows it (../assessment/verdicts.ts turns these into verdicts)
   */
  standardFields?: StandardField[];
  /** the screening verdicts, when the scenario has an assessment */
  verdicts?: ScreeningVerdicts;
  /** stacks flagged as standing in a building's wake */
  downwash?: DownwashFlag[];
}

/**
 * How a standard's figure was formed:
 * - "statistic": the standard's own statistic of an hourly series (or a wind rose's distribution);
 * - "upperBound": the highest hourly PC over the screening weather set, which no percentile of hourly or
 *   daily means and no period mean can exceed (constant emissions);
 * - "oneWeatherHour": the hourly PC of one steady weather state, for hourly standards only.
 */
export type StandardFieldBasis = 'statistic' | 'upperBound' | 'oneWeatherHour';

/** One standard's statistic of the assessed pollutant [ug/m3]. */
export interface StandardField {
  /** the standard's name (AssessedStandard.name) */
  name: string;
  basis: StandardFieldBasis;
  /** in the order of the scenario's receptors */
  receptors_ug_m3: Float64Array;
  /** on the ground-level grid, index i + nx * j; null where the weather gives no ground map */
  ground_ug_m3: Float64Array | null;
}

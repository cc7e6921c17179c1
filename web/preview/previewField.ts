/**
 * The instant preview: the scenario's ground-level field in Gaussian mode for ONE weather state,
 * computed by the solver's own pure code (grid geometry, weather resolution and the Gaussian reference
 * driver), so that the page shows what `plumeplan run --mode gaussian` would give for that state.
 *
 * Deliberately limited, and labelled as a preview on the page:
 * - one weather state: the steady weather; for an hourly series, one chosen hour (the first by default);
 *   for a wind rose, its most frequent cell. Statistics over a series need the real run;
 * - the grid is the scenario's, coarsened (spacing doubled, then doubled again...) until it has at most
 *   `maximumColumns` columns, so a drag stays responsive on a large domain.
 *
 * Pure: no DOM, no worker API; `preview.worker.ts` wraps it for the page, the tests call it directly.
 * It must not import solver/parallel or anything with a `node:` import (it is bundled for the browser).
 */
import type { Domain, Scenario, WeatherFields } from '../../scenarios/format/types.ts';
import { runGaussianSteady } from '../../solver/drivers/gaussianSteady.ts';
import type { SteadyRunInput } from '../../solver/drivers/types.ts';
import { deriveDomain } from '../../solver/grid/domainDefaults.ts';
import { columnsPerSide } from '../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../solver/grid/projection.ts';
import { prepareScenarioGeometry } from '../../solver/grid/scenarioGeometry.ts';
import { resolveWeatherWithSource } from '../../solver/meteorology/resolveWeather.ts';

/** Height of the preview's ground-level field [m]: the receptor default, as the runs use (1.5 m). */
export const PREVIEW_FIELD_HEIGHT_m = 1.5;

/** Most columns the preview computes by default: the demo's 200 x 200 grid. */
export const DEFAULT_PREVIEW_COLUMNS = 40_000;

export interface PreviewOptions {
  /** most ground columns; the spacing is doubled until the grid fits (default 40 000) */
  maximumColumns?: number;
  /** for an hourly series: which hour to preview (default 0, the first) */
  hourIndex?: number;
}

/** The part of the grid a ground-level field needs, as plain numbers (it crosses the worker boundary). */
export interface PreviewGrid {
  nx: number;
  ny: number;
  spacing_m: number;
  xWest_m: number;
  ySouth_m: number;
}

export interface PreviewResult {
  grid: PreviewGrid;
  /** ground-level field at 1.5 m, i + nx * j, row j = 0 at the south edge [ug/m3] */
  field_ug_m3: Float32Array;
  /** one value per receptor, in the scenario's order [ug/m3] */
  receptors_ug_m3: number[];
  /** highest value of the field [ug/m3] and its column centre in local metres */
  peak: { value_ug_m3: number; x_m: number; y_m: number };
  /** which weather state the preview shows, in words */
  weatherLabel: string;
  /** the solver's notes (plume rise, losses, curves) */
  notes: string[];
  /** true when the grid was coarsened from the scenario's */
  coarsened: boolean;
  /** time spent computing [ms] */
  compute_ms: number;
}

/**
 * Compute the Gaussian preview of a parsed scenario (defaults filled by `parseScenario`).
 *
 * @param scenario a parsed scenario
 * @param options column limit and hour choice
 * @returns the ground-level field, receptor values, peak and labels
 * @throws RangeError naming the field when the geometry or the weather cannot be used
 * @example const preview = computePreview(parsed.scenario); preview.peak.value_ug_m3
 */
export function computePreview(scenario: Scenario, options: PreviewOptions = {}): PreviewResult {
  const started = performance.now();
  const maximumColumns = options.maximumColumns ?? DEFAULT_PREVIEW_COLUMNS;
  if (!Number.isInteger(maximumColumns) || maximumColumns < 1) {
    throw new RangeError(`maximumColumns: ${maximumColumns} is not allowed; give a positive integer`);
  }
  // The scenario's own domain (given, or derived as a run derives it), coarsened until it fits.
  const domain: Domain = scenario.domain
    ? { ...scenario.domain }
    : deriveDomain({ sources: scenario.sources, receptors: scenario.receptors, projection: createLocalProjection(scenario.site) });
  let coarsened = false;
  while (columnsPerSide(domain) ** 2 > maximumColumns && domain.spacing_m * 2 <= 2 * domain.halfWidth_m) {
    domain.spacing_m *= 2;
    coarsened = true;
  }
  const geometry = prepareScenarioGeometry({ ...scenario, domain });
  const { fields, path, label } = previewWeather(scenario, options.hourIndex ?? 0);
  const weather = resolveWeatherWithSource(fields, scenario.site, path).weather;
  const input: SteadyRunInput = {
    grid: geometry.grid,
    sources: geometry.sources,
    receptors: geometry.receptors,
    pollutant: scenario.pollutant,
    weather,
    dispersion: scenario.dispersion,
    landUse: scenario.site.landUse,
    windProfile: scenario.windProfile,
    groundLevelHeight_m: PREVIEW_FIELD_HEIGHT_m,
  };
  const result = runGaussianSteady(input);
  const { grid } = geometry;
  const field = Float32Array.from(result.groundLevel_ug_m3);
  let peakIndex = 0;
  for (let n = 1; n < field.length; n++) if (field[n] > field[peakIndex]) peakIndex = n;
  const i = peakIndex % grid.nx;
  const j = (peakIndex - i) / grid.nx;
  return {
    grid: { nx: grid.nx, ny: grid.ny, spacing_m: grid.spacing_m, xWest_m: grid.xWest_m, ySouth_m: grid.ySouth_m },
    field_ug_m3: field,
    receptors_ug_m3: Array.from(result.receptors_ug_m3),
    peak: {
      value_ug_m3: result.groundLevel_ug_m3[peakIndex] ?? 0,
      x_m: grid.xWest_m + (i + 0.5) * grid.spacing_m,
      y_m: grid.ySouth_m + (j + 0.5) * grid.spacing_m,
    },
    weatherLabel: `${label}: wind from ${fmt(weather.windFrom_deg)}° at ${fmt(weather.windSpeed_m_s)} m/s, class ${weather.stability}, mixing height ${fmt(weather.mixingHeight_m)} m`,
    notes: result.notes,
    coarsened,
    compute_ms: performance.now() - started,
  };
}

/** Direction the screening set's preview state blows from [deg]: west, the prevailing wind of many mid-latitude sites. */
const SCREENING_PREVIEW_FROM_deg = 270;

/** The one weather state a preview shows, its field path for messages, and its label. */
function previewWeather(scenario: Scenario, hourIndex: number): { fields: WeatherFields & { time?: string }; path: string; label: string } {
  const weather = scenario.weather;
  switch (weather.kind) {
    case 'steady':
      return { fields: weather, path: 'weather', label: 'steady weather' };
    case 'hourly': {
      if (weather.hours.length === 0) throw new RangeError('weather.hours: no hours to preview; upload or enter at least one hour');
      const index = Math.min(Math.max(0, Math.trunc(hourIndex)), weather.hours.length - 1);
      const hour = weather.hours[index];
      return { fields: hour, path: `weather.hours[${index}]`, label: `hour ${index + 1} of ${weather.hours.length} (${hour.time})` };
    }
    case 'windRose': {
      if (weather.cells.length === 0) throw new RangeError('weather.cells: the wind rose has no cells to preview');
      let most = 0;
      weather.cells.forEach((cell, n) => {
        if (cell.frequency > weather.cells[most].frequency) most = n;
      });
      const cell = weather.cells[most];
      return {
        fields: {
          windSpeed_m_s: cell.windSpeed_m_s,
          windFrom_deg: cell.windFrom_deg,
          stability: cell.stability,
          mixingHeight_m: cell.mixingHeight_m,
          rain_mm_h: weather.rain_mm_h,
          airTemperature_K: weather.airTemperature_K,
          anemometerHeight_m: weather.anemometerHeight_m,
        },
        path: `weather.cells[${most}]`,
        label: `the wind rose's most frequent cell (${fmt(100 * cell.frequency)} % of the time)`,
      };
    }
    case 'screeningSet': {
      // The set has no one state; the preview shows a common one of them (class D at 5 m/s, from the
      // sector nearest west), and says so: the run takes the highest of all the set's states.
      const sectorWidth = 360 / weather.sectors;
      const windFrom_deg = (Math.round(SCREENING_PREVIEW_FROM_deg / sectorWidth) * sectorWidth) % 360;
      return {
        fields: {
          windSpeed_m_s: 5,
          windFrom_deg,
          stability: 'D',
          rain_mm_h: weather.rain_mm_h,
          airTemperature_K: weather.airTemperature_K,
          anemometerHeight_m: weather.anemometerHeight_m,
        },
        path: 'weather',
        label: 'one state of the screening weather set (the run takes the highest of all)',
      };
    }
    default:
      // A weather kind the preview does not know (added to the format later): say so rather than guess.
      throw new RangeError(
        `weather.kind: ${JSON.stringify((weather as { kind: unknown }).kind)}: the instant preview shows steady, hourly and wind-rose weather; run the scenario for this kind`,
      );
  }
}

function fmt(value: number): string {
  return String(Number(value.toPrecision(3)));
}

/**
 * Plausibility of a scenario's input: things a run can compute but a reader should look at twice. They
 * are warnings, not errors (each may be true of a real case); `plumeplan validate` prints them and every
 * run carries them in its notes, from this one function, so the two always agree.
 *
 * - flue gas colder than the air: the plume then has no buoyant rise (Briggs F <= 0; ../sources/plumeRise.ts),
 *   and a stack exit temperature below the air's is more often a typo (degrees Celsius for kelvin) than a fact;
 * - a mixing height below a stack, or below its effective height (stack + plume rise): the release is above
 *   the mixing layer, where the grid keeps it above the no-flux lid and the Gaussian mode ignores the lid;
 * - a receptor on the site (inside site.boundary): the public is not there.
 *
 * Weather series are checked hour by hour (or cell by cell for a wind rose) and each warning counts how
 * often it applies.
 */
import type { Scenario, WeatherFields } from '../../scenarios/format/types.ts';
import type { ResolvedWeather } from '../drivers/types.ts';
import { isInsideRing } from '../grid/siteBoundary.ts';
import type { ScenarioGeometry } from '../grid/scenarioGeometry.ts';
import { resolveWeather } from '../meteorology/resolveWeather.ts';
import { effectiveHeight_m } from '../sources/plumeRise.ts';

/** One warning: where, what was found, and why it matters. */
export interface InputWarning {
  /** field path like "sources[0].exitTemperature_K" */
  path: string;
  /** the value found there */
  value: unknown;
  message: string;
}

/** The weather states a scenario runs with, each with the field path it came from. */
function weatherStates(scenario: Scenario): { path: string; weather: ResolvedWeather }[] {
  const { weather, site } = scenario;
  switch (weather.kind) {
    case 'steady':
      return [{ path: 'weather', weather: resolveWeather(weather, site, 'weather') }];
    case 'hourly':
      return weather.hours.map((hour, h) => ({ path: `weather.hours[${h}]`, weather: resolveWeather(hour, site, `weather.hours[${h}]`) }));
    case 'windRose':
      return weather.cells.map((cell, c) => {
        const fields: WeatherFields = {
          windSpeed_m_s: cell.windSpeed_m_s,
          windFrom_deg: cell.windFrom_deg,
          stability: cell.stability,
          mixingHeight_m: cell.mixingHeight_m,
          rain_mm_h: weather.rain_mm_h,
          airTemperature_K: weather.airTemperature_K,
          anemometerHeight_m: weather.anemometerHeight_m,
        };
        return { path: `weather.cells[${c}]`, weather: resolveWeather(fields, site, `weather.cells[${c}]`) };
      });
    default:
      return [];
  }
}

/** "in 3 of 8760 hours (first: weather.hours[12])" or "" for a single steady state. */
function howOften(count: number, total: number, firstPath: string, unit: string): string {
  return total > 1 ? ` in ${count} of ${total} ${unit} (first: ${firstPath})` : '';
}

/**
 * The plausibility warnings of a scenario whose geometry has been placed.
 *
 * @param scenario the parsed scenario (weather.hours filled)
 * @param geometry its placed geometry (prepareScenarioGeometry)
 * @returns the warnings, in the order sources, weather, receptors; empty when nothing looks odd
 * @throws RangeError naming the field when the weather cannot be resolved (as a run would)
 * @example inputWarnings(scenario, prepareScenarioGeometry(scenario)) // [] for the demo
 */
export function inputWarnings(scenario: Scenario, geometry: ScenarioGeometry): InputWarning[] {
  const warnings: InputWarning[] = [];
  const states = weatherStates(scenario);
  const unit = scenario.weather.kind === 'windRose' ? 'wind-rose cells' : 'hours';
  scenario.sources.forEach((source, index) => {
    if (source.kind !== 'point') return;
    const placed = geometry.sources[index];
    if (placed.kind !== 'point') return;
    let colder = 0;
    let firstColder = '';
    let lowestAir_K = Infinity;
    let belowStack = 0;
    let firstBelowStack = '';
    let belowPlume = 0;
    let firstBelowPlume = '';
    let example = { mixing_m: 0, effective_m: 0 };
    for (const { path, weather } of states) {
      if (source.exitTemperature_K < weather.airTemperature_K) {
        if (colder++ === 0) firstColder = path;
        lowestAir_K = Math.min(lowestAir_K, weather.airTemperature_K);
      }
      if (weather.mixingHeight_m < source.height_m) {
        if (belowStack++ === 0) firstBelowStack = path;
      } else {
        const effective_m = effectiveHeight_m(placed, weather, scenario.site.landUse, scenario.windProfile);
        if (weather.mixingHeight_m < effective_m) {
          if (belowPlume++ === 0) {
            firstBelowPlume = path;
            example = { mixing_m: weather.mixingHeight_m, effective_m };
          }
        }
      }
    }
    if (colder > 0) {
      warnings.push({
        path: `sources[${index}].exitTemperature_K`,
        value: source.exitTemperature_K,
        message:
          `the flue gas (${source.exitTemperature_K} K) is colder than the air` +
          (states.length > 1 ? howOften(colder, states.length, firstColder, unit) : ` (${lowestAir_K} K)`) +
          ': the plume gets no buoyant rise; check that the temperature is in kelvin',
      });
    }
    if (belowStack > 0) {
      warnings.push({
        path: `sources[${index}].height_m`,
        value: source.height_m,
        message:
          `the mixing height is below the top of this ${source.height_m} m stack` +
          howOften(belowStack, states.length, firstBelowStack, unit) +
          ': the release is above the mixing layer (the grid keeps it above the no-flux lid; the Gaussian mode ignores the lid)',
      });
    }
    if (belowPlume > 0) {
      warnings.push({
        path: `sources[${index}]`,
        value: source.id,
        message:
          `the mixing height (${example.mixing_m} m) is below the stack's effective height (${example.effective_m.toFixed(0)} m, stack + plume rise)` +
          howOften(belowPlume, states.length, firstBelowPlume, unit) +
          ': the plume is released above the mixing layer, where screening figures at the ground are least certain',
      });
    }
  });
  if (geometry.site !== null) {
    const ring_m = geometry.site.ring_m;
    geometry.receptors.forEach((receptor, index) => {
      if (isInsideRing(ring_m, receptor.x_m, receptor.y_m)) {
        warnings.push({
          path: `receptors[${index}]`,
          value: receptor.id,
          message: 'is on the site (inside site.boundary), where the public is not: its figures are not an exposure',
        });
      }
    });
  }
  // A derived domain coarsened by a far receptor or source: `validate` says so before anyone runs it.
  const coarsening = geometry.domainCoarsening;
  if (coarsening !== null) {
    warnings.push({
      path: coarsening.field,
      value: coarsening.id,
      message:
        `is ${(coarsening.distance_m / 1000).toFixed(1)} km from the site: covering it, the derived domain would pass the ${coarsening.maxCells} cells ` +
        `a derived domain may have at the ${coarsening.nearSpacing_m} m cells the sources need, so its cells are ${coarsening.spacing_m} m; ` +
        'the figures at the other receptors can then move by more than the resolution check\'s 10 %: give a domain, or ask for the resolution check',
    });
  }
  return warnings;
}

/** One line per warning: `sources[0].exitTemperature_K: 280: the flue gas ...`. */
export function formatWarnings(warnings: readonly InputWarning[]): string[] {
  return warnings.map((warning) => `${warning.path} (${JSON.stringify(warning.value)}): ${warning.message}`);
}

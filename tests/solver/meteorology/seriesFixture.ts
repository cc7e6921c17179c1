/**
 * A small invented scenario for the series tests (hourly and wind rose): a 30 m stack and a ground
 * area source, three receptors downwind to the east and north, on a coarse grid. Not a test itself.
 */
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { prepareScenarioGeometry } from '../../../solver/grid/scenarioGeometry.ts';
import { seriesBaseInput } from '../../../solver/drivers/runScenario.ts';
import type { SeriesBaseInput } from '../../../solver/drivers/seriesSolves.ts';

export const SITE = { lat: 52.31, lon: 4.62, landUse: 'rural' as const };

/** A parsed scenario with overrides merged in (raw JSON fields). */
export function seriesScenario(overrides: Record<string, unknown> = {}, domain = { halfWidth_m: 2500, spacing_m: 100, height_m: 1000, layers: 16 }): Scenario {
  const raw = {
    format: 'plumeplan.scenario/1',
    name: 'Series test works (invented)',
    site: SITE,
    domain,
    pollutant: { name: 'NOx', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: { kind: 'steady', windSpeed_m_s: 5, windFrom_deg: 250, stability: 'D', mixingHeight_m: 800 },
    dispersion: { kind: 'stability', curves: 'briggs' },
    solver: { mode: 'gaussian' },
    sources: [
      { kind: 'point', id: 'stack', name: 'Stack', lat: 52.31, lon: 4.62, height_m: 30, diameter_m: 1, exitVelocity_m_s: 10,
        exitTemperature_K: 400, emission_g_s: 2, plumeRise: false },
      { kind: 'area', id: 'yard', name: 'Yard', releaseHeight_m: 1, emission_g_s: 0.2,
        polygon: [[4.6205, 52.3095], [4.6225, 52.3095], [4.6225, 52.3105], [4.6205, 52.3105], [4.6205, 52.3095]] },
    ],
    receptors: [
      { id: 'east-1km', name: 'East 1 km', lat: 52.3125, lon: 4.6345 },
      { id: 'north-800m', name: 'North 800 m', lat: 52.3172, lon: 4.6215 },
      { id: 'east-2km', name: 'East 2 km', lat: 52.3145, lon: 4.6485 },
    ],
    assessment: {
      background_ug_m3: 10,
      standards: [
        { name: 'NO2 1-hour mean', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 },
        { name: 'Daily mean', limit_ug_m3: 50, averaging_h: 24, allowedExceedances: 35 },
        { name: 'NO2 annual mean', limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0 },
      ],
    },
    ...overrides,
  };
  const parsed = parseScenario(raw);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues, null, 1));
  return parsed.scenario;
}

/** Everything but the weather, placed on the grid (the same assembly runScenario uses). */
export function baseInput(scenario: Scenario): SeriesBaseInput {
  return seriesBaseInput(scenario, prepareScenarioGeometry(scenario));
}

/** n hours from a start, each built by a function of its index. */
export function hoursFrom(start: string, count: number, build: (h: number) => Record<string, unknown>) {
  const t0 = Date.parse(start);
  return Array.from({ length: count }, (_, h) => ({
    time: new Date(t0 + h * 3_600_000).toISOString().replace('.000Z', 'Z'),
    rain_mm_h: 0,
    airTemperature_K: 285,
    anemometerHeight_m: 10,
    ...build(h),
  })) as unknown as import('../../../scenarios/format/types.ts').WeatherHour[];
}

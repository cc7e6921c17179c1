/**
 * A small real run for the consultation-pack tests: an invented stack and yard at an invented site near
 * Merrowdene, three receptors at 1.5 m (the ground field's height, so each receptor's figure is the
 * ground field at that point), run in Gaussian mode on a 100 x 100 grid at 30 m (quick: well under a second).
 */
import { runScenario } from '../../../solver/drivers/runScenario.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';

export function makePackScenario(): Scenario {
  return {
    format: 'plumeplan.scenario/1',
    name: 'Pack test: Merrowdene laundry boiler (invented)',
    site: { lat: 54.0612, lon: -2.2841, landUse: 'rural' },
    domain: { halfWidth_m: 1500, spacing_m: 30, height_m: 600, layers: 10 },
    pollutant: { name: 'NOx', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: {
      kind: 'steady',
      windSpeed_m_s: 4,
      windFrom_deg: 240,
      stability: 'D',
      mixingHeight_m: 800,
      rain_mm_h: 0,
      airTemperature_K: 283.15,
      anemometerHeight_m: 10,
    },
    dispersion: { kind: 'stability', curves: 'briggs' },
    solver: { mode: 'gaussian', hourlyMethod: 'independentHours' },
    windProfile: 'powerLaw',
    sources: [
      {
        kind: 'point',
        id: 'boiler-stack',
        name: 'Laundry boiler stack',
        lat: 54.0612,
        lon: -2.2841,
        height_m: 18,
        diameter_m: 0.6,
        exitVelocity_m_s: 10,
        exitTemperature_K: 400,
        emission_g_s: 0.8,
        plumeRise: true,
      },
      {
        kind: 'area',
        id: 'yard',
        name: 'Delivery yard',
        polygon: [
          [-2.2850, 54.0606],
          [-2.2843, 54.0606],
          [-2.2843, 54.0609],
          [-2.2850, 54.0609],
          [-2.2850, 54.0606],
        ],
        releaseHeight_m: 1,
        emission_g_s: 0.02,
      },
    ],
    receptors: [
      { id: 'mill-lane', name: 'Mill Lane, houses', lat: 54.0640, lon: -2.2780, height_m: 1.5 },
      { id: 'nursery', name: 'Tansy Hill nursery', lat: 54.0668, lon: -2.2706, height_m: 1.5 },
      { id: 'allotments', name: 'Brookside allotments, off-axis', lat: 54.0634, lon: -2.2740, height_m: 1.5 },
    ],
  };
}

let cached: Promise<ScenarioRunResult> | undefined;

/** The run of makePackScenario(), made once per test file. */
export function packRunResult(): Promise<ScenarioRunResult> {
  cached ??= runScenario(makePackScenario(), { mode: 'gaussian' });
  return cached;
}

import { describe, expect, it } from 'vitest';
import type { AreaSource, Scenario } from '../../../scenarios/format/types.ts';
import { prepareScenarioGeometry } from '../../../solver/grid/scenarioGeometry.ts';

// An invented scenario: a small heat plant at an invented site.
function scenario(overrides: Partial<Scenario> = {}): Scenario {
  return {
    format: 'plumeplan.scenario/1',
    name: 'Invented test plant',
    site: { lat: -35.0625, lon: 147.4125, landUse: 'rural' },
    pollutant: { name: 'NOx', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: {
      kind: 'steady', windSpeed_m_s: 5, windFrom_deg: 270, stability: 'D', mixingHeight_m: 800,
      rain_mm_h: 0, airTemperature_K: 288.15, anemometerHeight_m: 10,
    },
    dispersion: { kind: 'stability', curves: 'briggs' },
    solver: { mode: 'gaussian', hourlyMethod: 'independentHours' },
    windProfile: 'powerLaw',
    sources: [
      {
        kind: 'point', id: 'stack-1', name: 'Boiler stack', lat: -35.062, lon: 147.4131, height_m: 30,
        diameter_m: 1, exitVelocity_m_s: 12, exitTemperature_K: 420, emission_g_s: 1.5, plumeRise: true,
      },
      {
        kind: 'area', id: 'yard', name: 'Storage yard', releaseHeight_m: 1, emission_g_s: 0.4,
        polygon: [[147.414, -35.064], [147.417, -35.064], [147.417, -35.062], [147.414, -35.062], [147.414, -35.064]],
      },
    ],
    receptors: [{ id: 'school', name: 'Primary school', lat: -35.05, lon: 147.44, height_m: 1.5 }],
    ...overrides,
  };
}

describe('prepareScenarioGeometry', () => {
  it('derives the domain when the scenario has none, and places everything on its grid', () => {
    const geometry = prepareScenarioGeometry(scenario());
    expect(geometry.domainDerived).toBe(true);
    expect(geometry.projection.definition).toBe(
      '+proj=tmerc +lat_0=-35.0625 +lon_0=147.4125 +k=1 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs',
    );
    // The sources lie within 0.4 km of the site: near box 2 km at 20 m. The school is about 2.8 km out:
    // 1.5 x 2.8 = 4.2 km -> 5 km half-width; at 20 m 500^2 x 24 = 6 M cells, above the 4 M limit, at 25 m
    // 400^2 x 24 = 3.84 M.
    expect(geometry.domain).toEqual({ halfWidth_m: 5000, spacing_m: 25, height_m: 1000, layers: 24 });
    expect(geometry.grid.nx).toBe(400);
    expect(geometry.domainCoarsening?.note).toMatch(/receptors\[0\] \('school'.* 25 m instead of 20 m/);
    expect(geometry.grid.projection).toBe(geometry.projection);
    expect(geometry.sources.map((s) => s.kind)).toEqual(['point', 'area']);
    expect(geometry.receptors).toHaveLength(1);
    const [x_m, y_m] = geometry.projection.toLocal(147.44, -35.05);
    expect(geometry.receptors[0].x_m).toBe(x_m);
    expect(geometry.receptors[0].y_m).toBe(y_m);
  });

  it('uses a given domain as it is', () => {
    const domain = { halfWidth_m: 3000, spacing_m: 25, height_m: 800, layers: 20 };
    const geometry = prepareScenarioGeometry(scenario({ domain }));
    expect(geometry.domainDerived).toBe(false);
    expect(geometry.domainCoarsening).toBeNull();
    expect(geometry.domain).toBe(domain);
    expect(geometry.grid.nx).toBe(240);
    expect(geometry.grid.zFaces_m[20]).toBe(800);
  });

  it('refuses a grid that would exhaust memory before building anything for it', () => {
    // A 200 km half-width at 1 m spacing is 1.6e11 columns. The yard below covers 60 km x 60 km of
    // it; were the grid built and the yard rasterised first, that would take hours and more memory
    // than the machine has. The memory check must answer at once from the domain's numbers.
    const hugeYard: AreaSource = {
      kind: 'area', id: 'yard', name: 'Huge yard', releaseHeight_m: 1, emission_g_s: 1,
      polygon: [[147.1, -35.3], [147.7, -35.3], [147.7, -34.8], [147.1, -34.8], [147.1, -35.3]],
    };
    const huge = scenario({ domain: { halfWidth_m: 200_000, spacing_m: 1, height_m: 1000, layers: 24 }, sources: [hugeYard] });
    expect(() => prepareScenarioGeometry(huge)).toThrow(RangeError);
    expect(() => prepareScenarioGeometry(huge)).toThrow(/^domain: .*400000 x 400000 x 24 = 3840000000000 cells/);
  });

  it('passes on placement errors with their field paths', () => {
    const outside = scenario({ domain: { halfWidth_m: 1000, spacing_m: 20, height_m: 1000, layers: 24 } });
    // The school is about 2.8 km out, outside a 1 km half-width.
    expect(() => prepareScenarioGeometry(outside)).toThrow(/^receptors\[0\]: receptor 'school'/);
    expect(() => prepareScenarioGeometry(scenario({ site: { lat: 95, lon: 147, landUse: 'rural' } }))).toThrow(/^site\.lat: got 95/);
  });
});

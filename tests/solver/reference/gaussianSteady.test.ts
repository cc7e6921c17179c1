/**
 * The Gaussian reference driver: wind-direction convention, agreement with the plume kernel and the
 * hand-computed value, effective heights, losses, area-source integration (convergence under grid
 * refinement, the infinite crosswind line source, the far-field point limit), notes, progress, abort.
 */
import { describe, expect, it } from 'vitest';
import { runGaussianSteady } from '../../../solver/drivers/gaussianSteady.ts';
import type {
  PlacedAreaSource,
  PlacedPointSource,
  PlacedReceptor,
  ResolvedWeather,
  SteadyRunInput,
} from '../../../solver/drivers/types.ts';
import type { LocalGrid } from '../../../solver/grid/types.ts';
import { rasteriseRing, ringArea_m2, ringCentroid_m } from '../../../solver/sources/areaRasterisation.ts';
import { GaussianPlume } from '../../../solver/reference/gaussianPlume.ts';
import { briggsSigmas, sigmasFor } from '../../../solver/reference/dispersionCurves.ts';
import { briggsPlumeRise } from '../../../solver/sources/plumeRise.ts';
import { decayRate_per_s } from '../../../solver/losses/rates.ts';

const expectRelative = (actual: number, expected: number, tolerance: number) =>
  expect(Math.abs(actual - expected) / Math.abs(expected)).toBeLessThan(tolerance);

/** a grid literal following solver/grid/types.ts (one layer; the Gaussian mode uses columns only) */
function grid(xWest_m: number, ySouth_m: number, nx: number, ny: number, spacing_m: number): LocalGrid {
  return {
    nx,
    ny,
    nz: 1,
    spacing_m,
    xWest_m,
    ySouth_m,
    zFaces_m: Float64Array.of(0, 1000),
    zCentres_m: Float64Array.of(500),
    dz_m: Float64Array.of(1000),
    projection: { definition: 'test', toLocal: (lon, lat) => [lon, lat], toLonLat: (x, y) => [x, y] },
  };
}

const weather = (over: Partial<ResolvedWeather> = {}): ResolvedWeather => ({
  windSpeed_m_s: 5,
  windFrom_deg: 270,
  stability: 'D',
  mixingHeight_m: Infinity,
  rain_mm_h: 0,
  airTemperature_K: 288,
  anemometerHeight_m: 10,
  calm: false,
  ...over,
});

const stack = (over: Partial<PlacedPointSource> = {}): PlacedPointSource => ({
  kind: 'point',
  id: 'stack',
  x_m: 0,
  y_m: 0,
  height_m: 50,
  diameter_m: 1,
  exitVelocity_m_s: 12,
  exitTemperature_K: 420,
  emission_g_s: 100,
  plumeRise: false,
  ...over,
});

const receptor = (id: string, x_m: number, y_m: number, height_m = 0): PlacedReceptor => ({ id, x_m, y_m, height_m });

function input(over: Partial<SteadyRunInput>): SteadyRunInput {
  return {
    grid: grid(-1500, -1500, 30, 30, 100),
    sources: [stack()],
    receptors: [],
    pollutant: { name: 'test', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: weather(),
    dispersion: { kind: 'stability', curves: 'briggs' },
    landUse: 'rural',
    windProfile: 'uniform',
    groundLevelHeight_m: 0,
    ...over,
  };
}

function areaSource(id: string, ring_m: [number, number][], g: LocalGrid, emission_g_s: number, releaseHeight_m: number): PlacedAreaSource {
  const [x_m, y_m] = ringCentroid_m(ring_m);
  return {
    kind: 'area',
    id,
    ring_m,
    area_m2: ringArea_m2(ring_m),
    x_m,
    y_m,
    releaseHeight_m,
    emission_g_s,
    shares: rasteriseRing(ring_m, g),
  };
}

describe('point source through the driver', () => {
  it('reproduces the hand-computed ground centreline value 923.2376 ug/m3 at 1 km downwind of a wind from the west (1e-9)', () => {
    // Q 100 g/s, u 5 m/s (uniform profile), H 50 m, Briggs D rural: 9.232376242157324e-4 g/m3 (see gaussianPlume.test.ts)
    const result = runGaussianSteady(input({ receptors: [receptor('east', 1000, 0), receptor('west', -1000, 0)] }));
    expectRelative(result.receptors_ug_m3[0], 923.2376242157324, 1e-9);
    expect(result.receptors_ug_m3[1]).toBe(0);
    expect(result.mode).toBe('gaussian');
    expect(result.massBudget_g).toBeNull();
  });

  it('windFrom_deg is where the wind comes FROM, clockwise from north: the plume lies along (-sin, -cos)', () => {
    const at = (windFrom_deg: number, x: number, y: number) =>
      runGaussianSteady(input({ weather: weather({ windFrom_deg }), receptors: [receptor('r', x, y)] })).receptors_ug_m3[0];
    const reference = 923.2376242157324;
    expectRelative(at(0, 0, -1000), reference, 1e-9); // from the north: blows south
    expectRelative(at(90, -1000, 0), reference, 1e-9); // from the east: blows west
    expectRelative(at(180, 0, 1000), reference, 1e-9); // from the south: blows north
    expectRelative(at(225, 1000 / Math.SQRT2, 1000 / Math.SQRT2), reference, 1e-9); // from the south-west: north-east
    expect(at(0, 0, 1000)).toBe(0);
  });

  it('the ground-level field at a column centre equals a receptor there at the same height', () => {
    const g = grid(-1500, -1500, 30, 30, 100);
    const column = 22 + 30 * 16; // centre (750, 150)
    const result = runGaussianSteady(input({ grid: g, receptors: [receptor('c', 750, 150, 1.5)], groundLevelHeight_m: 1.5 }));
    expectRelative(result.groundLevel_ug_m3[column], result.receptors_ug_m3[0], 1e-14);
    expect(result.groundLevel_ug_m3.length).toBe(900);
    expect(Math.min(...result.groundLevel_ug_m3)).toBeGreaterThanOrEqual(0);
  });

  it('is linear in the emission rates (two sources, all emissions x 2.5 -> every value x 2.5, 1e-13)', () => {
    const sources = [stack(), stack({ id: 'b', x_m: -300, y_m: 200, height_m: 20, emission_g_s: 7 })];
    const scaled = sources.map((s) => ({ ...s, emission_g_s: 2.5 * s.emission_g_s }));
    const one = runGaussianSteady(input({ sources, weather: weather({ windFrom_deg: 250 }) }));
    const two = runGaussianSteady(input({ sources: scaled, weather: weather({ windFrom_deg: 250 }) }));
    for (let c = 0; c < one.groundLevel_ug_m3.length; c++) {
      const a = one.groundLevel_ug_m3[c];
      if (a > 0) expectRelative(two.groundLevel_ug_m3[c], 2.5 * a, 1e-13);
      else expect(two.groundLevel_ug_m3[c]).toBe(0);
    }
  });

  it('plume rise: reports stack + final rise (wind at stack top) and uses the power-law wind at that height in the plume', () => {
    const source = stack({ height_m: 30, plumeRise: true, emission_g_s: 1.5 });
    const result = runGaussianSteady(
      input({ sources: [source], windProfile: 'powerLaw', receptors: [receptor('r', 1200, 40, 1.5)], weather: weather({ mixingHeight_m: 800 }) }),
    );
    // Worked in Python from REFERENCES.md alone [derived]: wind at the stack top 5 * 3^0.15 = 5.89574 m/s
    // (Irwin D rural exponent, from memory); F = 9.24627 m4/s3, final rise 21.425 F^(3/4) / u = 19.2689 m
    // (reached at x_f = 196.8 m, before the receptor), H = 49.2689 m; the plume's wind 5 (H/10)^0.15 = 6.35120 m/s;
    // Briggs D open country at 1200 m: sigma_y 90.7115 m, sigma_z 43.0282 m; ground and lid (800 m) images:
    // C(1200, 40, 1.5) = 9.07454 ug/m3 for 1.5 g/s.
    expectRelative(result.sources[0].effectiveHeight_m, 49.2689, 1e-5);
    expectRelative(result.receptors_ug_m3[0], 9.07454, 1e-5);
    expect(result.notes.some((n) => n.includes('source stack: Briggs plume rise'))).toBe(true);
  });

  it('decay through the driver: the ratio with/without decay is exp(-k x / u) (1e-12)', () => {
    const k = decayRate_per_s(0.25);
    const receptors = [receptor('a', 600, 30, 1.5), receptor('b', 1400, -60, 1.5)];
    const without = runGaussianSteady(input({ receptors }));
    const withDecay = runGaussianSteady(input({ receptors, pollutant: { name: 'x', halfLife_h: 0.25, washout: null, depositionVelocity_m_s: 0 } }));
    expectRelative(withDecay.receptors_ug_m3[0] / without.receptors_ug_m3[0], Math.exp((-k * 600) / 5), 1e-12);
    expectRelative(withDecay.receptors_ug_m3[1] / without.receptors_ug_m3[1], Math.exp((-k * 1400) / 5), 1e-12);
    expect(withDecay.notes.some((n) => n.startsWith('first-order decay applied'))).toBe(true);
  });

  it('washout adds to decay: Lambda = a R^b over the travel time (1e-12)', () => {
    const receptors = [receptor('a', 900, 0, 0)];
    const washout = { a_per_s: 7e-5, b: 0.8 };
    const dry = runGaussianSteady(input({ receptors, pollutant: { name: 'x', halfLife_h: null, washout, depositionVelocity_m_s: 0 } }));
    const wet = runGaussianSteady(
      input({ receptors, weather: weather({ rain_mm_h: 2 }), pollutant: { name: 'x', halfLife_h: null, washout, depositionVelocity_m_s: 0 } }),
    );
    expectRelative(wet.receptors_ug_m3[0] / dry.receptors_ug_m3[0], Math.exp((-7e-5 * Math.pow(2, 0.8) * 900) / 5), 1e-12);
    expect(dry.notes).toContain('no washout (no rain)');
  });

  it('dry deposition through the driver: the source-depletion factor in closed form (constant K, elevated release), 1e-3', () => {
    // Source depletion (Chamberlain 1953, from memory): Q(x) / Q = exp(-(v_d / u) integral_0^x Z(0; x') dx'),
    // Z(0) = 2 exp(-H^2 / 2 s^2) / (sqrt(2 pi) s), and with constant K the spread is s^2 = 2 K x / u
    // (REFERENCES.md, slender-plume limit). With a = H^2 u / 4K the integral has the closed form [derived]
    //   sqrt(2 / pi) sqrt(u / 2K) [2 sqrt(x) exp(-a / x) - 2 sqrt(pi a) erfc(sqrt(a / x))],
    // (differentiate it to check), so C(v_d) / C(0) at the ground on the axis is that factor. The 1e-3
    // tolerance is a tenth of what a 10 % error in v_d moves it by (1.6 % at 2 km).
    const erfc = (z: number): number => {
      // Abramowitz & Stegun 7.1.26, |error| < 1.5e-7 for z >= 0
      const t = 1 / (1 + 0.3275911 * z);
      const poly = t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
      return poly * Math.exp(-z * z);
    };
    const K = 10;
    const u = 5;
    const H = 50;
    const vd = 0.05;
    const receptors = [1000, 2000, 4000].map((x) => receptor(`x${x}`, x, 0, 0));
    const dispersion = { kind: 'constant' as const, horizontal_m2_s: K, vertical_m2_s: K };
    const run = (depositionVelocity_m_s: number) =>
      runGaussianSteady(
        input({ receptors, dispersion, sources: [stack({ height_m: H })], pollutant: { name: 'x', halfLife_h: null, washout: null, depositionVelocity_m_s } }),
      ).receptors_ug_m3;
    const dry = run(vd);
    const none = run(0);
    const a = (H * H * u) / (4 * K);
    receptors.forEach((r, n) => {
      const x = r.x_m;
      const integral =
        Math.sqrt(2 / Math.PI) * Math.sqrt(u / (2 * K)) * (2 * Math.sqrt(x) * Math.exp(-a / x) - 2 * Math.sqrt(Math.PI * a) * erfc(Math.sqrt(a / x)));
      expectRelative(dry[n] / none[n], Math.exp((-vd / u) * integral), 1e-3);
    });
  });

  it('notes say whether dry deposition was applied', () => {
    const off = runGaussianSteady(input({}));
    expect(off.notes).toContain('dry deposition not applied (deposition velocity 0)');
    const on = runGaussianSteady(input({ pollutant: { name: 'x', halfLife_h: null, washout: null, depositionVelocity_m_s: 0.01 } }));
    expect(on.notes.some((n) => n.startsWith('dry deposition by source depletion'))).toBe(true);
    expect(on.groundLevel_ug_m3.reduce((a, b) => a + b, 0)).toBeLessThan(off.groundLevel_ug_m3.reduce((a, b) => a + b, 0));
  });

  it('a plume at or above the mixing height is run without the lid, and a note says so', () => {
    const result = runGaussianSteady(input({ weather: weather({ mixingHeight_m: 40 }), receptors: [receptor('r', 1000, 0)] }));
    expect(result.notes.some((n) => n.includes('at or above the mixing height'))).toBe(true);
    expectRelative(result.receptors_ug_m3[0], 923.2376242157324, 1e-9);
  });
});

describe('area sources: integrated over their cells', () => {
  // a skewed quadrilateral yard, about 120 m x 90 m, not aligned with the grid
  const yard: [number, number][] = [[-60, -40], [55, -52], [62, 45], [-48, 38], [-60, -40]];
  const windFrom_deg = 250;
  const theta = (windFrom_deg * Math.PI) / 180;
  const down: [number, number] = [-Math.sin(theta), -Math.cos(theta)];
  const cross: [number, number] = [-down[1], down[0]];
  const [cx, cy] = ringCentroid_m(yard);
  const at = (along: number, across: number, z = 1.5) =>
    receptor(`r${along}_${across}`, cx + along * down[0] + across * cross[0], cy + along * down[1] + across * cross[1], z);
  const receptors = [at(300, 0), at(300, 35), at(300, -20, 0), at(1000, 10)];

  function run(spacing_m: number, offset_m = 0, targets = receptors) {
    const half = 1200;
    const n = Math.round((2 * half) / spacing_m);
    const g = grid(-half + offset_m, -half + offset_m, n, n, spacing_m);
    return runGaussianSteady(
      input({
        grid: g,
        sources: [areaSource('yard', yard, g, 0.4, 1)],
        receptors: targets,
        weather: weather({ windFrom_deg, mixingHeight_m: 800 }),
        windProfile: 'powerLaw',
        groundLevelHeight_m: 1.5,
      }),
    );
  }

  it('refining the grid changes the receptor values 300 m and 1 km downwind by less than 1 % (50 m -> 25 m -> 10 m, shifted grids)', () => {
    const coarse = run(50).receptors_ug_m3;
    const medium = run(25, 7).receptors_ug_m3;
    const fine = run(10, 3).receptors_ug_m3;
    for (let r = 0; r < receptors.length; r++) {
      expect(fine[r]).toBeGreaterThan(0);
      expectRelative(coarse[r], fine[r], 0.01);
      expectRelative(medium[r], fine[r], 0.01);
    }
  });

  it('inside the yard and at its edge, even at the release height, refining changes values by less than 1 % (50 -> 10 m)', () => {
    const near = [at(0, 0), at(40, 10), at(60, 0, 1), at(-20, 5, 1)]; // at(60, 0) is within 2 m of the yard's edge
    const coarse = run(50, 0, near).receptors_ug_m3;
    const fine = run(10, 3, near).receptors_ug_m3;
    for (let r = 0; r < near.length; r++) expectRelative(coarse[r], fine[r], 0.01);
  });

  it('far downwind it approaches the point source at its centroid (5 km: within 1 %)', () => {
    const g = grid(-6000, -6000, 120, 120, 100);
    const far = [at(5000, 0)];
    const area = runGaussianSteady(
      input({ grid: g, sources: [areaSource('yard', yard, g, 0.4, 1)], receptors: far, weather: weather({ windFrom_deg }) }),
    );
    const point = runGaussianSteady(
      input({ grid: g, sources: [stack({ x_m: cx, y_m: cy, height_m: 1, emission_g_s: 0.4 })], receptors: far, weather: weather({ windFrom_deg }) }),
    );
    expectRelative(area.receptors_ug_m3[0], point.receptors_ug_m3[0], 0.01);
  });

  it('a long thin crosswind strip matches the infinite crosswind line source 2 q / (sqrt(2 pi) sigma_z u) [derived], within 0.5 %', () => {
    // strip 2000 m wide (along x) and 10 m deep, wind from the south, receptor 300 m north of it at the
    // release height: C = Q/L * 2 exp(0) / (sqrt(2 pi) sigma_z u) with ground reflection at z = H = 0
    const g = grid(-1100, -400, 110, 40, 20);
    const strip: [number, number][] = [[-1000, -5], [1000, -5], [1000, 5], [-1000, 5], [-1000, -5]];
    const result = runGaussianSteady(
      input({
        grid: g,
        sources: [areaSource('strip', strip, g, 20, 0)],
        receptors: [receptor('r', 0, 300, 0)],
        weather: weather({ windFrom_deg: 180 }),
      }),
    );
    const sigmaZ = briggsSigmas(300, 'D', 'rural').sigmaZ_m;
    const line_g_m3 = ((20 / 2000) * 2) / (Math.sqrt(2 * Math.PI) * sigmaZ * 5);
    expectRelative(result.receptors_ug_m3[0], 1e6 * line_g_m3, 0.005);
  });

  it('inside the yard the values stay finite and non-negative, and the area source is reported at its release height', () => {
    const result = run(25);
    expect(result.groundLevel_ug_m3.every((v) => Number.isFinite(v) && v >= 0)).toBe(true);
    expect(result.sources[0].effectiveHeight_m).toBe(1);
    expectRelative(result.sources[0].x_m, cx, 1e-12);
  });
});

describe('progress and cancellation', () => {
  it('reports progress from 0 to 1 and stops with an AbortError when aborted', () => {
    const fractions: number[] = [];
    runGaussianSteady(input({ grid: grid(-3000, -3000, 60, 60, 100) }), { onProgress: (f) => fractions.push(f) });
    expect(fractions[0]).toBe(0);
    expect(fractions[fractions.length - 1]).toBe(1);
    expect(fractions.length).toBeGreaterThan(3);
    const controller = new AbortController();
    let calls = 0;
    expect(() =>
      runGaussianSteady(input({ grid: grid(-3000, -3000, 60, 60, 100) }), {
        signal: controller.signal,
        onProgress: () => {
          if (++calls === 2) controller.abort();
        },
      }),
    ).toThrow(expect.objectContaining({ name: 'AbortError' }));
  });

  it('rejects a bad mixing height or receptor height with a RangeError naming the field', () => {
    expect(() => runGaussianSteady(input({ weather: weather({ mixingHeight_m: 0 }) }))).toThrow(/weather.mixingHeight_m is 0/);
    expect(() => runGaussianSteady(input({ receptors: [receptor('low', 10, 10, -1)] }))).toThrow(/receptor low: height_m is -1/);
  });
});

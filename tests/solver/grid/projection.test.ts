import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { createLocalProjection } from '../../../solver/grid/projection.ts';

/**
 * Run PROJ's cs2cs (Debian proj-bin, installed by .ci/run) on lines of "a b" and return the first
 * two numbers of each output line. The test fails, rather than skips, when cs2cs is missing:
 * this check against PROJ is the point of the file.
 */
function runCs2cs(from: string, to: string, points: [number, number][], format: string): [number, number][] {
  const args = [...from.split(' '), '+to', ...to.split(' '), '-f', format];
  const result = spawnSync('cs2cs', args, {
    input: points.map(([a, b]) => `${a} ${b}\n`).join(''),
    encoding: 'utf8',
  });
  if (result.error) {
    throw new Error(`cs2cs could not run (${result.error.message}); install Debian proj-bin (see .ci/run)`);
  }
  expect(result.status, result.stderr).toBe(0);
  const lines = result.stdout.trim().split('\n');
  expect(lines).toHaveLength(points.length);
  return lines.map((line) => {
    const [a, b] = line.trim().split(/\s+/).map(Number);
    return [a, b];
  });
}

const LONLAT = '+proj=longlat +ellps=WGS84';

// Invented sites (no real place intended), one in each hemisphere.
const SITES = [
  { lat: 52.1375, lon: 5.2875 },
  { lat: -35.0625, lon: 147.4125 },
];

/** 5 x 5 lattice plus 4 off-lattice points spread over a 20 km square centred on the site [deg]. */
function lonLatPointsAround(site: { lat: number; lon: number }): [number, number][] {
  const halfWidth_m = 10_000;
  const degreesLat = halfWidth_m / 111_000;
  const degreesLon = halfWidth_m / (111_000 * Math.cos((site.lat * Math.PI) / 180));
  const points: [number, number][] = [];
  for (let a = -2; a <= 2; a++) {
    for (let b = -2; b <= 2; b++) {
      points.push([site.lon + (a / 2) * degreesLon, site.lat + (b / 2) * degreesLat]);
    }
  }
  for (const [fa, fb] of [[0.31, -0.77], [-0.93, 0.41], [0.58, 0.66], [-0.12, -0.95]]) {
    points.push([site.lon + fa * degreesLon, site.lat + fb * degreesLat]);
  }
  return points;
}

describe('createLocalProjection', () => {
  it('writes the agreed proj4 definition with the numbers printed exactly', () => {
    // Behaviour check: summary.json reports this string and other modules match on it.
    expect(createLocalProjection({ lat: 52.1375, lon: 5.2875 }).definition).toBe(
      '+proj=tmerc +lat_0=52.1375 +lon_0=5.2875 +k=1 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs',
    );
    expect(createLocalProjection({ lat: -35.0625, lon: -0.000125 }).definition).toBe(
      '+proj=tmerc +lat_0=-35.0625 +lon_0=-0.000125 +k=1 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs',
    );
  });

  it('puts the site at the origin', () => {
    // Exact by construction of a projection with lat_0/lon_0 at the site and no false origin.
    for (const site of SITES) {
      const [x_m, y_m] = createLocalProjection(site).toLocal(site.lon, site.lat);
      expect(Math.abs(x_m)).toBeLessThan(1e-9);
      expect(Math.abs(y_m)).toBeLessThan(1e-9);
    }
  });

  for (const site of SITES) {
    it(`agrees with PROJ cs2cs forward to 1 mm over 20 km at lat ${site.lat}`, () => {
      // Reference: PROJ's cs2cs (proj-bin), +proj=longlat +ellps=WGS84 +to <our definition>.
      const projection = createLocalProjection(site);
      const points = lonLatPointsAround(site);
      expect(points.length).toBeGreaterThanOrEqual(20);
      const reference = runCs2cs(LONLAT, projection.definition, points, '%.6f');
      let worst_m = 0;
      points.forEach(([lon, lat], n) => {
        const [x_m, y_m] = projection.toLocal(lon, lat);
        worst_m = Math.max(worst_m, Math.abs(x_m - reference[n][0]), Math.abs(y_m - reference[n][1]));
      });
      // The points really do span the 20 km domain.
      expect(Math.max(...reference.map(([x]) => Math.abs(x)))).toBeGreaterThan(9_000);
      expect(Math.max(...reference.map(([, y]) => Math.abs(y)))).toBeGreaterThan(9_000);
      expect(worst_m).toBeLessThan(1e-3);
    });

    it(`agrees with PROJ cs2cs inverse to 1e-8 deg over 20 km at lat ${site.lat}`, () => {
      // Reference: PROJ's cs2cs, <our definition> +to +proj=longlat +ellps=WGS84, 10 decimals.
      const projection = createLocalProjection(site);
      const points: [number, number][] = [];
      for (let a = -2; a <= 2; a++) {
        for (let b = -2; b <= 2; b++) points.push([a * 5000 + 17.25, b * 5000 - 3.5]);
      }
      const reference = runCs2cs(projection.definition, LONLAT, points, '%.10f');
      let worst_deg = 0;
      points.forEach(([x_m, y_m], n) => {
        const [lon, lat] = projection.toLonLat(x_m, y_m);
        worst_deg = Math.max(worst_deg, Math.abs(lon - reference[n][0]), Math.abs(lat - reference[n][1]));
      });
      expect(worst_deg).toBeLessThan(1e-8);
    });
  }

  it('round-trips lon/lat -> metres -> lon/lat to 1e-10 deg', () => {
    // Consistency of proj4's forward and inverse series (exact inverse pair).
    for (const site of SITES) {
      const projection = createLocalProjection(site);
      for (const [lon, lat] of lonLatPointsAround(site)) {
        const [x_m, y_m] = projection.toLocal(lon, lat);
        const [lonBack, latBack] = projection.toLonLat(x_m, y_m);
        expect(Math.abs(lonBack - lon)).toBeLessThan(1e-10);
        expect(Math.abs(latBack - lat)).toBeLessThan(1e-10);
      }
    }
  });

  it('refuses a site it cannot centre a grid on, naming the field', () => {
    expect(() => createLocalProjection({ lat: Number.NaN, lon: 5 })).toThrow(/^site\.lat: got NaN/);
    expect(() => createLocalProjection({ lat: 89.5, lon: 5 })).toThrow(/^site\.lat: got 89\.5; allowed/);
    expect(() => createLocalProjection({ lat: 10, lon: 181 })).toThrow(/^site\.lon: got 181/);
    expect(() => createLocalProjection({ lat: 10, lon: Infinity })).toThrow(RangeError);
  });
});

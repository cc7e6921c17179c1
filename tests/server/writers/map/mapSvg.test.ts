/**
 * map.svg: a fixture test of its structure (what is drawn, not its pixels), and its geometry checked
 * against outside references: receptor markers placed where PROJ's cs2cs puts them in UTM, the north
 * arrow against the meridian convergence, and the scale bar against the UTM scale factor.
 *
 * `REGEN=1 npx vitest run tests/server/writers` rewrites tests/fixtures/map/out/pack-map.json after a
 * deliberate change (review the diff; CI never regenerates).
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../../server/writers/caution.ts';
import { MAP_HEIGHT, MAP_WIDTH, renderMapSvg, type MapFigure } from '../../../../server/writers/map/mapSvg.ts';
import type { ScenarioRunResult } from '../../../../solver/drivers/types.ts';
import { makePackScenario, packRunResult } from '../packFixture.ts';

const FIXTURE = new URL('../../../fixtures/map/out/pack-map.json', import.meta.url);
const scenario = makePackScenario();
let result: ScenarioRunResult;
let figure: MapFigure;

/** The frame as mapSvg draws it: 600 px square, top-left corner at (78, 78). */
const FRAME = { left: 78, top: 78, size: 600 };

beforeAll(async () => {
  result = await packRunResult();
  figure = renderMapSvg(scenario, result, {
    levels_ug_m3: [0.5, 1, 2, 5],
    contextLayers: [{ name: 'Mill Lane', features: [{ type: 'Feature', properties: {}, geometry: { type: 'LineString', coordinates: [[-2.2800, 54.0630], [-2.2760, 54.0650]] } }] }],
    provenance: { version: '0.1.0', scenarioSha256: 'ab'.repeat(32), runDate: '2026-12-02T03:00:00Z', command: 'plumeplan run pack.json --out out' },
  });
});

/** What the figure holds, as a plain object for the fixture. */
function structureOf(svg: string): Record<string, unknown> {
  const all = (pattern: RegExp): string[] => [...svg.matchAll(pattern)].map((match) => match[1]);
  const texts = all(/<text[^>]*>([^<]*)<\/text>/g);
  return {
    size: all(/<svg[^>]* width="(\d+)"/g).concat(all(/<svg[^>]* height="(\d+)"/g)),
    bandsLowerLevels: all(/class="band" data-lower-ug-m3="([^"]+)"/g),
    legendBands: all(/class="legend-band"[^>]*\/>\s*<text[^>]*>([^<]*)</g),
    receptors: all(/class="receptor" data-id="([^"]+)"/g),
    pointSources: all(/class="point-source" data-id="([^"]+)"/g),
    areaSources: all(/class="area-source" data-id="([^"]+)"/g),
    contextLayers: all(/class="context" data-layer="([^"]+)"/g),
    peak: all(/class="peak" data-concentration-ug-m3="([^"]+)"/g).length,
    scaleBar_m: all(/class="scale-bar" data-length-m="([^"]+)"/g),
    northArrow: all(/class="north-arrow" data-true-north-deg="([^"]+)"/g).length,
    gridEdge: all(/class="(grid-edge)"/g).length,
    wind: all(/class="wind" data-wind-from-deg="([^"]+)"/g),
    legendTexts: texts.filter((text) => /stack|area source|receptor|maximum|grid|wind|µg/.test(text)),
    title: texts[0],
    crsLabel: texts.find((text) => text.includes('EPSG')),
    provenance: texts.find((text) => text.startsWith('plumeplan ')),
  };
}

describe('map.svg', () => {
  it('holds the bands, sources, receptors, legend, scale bar, north arrow and caption of the fixture', () => {
    const structure = structureOf(figure.svg);
    if (process.env.REGEN === '1' || !existsSync(FIXTURE)) writeFileSync(FIXTURE, `${JSON.stringify(structure, null, 2)}\n`);
    expect(structure).toEqual(JSON.parse(readFileSync(FIXTURE, 'utf8')));
    expect(structure.size).toEqual([String(MAP_WIDTH), String(MAP_HEIGHT)]);
  });

  it('draws the site boundary when the scenario gives one, and names the peak as off the site', () => {
    const fenced = { ...scenario, site: { ...scenario.site, boundary: [[-2.2852, 54.0603], [-2.2830, 54.0603], [-2.2830, 54.0618], [-2.2852, 54.0618], [-2.2852, 54.0603]] as [number, number][] } };
    const svg = renderMapSvg(fenced, result, { levels_ug_m3: [0.5, 1, 2, 5] }).svg;
    expect(svg).toMatch(/<path class="site-boundary" d="M[\d.]+ [\d.]+(L[\d.]+ [\d.]+){4}Z"/);
    expect(svg).toContain('>site boundary<');
    expect(svg).toContain('>maximum impact off the site<');
    expect(figure.svg).not.toContain('site-boundary');
  });

  it('carries the screening caution as text under the figure and in its description', () => {
    const cautionLines = [...figure.svg.matchAll(/<g class="caution">([\s\S]*?)<\/g>/g)][0][1];
    const text = [...cautionLines.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((match) => match[1]).join(' ');
    expect(text).toBe(SCREENING_CAUTION);
    expect(figure.svg).toContain(`<desc id="caution">${SCREENING_CAUTION}</desc>`);
  });

  it('puts each receptor where PROJ (cs2cs) puts it in UTM zone 30N, to 0.1 px (coordinates are written to 0.1 px)', () => {
    const [west, , east, north] = figure.extent;
    const scale = FRAME.size / (east - west);
    for (const receptor of scenario.receptors) {
      const [easting, northing] = execFileSync('cs2cs', ['-f', '%.4f', 'EPSG:4326', 'EPSG:32630'], { input: `${receptor.lat} ${receptor.lon}\n`, encoding: 'utf8' })
        .trim()
        .split(/\s+/)
        .map(Number);
      const match = new RegExp(`class="receptor" data-id="${receptor.id}"><circle cx="([\\d.]+)" cy="([\\d.]+)"`).exec(figure.svg);
      expect(match, receptor.id).not.toBeNull();
      expect(Math.abs(Number(match![1]) - (FRAME.left + (easting - west) * scale))).toBeLessThan(0.1);
      expect(Math.abs(Number(match![2]) - (FRAME.top + (north - northing) * scale))).toBeLessThan(0.1);
    }
  });

  it('points the north arrow to true north: the meridian convergence of UTM zone 30N at the site', () => {
    // Convergence gamma = atan(tan(lon - lon0) sin(lat)) (spherical form, Snyder 1987, Map Projections: A
    // Working Manual, from memory; ellipsoidal terms change it by under 0.001 deg here). East of the central
    // meridian in the north, grid north lies east of true north, so true north is turned anticlockwise.
    const [west, south, east, north] = figure.extent;
    const [lon, lat] = execFileSync('cs2cs', ['-f', '%.8f', 'EPSG:32630', 'EPSG:4326'], { input: `${(west + east) / 2} ${(south + north) / 2}\n`, encoding: 'utf8' })
      .trim()
      .split(/\s+/)
      .map(Number)
      .slice(0, 2)
      .reverse();
    const rad = Math.PI / 180;
    const gamma_deg = Math.atan(Math.tan((lon - -3) * rad) * Math.sin(lat * rad)) / rad;
    const drawn = Number(/class="north-arrow" data-true-north-deg="([^"]+)"/.exec(figure.svg)![1]);
    expect(gamma_deg).toBeGreaterThan(0.5);
    expect(Math.abs(drawn - -gamma_deg)).toBeLessThan(0.01);
  });

  it('draws a scale bar of the ground length it states, within the UTM scale factor (0.9996 near the central meridian)', () => {
    const [west, , east] = figure.extent;
    const length_m = Number(/class="scale-bar" data-length-m="([^"]+)"/.exec(figure.svg)![1]);
    const group = /<g class="scale-bar"[^>]*>([\s\S]*?)<\/g>/.exec(figure.svg)![1];
    const halves = [...group.matchAll(/<rect x="[^"]+" y="[^"]+" width="([\d.]+)" height="6"/g)].map((match) => Number(match[1]));
    expect(halves).toHaveLength(2);
    const gridMetres = ((halves[0] + halves[1]) * (east - west)) / FRAME.size;
    // Grid distance = k x ground distance, k = 0.9996 (1 + (dlon cos lat)^2 / 2) = 0.99963 here (UTM definition).
    const k = 0.9996 * (1 + ((0.716 * Math.PI) / 180 * Math.cos((54.06 * Math.PI) / 180)) ** 2 / 2);
    expect(Math.abs(gridMetres / k - length_m) / length_m).toBeLessThan(5e-4);
  });
});

/**
 * `plumeplan run --context-layers FILE`: the user's GeoJSON (RFC 7946: a FeatureCollection, positions as
 * [longitude, latitude] in WGS 84) drawn on the map figure, one layer per `properties.layer`; bad files exit
 * 2 naming the file, the feature and the value before any solve. The file is also read by GDAL's ogrinfo
 * (Debian gdal-bin), the outside check that the fixture is the GeoJSON the usage text asks for.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CommandIO } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { parseContextLayers } from '../../../server/writers/contextLayers.ts';
import { makePackScenario } from '../writers/packFixture.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-context-cli-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

function capture(): { io: CommandIO; stdout: () => string; stderr: () => string } {
  const out: string[] = [];
  const err: string[] = [];
  return {
    io: { stdout: { write: (t: string) => out.push(t) }, stderr: { write: (t: string) => err.push(t), isTTY: false }, env: {}, now: () => 0 },
    stdout: () => out.join(''),
    stderr: () => err.join(''),
  };
}

/** Invented context near the pack fixture's invented site: a road, two buildings, the site fence. */
const CONTEXT = {
  type: 'FeatureCollection',
  name: 'Merrowdene context (invented)',
  features: [
    { type: 'Feature', properties: { layer: 'roads', name: 'Mill Lane' }, geometry: { type: 'LineString', coordinates: [[-2.2860, 54.0600], [-2.2790, 54.0640], [-2.2700, 54.0670]] } },
    { type: 'Feature', properties: { layer: 'buildings' }, geometry: { type: 'Polygon', coordinates: [[[-2.2845, 54.0614], [-2.2840, 54.0614], [-2.2840, 54.0617], [-2.2845, 54.0617], [-2.2845, 54.0614]]] } },
    { type: 'Feature', properties: { layer: 'buildings' }, geometry: { type: 'Polygon', coordinates: [[[-2.2785, 54.0641], [-2.2780, 54.0641], [-2.2780, 54.0644], [-2.2785, 54.0644], [-2.2785, 54.0641]]] } },
    { type: 'Feature', properties: {}, geometry: { type: 'Polygon', coordinates: [[[-2.2855, 54.0603], [-2.2830, 54.0603], [-2.2830, 54.0618], [-2.2855, 54.0618], [-2.2855, 54.0603]]] } },
  ],
};

function writeJson(name: string, value: unknown): string {
  const file = path.join(scratch, name);
  writeFileSync(file, typeof value === 'string' ? value : JSON.stringify(value));
  return file;
}

describe('plumeplan run --context-layers', () => {
  it('is in the usage text', async () => {
    const c = capture();
    expect(await main(['run', '--help'], c.io)).toBe(0);
    expect(c.stdout()).toContain('--context-layers FILE');
    expect(c.stdout()).toContain('properties.layer');
  });

  it('draws each layer on map.svg and names it in the legend', async () => {
    const contextFile = writeJson('context.geojson', CONTEXT);
    // the outside reader: GDAL opens it as GeoJSON with four features
    const ogr = execFileSync('ogrinfo', ['-ro', '-al', '-so', contextFile], { encoding: 'utf8' });
    expect(ogr).toMatch(/Feature Count: 4/);
    const scenarioFile = writeJson('scenario.json', makePackScenario());
    const out = path.join(scratch, 'run');
    const c = capture();
    expect(await main(['run', scenarioFile, '--out', out, '--quick', '--context-layers', contextFile], c.io)).toBe(0);
    const svg = readFileSync(path.join(out, 'map.svg'), 'utf8');
    const layers = [...svg.matchAll(/<g class="context" data-layer="([^"]+)"/g)].map((match) => match[1]);
    expect(layers).toEqual(['roads', 'buildings', 'Merrowdene context (invented)']);
    const buildings = svg.slice(svg.indexOf('data-layer="buildings"'));
    expect(buildings.slice(0, buildings.indexOf('</g>')).match(/<path /g)).toHaveLength(2);
    for (const name of ['roads', 'buildings']) expect(svg).toContain(`>${name}</text>`);
  });

  it('exits 2 before solving, naming the file, the feature and the value', async () => {
    const swapped = structuredClone(CONTEXT);
    swapped.features[1].geometry.coordinates = [[[54.0614, -2.2845], [54.0614, 95], [54.0617, -2.2840], [54.0614, -2.2845]]];
    const cases: [string, RegExp][] = [
      [writeJson('bad.json', '{"type": "FeatureCollection", "features": ['), /not JSON/],
      [writeJson('points.json', { type: 'GeometryCollection', geometries: [] }), /type "GeometryCollection" is not allowed; give a GeoJSON FeatureCollection/],
      [writeJson('swapped.json', swapped), /features\[1\]\.geometry\.coordinates\[0\]\[1\]: \[54\.0614, 95\] is not allowed; longitude -180\.\.180 and latitude -90\.\.90/],
      [path.join(scratch, 'missing.geojson'), /cannot read .*missing\.geojson \(ENOENT\)/],
    ];
    const scenarioFile = writeJson('scenario-bad.json', makePackScenario());
    for (const [file, message] of cases) {
      const c = capture();
      expect(await main(['run', scenarioFile, '--out', path.join(scratch, 'never'), '--context-layers', file], c.io)).toBe(2);
      expect(c.stderr()).toMatch(/--context-layers: /);
      expect(c.stderr()).toMatch(message);
    }
  });

  it('reads a single Feature and names its layer after the file when nothing else names it', () => {
    const layers = parseContextLayers(JSON.stringify(CONTEXT.features[3]), 'site/fence.geojson');
    expect(layers.map((layer) => layer.name)).toEqual(['fence']);
  });
});

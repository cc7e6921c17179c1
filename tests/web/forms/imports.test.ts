/**
 * Imports on the map page, on small fixture files of our own (tests/web/fixtures/imports/, invented
 * shapes around the invented demo site): a zipped shapefile through shpjs, GeoJSON as it is, and an
 * hourly weather CSV with the preview of what was read. The shapefile was written by GDAL's ogr2ogr
 * (Debian's GDAL, the reference tool) from merrowdene-buildings.geojson beside it, so reading it back must
 * give that GeoJSON's shapes and attributes. KML needs a DOM parser, which Node lacks: the end-to-end test
 * (tests/e2e/mapPage.test.ts) reads the KML fixture in Chromium.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readContextFile } from '../../../web/map/readContextFile.ts';
import { hoursSummary, readWeatherUpload } from '../../../web/forms/weatherUpload.ts';

const FIXTURES = new URL('../fixtures/imports/', import.meta.url);

function fixture(name: string): File {
  return new File([readFileSync(new URL(name, FIXTURES))], name);
}

type Ring = [number, number][];

/** A ring's corners as a sorted set of "lon,lat" (shapefiles store outer rings clockwise, GeoJSON sources may not). */
function corners(ring: Ring): string[] {
  return [...new Set(ring.map(([lon, lat]) => `${lon.toFixed(6)},${lat.toFixed(6)}`))].sort();
}

describe('context layers from files', () => {
  it('reads a zipped shapefile (written by ogr2ogr) back to the shapes and attributes it was made from', async () => {
    const source = JSON.parse(readFileSync(new URL('merrowdene-buildings.geojson', FIXTURES), 'utf8'));
    const read = await readContextFile(fixture('merrowdene-buildings.zip'));
    expect(read.type).toBe('FeatureCollection');
    expect(read.features.map((f) => f.properties)).toEqual(source.features.map((f: { properties: unknown }) => f.properties));
    read.features.forEach((feature, n) => {
      expect(feature.geometry.type).toBe('Polygon');
      const ring = (feature.geometry as unknown as { coordinates: Ring[] }).coordinates[0];
      expect(ring[0]).toEqual(ring[ring.length - 1]);
      expect(corners(ring)).toEqual(corners(source.features[n].geometry.coordinates[0]));
    });
  });

  it('reads GeoJSON as it is, and a bare geometry as one feature', async () => {
    const read = await readContextFile(fixture('merrowdene-buildings.geojson'));
    expect(read.features).toHaveLength(2);
    const bare = new File([JSON.stringify({ type: 'LineString', coordinates: [[-2.283, 54.0608], [-2.279, 54.0615]] })], 'lane.json');
    expect((await readContextFile(bare)).features[0].geometry.type).toBe('LineString');
  });

  it('names the file and what is wrong with it', async () => {
    await expect(readContextFile(new File(['not json at all'], 'roads.geojson'))).rejects.toThrow(/^roads\.geojson: not JSON/);
    await expect(readContextFile(new File([JSON.stringify({ name: 'x' })], 'odd.json'))).rejects.toThrow(/^odd\.json: JSON but not GeoJSON/);
    await expect(readContextFile(new File([new Uint8Array([1, 2, 3, 4])], 'broken.zip'))).rejects.toThrow(/^broken\.zip: not readable as a zipped shapefile/);
    await expect(readContextFile(fixture('merrowdene-fence-and-lane.kml'), null)).rejects.toThrow(/^merrowdene-fence-and-lane\.kml: KML needs an XML parser/);
  });
});

describe('hourly weather CSV upload', () => {
  it('reads the hours with the format\'s defaults and previews what was read', () => {
    const read = readWeatherUpload(readFileSync(new URL('two-hours-ok.csv', FIXTURES), 'utf8'), 'two-hours-ok.csv');
    if (!read.ok) throw new Error(read.errorText);
    expect(read.hours).toHaveLength(2);
    // defaults of the scenario format for columns the file leaves out: 288.15 K, anemometer at 10 m
    expect(read.hours[1]).toEqual({ time: '2026-03-02T07:00Z', windSpeed_m_s: 4, windFrom_deg: 240, stability: 'C', rain_mm_h: 0.4, airTemperature_K: 288.15, anemometerHeight_m: 10 });
    const text = read.summaryHtml.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
    expect(text).toContain('Read 2 hours from two-hours-ok.csv');
    expect(text).toContain('2 hours, 2026-03-02T06:00Z to 2026-03-02T07:00Z');
    expect(text).toContain('2026-03-02T07:00Z 4 240 C');
  });

  it('names the line and column of every problem', () => {
    const read = readWeatherUpload(readFileSync(new URL('bad-speed.csv', FIXTURES), 'utf8'), 'bad-speed.csv');
    expect(read.ok).toBe(false);
    if (read.ok) return;
    expect(read.errorText.split('\n')).toEqual([
      'bad-speed.csv line 3, column windSpeed_m_s: must be a finite number > 0 [m/s]',
      'bad-speed.csv line 3, column stability: must be one of "A", "B", "C", "D", "E", "F"',
    ]);
  });

  it('says so when no hours are there yet, and escapes what it shows', () => {
    expect(hoursSummary([])).toContain('No hours yet');
    expect(hoursSummary([{ time: '<b>', windSpeed_m_s: 1, windFrom_deg: 0 }])).toContain('&lt;b&gt;');
  });
});

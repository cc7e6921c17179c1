/**
 * footprint.geojson read by GDAL's ogrinfo (Debian gdal-bin), the outside reader a GIS officer's software
 * resembles: one layer of polygons in WGS 84, a feature per band, the band bounds as real-number fields and
 * the caution as a field of every feature (GIS software shows feature fields, not the collection's own
 * properties, so the caution must travel with each band).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { footprintBands } from '../../../server/writers/footprint.ts';
import { formatFootprint } from '../../../server/writers/writeResultFolder.ts';
import { packRunResult } from './packFixture.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-ogr-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('footprint.geojson in ogrinfo', () => {
  it('reads a polygon layer in WGS 84 with one feature per band, its bounds and the caution', async () => {
    const result = await packRunResult();
    const collection = footprintBands(result.footprint_ug_m3, result.grid, { levels_ug_m3: [0.5, 1, 2, 5] });
    const file = path.join(scratch, 'footprint.geojson');
    writeFileSync(file, formatFootprint(collection));
    const summary = execFileSync('ogrinfo', ['-ro', '-so', '-al', file], { encoding: 'utf8' });
    expect(summary).toMatch(/Geometry: (Multi Polygon|Polygon|Unknown \(any\))/);
    expect(summary).toMatch(/Feature Count: 4/);
    expect(summary).toMatch(/ID\["EPSG",4326\]/);
    expect(summary).toMatch(/lower_ug_m3: Real/);
    // OGR infers a field's type from its values: whole-number levels give Integer, any fraction Real.
    expect(summary).toMatch(/upper_ug_m3: (Real|Integer)/);
    expect(summary).toMatch(/caution: String/);
    const features = execFileSync('ogrinfo', ['-ro', '-al', '-geom=NO', file], { encoding: 'utf8' });
    const lowers = [...features.matchAll(/lower_ug_m3 \((?:Real|Integer)\) = ([\d.]+)/g)].map((match) => Number(match[1]));
    expect(lowers).toEqual([0.5, 1, 2, 5]);
    const cautions = [...features.matchAll(/caution \(String\) = (.*)/g)].map((match) => match[1]);
    expect(cautions).toEqual([SCREENING_CAUTION, SCREENING_CAUTION, SCREENING_CAUTION, SCREENING_CAUTION]);
    expect(features).toMatch(/upper_ug_m3 \((Real|Integer)\) = \(null\)/);
  });
});

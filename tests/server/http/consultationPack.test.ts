/**
 * The consultation pack of a scenario run, as downloads: the run made with pack "full" offers the files
 * `plumeplan run` writes (ground.tif, map.svg, map.png, report.html, report.pdf, receptors-with-caution.csv,
 * plumeplan-run.zip), each with its content type and `Content-Disposition: attachment`, and each is what it
 * claims, read back by outside tools: pdfinfo (Debian poppler-utils) sees A4 pages (ISO 216: 210 x 297 mm
 * = 595.28 x 841.89 pt), pdftotext the caution on page 1, gdalinfo (Debian gdal-bin) a float32 GeoTIFF in
 * the CRS asked for (EPSG:27700) with nodata and the caution, `unzip -t` a sound zip whose manifest
 * checksums (SHA-256) match its entries, and the PNG's signature and header (PNG spec, ISO/IEC 15948).
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { unzipSync } from 'fflate';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { smallScenario, startTestServer, waitFor, type TestServer } from '../serverFixture.ts';

let server: TestServer;
let scenarioId: string;
let fullRun: string;
let scratch: string;
const PACK_FILES = ['ground.tif', 'map.svg', 'map.png', 'report.html', 'report.pdf', 'receptors-with-caution.csv', 'plumeplan-run.zip'];
const squash = (text: string): string => text.replace(/\s+/g, ' ').trim();

const roadLayer = {
  name: 'Mill Lane (invented)',
  features: { type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: { type: 'LineString', coordinates: [[-2.292, 54.058], [-2.276, 54.064]] } }] },
};

beforeAll(async () => {
  server = await startTestServer();
  scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-pack-'));
  scenarioId = (await request(server.app).post('/api/scenarios').send({ scenario: smallScenario() }).expect(201)).body.id;
});
afterAll(async () => {
  await server.close();
  rmSync(scratch, { recursive: true, force: true });
});

async function finished(id: string): Promise<{ status: string; results: { name: string; contentType: string; sha256: string }[]; error: unknown }> {
  return waitFor(async () => {
    const response = await request(server.app).get(`/api/runs/${id}`).expect(200);
    return ['done', 'failed', 'cancelled', 'interrupted'].includes(response.body.status) ? response.body : undefined;
  });
}

async function download(id: string, name: string): Promise<{ bytes: Buffer; headers: Record<string, string> }> {
  const response = await request(server.app)
    .get(`/api/runs/${id}/results/${name}`)
    .buffer(true)
    .parse((res, callback) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => callback(null, Buffer.concat(chunks)));
    })
    .expect(200);
  return { bytes: response.body as Buffer, headers: response.headers as Record<string, string> };
}

async function saved(id: string, name: string): Promise<string> {
  const file = path.join(scratch, `${id}-${name}`);
  writeFileSync(file, (await download(id, name)).bytes);
  return file;
}

describe('consultation pack downloads', () => {
  it('a run with pack "full" makes every file plumeplan run writes, with content types and attachment names', async () => {
    const accepted = await request(server.app)
      .post('/api/runs')
      .send({ scenarioId, mode: 'gaussian', pack: 'full', crs: 'EPSG:27700', contextLayers: [roadLayer] })
      .expect(202);
    fullRun = accepted.body.id;
    const run = await finished(fullRun);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    const names = run.results.map((file) => file.name);
    for (const name of [...PACK_FILES, 'summary.json', 'receptors.csv', 'footprint.geojson', 'ground-field.bin']) expect(names).toContain(name);
    const types: Record<string, RegExp> = {
      'ground.tif': /^image\/tiff$/,
      'map.svg': /^image\/svg\+xml/,
      'map.png': /^image\/png$/,
      'report.html': /^text\/html/,
      'report.pdf': /^application\/pdf$/,
      'receptors-with-caution.csv': /^text\/csv/,
      'plumeplan-run.zip': /^application\/zip$/,
    };
    for (const [name, type] of Object.entries(types)) {
      const { headers, bytes } = await download(fullRun, name);
      expect(headers['content-type'], name).toMatch(type);
      expect(headers['content-disposition'], name).toBe(`attachment; filename="${name}"`);
      expect(Number(headers['content-length'])).toBe(bytes.length);
      expect(createHash('sha256').update(bytes).digest('hex')).toBe(run.results.find((file) => file.name === name)!.sha256);
    }
  });

  it('report.pdf: pdfinfo sees A4 pages; pdftotext finds the caution on page 1 and the receptor table', async () => {
    const file = await saved(fullRun, 'report.pdf');
    const info = execFileSync('pdfinfo', ['-f', '1', '-l', '99', file], { encoding: 'utf8' });
    const pages = Number(/^Pages:\s+(\d+)/m.exec(info)![1]);
    expect(pages).toBeGreaterThanOrEqual(2);
    for (const size of [...info.matchAll(/^Page\s+\d+ size:\s+(.*)$/gm)].map((match) => match[1].trim())) expect(size).toBe('595.28 x 841.89 pts (A4)');
    const first = squash(execFileSync('pdftotext', ['-f', '1', '-l', '1', file, '-'], { encoding: 'utf8' }));
    expect(first).toContain(SCREENING_CAUTION);
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    for (const id of ['fennick-row', 'school', 'care-home']) expect(text).toContain(id);
    // the reproducibility block names the request that made it
    expect(squash(text)).toContain('plumeplan server: POST /api/runs');
  });

  it('ground.tif: gdalinfo reads a float32 GeoTIFF in EPSG:27700 with nodata and the caution', async () => {
    const file = await saved(fullRun, 'ground.tif');
    const info = JSON.parse(execFileSync('gdalinfo', ['-json', file], { encoding: 'utf8' }));
    expect(info.driverShortName).toBe('GTiff');
    expect(info.coordinateSystem.wkt).toMatch(/ID\["EPSG",27700\]\]$/);
    expect(info.bands).toHaveLength(1);
    expect(info.bands[0].type).toBe('Float32');
    expect(info.bands[0].noDataValue).toBe(-9999);
    expect(info.metadata['']['TIFFTAG_IMAGEDESCRIPTION']).toContain(SCREENING_CAUTION);
  });

  it('plumeplan-run.zip: unzip -t finds it sound; the manifest lists every file with its SHA-256, the scenario and the caution', async () => {
    const file = await saved(fullRun, 'plumeplan-run.zip');
    expect(execFileSync('unzip', ['-t', file], { encoding: 'utf8' })).toMatch(/No errors detected/);
    const entries = unzipSync(new Uint8Array((await download(fullRun, 'plumeplan-run.zip')).bytes));
    const manifest = JSON.parse(new TextDecoder().decode(entries['manifest.json']));
    expect(manifest.caution).toBe(SCREENING_CAUTION);
    for (const listed of manifest.files as { name: string; bytes: number; sha256: string }[]) {
      const entry = entries[listed.name];
      expect(entry, listed.name).toBeDefined();
      expect(entry.length).toBe(listed.bytes);
      expect(createHash('sha256').update(entry).digest('hex'), listed.name).toBe(listed.sha256);
    }
    expect(createHash('sha256').update(entries[manifest.scenario.file]).digest('hex')).toBe(manifest.scenario.sha256);
    // the zip holds the very files the run serves
    for (const name of ['summary.json', 'report.pdf', 'ground.tif', 'map.png']) {
      expect(Buffer.from(entries[name]).equals((await download(fullRun, name)).bytes), name).toBe(true);
    }
  });

  it('map.png is a PNG with its stated size; map.svg and report.html carry the caution and the context layer', async () => {
    const png = (await download(fullRun, 'map.png')).bytes;
    expect(png.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))).toBe(true);
    expect(png.subarray(12, 16).toString('ascii')).toBe('IHDR');
    // the size docs/http-api.md states: 2000 x 1580 px (IHDR width and height, big-endian)
    expect([png.readUInt32BE(16), png.readUInt32BE(20)]).toEqual([2000, 1580]);
    const svg = (await download(fullRun, 'map.svg')).bytes.toString('utf8');
    expect(squash(svg.replace(/<[^>]+>/g, ' '))).toContain('Screening estimate only');
    expect(svg).toContain('Mill Lane (invented)');
    const html = (await download(fullRun, 'report.html')).bytes.toString('utf8');
    expect(squash(html.replace(/<[^>]+>/g, ' '))).toContain(squash(SCREENING_CAUTION));
  });

  it('a later request without a pack is answered by the run with the larger pack', async () => {
    // the full run asked for EPSG:27700 and a layer; a request without a pack needs neither, so it is answered
    const again = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian' }).expect(200);
    expect(again.body).toMatchObject({ id: fullRun, reused: true });
  });

  it('levels as percentages of a standard (plumeplan run --percent-of) set the footprint; such a run is not answered by one with other levels', async () => {
    const accepted = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian', percentOf: 'NO2 1-hour mean', levels_ug_m3: [1, 10] }).expect(202);
    expect(accepted.body.reused).toBe(false);
    const run = await finished(accepted.body.id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    const summary = JSON.parse((await download(accepted.body.id, 'summary.json')).bytes.toString('utf8'));
    // 1 % and 10 % of the demo's invented 200 ug/m3 one-hour limit
    expect(summary.footprint.levels_ug_m3).toEqual([2, 20]);
    expect(summary.footprint.levelsBasis).toContain('NO2 1-hour mean');
    const unknown = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian', percentOf: 'PM10 daily mean' }).expect(422);
    expect(unknown.body.field).toBe('percentOf');
  });

  it('pack "quick" leaves out map.png and report.pdf', async () => {
    const accepted = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian', pack: 'quick' }).expect(202);
    const run = await finished(accepted.body.id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    const names = run.results.map((file) => file.name);
    for (const name of ['ground.tif', 'map.svg', 'report.html', 'plumeplan-run.zip']) expect(names).toContain(name);
    expect(names).not.toContain('map.png');
    expect(names).not.toContain('report.pdf');
    const info = JSON.parse(execFileSync('gdalinfo', ['-json', await saved(accepted.body.id, 'ground.tif')], { encoding: 'utf8' }));
    // the default CRS: the site's WGS 84 UTM zone (lon -2.28: zone 30 north, EPSG:32630)
    expect(info.coordinateSystem.wkt).toMatch(/ID\["EPSG",32630\]\]$/);
  });

  it.each([
    ['an unknown pack', { pack: 'everything' }, 'pack'],
    ['a CRS plumeplan does not know', { pack: 'quick', crs: 'EPSG:4979' }, 'crs'],
    ['a CRS that is no EPSG code', { pack: 'quick', crs: 'british grid' }, 'crs'],
    ['a CRS without a pack', { crs: 'EPSG:27700' }, 'crs'],
    ['a context layer of non-features', { pack: 'quick', contextLayers: [{ name: 'x', features: [{ type: 'Point', coordinates: [0, 0] }] }] }, 'contextLayers[0].features[0]'],
    ['a context layer without a name', { pack: 'quick', contextLayers: [{ features: [] }] }, 'contextLayers[0].name'],
    ['levels that do not increase', { levels_ug_m3: [5, 5] }, 'levels_ug_m3[1]'],
    ['a resolution check that is not a boolean', { resolutionCheck: 'yes' }, 'resolutionCheck'],
  ])('%s is refused (400) naming the field, and the server still serves', async (_what, options, field) => {
    const response = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian', ...options }).expect(400);
    expect(response.body.field).toBe(field);
    await request(server.app).get('/api/health').expect(200);
  });
});

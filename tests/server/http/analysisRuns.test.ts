/**
 * Compare, sweep, stack-height and site runs through the server's job machinery (real worker threads):
 * each runs to done on a small scenario in Gaussian mode, and its result files are byte for byte what the
 * function the CLI command shares with the job builds (the figures come from the same computation, so
 * this checks the plumbing, not the physics: the physics has its own tests against published values).
 * Then bad input for each kind is answered 4xx naming the field, with the server still serving, and a
 * running sweep is cancelled.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { runScenario } from '../../../solver/drivers/runScenario.ts';
import { buildComparisonFiles } from '../../../server/analyses/comparison.ts';
import { computeSiting } from '../../../server/analyses/siting.ts';
import { buildStackHeightFiles, computeStackHeight, resolveStackHeightTarget } from '../../../server/analyses/stackHeight.ts';
import { buildSweepFiles, computeSweep, type MemberLanes } from '../../../server/analyses/sweep.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { buildSitingFiles } from '../../../server/writers/siting.ts';
import { buildResultFiles } from '../../../server/writers/writeResultFolder.ts';
import { smallScenario, startTestServer, waitFor, type TestServer } from '../serverFixture.ts';

let server: TestServer;
let scenarioId: string;
let scenario: Scenario;
let otherId: string;
let other: Scenario;

const gaussianMembers: MemberLanes = { runMember: (member) => runScenario(member, { mode: 'gaussian' }), lanes: 1 };

function parsed(raw: unknown): Scenario {
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}

beforeAll(async () => {
  server = await startTestServer();
  const raw = smallScenario();
  scenario = parsed(raw);
  scenarioId = (await request(server.app).post('/api/scenarios').send({ scenario: raw }).expect(201)).body.id;
  const taller = smallScenario({ name: 'Merrowdene with a taller stack (invented)' });
  (taller.sources as { id: string; height_m?: number }[])[0].height_m = 45;
  other = parsed(taller);
  otherId = (await request(server.app).post('/api/scenarios').send({ scenario: taller }).expect(201)).body.id;
});
afterAll(async () => {
  await server.close();
});

async function finished(id: string): Promise<{ status: string; results: { name: string; contentType: string }[]; error: unknown; options: Record<string, unknown> }> {
  return waitFor(async () => {
    const response = await request(server.app).get(`/api/runs/${id}`).expect(200);
    return ['done', 'failed', 'cancelled', 'interrupted'].includes(response.body.status) ? response.body : undefined;
  });
}

async function download(id: string, name: string): Promise<{ bytes: Buffer; contentType: string }> {
  const response = await request(server.app)
    .get(`/api/runs/${id}/results/${name}`)
    .buffer(true)
    .parse((res, callback) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => callback(null, Buffer.concat(chunks)));
    })
    .expect(200);
  return { bytes: response.body as Buffer, contentType: String(response.headers['content-type']) };
}

/** Every built file equals the downloaded one, byte for byte. */
async function expectSameFiles(id: string, built: readonly [string, string | Uint8Array][], except: (name: string, text: string) => string = (_n, text) => text): Promise<void> {
  for (const [name, content] of built) {
    const { bytes } = await download(id, name);
    const expected = typeof content === 'string' ? Buffer.from(content, 'utf8') : Buffer.from(content);
    if (/\.(json|svg|html)$/.test(name)) expect(except(name, bytes.toString('utf8')), name).toBe(except(name, expected.toString('utf8')));
    else expect(bytes.equals(expected), name).toBe(true);
  }
}

/** A JSON file without its "run" block (timings of the solve, which differ from run to run). */
function withoutRunTimings(_name: string, text: string): string {
  const json = JSON.parse(text);
  delete json.run;
  return JSON.stringify(json);
}

/** siting.json without its timings; the figure and report without their date (the job's and the test's differ). */
function withoutSitingTimes(name: string, text: string): string {
  return name.endsWith('.json') ? withoutRunTimings(name, text) : text.replace(/\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ/g, 'DATE');
}

async function submit(body: Record<string, unknown>, status = 202): Promise<string> {
  const response = await request(server.app).post('/api/runs').send(body);
  expect(response.status, JSON.stringify(response.body)).toBe(status);
  return response.body.id;
}

describe('analysis runs', () => {
  it('sweep: runs to done and stores sweep.csv, sweep.svg, sweep.json as the CLI builds them', async () => {
    const body = { kind: 'sweep', scenarioId, mode: 'gaussian', parameter: 'stackHeight_m', values: [20, 40, 60] };
    const id = await submit(body);
    const run = await finished(id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    expect(run.options).toMatchObject({ mode: 'gaussian', parameter: 'stackHeight_m', values: [20, 40, 60] });
    expect(run.results.map((file) => file.name).sort()).toEqual(['sweep.csv', 'sweep.json', 'sweep.svg']);
    const sweep = await computeSweep(scenario, { parameter: 'stackHeight_m', values: [20, 40, 60] }, gaussianMembers, {});
    await expectSameFiles(id, buildSweepFiles(sweep, scenario.name));
    const json = JSON.parse((await download(id, 'sweep.json')).bytes.toString('utf8'));
    expect(json.caution).toBe(SCREENING_CAUTION);
    expect((await download(id, 'sweep.csv')).contentType).toMatch(/^text\/csv/);
    // an identical submission is the finished run
    const again = await request(server.app).post('/api/runs').send(body).expect(200);
    expect(again.body).toMatchObject({ id, reused: true, status: 'done' });
  });

  it('stack-height: runs to done with a target as % of a standard and stores the CLI files', async () => {
    const options = { targetPercent: 10, standard: 'NO2 1-hour mean', minHeight_m: 10, maxHeight_m: 120, tolerance_m: 5 };
    const id = await submit({ kind: 'stack-height', scenarioId, mode: 'gaussian', ...options });
    const run = await finished(id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    expect(run.results.map((file) => file.name).sort()).toEqual(['stack-height.csv', 'stack-height.json', 'stack-height.svg']);
    const requestOptions = { ...options, at: 'ground' as const };
    const target = resolveStackHeightTarget(scenario, requestOptions);
    expect(target.target_ug_m3).toBe(20); // 10 % of the 200 ug/m3 limit
    const result = await computeStackHeight(scenario, requestOptions, target.target_ug_m3, gaussianMembers, {});
    await expectSameFiles(id, buildStackHeightFiles(result, scenario.name, target.basis));
  });

  it('site: runs to done with candidates and stores the CLI files (siting.json without its timings)', async () => {
    const candidates = [
      { id: 'north', lon: -2.2841, lat: 54.0630 },
      { id: 'south', lon: -2.2841, lat: 54.0595 },
    ];
    const id = await submit({ kind: 'site', scenarioId, mode: 'gaussian', candidates, spacing_m: 100, quick: true });
    const run = await finished(id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    const names = run.results.map((file) => file.name).sort();
    // the combined map, then one raster per receptor (the demo's three, at most MAX_RECEPTOR_RASTERS); quick: the figure's SVG and the report's HTML
    expect(names).toEqual([
      'candidates.csv', 'siting-map-care-home.tif', 'siting-map-fennick-row.tif', 'siting-map-school.tif', 'siting-map.svg', 'siting-map.tif',
      'siting-report.html', 'siting.geojson', 'siting.json',
    ]);
    expect(run.results.find((file) => file.name === 'siting-map.tif')?.contentType).toBe('image/tiff');
    const result = await computeSiting(scenario, { mode: 'gaussian', candidates, spacing_m: 100 }, undefined, {});
    const built = await buildSitingFiles(result, { site: scenario.site, scenario, command: 'POST /api/runs {"kind": "site"}', outputs: 'quick' });
    await expectSameFiles(id, built, withoutSitingTimes);
    const report = (await download(id, 'siting-report.html')).bytes.toString('utf8');
    expect(report).toContain(SCREENING_CAUTION);
  });

  it('site: without quick also stores the rendered figure and report (siting-map.png, siting-report.pdf)', async () => {
    const id = await submit({ kind: 'site', scenarioId, mode: 'gaussian', candidates: [{ id: 'north', lon: -2.2841, lat: 54.0630 }] });
    const run = await finished(id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    const types = Object.fromEntries(run.results.map((file) => [file.name, file.contentType]));
    expect(types['siting-map.png']).toBe('image/png');
    expect(types['siting-report.pdf']).toBe('application/pdf');
    const pdf = (await download(id, 'siting-report.pdf')).bytes;
    expect(pdf.subarray(0, 5).toString('ascii')).toBe('%PDF-');
  });

  let scenarioRunA: string;
  let scenarioRunB: string;

  it('compare: two stored scenarios run to done; comparison.json, difference.geojson and each side as the CLI builds them', async () => {
    const id = await submit({ kind: 'compare', a: { scenarioId }, b: { scenarioId: otherId, revision: 1 }, mode: 'gaussian' });
    const run = await finished(id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    const names = run.results.map((file) => file.name);
    expect(names).toContain('comparison.json');
    expect(names).toContain('difference.geojson');
    expect(names).toContain('a.summary.json');
    expect(names).toContain('b.receptors.csv');
    const resultA = await runScenario(scenario, { mode: 'gaussian' });
    const resultB = await runScenario(other, { mode: 'gaussian' });
    const built = buildComparisonFiles(
      { source: `scenario ${scenarioId} revision 1`, scenario, result: resultA },
      { source: `scenario ${otherId} revision 1`, scenario: other, result: resultB },
      undefined,
    );
    await expectSameFiles(id, built.files);
    const sideA = buildResultFiles(scenario, resultA, built.sideOptions).contents.map(([name, text]) => [`a.${name}`, text] as [string, string]);
    const sideB = buildResultFiles(other, resultB, built.sideOptions).contents.map(([name, text]) => [`b.${name}`, text] as [string, string]);
    // summary.json's run block holds the solve's wall time: everything else is the same
    await expectSameFiles(id, [...sideA, ...sideB], withoutRunTimings);
    const comparison = JSON.parse((await download(id, 'comparison.json')).bytes.toString('utf8'));
    expect(comparison.caution).toBe(SCREENING_CAUTION);
  });

  it('compare: two finished runs compare as their scenario revisions and modes', async () => {
    scenarioRunA = await submit({ scenarioId, mode: 'gaussian' });
    scenarioRunB = await submit({ scenarioId: otherId, mode: 'gaussian' });
    expect((await finished(scenarioRunA)).status).toBe('done');
    expect((await finished(scenarioRunB)).status).toBe('done');
    const id = await submit({ kind: 'compare', a: { runId: scenarioRunA }, b: { runId: scenarioRunB } });
    const run = await finished(id);
    expect(run.status, JSON.stringify(run.error)).toBe('done');
    expect(run.options).toMatchObject({ a: { scenarioId, revision: 1, mode: 'gaussian', runId: scenarioRunA }, b: { scenarioId: otherId, mode: 'gaussian', runId: scenarioRunB } });
    const comparison = JSON.parse((await download(id, 'comparison.json')).bytes.toString('utf8'));
    expect(comparison.a.label).toContain(`run ${scenarioRunA}`);
    // the same figures as the comparison of the stored scenarios: only the labels differ
    const resultA = await runScenario(scenario, { mode: 'gaussian' });
    const resultB = await runScenario(other, { mode: 'gaussian' });
    const built = buildComparisonFiles({ source: `run ${scenarioRunA}`, scenario, result: resultA }, { source: `run ${scenarioRunB}`, scenario: other, result: resultB });
    await expectSameFiles(id, built.files);
  });

  it.each(
    (
      [
    ['unknown scenario (sweep)', { kind: 'sweep', scenarioId: '00000000-0000-4000-8000-000000000000', parameter: 'stackHeight_m', values: [10] }, 404, 'id'],
    ['unknown scenario (stack-height)', { kind: 'stack-height', scenarioId: '00000000-0000-4000-8000-000000000000', target_ug_m3: 5 }, 404, 'id'],
    ['unknown scenario (site)', { kind: 'site', scenarioId: '00000000-0000-4000-8000-000000000000' }, 404, 'id'],
    ['unknown kind', { kind: 'forecast', scenarioId: 'x' }, 400, 'kind'],
    ['bad parameter name', { kind: 'sweep', parameter: 'chimneyHeight', values: [10] }, 400, 'parameter'],
    ['empty values', { kind: 'sweep', parameter: 'stackHeight_m', values: [] }, 400, 'values'],
    ['a value that is not a number', { kind: 'sweep', parameter: 'stackHeight_m', values: [10, 'tall'] }, 400, 'values[1]'],
    ['a value out of range', { kind: 'sweep', parameter: 'stackHeight_m', values: [30, -5] }, 422, 'values[1]'],
    ['a half-life of zero', { kind: 'sweep', parameter: 'halfLife_h', values: [0] }, 422, 'values[0]'],
    ['an unknown sweep source', { kind: 'sweep', parameter: 'stackHeight_m', values: [30], sourceId: 'fuel-yard' }, 422, 'sourceId'],
    ['an unknown field', { kind: 'sweep', parameter: 'stackHeight_m', values: [30], colour: 'red' }, 400, 'colour'],
    ['stack-height without a target', { kind: 'stack-height' }, 400, 'target_ug_m3'],
    ['stack-height with a negative target', { kind: 'stack-height', target_ug_m3: -1 }, 400, 'target_ug_m3'],
    ['stack-height: an unknown standard', { kind: 'stack-height', targetPercent: 1, standard: 'PM10 daily' }, 422, 'standard'],
    ['stack-height: max above the grid top', { kind: 'stack-height', target_ug_m3: 5, maxHeight_m: 5000 }, 422, 'maxHeight_m'],
    ['stack-height: max below min', { kind: 'stack-height', target_ug_m3: 5, minHeight_m: 50, maxHeight_m: 40 }, 400, 'maxHeight_m'],
    ['stack-height: an unknown receptor', { kind: 'stack-height', target_ug_m3: 5, at: ['school', 'town-hall'] }, 422, 'at[1]'],
    ['site: an unknown stack', { kind: 'site', stackId: 'fuel-yard' }, 422, 'stackId'],
    ['site: candidates that are not points', { kind: 'site', candidates: { type: 'FeatureCollection', features: [{ type: 'Feature', geometry: { type: 'LineString', coordinates: [] } }] } }, 400, 'candidates.features[0]'],
    ['site: a candidate off the globe', { kind: 'site', candidates: [{ lon: 200, lat: 54 }] }, 400, 'candidates[0]'],
    ['site: a polygon that is not one', { kind: 'site', sitePolygon: { type: 'Point', coordinates: [0, 0] } }, 400, 'sitePolygon'],
    ['site: weights that do not match the receptors', { kind: 'site', weights: [1, 2] }, 400, 'weights'],
    ['site: an unknown receptor', { kind: 'site', receptorIds: ['school', 'mill'] }, 422, 'receptorIds[1]'],
    ['site: levels that do not increase', { kind: 'site', levels_ug_m3: [5, 2] }, 400, 'levels_ug_m3[1]'],
    ['compare: a side with neither scenario nor run', { kind: 'compare', a: {}, b: { scenarioId: 'SCENARIO' } }, 400, 'a'],
    ['compare: an unknown scenario', { kind: 'compare', a: { scenarioId: 'SCENARIO' }, b: { scenarioId: '00000000-0000-4000-8000-000000000000' } }, 404, 'b.scenarioId'],
    ['compare: an unknown run', { kind: 'compare', a: { runId: '00000000-0000-4000-8000-000000000000' }, b: { scenarioId: 'SCENARIO' } }, 404, 'a.runId'],
    ['compare: an unknown revision', { kind: 'compare', a: { scenarioId: 'SCENARIO', revision: 9 }, b: { scenarioId: 'SCENARIO' } }, 404, 'a.revision'],
      ] as [string, Record<string, unknown>, number, string][]
    ).map(([what, body, status, field]) => [what, status, field, body] as const),
  )('%s is answered %i naming %s, and the server still serves', async (_what, status, field, body) => {
    const filled = JSON.parse(JSON.stringify(body).replaceAll('SCENARIO', scenarioId));
    if (!('scenarioId' in filled) && filled.kind !== 'compare') filled.scenarioId = scenarioId;
    const response = await request(server.app).post('/api/runs').send({ mode: 'gaussian', ...filled });
    expect(response.status, JSON.stringify(response.body)).toBe(status);
    expect(response.body.field).toBe(field);
    expect(typeof response.body.error).toBe('string');
    await request(server.app).get('/api/health').expect(200);
  });

  it('compare: a run that is not done (409) or not a scenario run (422) is refused naming the side', async () => {
    const sweeps = (await request(server.app).get('/api/runs?limit=100').expect(200)).body.items as { id: string; kind: string }[];
    const sweepRun = sweeps.find((run) => run.kind === 'sweep')!;
    const notScenario = await request(server.app).post('/api/runs').send({ kind: 'compare', a: { scenarioId }, b: { runId: sweepRun.id } }).expect(422);
    expect(notScenario.body.field).toBe('b.runId');

    const big = smallScenario({ name: 'Finer grid, not done yet (invented)', domain: { halfWidth_m: 2500, spacing_m: 25, height_m: 1000, layers: 30 } });
    const created = await request(server.app).post('/api/scenarios').send({ scenario: big }).expect(201);
    const running = await submit({ scenarioId: created.body.id, mode: 'grid' });
    const notDone = await request(server.app).post('/api/runs').send({ kind: 'compare', a: { runId: running }, b: { scenarioId } }).expect(409);
    expect(notDone.body).toMatchObject({ field: 'a.runId', allowed: 'a run whose status is done' });
    await request(server.app).post(`/api/runs/${running}/cancel`).expect(200);
    // a cancelled run is stale for a comparison too
    const stale = await request(server.app).post('/api/runs').send({ kind: 'compare', a: { runId: running }, b: { scenarioId } }).expect(409);
    expect(stale.body.field).toBe('a.runId');
  });

  it('cancels a running sweep: progress within a member streams first; then cancelled, no results, the executor free again', async () => {
    const big = smallScenario({ name: 'Finer grid sweep to cancel (invented)', domain: { halfWidth_m: 2500, spacing_m: 25, height_m: 1000, layers: 30 } });
    const created = await request(server.app).post('/api/scenarios').send({ scenario: big }).expect(201);
    const id = await submit({ kind: 'sweep', scenarioId: created.body.id, mode: 'grid', parameter: 'stackHeight_m', values: [20, 30, 40, 50] });
    // the progress stream: read until an event names the first member's own progress
    const heard = await new Promise<{ status: string; progress: number; message: string }>((resolve, reject) => {
      const stream = request(server.app)
        .get(`/api/runs/${id}/events`)
        .buffer(false)
        .parse((response, callback) => {
          let text = '';
          response.setEncoding('utf8');
          response.on('data', (chunk: string) => {
            text += chunk;
            const found = [...text.matchAll(/^data: (.*)$/gm)].map((match) => JSON.parse(match[1])).find((data) => /^member 1 of 4: /.test(data.message));
            if (found !== undefined) {
              resolve(found);
              (response as unknown as { destroy(): void }).destroy();
            }
          });
          response.on('end', () => callback(null, text));
          response.on('error', () => callback(null, text));
        });
      stream.then(() => reject(new Error('the stream ended before a member reported progress')), () => undefined);
    });
    expect(heard.status).toBe('running');
    expect(heard.progress).toBeGreaterThanOrEqual(0);
    expect(heard.progress).toBeLessThan(0.25);
    const cancelled = await request(server.app).post(`/api/runs/${id}/cancel`).expect(200);
    expect(cancelled.body).toMatchObject({ status: 'cancelled', results: [] });
    expect(server.services.manager.activity().running).toBe(0);
    await request(server.app).get(`/api/runs/${id}/results/sweep.csv`).expect(409);
  });

  it('lists the new kinds, the pack options, the warnings and the progress stream token in the OpenAPI document', async () => {
    const document = (await request(server.app).get('/api/openapi.json').expect(200)).body;
    const schemas = document.components.schemas;
    expect(Object.keys(schemas)).toEqual(expect.arrayContaining(['CompareRequest', 'SweepRequest', 'StackHeightRequest', 'SiteRequest']));
    expect(schemas.SweepRequest.properties.parameter.enum).toContain('stackHeight_m');
    expect(schemas.Run.properties.kind.enum).toEqual(['scenario', 'compare', 'sweep', 'stack-height', 'site']);
    expect(schemas.RunRequest.oneOf.map((entry: { $ref: string }) => entry.$ref.split('/').at(-1))).toEqual([
      'ScenarioRunRequest',
      'CompareRequest',
      'SweepRequest',
      'StackHeightRequest',
      'SiteRequest',
    ]);
    expect(Object.keys(schemas.ScenarioRunRequest.properties)).toEqual(expect.arrayContaining(['pack', 'crs', 'contextLayers']));
    expect(Object.keys(schemas.Validation.properties)).toContain('warnings');
    const events = document.paths['/api/runs/{id}/events'].parameters.map((parameter: { name: string }) => parameter.name);
    expect(events).toContain('access_token');
    expect(document.paths['/api/runs/{id}/assessment'].get).toBeDefined();
  });
});

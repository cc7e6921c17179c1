/**
 * Behaviour of the run routes with real worker threads: a run is accepted at once (202), computes in
 * the background, reports progress as server-sent events, and its results download; an identical
 * submission is answered by the earlier run; a cancelled run stops.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeGroundField } from '../../../server/writers/groundField.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { smallScenario, startTestServer, waitFor, type TestServer } from '../serverFixture.ts';

let server: TestServer;
let scenarioId: string;

beforeAll(async () => {
  server = await startTestServer();
  const created = await request(server.app).post('/api/scenarios').send({ scenario: smallScenario() }).expect(201);
  scenarioId = created.body.id;
});
afterAll(async () => {
  await server.close();
});

async function runUntilFinished(id: string): Promise<Record<string, unknown>> {
  return waitFor(async () => {
    const response = await request(server.app).get(`/api/runs/${id}`).expect(200);
    return ['done', 'failed', 'cancelled', 'interrupted'].includes(response.body.status) ? (response.body as Record<string, unknown>) : undefined;
  });
}

/** Read a whole server-sent event stream into its events. */
function parseEvents(text: string): { event: string; data: { status: string; progress: number } }[] {
  return text
    .split('\n\n')
    .map((block) => {
      const event = /^event: (.*)$/m.exec(block)?.[1];
      const data = /^data: (.*)$/m.exec(block)?.[1];
      return event === undefined || data === undefined ? null : { event, data: JSON.parse(data) };
    })
    .filter((entry): entry is { event: string; data: { status: string; progress: number } } => entry !== null);
}

describe('runs', () => {
  let gaussianRun: string;

  it('accepts a run at once (202), streams its progress and finishes with every result file', async () => {
    const accepted = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian' }).expect(202);
    expect(accepted.body).toMatchObject({ reused: false, url: `/api/runs/${accepted.body.id}` });
    expect(['queued', 'running']).toContain(accepted.body.status);
    gaussianRun = accepted.body.id;

    const stream = await request(server.app).get(`/api/runs/${gaussianRun}/events`).buffer(true).parse((response, callback) => {
      let text = '';
      response.setEncoding('utf8');
      response.on('data', (chunk: string) => (text += chunk));
      response.on('end', () => callback(null, text));
    });
    expect(stream.headers['content-type']).toMatch(/^text\/event-stream/);
    const events = parseEvents(stream.body as string);
    expect(events.at(-1)).toMatchObject({ event: 'status', data: { status: 'done', progress: 1 } });

    const run = await runUntilFinished(gaussianRun);
    expect(run).toMatchObject({ status: 'done', mode: 'gaussian', revision: 1, kind: 'scenario', error: null });
    const names = (run.results as { name: string }[]).map((file) => file.name).sort();
    expect(names).toEqual(['footprint.geojson', 'ground-field.bin', 'receptors.csv', 'summary.json']);
  });

  it('serves the results: summary with the caution, receptors CSV, footprint GeoJSON, ground field binary', async () => {
    const summary = await request(server.app).get(`/api/runs/${gaussianRun}/results/summary.json`).expect(200);
    expect(summary.headers['content-type']).toMatch(/^application\/json/);
    expect(summary.body.caution).toBe(SCREENING_CAUTION);
    expect(summary.body.grid).toMatchObject({ nx: 50, ny: 50 });

    const csv = await request(server.app).get(`/api/runs/${gaussianRun}/results/receptors.csv`).expect(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.text.split('\r\n')[0]).toBe('id,name,lat,lon,x_m,y_m,height_m,concentration_ug_m3');

    const footprint = await request(server.app).get(`/api/runs/${gaussianRun}/results/footprint.geojson`).expect(200);
    const geojson = JSON.parse(footprint.text);
    expect(geojson.type).toBe('FeatureCollection');
    expect(geojson.properties.caution).toBe(SCREENING_CAUTION);

    const binary = await request(server.app)
      .get(`/api/runs/${gaussianRun}/results/ground-field.bin`)
      .buffer(true)
      .parse((response, callback) => {
        const chunks: Buffer[] = [];
        response.on('data', (chunk: Buffer) => chunks.push(chunk));
        response.on('end', () => callback(null, Buffer.concat(chunks)));
      })
      .expect(200);
    const field = decodeGroundField(new Uint8Array(binary.body as Buffer));
    expect(field.header).toMatchObject({ nx: 50, ny: 50, spacing_m: 100, origin: { x_m: -2500, y_m: -2500 }, units: 'ug/m3', caution: SCREENING_CAUTION });
    expect(field.values).toHaveLength(2500);
    // The field's largest value, rounded to 3 significant figures, is the summary's largest peak (the demo
    // gives a site boundary: the peak off the site or the one on it, kept as peak.onSite): the same ground
    // field, written twice.
    let max = 0;
    for (const value of field.values) max = Math.max(max, value);
    const peak = summary.body.peak;
    expect(Number(max.toPrecision(3))).toBeCloseTo(Math.max(peak.concentration_ug_m3, peak.onSite?.concentration_ug_m3 ?? 0), 6);
  });

  it('serves the assessment figures of a finished run with the caution', async () => {
    const response = await request(server.app).get(`/api/runs/${gaussianRun}/assessment`).expect(200);
    expect(response.body.caution).toBe(SCREENING_CAUTION);
    // The test scenario is the demo's: one steady state with two NO2 standards and a background.
    expect(response.body.assessment).toMatchObject({ background_ug_m3: 14 });
    expect(response.body.assessment.standards).toHaveLength(2);
    expect(response.body.peak.concentration_ug_m3).toBeGreaterThan(0);
    // The screening verdicts and footprint areas are summary.json's, served as they are there.
    const summary = await request(server.app).get(`/api/runs/${gaussianRun}/results/summary.json`).expect(200);
    const written = JSON.parse(summary.text) as { verdicts: unknown; footprint: { areas: unknown[] } };
    expect(response.body.verdicts).toEqual(written.verdicts);
    expect(response.body.verdicts).not.toBeNull();
    expect(response.body.areas).toEqual(written.footprint.areas);
    expect(response.body.areas.length).toBeGreaterThan(0);
  });

  it('answers an identical submission with the earlier run instead of solving twice', async () => {
    const again = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian' }).expect(200);
    expect(again.body).toMatchObject({ id: gaussianRun, reused: true, status: 'done' });
    const list = await request(server.app).get(`/api/runs?scenarioId=${scenarioId}`).expect(200);
    expect(list.body.total).toBe(1);
  });

  it('runs a changed revision anew', async () => {
    await request(server.app).put(`/api/scenarios/${scenarioId}`).send({ scenario: smallScenario({ name: 'Changed (invented)' }), revision: 1 }).expect(200);
    const accepted = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian' }).expect(202);
    expect(accepted.body.id).not.toBe(gaussianRun);
    const run = await runUntilFinished(accepted.body.id);
    expect(run).toMatchObject({ status: 'done', revision: 2 });
  });

  it('runs grid mode and reports a mass budget', async () => {
    const accepted = await request(server.app).post('/api/runs').send({ scenarioId, revision: 1, mode: 'grid' }).expect(202);
    const run = await runUntilFinished(accepted.body.id);
    expect(run).toMatchObject({ status: 'done', revision: 1, mode: 'grid' });
    const summary = await request(server.app).get(`/api/runs/${accepted.body.id}/results/summary.json`).expect(200);
    expect(Math.abs(summary.body.massBudget_g.relativeImbalance)).toBeLessThan(1e-3);
  });

  it('cancels a running run: cancelled, no results, and a second cancel is refused (409)', async () => {
    const big = smallScenario({ name: 'Finer grid to cancel (invented)', domain: { halfWidth_m: 2500, spacing_m: 25, height_m: 1000, layers: 30 } });
    const created = await request(server.app).post('/api/scenarios').send({ scenario: big }).expect(201);
    const accepted = await request(server.app).post('/api/runs').send({ scenarioId: created.body.id }).expect(202);
    await waitFor(async () => {
      const response = await request(server.app).get(`/api/runs/${accepted.body.id}`);
      return response.body.status === 'running' ? true : undefined;
    });
    const cancelled = await request(server.app).post(`/api/runs/${accepted.body.id}/cancel`).expect(200);
    expect(cancelled.body).toMatchObject({ status: 'cancelled', results: [] });
    const again = await request(server.app).post(`/api/runs/${accepted.body.id}/cancel`).expect(409);
    expect(again.body.field).toBe('id');
    const results = await request(server.app).get(`/api/runs/${accepted.body.id}/results/summary.json`).expect(409);
    expect(results.body.field).toBe('id');
    expect(server.services.manager.activity().running).toBe(0);
  });
});

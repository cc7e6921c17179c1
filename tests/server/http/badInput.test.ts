/**
 * Bad input of every kind the issue lists (and more): each is answered 4xx as JSON naming the field,
 * nothing saved is lost, and the server keeps serving afterwards.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ManualExecutor, smallScenario, startTestServer, type TestServer } from '../serverFixture.ts';

let server: TestServer;
let executor: ManualExecutor;
let scenarioId: string;
let finishedRunId: string;
let largeGridScenarioId: string;

beforeAll(async () => {
  executor = new ManualExecutor();
  server = await startTestServer({ executor, bodyLimit_bytes: 256 * 1024, limits: { maxCellsPerRun: 200_000, maxActiveRunsPerClient: 2 } });
  const created = await request(server.app).post('/api/scenarios').send({ scenario: smallScenario() }).expect(201);
  scenarioId = created.body.id;
  await request(server.app).put(`/api/scenarios/${scenarioId}`).send({ scenario: smallScenario({ name: 'Second (invented)' }), revision: 1 }).expect(200);
  const large = smallScenario({ name: 'Fine grid (invented)', domain: { halfWidth_m: 2500, spacing_m: 10, height_m: 1000, layers: 10 } });
  largeGridScenarioId = (await request(server.app).post('/api/scenarios').send({ scenario: large }).expect(201)).body.id;
  const accepted = await request(server.app).post('/api/runs').send({ scenarioId, mode: 'gaussian' }).expect(202);
  finishedRunId = accepted.body.id;
  executor.emit(finishedRunId, { type: 'started' });
  executor.emit(finishedRunId, { type: 'failed', error: { error: 'test failure', field: null } });
});
afterAll(async () => {
  await server.close();
});

function withSource(change: Record<string, unknown>): Record<string, unknown> {
  const scenario = smallScenario();
  const sources = scenario.sources as Record<string, unknown>[];
  sources[0] = { ...sources[0], ...change };
  return scenario;
}

function deeplyNested(depth: number): string {
  return `{"scenario":${'['.repeat(depth)}${']'.repeat(depth)}}`;
}

interface BadCase {
  name: string;
  send: () => request.Test;
  status: number;
  field: string | RegExp;
}

const SCRIPT = '<script>alert(1)</script>';

const cases: BadCase[] = [
  { name: 'malformed JSON', send: () => request(server.app).post('/api/scenarios').set('Content-Type', 'application/json').send('{"scenario": {'), status: 400, field: '(body)' },
  { name: 'NaN in JSON', send: () => request(server.app).post('/api/scenarios').set('Content-Type', 'application/json').send('{"scenario": {"x": NaN}}'), status: 400, field: '(body)' },
  { name: 'Infinity in JSON', send: () => request(server.app).post('/api/runs').set('Content-Type', 'application/json').send('{"scenarioId": Infinity}'), status: 400, field: '(body)' },
  { name: 'a number overflowing to infinity (1e999)', send: () => request(server.app).post('/api/scenarios').set('Content-Type', 'application/json').send(JSON.stringify({ scenario: withSource({ emission_g_s: 1 }) }).replace('"emission_g_s":1', '"emission_g_s":1e999')), status: 422, field: 'scenario.sources[0].emission_g_s' },
  { name: 'huge body', send: () => request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ name: 'x'.repeat(400 * 1024) }) }), status: 413, field: '(body)' },
  { name: 'deep nesting', send: () => request(server.app).post('/api/validate').set('Content-Type', 'application/json').send(deeplyNested(5000)), status: 400, field: '(body)' },
  { name: 'not JSON at all (text/plain)', send: () => request(server.app).post('/api/scenarios').set('Content-Type', 'text/plain').send('hello'), status: 415, field: 'Content-Type' },
  { name: 'body that is an array', send: () => request(server.app).post('/api/scenarios').send([1, 2]), status: 400, field: '(body)' },
  { name: 'missing scenario', send: () => request(server.app).post('/api/scenarios').send({}), status: 400, field: 'scenario' },
  { name: 'scenario of the wrong type', send: () => request(server.app).post('/api/scenarios').send({ scenario: 'a string' }), status: 422, field: 'scenario' },
  { name: 'unknown field in the envelope', send: () => request(server.app).post('/api/scenarios').send({ scenario: smallScenario(), colour: 'red' }), status: 400, field: 'colour' },
  { name: 'unknown field in the scenario', send: () => request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ stackColour: 'red' }) }), status: 422, field: 'scenario.stackColour' },
  { name: 'wrong type of a scenario field', send: () => request(server.app).post('/api/scenarios').send({ scenario: withSource({ height_m: '32' }) }), status: 422, field: 'scenario.sources[0].height_m' },
  { name: 'negative emission', send: () => request(server.app).post('/api/scenarios').send({ scenario: withSource({ emission_g_s: -1 }) }), status: 422, field: 'scenario.sources[0].emission_g_s' },
  { name: 'latitude out of range', send: () => request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ site: { lat: 95, lon: 0, landUse: 'rural' } }) }), status: 422, field: 'scenario.site.lat' },
  { name: 'a weather CSV path (the server reads no files)', send: () => request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ weather: { kind: 'hourly', csv: '../../etc/passwd' } }) }), status: 422, field: 'scenario.weather.csv' },
  { name: 'path traversal in a scenario id', send: () => request(server.app).get('/api/scenarios/..%2F..%2Fetc%2Fpasswd'), status: 400, field: 'id' },
  { name: 'odd characters in a scenario id', send: () => request(server.app).get(`/api/scenarios/${encodeURIComponent(SCRIPT)}`), status: 400, field: 'id' },
  { name: 'upper-case id (not one the server made)', send: () => request(server.app).get(`/api/scenarios/${scenarioId.toUpperCase()}`), status: 400, field: 'id' },
  { name: 'unknown scenario id', send: () => request(server.app).get('/api/scenarios/00000000-0000-4000-8000-000000000000'), status: 404, field: 'id' },
  { name: 'revision that does not exist', send: () => request(server.app).get(`/api/scenarios/${scenarioId}/revisions/99`), status: 404, field: 'revision' },
  { name: 'revision that is not a number', send: () => request(server.app).get(`/api/scenarios/${scenarioId}/revisions/-1`), status: 400, field: 'revision' },
  { name: 'stale revision', send: () => request(server.app).put(`/api/scenarios/${scenarioId}`).send({ scenario: smallScenario(), revision: 1 }), status: 409, field: 'revision' },
  { name: 'revision of the wrong type', send: () => request(server.app).put(`/api/scenarios/${scenarioId}`).send({ scenario: smallScenario(), revision: '2' }), status: 400, field: 'revision' },
  { name: 'malformed If-Match', send: () => request(server.app).put(`/api/scenarios/${scenarioId}`).set('If-Match', 'two').send({ scenario: smallScenario() }), status: 400, field: 'If-Match' },
  { name: 'bad paging (limit 0)', send: () => request(server.app).get('/api/scenarios?limit=0'), status: 400, field: 'query.limit' },
  { name: 'bad paging (limit text)', send: () => request(server.app).get('/api/runs?limit=lots'), status: 400, field: 'query.limit' },
  { name: 'run of an unknown mode', send: () => request(server.app).post('/api/runs').send({ scenarioId, mode: 'puff' }), status: 400, field: 'mode' },
  { name: 'run with a malformed scenario id', send: () => request(server.app).post('/api/runs').send({ scenarioId: '../x' }), status: 400, field: 'scenarioId' },
  { name: 'run of an unknown scenario', send: () => request(server.app).post('/api/runs').send({ scenarioId: '00000000-0000-4000-8000-000000000000' }), status: 404, field: 'id' },
  { name: 'run of a revision that does not exist', send: () => request(server.app).post('/api/runs').send({ scenarioId, revision: 7 }), status: 404, field: 'revision' },
  { name: 'run with an unknown field', send: () => request(server.app).post('/api/runs').send({ scenarioId, priority: 'high' }), status: 400, field: 'priority' },
  { name: 'a grid too large for the server', send: () => request(server.app).post('/api/runs').send({ scenarioId: largeGridScenarioId, mode: 'grid' }), status: 422, field: 'scenario.domain' },
  { name: 'cancel of a finished run', send: () => request(server.app).post(`/api/runs/${finishedRunId}/cancel`), status: 409, field: 'id' },
  { name: 'results of a run that is not done', send: () => request(server.app).get(`/api/runs/${finishedRunId}/results/summary.json`), status: 409, field: 'id' },
  { name: 'result name with a path', send: () => request(server.app).get(`/api/runs/${finishedRunId}/results/..%2F..%2Fplumeplan.sqlite`), status: 400, field: 'name' },
  { name: 'unknown run id', send: () => request(server.app).get('/api/runs/00000000-0000-4000-8000-000000000000'), status: 404, field: 'id' },
  { name: 'unknown API route', send: () => request(server.app).get('/api/reports'), status: 404, field: 'path' },
];

describe('bad input', () => {
  it('covers at least 25 kinds', () => {
    expect(cases.length).toBeGreaterThanOrEqual(25);
  });

  for (const badCase of cases) {
    it(`${badCase.name}: ${badCase.status}, naming ${String(badCase.field)}`, async () => {
      const response = await badCase.send();
      expect(response.status).toBe(badCase.status);
      expect(response.headers['content-type']).toMatch(/^application\/json/);
      expect(typeof response.body.error).toBe('string');
      if (typeof badCase.field === 'string') expect(response.body.field).toBe(badCase.field);
      else expect(response.body.field).toMatch(badCase.field);
    });
  }

  it('script in a name is stored as text and shown escaped on the page', async () => {
    const created = await request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ name: SCRIPT }) }).expect(201);
    const read = await request(server.app).get(`/api/scenarios/${created.body.id}`).expect(200);
    expect(read.body.name).toBe(SCRIPT);
    const page = await request(server.app).get('/').expect(200);
    expect(page.text).not.toContain(SCRIPT);
    expect(page.text).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
  });

  it('refuses more queued runs than a client may have (429)', async () => {
    const second = await request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ name: 'Queue A' }) }).expect(201);
    const third = await request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ name: 'Queue B' }) }).expect(201);
    const fourth = await request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ name: 'Queue C' }) }).expect(201);
    await request(server.app).post('/api/runs').send({ scenarioId: second.body.id, mode: 'gaussian' }).expect(202);
    await request(server.app).post('/api/runs').send({ scenarioId: third.body.id, mode: 'gaussian' }).expect(202);
    const refused = await request(server.app).post('/api/runs').send({ scenarioId: fourth.body.id, mode: 'gaussian' }).expect(429);
    expect(refused.body.field).toBe('scenarioId');
  });

  it('lost nothing saved and still serves', async () => {
    const health = await request(server.app).get('/api/health').expect(200);
    expect(health.body.ok).toBe(true);
    const read = await request(server.app).get(`/api/scenarios/${scenarioId}`).expect(200);
    expect(read.body).toMatchObject({ revision: 2, name: 'Second (invented)' });
    const revisions = await request(server.app).get(`/api/scenarios/${scenarioId}/revisions`).expect(200);
    expect(revisions.body.items).toHaveLength(2);
  });
});

/**
 * Behaviour of the scenario routes: create, read, list, revisions kept (nothing overwritten), stale
 * saves refused with 409, delete recoverable.
 */
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { ManualExecutor, smallScenario, startTestServer, type TestServer } from '../serverFixture.ts';

let server: TestServer;
beforeEach(async () => {
  server = await startTestServer({ executor: new ManualExecutor() });
});
afterEach(async () => {
  await server.close();
});

async function create(name = 'First (invented)'): Promise<{ id: string; revision: number }> {
  const response = await request(server.app).post('/api/scenarios').send({ scenario: smallScenario({ name }) }).expect(201);
  return response.body as { id: string; revision: number };
}

describe('scenarios', () => {
  it('creates a scenario as revision 1 and reads it back as sent', async () => {
    const scenario = smallScenario({ $schema: '../format/scenario.schema.json' });
    const created = await request(server.app).post('/api/scenarios').send({ scenario }).expect(201);
    expect(created.body).toMatchObject({ revision: 1, name: scenario.name, deletedAt: null });
    expect(created.headers.location).toBe(`/api/scenarios/${created.body.id}`);
    const read = await request(server.app).get(`/api/scenarios/${created.body.id}`).expect(200);
    expect(read.headers.etag).toBe('"1"');
    const { $schema: _editor, ...withoutEditorSchema } = scenario;
    expect(read.body.scenario).toEqual(withoutEditorSchema);
    expect(read.body.checksum).toMatch(/^[0-9a-f]{64}$/);
  });

  it('keeps every revision: a save adds one, the earlier stays readable', async () => {
    const { id } = await create();
    await request(server.app).put(`/api/scenarios/${id}`).send({ scenario: smallScenario({ name: 'Second' }), revision: 1 }).expect(200);
    const third = await request(server.app)
      .put(`/api/scenarios/${id}`)
      .set('If-Match', '"2"')
      .send({ scenario: smallScenario({ name: 'Third' }) })
      .expect(200);
    expect(third.body.revision).toBe(3);
    const revisions = await request(server.app).get(`/api/scenarios/${id}/revisions`).expect(200);
    expect(revisions.body.items.map((item: { revision: number; name: string }) => [item.revision, item.name])).toEqual([
      [3, 'Third'],
      [2, 'Second'],
      [1, 'First (invented)'],
    ]);
    const first = await request(server.app).get(`/api/scenarios/${id}/revisions/1`).expect(200);
    expect(first.body.scenario.name).toBe('First (invented)');
  });

  it('refuses a stale save with 409 and keeps the other save', async () => {
    const { id } = await create();
    await request(server.app).put(`/api/scenarios/${id}`).send({ scenario: smallScenario({ name: 'Theirs' }), revision: 1 }).expect(200);
    const stale = await request(server.app).put(`/api/scenarios/${id}`).send({ scenario: smallScenario({ name: 'Mine' }), revision: 1 }).expect(409);
    expect(stale.body).toMatchObject({ field: 'revision', value: 1 });
    expect(stale.body.allowed).toContain('2');
    const latest = await request(server.app).get(`/api/scenarios/${id}`).expect(200);
    expect(latest.body.name).toBe('Theirs');
  });

  it('asks for the revision when a save gives none (428)', async () => {
    const { id } = await create();
    const response = await request(server.app).put(`/api/scenarios/${id}`).send({ scenario: smallScenario() }).expect(428);
    expect(response.body.field).toBe('revision');
  });

  it('lists scenarios in pages', async () => {
    for (const name of ['A', 'B', 'C']) await create(name);
    const page = await request(server.app).get('/api/scenarios?limit=2&offset=0').expect(200);
    expect(page.body.total).toBe(3);
    expect(page.body.items).toHaveLength(2);
    const rest = await request(server.app).get('/api/scenarios?limit=2&offset=2').expect(200);
    expect(rest.body.items).toHaveLength(1);
    const names = [...page.body.items, ...rest.body.items].map((item: { name: string }) => item.name).sort();
    expect(names).toEqual(['A', 'B', 'C']);
  });

  it('deletes recoverably: gone from the list and 404, back after restore with its revisions', async () => {
    const { id } = await create();
    await request(server.app).put(`/api/scenarios/${id}`).send({ scenario: smallScenario({ name: 'Two' }), revision: 1 }).expect(200);
    await request(server.app).delete(`/api/scenarios/${id}`).expect(200);
    expect((await request(server.app).get('/api/scenarios').expect(200)).body.total).toBe(0);
    const gone = await request(server.app).get(`/api/scenarios/${id}`).expect(404);
    expect(gone.body.error).toContain('restore');
    const deleted = await request(server.app).get('/api/scenarios?deleted=true').expect(200);
    expect(deleted.body.items.map((item: { id: string }) => item.id)).toEqual([id]);
    await request(server.app).post(`/api/scenarios/${id}/restore`).expect(200);
    const back = await request(server.app).get(`/api/scenarios/${id}`).expect(200);
    expect(back.body).toMatchObject({ revision: 2, name: 'Two', deletedAt: null });
  });

  it('validates without saving: issues with their fields, or the grid a run would use', async () => {
    const good = await request(server.app).post('/api/validate').send({ scenario: smallScenario() }).expect(200);
    expect(good.body).toMatchObject({ valid: true, issues: [], grid: { nx: 50, ny: 50, nz: 10, spacing_m: 100, cells: 25_000 } });
    const bad = smallScenario();
    (bad.sources as { emission_g_s: number }[])[0].emission_g_s = -1;
    const response = await request(server.app).post('/api/validate').send({ scenario: bad }).expect(200);
    expect(response.body.valid).toBe(false);
    expect(response.body.issues[0]).toMatchObject({ field: 'scenario.sources[0].emission_g_s', value: -1 });
    expect((await request(server.app).get('/api/scenarios').expect(200)).body.total).toBe(0);
  });

  it('reports a source outside the domain when validating', async () => {
    const scenario = smallScenario({ domain: { halfWidth_m: 500, spacing_m: 50, height_m: 1000, layers: 10 } });
    const response = await request(server.app).post('/api/validate').send({ scenario }).expect(200);
    expect(response.body.valid).toBe(false);
    expect(response.body.issues.map((issue: { field: string }) => issue.field)).toContain('scenario.receptors[1]');
  });
});

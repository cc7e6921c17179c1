/**
 * The app around the routes: security headers with a strict content security policy, the token when
 * the server has one, the built map page served at / (or the not-built page), and the OpenAPI 3.1
 * document listing every route the app answers.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterEach, describe, expect, it } from 'vitest';
import { ManualExecutor, smallScenario, startTestServer, type TestServer } from '../serverFixture.ts';

let server: TestServer | null = null;
let webRoot: string | null = null;
afterEach(async () => {
  await server?.close();
  server = null;
  if (webRoot !== null) rmSync(webRoot, { recursive: true, force: true });
  webRoot = null;
});

describe('the app', () => {
  it('sends a strict content security policy: no inline script, no other origin, no framing', async () => {
    server = await startTestServer({ executor: new ManualExecutor() });
    const response = await request(server.app).get('/').expect(200);
    const policy = response.headers['content-security-policy'] as string;
    const directives = Object.fromEntries(policy.split(';').map((part) => {
      const [name, ...values] = part.trim().split(/\s+/);
      return [name, values];
    }));
    expect(directives['default-src']).toEqual(["'self'"]);
    expect(directives['script-src']).toEqual(["'self'"]);
    expect(directives['frame-ancestors']).toEqual(["'none'"]);
    expect(directives['object-src']).toEqual(["'none'"]);
    expect(policy).not.toContain('unsafe-inline');
    expect(policy).not.toMatch(/https?:/);
    expect(response.headers['x-content-type-options']).toBe('nosniff');
    expect(response.headers['x-powered-by']).toBeUndefined();
    // The not-built page itself holds no inline script or style.
    expect(response.text).not.toMatch(/<script|<style|style=/);
  });

  it('serves the built page from the web root when it exists', async () => {
    webRoot = mkdtempSync(path.join(tmpdir(), 'plumeplan-web-'));
    mkdirSync(path.join(webRoot, 'assets'));
    writeFileSync(path.join(webRoot, 'index.html'), '<!doctype html><title>map</title><script type="module" src="/assets/app.js"></script>');
    writeFileSync(path.join(webRoot, 'assets', 'app.js'), 'export {};');
    server = await startTestServer({ executor: new ManualExecutor(), webRoot });
    const page = await request(server.app).get('/').expect(200);
    expect(page.text).toContain('<title>map</title>');
    const script = await request(server.app).get('/assets/app.js').expect(200);
    expect(script.headers['content-type']).toMatch(/javascript/);
    await request(server.app).get('/assets/missing.js').expect(404);
  });

  it('asks for the token on every API request when it has one, and only there', async () => {
    server = await startTestServer({ executor: new ManualExecutor(), token: 'a-long-test-token' });
    const refused = await request(server.app).get('/api/scenarios').expect(401);
    expect(refused.body.field).toBe('Authorization');
    await request(server.app).get('/api/scenarios').set('Authorization', 'Bearer wrong-token').expect(401);
    await request(server.app).post('/api/scenarios').send({ scenario: smallScenario() }).expect(401);
    await request(server.app).get('/api/scenarios').set('Authorization', 'Bearer a-long-test-token').expect(200);
    // The progress stream (EventSource cannot send headers) takes it as a query parameter; nothing else does.
    await request(server.app).get('/api/scenarios?access_token=a-long-test-token').expect(401);
    const stream = await request(server.app).get('/api/runs/00000000-0000-4000-8000-000000000000/events?access_token=a-long-test-token');
    expect(stream.status).toBe(404);
    await request(server.app).get('/api/runs/00000000-0000-4000-8000-000000000000/events?access_token=wrong').expect(401);
    await request(server.app).get('/').expect(200);
  });

  it('describes every route in an OpenAPI 3.1 document built from the request schemas', async () => {
    server = await startTestServer({ executor: new ManualExecutor() });
    const response = await request(server.app).get('/api/openapi.json').expect(200);
    const document = response.body;
    expect(document.openapi).toBe('3.1.0');
    const routes = Object.entries(document.paths as Record<string, Record<string, unknown>>).flatMap(([route, operations]) =>
      Object.keys(operations)
        .filter((key) => key !== 'parameters')
        .map((method) => `${method.toUpperCase()} ${route}`),
    );
    for (const expected of [
      'POST /api/scenarios',
      'GET /api/scenarios',
      'GET /api/scenarios/{id}',
      'PUT /api/scenarios/{id}',
      'DELETE /api/scenarios/{id}',
      'POST /api/scenarios/{id}/restore',
      'GET /api/scenarios/{id}/revisions',
      'GET /api/scenarios/{id}/revisions/{revision}',
      'POST /api/validate',
      'POST /api/runs',
      'GET /api/runs',
      'GET /api/runs/{id}',
      'GET /api/runs/{id}/events',
      'POST /api/runs/{id}/cancel',
      'GET /api/runs/{id}/results/{name}',
      'GET /api/runs/{id}/assessment',
    ]) {
      expect(routes).toContain(expected);
    }
    // Every documented route answers (not the catch-all 404 for unknown routes).
    for (const route of routes) {
      const [method, pattern] = route.split(' ');
      const url = pattern.replaceAll('{id}', '00000000-0000-4000-8000-000000000000').replaceAll('{revision}', '1').replaceAll('{name}', 'summary.json');
      const answer = await request(server.app)[method.toLowerCase() as 'get'](url).set('Content-Type', 'application/json').send(method === 'GET' || method === 'DELETE' ? undefined : '{}');
      expect(answer.body?.field, `${route} is routed`).not.toBe('path');
    }
    // The run request schema is the one the route checks with: one body per kind; a scenario run's
    // fields and the mode's choices.
    expect(document.components.schemas.RunRequest.oneOf).toHaveLength(5);
    const runRequest = document.components.schemas.ScenarioRunRequest;
    expect(Object.keys(runRequest.properties).sort()).toEqual(['contextLayers', 'crs', 'kind', 'levels_ug_m3', 'mode', 'pack', 'percentOf', 'resolutionCheck', 'revision', 'scenarioId']);
    expect(runRequest.properties.mode.enum).toEqual(['grid', 'gaussian']);
    expect(runRequest.additionalProperties).toBe(false);
    expect(document.components.schemas.Scenario.properties.sources).toBeDefined();
  });
});

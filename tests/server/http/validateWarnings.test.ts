/**
 * POST /api/validate's plausibility warnings: flue gas colder than the air, a mixing height below the
 * stack, a receptor on the site. They are warnings, not issues (the scenario stays valid), each naming its
 * field; and they are the same ones `plumeplan validate` prints (the real command line) and a run of the
 * same scenario records in summary.json's inputWarnings.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { smallScenario, startTestServer, waitFor, type TestServer } from '../serverFixture.ts';

let server: TestServer;
let scratch: string;
const repoRoot = new URL('../../../', import.meta.url).pathname;

beforeAll(async () => {
  server = await startTestServer();
  scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-warnings-'));
});
afterAll(async () => {
  await server.close();
  rmSync(scratch, { recursive: true, force: true });
});

/** The demo on the coarse grid with three implausible inputs (invented figures). */
function oddScenario(): Record<string, unknown> {
  const scenario = smallScenario({ name: 'Implausible inputs (invented)' });
  const stack = (scenario.sources as Record<string, unknown>[])[0];
  stack.exitTemperature_K = 270; // colder than the 283.15 K air
  (scenario.weather as Record<string, unknown>).mixingHeight_m = 25; // below the 32 m stack
  // a receptor inside site.boundary (the demo's site polygon spans lon -2.2858..-2.2830, lat 54.0602..54.0618)
  (scenario.receptors as Record<string, unknown>[]).push({ id: 'gatehouse', name: 'Gatehouse on the site', lat: 54.0606, lon: -2.2850, height_m: 1.5 });
  return scenario;
}

describe('POST /api/validate warnings', () => {
  it('a plausible scenario has none', async () => {
    const response = await request(server.app).post('/api/validate').send({ scenario: smallScenario() }).expect(200);
    expect(response.body).toMatchObject({ valid: true, warnings: [] });
  });

  it('names each implausible input as a warning beside the issues; the scenario stays valid', async () => {
    const response = await request(server.app).post('/api/validate').send({ scenario: oddScenario() }).expect(200);
    expect(response.body.valid).toBe(true);
    expect(response.body.issues).toEqual([]);
    const fields = (response.body.warnings as { field: string }[]).map((warning) => warning.field);
    expect(fields).toEqual(expect.arrayContaining(['scenario.sources[0].exitTemperature_K', 'scenario.sources[0].height_m', 'scenario.receptors[3]']));
    const cold = response.body.warnings.find((warning: { field: string }) => warning.field === 'scenario.sources[0].exitTemperature_K');
    expect(cold.value).toBe(270);
    expect(cold.message).toMatch(/colder|air/);
    for (const warning of response.body.warnings) expect(typeof warning.message).toBe('string');
  });

  it('an invalid scenario has issues and no warnings', async () => {
    const bad = oddScenario();
    (bad.sources as { emission_g_s: number }[])[0].emission_g_s = -1;
    const response = await request(server.app).post('/api/validate').send({ scenario: bad }).expect(200);
    expect(response.body).toMatchObject({ valid: false, warnings: [] });
  });

  it('validate, plumeplan validate and a run of the same scenario give the same warnings', async () => {
    const scenario = oddScenario();
    const validated = (await request(server.app).post('/api/validate').send({ scenario }).expect(200)).body.warnings as { field: string; value: unknown; message: string }[];
    expect(validated.length).toBeGreaterThanOrEqual(3);

    // the command line prints "  warning: PATH (VALUE): MESSAGE", one a line
    const file = path.join(scratch, 'odd.json');
    writeFileSync(file, JSON.stringify(scenario));
    const cli = spawnSync(process.execPath, ['bin/plumeplan.mjs', 'validate', file], { cwd: repoRoot, encoding: 'utf8' });
    expect(cli.status).toBe(0);
    const printed = cli.stdout.split('\n').filter((line) => line.startsWith('  warning: ')).map((line) => line.slice('  warning: '.length));
    expect(printed).toEqual(validated.map((warning) => `${warning.field.replace(/^scenario\./, '')} (${JSON.stringify(warning.value)}): ${warning.message}`));

    // a run records them in summary.json
    const id = (await request(server.app).post('/api/scenarios').send({ scenario }).expect(201)).body.id;
    const run = (await request(server.app).post('/api/runs').send({ scenarioId: id, mode: 'gaussian' }).expect(202)).body.id;
    await waitFor(async () => ((await request(server.app).get(`/api/runs/${run}`)).body.status === 'done' ? true : undefined));
    const summary = (await request(server.app).get(`/api/runs/${run}/results/summary.json`).expect(200)).body;
    expect(summary.inputWarnings.map((warning: { path: string; value: unknown; message: string }) => ({ field: `scenario.${warning.path}`, value: warning.value, message: warning.message }))).toEqual(validated);
  });
});

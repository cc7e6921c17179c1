/**
 * POST /api/validate: check a scenario without saving or running it. A scenario with issues is a
 * successful check (200, `valid: false` and every issue with its field); only a malformed request is
 * an error. A valid one reports the grid a run would use and the plausibility warnings (flue gas colder
 * than the air, a mixing height below a stack, a receptor on the site...): the very ones
 * `plumeplan validate` prints and a run records in summary.json's inputWarnings, from the same function.
 */
import { Router } from 'express';
import { parseScenario, type ScenarioIssue } from '../../../scenarios/format/schema.ts';
import { GRID_ARRAYS_PER_CELL, estimateGridMemory_bytes } from '../../../solver/grid/domainDefaults.ts';
import type { InputWarning } from '../../../solver/diagnostics/plausibility.ts';
import { examineScenarioGeometry } from '../../scenarioFiles/semantics.ts';
import { parseRequest, scenarioEnvelopeSchema } from '../apiSchemas.ts';
import { ApiError, echoValue } from '../errors.ts';
import { requireJson } from '../requestChecks.ts';
import { acceptScenario } from '../scenarioInput.ts';

/** @param maxCellsPerRun the server's cell limit, reported as an issue when a grid-mode run would pass it */
export function validateRoutes(maxCellsPerRun: number): Router {
  const router = Router();
  router.post('/', requireJson, (request, response) => {
    const body = parseRequest(scenarioEnvelopeSchema, request.body);
    const issues: ScenarioIssue[] = [];
    let parsed = null;
    try {
      parsed = acceptScenario(body.scenario).scenario;
    } catch (error) {
      if (!(error instanceof ApiError) || error.status !== 422) throw error;
      const outcome = parseScenario(body.scenario);
      if (!outcome.ok) issues.push(...outcome.issues);
      else issues.push({ path: error.body.field?.replace(/^scenario\.?/, '') || '(scenario)', value: error.body.value, message: error.body.allowed ?? error.body.error });
    }
    let grid = null;
    let warnings: InputWarning[] = [];
    if (parsed !== null) {
      const examination = examineScenarioGeometry(parsed);
      issues.push(...examination.issues);
      warnings = examination.warnings;
      if (examination.geometry !== null) {
        const { grid: localGrid, domain, domainDerived } = examination.geometry;
        const memory = estimateGridMemory_bytes(domain);
        grid = {
          nx: localGrid.nx,
          ny: localGrid.ny,
          nz: localGrid.nz,
          spacing_m: localGrid.spacing_m,
          cells: memory / (GRID_ARRAYS_PER_CELL * 8),
          estimatedMemory_bytes: memory,
          domainDerived,
        };
        if (parsed.solver.mode === 'grid' && grid.cells > maxCellsPerRun) {
          issues.push({
            path: 'domain',
            value: domain,
            message: `the grid would have ${grid.cells} cells; this server runs at most ${maxCellsPerRun}: use a larger spacing_m, a smaller halfWidth_m or fewer layers`,
          });
        }
      }
    }
    response.json({
      valid: issues.length === 0,
      issues: issues.map((issue) => ({
        field: issue.path === '(scenario)' ? 'scenario' : `scenario.${issue.path}`,
        value: echoValue(issue.value),
        allowed: issue.message,
      })),
      grid,
      warnings: warnings.map((warning) => ({ field: `scenario.${warning.path}`, value: echoValue(warning.value), message: warning.message })),
    });
  });
  return router;
}

/**
 * The assessment of a finished run: each standard's figure where the weather allows one (a steady state
 * gives hourly standards the hourly PC of its weather), the screening verdicts, and the downwash flags.
 * runScenario calls this; the server may call it on a stored result as well.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import type { PlacedReceptor, ScenarioRunResult, StandardField } from '../drivers/types.ts';
import { downwashFlags } from './downwash.ts';
import type { AssessmentPlan } from './standards.ts';
import { screeningVerdicts } from './verdicts.ts';

/** The receptor column of a steady run (../drivers/steadyScenario.ts). */
const STEADY_COLUMN = 'concentration_ug_m3';

/**
 * Hourly standards' figures from one steady weather state: the PC of that hour (times the NOx to NO2
 * ratio where the standard needs it). Longer standards get none: one steady state cannot tell them.
 *
 * @param plan the assessment plan
 * @param result a steady run's result
 */
export function steadyStandardFields(plan: AssessmentPlan, result: ScenarioRunResult): StandardField[] {
  const column = result.receptorColumns.find((c) => c.key === STEADY_COLUMN);
  if (column === undefined) throw new Error(`steady run: no ${STEADY_COLUMN} column to assess`);
  return plan.standards
    .filter((standard) => standard.averaging_h === 1 && standard.notComputed === null)
    .map((standard) => ({
      name: standard.name,
      basis: 'oneWeatherHour' as const,
      receptors_ug_m3: column.values.map((value) => standard.pcFactor * value),
      ground_ug_m3: result.footprint_ug_m3.map((value) => standard.pcFactor * value),
    }));
}

/**
 * Add the assessment to a run's result: standard figures (steady weather), verdicts (when the scenario
 * has an assessment) and downwash flags (when a stack names a building), with notes.
 *
 * @param scenario the scenario that was run
 * @param plan its assessment plan, or undefined without an assessment
 * @param result the run's result; returned as a new object, the input is not changed
 * @param receptors the placed receptors (ids and local positions)
 */
export function assessRun(
  scenario: Scenario,
  plan: AssessmentPlan | undefined,
  result: ScenarioRunResult,
  receptors: readonly PlacedReceptor[],
): ScenarioRunResult {
  const assessed: ScenarioRunResult = { ...result, notes: [...result.notes] };
  if (plan !== undefined) {
    if (result.weatherKind === 'steady') assessed.standardFields = steadyStandardFields(plan, result);
    assessed.verdicts = screeningVerdicts(plan, assessed.standardFields ?? [], {
      weatherKind: result.weatherKind,
      grid: result.grid,
      receptors,
      site: result.site ?? null,
    });
  }
  const flags = downwashFlags(scenario.sources);
  if (flags.length > 0) {
    assessed.downwash = flags;
    for (const flag of flags) if (flag.flagged) assessed.notes.push(flag.message);
  }
  return assessed;
}

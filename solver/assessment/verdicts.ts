/**
 * Screening verdicts: for each assessed standard, at every receptor and at the point of maximum impact,
 * the process contribution (PC), PC as % of the standard, the background, PEC = PC + background, PEC as %
 * of the standard, and the two-stage insignificance screen.
 *
 * The screen is common practice in permit guidance (gov.uk, "Air emissions risk assessment for your
 * environmental permit" [read: the steps; thresholds from memory], REFERENCES.md), never a legal
 * decision:
 * - stage 1: the PC is insignificant when below 1 % of a long-term or 10 % of a short-term standard;
 * - stage 2 (long-term standards the PC did not clear at stage 1): PEC below 70 % of the standard.
 * The thresholds are configurable (`assessment.screening`) and always shown beside the result.
 *
 * What the weather allows (StandardFieldBasis in ../drivers/types.ts):
 * - an hourly series or a wind rose gives each standard's own statistic: a plain screen;
 * - the screening weather set gives the highest hourly PC, an upper bound of every statistic: passing
 *   the screen on the bound passes it for sure; failing it decides nothing ("undetermined");
 * - one steady weather state gives the hourly PC of that weather alone: hourly standards get their
 *   figures as an indication ("indicative"), and nothing is said about annual means or percentiles,
 *   which a single steady state cannot tell.
 */
import type { ScreeningThresholds, SolverMode } from '../../scenarios/format/types.ts';
import type { PlacedReceptor, StandardField, StandardFieldBasis } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import { sitePeak, type SiteColumns } from '../grid/siteBoundary.ts';
import type { AssessedStandard, AssessmentPlan } from './standards.ts';
import { NOX_TO_NO2_SOURCE } from './standards.ts';

/** The label every verdict carries. */
export const SCREENING_LABEL =
  'two-stage insignificance screen as commonly applied in permit guidance (gov.uk air emissions risk assessment; ' +
  'thresholds from memory): a screening aid, not a legal decision or a regulatory assessment';

/** What the screen says at one place. */
export type ScreenOutcome =
  /** stage 1 or 2 passed on the standard's own statistic or on an upper bound of it */
  | 'screenedOut'
  /** neither stage passed on the standard's own statistic: a detailed assessment is the usual next step */
  | 'notScreenedOut'
  /** an upper bound failed the screen: the statistic itself may still pass; an hourly series is needed */
  | 'undetermined'
  /** one steady weather state: figures for that hour only, no screen decision */
  | 'indicative';

/** The screen at one place: a receptor or the point of maximum impact. */
export interface PointVerdict {
  /** process contribution of the assessed pollutant [ug/m3] */
  pc_ug_m3: number;
  /** 100 PC / limit [%] */
  pcPercentOfStandard: number;
  background_ug_m3: number;
  /** PC + background [ug/m3] */
  pec_ug_m3: number;
  /** 100 PEC / limit [%] */
  pecPercentOfStandard: number;
  /** stage 1: PC below the threshold share of the standard */
  stage1: { threshold_pct: number; passed: boolean };
  /** stage 2 (long-term standards not cleared at stage 1): PEC below its threshold share; null where it does not apply */
  stage2: { threshold_pct: number; passed: boolean } | null;
  outcome: ScreenOutcome;
}

export interface ReceptorVerdict extends PointVerdict {
  id: string;
}

/** The point of maximum impact: the highest PC on the ground grid (or, without a ground map, over the receptors). */
export interface MaximumVerdict extends PointVerdict {
  where: 'ground' | 'receptors';
  /** for the ground: off the site (a boundary was given) or anywhere (it may be on the site) */
  searched?: string;
  /** local position of the grid cell's centre or the receptor [m] */
  x_m: number;
  y_m: number;
  /** the receptor, when the maximum is taken over receptors */
  receptorId?: string;
}

/** One standard's verdicts. */
export interface StandardVerdict {
  name: string;
  limit_ug_m3: number;
  averaging_h: number;
  allowedExceedances: number;
  term: 'long' | 'short';
  kind: AssessedStandard['kind'];
  setTitle: string;
  source: string;
  assessedPollutant: string;
  statistic: AssessedStandard['statistic'];
  /** the NOx to NO2 conversion applied, or null */
  conversion: string | null;
  /** null when the weather gave no figure for this standard (see reason) */
  basis: StandardFieldBasis | null;
  /** what the figures are, in words */
  basisNote: string;
  /** why there are no figures, when there are none */
  reason?: string;
  maximum?: MaximumVerdict;
  receptors?: ReceptorVerdict[];
}

/** Every standard's verdicts for one run. */
export interface ScreeningVerdicts {
  label: string;
  thresholds: ScreeningThresholds;
  background_ug_m3: number;
  noxToNo2: { longTerm: number; shortTerm: number; source: string } | null;
  standards: StandardVerdict[];
}

/** What the run was, as far as the verdicts need it. */
export interface VerdictRunContext {
  weatherKind: 'steady' | 'hourly' | 'windRose' | 'screeningSet';
  mode?: SolverMode;
  grid: Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m'>;
  receptors: readonly Pick<PlacedReceptor, 'id' | 'x_m' | 'y_m'>[];
  /** the site boundary's columns: the maximum on the ground is then taken off the site */
  site?: SiteColumns | null;
}

const BASIS_NOTES: Readonly<Record<StandardFieldBasis, string>> = {
  statistic: "the standard's own statistic of the assessed pollutant",
  upperBound:
    'the highest hourly PC over the screening weather set: no percentile of hourly or daily means and no annual mean ' +
    'can exceed it (constant emissions), so a pass on it is a pass; a fail decides nothing',
  oneWeatherHour:
    'the hourly PC of this one steady weather state: whether it is the worst hour of a year, and how often it occurs, ' +
    'is unknown; figures are indicative only',
};

/**
 * The screen at one place.
 *
 * @param pc_ug_m3 process contribution of the assessed pollutant [ug/m3]
 * @param standard limit and term
 * @param background_ug_m3 background of the assessed pollutant [ug/m3]
 * @param thresholds the screen's thresholds [%]
 * @param basis how the PC was formed (decides what a pass or a fail means)
 * @example pointVerdict(0.3, { limit_ug_m3: 40, term: 'long' }, 14, DEFAULT_SCREENING_THRESHOLDS, 'statistic')
 *   // PC 0.75 % of 40: stage 1 passed -> screenedOut
 */
export function pointVerdict(
  pc_ug_m3: number,
  standard: Pick<AssessedStandard, 'limit_ug_m3' | 'term'>,
  background_ug_m3: number,
  thresholds: ScreeningThresholds,
  basis: StandardFieldBasis,
): PointVerdict {
  if (!(Number.isFinite(pc_ug_m3) && pc_ug_m3 >= 0)) throw new RangeError(`process contribution: ${pc_ug_m3} is not allowed (finite, >= 0 ug/m3)`);
  const pcPercent = (100 * pc_ug_m3) / standard.limit_ug_m3;
  const pec = pc_ug_m3 + background_ug_m3;
  const pecPercent = (100 * pec) / standard.limit_ug_m3;
  const stage1Threshold = standard.term === 'long' ? thresholds.pcLongTerm_pct : thresholds.pcShortTerm_pct;
  const stage1 = { threshold_pct: stage1Threshold, passed: pcPercent < stage1Threshold };
  const stage2 =
    standard.term === 'long' && !stage1.passed ? { threshold_pct: thresholds.pecLongTerm_pct, passed: pecPercent < thresholds.pecLongTerm_pct } : null;
  const passed = stage1.passed || (stage2?.passed ?? false);
  const outcome: ScreenOutcome =
    basis === 'oneWeatherHour' ? 'indicative' : passed ? 'screenedOut' : basis === 'upperBound' ? 'undetermined' : 'notScreenedOut';
  return {
    pc_ug_m3,
    pcPercentOfStandard: pcPercent,
    background_ug_m3,
    pec_ug_m3: pec,
    pecPercentOfStandard: pecPercent,
    stage1,
    stage2,
    outcome,
  };
}

/**
 * Why a standard has no figure for this weather.
 */
function missingReason(standard: AssessedStandard, weatherKind: VerdictRunContext['weatherKind']): string {
  if (standard.notComputed !== null) return standard.notComputed;
  if (weatherKind === 'steady') {
    return (
      'a single steady weather state is one hour of one weather: it cannot tell an annual mean, a daily mean or a ' +
      'percentile of a year; run an hourly series or a wind rose for the statistic, or the screening weather set for an upper bound'
    );
  }
  if (weatherKind === 'windRose') return `a wind rose has no time order, which ${standard.averaging_h}-hour means need; run an hourly series`;
  return 'the run gave no figure for this standard';
}

/**
 * The screening verdicts of a run.
 *
 * @param plan the assessment plan (standards, background, thresholds, NOx to NO2 ratios)
 * @param fields each standard's statistic from the run (ScenarioRunResult.standardFields)
 * @param context the weather kind, the grid (for the position of the maximum) and the receptors
 * @returns verdicts per standard: at the point of maximum impact and at every receptor; standards the
 *   weather gives no figure for carry the reason instead
 * @example const verdicts = screeningVerdicts(plan, result.standardFields ?? [], { weatherKind: 'hourly', grid, receptors });
 */
export function screeningVerdicts(plan: AssessmentPlan, fields: readonly StandardField[], context: VerdictRunContext): ScreeningVerdicts {
  const byName = new Map(fields.map((field) => [field.name, field]));
  const standards = plan.standards.map((standard): StandardVerdict => {
    const base = {
      name: standard.name,
      limit_ug_m3: standard.limit_ug_m3,
      averaging_h: standard.averaging_h,
      allowedExceedances: standard.allowedExceedances,
      term: standard.term,
      kind: standard.kind,
      setTitle: standard.setTitle,
      source: standard.source,
      assessedPollutant: standard.assessedPollutant,
      statistic: standard.statistic,
      conversion: standard.conversion,
    };
    const field = byName.get(standard.name);
    if (field === undefined) {
      return { ...base, basis: null, basisNote: 'no figure', reason: missingReason(standard, context.weatherKind) };
    }
    const verdictAt = (pc: number): PointVerdict => pointVerdict(pc, standard, plan.background_ug_m3, plan.thresholds, field.basis);
    const receptors = context.receptors.map((receptor, r) => ({ id: receptor.id, ...verdictAt(field.receptors_ug_m3[r]) }));
    return { ...base, basis: field.basis, basisNote: BASIS_NOTES[field.basis], maximum: maximumVerdict(field, context, verdictAt), receptors };
  });
  return {
    label: SCREENING_LABEL,
    thresholds: { ...plan.thresholds },
    background_ug_m3: plan.background_ug_m3,
    noxToNo2: plan.noxToNo2 === null ? null : { ...plan.noxToNo2, source: NOX_TO_NO2_SOURCE },
    standards,
  };
}

/** The point of maximum impact: the largest ground value (cell centre; off the site when a boundary is given), else the largest receptor value. */
function maximumVerdict(
  field: StandardField,
  context: VerdictRunContext,
  verdictAt: (pc: number) => PointVerdict,
): MaximumVerdict | undefined {
  const { grid } = context;
  if (field.ground_ug_m3 !== null && field.ground_ug_m3.length > 0) {
    // off the site when a boundary is given: nobody of the public stands inside it (../grid/siteBoundary.ts)
    const peak = sitePeak(grid, field.ground_ug_m3, context.site ?? null);
    return { where: 'ground', searched: peak.where, x_m: peak.x_m, y_m: peak.y_m, ...verdictAt(peak.value_ug_m3) };
  }
  if (context.receptors.length === 0) return undefined;
  let best = 0;
  for (let r = 1; r < context.receptors.length; r++) if (field.receptors_ug_m3[r] > field.receptors_ug_m3[best]) best = r;
  const receptor = context.receptors[best];
  return { where: 'receptors', x_m: receptor.x_m, y_m: receptor.y_m, receptorId: receptor.id, ...verdictAt(field.receptors_ug_m3[best]) };
}

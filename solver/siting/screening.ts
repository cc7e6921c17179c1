/**
 * The siting ranking's screen of a process contribution (PC): the assessment's own point verdict
 * (../assessment/verdicts.ts pointVerdict: PC < 1 % of a long-term or < 10 % of a short-term standard,
 * then PEC < 70 % of a long-term one; the scenario's thresholds, else the defaults; common practice in
 * permit guidance, never a legal decision), with what the siting map's figure is for the standard:
 * - a long-term standard and a mean over a wind rose or an hourly series: the statistic itself;
 * - anything else (one steady state, or a mean against a short-term standard): indicative only, as a run
 *   of one weather hour is.
 */
import type { AirQualityStandard, ScreeningThresholds } from '../../scenarios/format/types.ts';
import type { StandardFieldBasis } from '../drivers/types.ts';
import { DEFAULT_SCREENING_THRESHOLDS, isLongTerm } from '../assessment/standards.ts';
import { pointVerdict, type ScreenOutcome } from '../assessment/verdicts.ts';

export type ScreeningVerdict = ScreenOutcome;

export interface ScreenedPc {
  /** PC as % of the standard's limit */
  percentOfStandard: number;
  /** the first-stage threshold applied, % of the standard */
  threshold_percent: number;
  verdict: ScreeningVerdict;
}

/** How a siting figure stands to a standard (see the file's header). */
export function sitingBasis(standard: Pick<AirQualityStandard, 'averaging_h'>, weatherKind: 'steady' | 'windRose' | 'hourly'): StandardFieldBasis {
  return weatherKind !== 'steady' && isLongTerm(standard) ? 'statistic' : 'oneWeatherHour';
}

/**
 * A screen for the candidates' PCs against one standard.
 *
 * @param background_ug_m3 the scenario's background (for the PEC stage of a long-term standard)
 * @param thresholds the scenario's thresholds (default: the assessment's defaults)
 * @example screenFor(annualNO2, 'windRose', 14)(0.3) // { percentOfStandard: 0.75, threshold_percent: 1, verdict: 'screenedOut' }
 */
export function screenFor(
  standard: AirQualityStandard,
  weatherKind: 'steady' | 'windRose' | 'hourly',
  background_ug_m3: number,
  thresholds: ScreeningThresholds = DEFAULT_SCREENING_THRESHOLDS,
): (pc_ug_m3: number) => ScreenedPc {
  if (!(standard.limit_ug_m3 > 0)) throw new RangeError(`standard ${standard.name}: limit_ug_m3 is ${standard.limit_ug_m3}; allowed: > 0`);
  const term = isLongTerm(standard) ? 'long' : 'short';
  const basis = sitingBasis(standard, weatherKind);
  return (pc_ug_m3) => {
    const verdict = pointVerdict(pc_ug_m3, { limit_ug_m3: standard.limit_ug_m3, term }, background_ug_m3, thresholds, basis);
    return { percentOfStandard: verdict.pcPercentOfStandard, threshold_percent: verdict.stage1.threshold_pct, verdict: verdict.outcome };
  };
}

/**
 * The standard a siting run compares with: the one named, or else the one whose statistic the run gives
 * (steady weather: an hourly PC, so the shortest averaging period; a wind rose or an hourly series: a
 * mean, so a long-term standard). Null when the scenario has no standards.
 *
 * @throws RangeError when the named standard is not among the scenario's
 */
export function chooseStandard(standards: readonly AirQualityStandard[], weatherKind: 'steady' | 'windRose' | 'hourly', name?: string): AirQualityStandard | null {
  if (name !== undefined) {
    const named = standards.find((standard) => standard.name === name);
    if (named === undefined) {
      throw new RangeError(`standard "${name}" is not in assessment.standards; allowed: ${standards.map((standard) => `"${standard.name}"`).join(', ') || 'none (the scenario has no standards)'}`);
    }
    return named;
  }
  if (standards.length === 0) return null;
  if (weatherKind !== 'steady') return standards.find(isLongTerm) ?? null;
  return [...standards].sort((a, b) => a.averaging_h - b.averaging_h)[0];
}

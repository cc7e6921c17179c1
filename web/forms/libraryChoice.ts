/**
 * The pollutant library and the screening weather set as the Conditions panel offers them: pure edits of
 * the raw scenario (no DOM), so the tests can check what a choice writes.
 *
 * Choosing a library pollutant writes `pollutant.name` and `assessment.libraryPollutant` (the library's
 * standards then join the verdicts, see solver/assessment/standards.ts). The library's loss coefficients
 * are only offered: they replace the scenario's washout or deposition when the user asks, never silently.
 */
import { LIBRARY_POLLUTANT_ENTRIES, libraryStandardsFor, STANDARD_SET_TITLES, type LibraryStandard } from '../../solver/assessment/pollutantLibrary.ts';
import { DEFAULT_NOX_TO_NO2, NOX_TO_NO2_SOURCE } from '../../solver/assessment/standards.ts';
import { screeningClassSpeeds, SCREENING_SET_ORIGIN } from '../../solver/assessment/screeningWeather.ts';
import { LIBRARY_POLLUTANTS, STANDARD_SETS, type LibraryPollutant, type StandardSet } from '../../scenarios/format/types.ts';
import type { RawScenario } from '../state/scenarioDocument.ts';

type Obj = Record<string, unknown>;

export { LIBRARY_POLLUTANTS, STANDARD_SETS, STANDARD_SET_TITLES, NOX_TO_NO2_SOURCE, SCREENING_SET_ORIGIN };

/** The library pollutant a scenario has chosen, or null (its own pollutant only). */
export function chosenLibraryPollutant(view: Readonly<RawScenario>): LibraryPollutant | null {
  const chosen = (view.assessment as Obj | undefined)?.libraryPollutant;
  return typeof chosen === 'string' && (LIBRARY_POLLUTANTS as readonly string[]).includes(chosen) ? (chosen as LibraryPollutant) : null;
}

/**
 * Choose a pollutant from the library (or null: the scenario's own pollutant, no library standards).
 * Writes the pollutant's name and `assessment.libraryPollutant`; an assessment block is created with no
 * background (0) and no standards of the user's when there was none. The NOx ratios go when NOx does.
 */
export function chooseLibraryPollutant(draft: RawScenario, name: LibraryPollutant | null): void {
  if (name === null) {
    const assessment = draft.assessment as Obj | undefined;
    if (assessment) {
      delete assessment.libraryPollutant;
      delete assessment.standardSets;
      delete assessment.noxToNo2;
    }
    return;
  }
  const pollutant = ((draft.pollutant as Obj | undefined) ?? (draft.pollutant = {})) as Obj;
  pollutant.name = name;
  const assessment = ((draft.assessment as Obj | undefined) ?? (draft.assessment = { background_ug_m3: 0, standards: [] })) as Obj;
  assessment.libraryPollutant = name;
  if (name !== 'NOx') delete assessment.noxToNo2;
  // A set filter that leaves the new pollutant without standards would hide them all: drop it.
  const sets = assessment.standardSets as StandardSet[] | undefined;
  if (sets !== undefined && libraryStandardsFor(name, sets).length === 0) delete assessment.standardSets;
}

/**
 * Take (true) or leave out (false) one set of standards. Absent `standardSets` means every set; taking
 * every set again removes the field, so a scenario says no more than it needs.
 */
export function toggleStandardSet(draft: RawScenario, set: StandardSet, wanted: boolean): void {
  const assessment = draft.assessment as Obj | undefined;
  if (assessment === undefined) return;
  const current = new Set((assessment.standardSets as StandardSet[] | undefined) ?? STANDARD_SETS);
  if (wanted) current.add(set);
  else current.delete(set);
  const ordered = STANDARD_SETS.filter((s) => current.has(s));
  if (ordered.length === STANDARD_SETS.length) delete assessment.standardSets;
  else assessment.standardSets = ordered;
}

/** The sets that hold standards for a pollutant (the only ones worth a checkbox). */
export function setsWithStandards(name: LibraryPollutant): StandardSet[] {
  return STANDARD_SETS.filter((set) => libraryStandardsFor(name, [set]).length > 0);
}

/** The library's standards a scenario takes, given its set filter. */
export function chosenStandards(view: Readonly<RawScenario>): LibraryStandard[] {
  const name = chosenLibraryPollutant(view);
  if (name === null) return [];
  const sets = (view.assessment as Obj | undefined)?.standardSets as StandardSet[] | undefined;
  return libraryStandardsFor(name, sets);
}

/** NOx to NO2 ratios in force: the scenario's own, else the defaults (with where they come from). */
export function noxRatios(view: Readonly<RawScenario>): { longTerm: number; shortTerm: number; source: string; own: boolean } {
  const own = (view.assessment as Obj | undefined)?.noxToNo2 as { longTerm?: number; shortTerm?: number } | undefined;
  if (own && typeof own.longTerm === 'number' && typeof own.shortTerm === 'number') {
    return { longTerm: own.longTerm, shortTerm: own.shortTerm, source: 'given in this scenario (assessment.noxToNo2)', own: true };
  }
  return { ...DEFAULT_NOX_TO_NO2, source: NOX_TO_NO2_SOURCE, own: false };
}

/** Set one of the NOx to NO2 ratios; the other keeps its value in force (the default when none was given). */
export function setNoxRatio(draft: RawScenario, term: 'longTerm' | 'shortTerm', value: number | null): void {
  const assessment = draft.assessment as Obj | undefined;
  if (assessment === undefined) return;
  if (value === null) {
    delete assessment.noxToNo2;
    return;
  }
  const current = noxRatios(draft);
  assessment.noxToNo2 = { longTerm: current.longTerm, shortTerm: current.shortTerm, [term]: value };
}

/** What the library says about a pollutant's losses, ready to show (values with their sources). */
export interface LibraryLosses {
  description: string;
  /** the library holds no half-life for any pollutant: screening takes them as conserved */
  halfLife: string;
  washout: { a_per_s: number; b: number; source: string } | null;
  depositionVelocity: { value_m_s: number; source: string } | null;
}

export function libraryLosses(name: LibraryPollutant): LibraryLosses {
  const entry = LIBRARY_POLLUTANT_ENTRIES[name];
  const deposition = entry.suggestedLosses.depositionVelocity_m_s;
  return {
    description: entry.description,
    halfLife: 'none in the library: taken as conserved over screening distances (common practice); give a half-life below if yours decays',
    washout: entry.suggestedLosses.washout ?? null,
    depositionVelocity: deposition ? { value_m_s: deposition.value, source: deposition.source } : null,
  };
}

/** Apply the library's suggested washout or deposition to the scenario's pollutant. */
export function useLibraryLoss(draft: RawScenario, name: LibraryPollutant, which: 'washout' | 'deposition'): void {
  const losses = libraryLosses(name);
  const pollutant = ((draft.pollutant as Obj | undefined) ?? (draft.pollutant = {})) as Obj;
  if (which === 'washout' && losses.washout) pollutant.washout = { a_per_s: losses.washout.a_per_s, b: losses.washout.b };
  if (which === 'deposition' && losses.depositionVelocity) pollutant.depositionVelocity_m_s = losses.depositionVelocity.value_m_s;
}

/** The screening weather set a new choice starts from: 36 sectors (the format's default), dry, 15 °C, 10 m. */
export const SCREENING_SET_DEFAULT = { kind: 'screeningSet', sectors: 36, rain_mm_h: 0, airTemperature_K: 288.15, anemometerHeight_m: 10 } as const;

/** How many steady states a screening set of so many sectors solves (sectors x class-speed pairs). */
export function screeningStateCount(sectors: number): { pairs: number; states: number } {
  const pairs = screeningClassSpeeds().length;
  return { pairs, states: pairs * sectors };
}

/** A standard's averaging period in words. */
export function averagingWords(standard: Pick<LibraryStandard, 'averaging_h' | 'statistic'>): string {
  if (standard.averaging_h >= 8760) return 'annual mean';
  if (standard.statistic === 'maximum daily 8-hour running mean') return 'max. daily 8-h running mean';
  return `${standard.averaging_h}-hour mean`;
}

/**
 * What the Conditions panel's library choices write into a scenario: the pollutant and its standards,
 * the set filter, the NOx to NO2 ratios, the library's loss values only when asked, and the screening
 * weather set. Expected values are the library's own entries (solver/assessment/pollutantLibrary.ts,
 * each with its source there) and the scenario format (/work/shared/spec/scenario-format.md): this
 * checks that the page passes them on unchanged, not the values themselves.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import { LIBRARY_POLLUTANT_ENTRIES, libraryStandardsFor } from '../../../solver/assessment/pollutantLibrary.ts';
import {
  chooseLibraryPollutant,
  chosenLibraryPollutant,
  chosenStandards,
  libraryLosses,
  noxRatios,
  SCREENING_SET_DEFAULT,
  screeningStateCount,
  setNoxRatio,
  setsWithStandards,
  toggleStandardSet,
  useLibraryLoss,
} from '../../../web/forms/libraryChoice.ts';
import { cloneJson, type RawScenario } from '../../../web/state/scenarioDocument.ts';

const demo = JSON.parse(readFileSync(new URL('../../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url), 'utf8')) as RawScenario;
delete demo.$schema;

function fresh(): RawScenario {
  return cloneJson(demo);
}

describe('choosing a pollutant from the library', () => {
  it('writes the name and assessment.libraryPollutant, and the scenario stays valid', () => {
    const draft = fresh();
    chooseLibraryPollutant(draft, 'PM10');
    expect((draft.pollutant as { name: string }).name).toBe('PM10');
    expect(chosenLibraryPollutant(draft)).toBe('PM10');
    expect(parseScenario(draft).ok).toBe(true);
    // the user's own standards stay beside the library's
    expect((draft.assessment as { standards: unknown[] }).standards).toHaveLength(2);
    expect(chosenStandards(draft).map((s) => s.name)).toEqual(libraryStandardsFor('PM10').map((s) => s.name));
  });

  it('creates an assessment block when there was none, with no background', () => {
    const draft = fresh();
    delete draft.assessment;
    chooseLibraryPollutant(draft, 'SO2');
    expect(draft.assessment).toEqual({ background_ug_m3: 0, standards: [], libraryPollutant: 'SO2' });
    expect(parseScenario(draft).ok).toBe(true);
  });

  it('leaves the losses alone until asked, then copies the library values', () => {
    const draft = fresh();
    chooseLibraryPollutant(draft, 'PM10');
    expect((draft.pollutant as { washout: unknown }).washout).toBeNull();
    useLibraryLoss(draft, 'PM10', 'washout');
    useLibraryLoss(draft, 'PM10', 'deposition');
    const suggested = LIBRARY_POLLUTANT_ENTRIES.PM10.suggestedLosses;
    expect((draft.pollutant as { washout: unknown }).washout).toEqual({ a_per_s: suggested.washout!.a_per_s, b: suggested.washout!.b });
    expect((draft.pollutant as { depositionVelocity_m_s: number }).depositionVelocity_m_s).toBe(suggested.depositionVelocity_m_s!.value);
    expect(parseScenario(draft).ok).toBe(true);
  });

  it('shows each loss with its source, and says the library has no half-life', () => {
    const pm = libraryLosses('PM2.5');
    expect(pm.washout?.source).toMatch(/VDI 3782/);
    expect(pm.depositionVelocity?.source).toMatch(/TA Luft/);
    expect(pm.halfLife).toMatch(/none in the library/);
    expect(libraryLosses('CO').washout).toBeNull();
  });

  it('filters standards by set, and taking every set again drops the filter', () => {
    const draft = fresh();
    chooseLibraryPollutant(draft, 'NO2');
    expect(setsWithStandards('NO2')).toEqual(['eu-2008-50-ec', 'eu-2024-2881', 'who-2021']);
    toggleStandardSet(draft, 'who-2021', false);
    toggleStandardSet(draft, 'unece-2007', false);
    expect((draft.assessment as { standardSets: string[] }).standardSets).toEqual(['eu-2008-50-ec', 'eu-2024-2881']);
    expect(chosenStandards(draft).every((s) => s.set !== 'who-2021')).toBe(true);
    expect(parseScenario(draft).ok).toBe(true);
    toggleStandardSet(draft, 'who-2021', true);
    toggleStandardSet(draft, 'unece-2007', true);
    expect((draft.assessment as Record<string, unknown>).standardSets).toBeUndefined();
  });

  it('drops a set filter that would leave the new pollutant with no standard', () => {
    const draft = fresh();
    chooseLibraryPollutant(draft, 'NH3');
    toggleStandardSet(draft, 'eu-2008-50-ec', false);
    chooseLibraryPollutant(draft, 'benzene');
    // benzene has standards in the EU sets only; the filter [eu-2024, who, unece] still gives one
    expect(chosenStandards(draft).length).toBeGreaterThan(0);
    const only = fresh();
    chooseLibraryPollutant(only, 'NH3');
    (only.assessment as Record<string, unknown>).standardSets = ['unece-2007'];
    chooseLibraryPollutant(only, 'CO');
    expect((only.assessment as Record<string, unknown>).standardSets).toBeUndefined();
  });

  it('gives NOx the default NO2 shares with their source, and keeps the user\'s own', () => {
    const draft = fresh();
    chooseLibraryPollutant(draft, 'NOx');
    // 70 % long-term, 35 % short-term: common practice in permit guidance, from memory (REFERENCES.md)
    expect(noxRatios(draft)).toMatchObject({ longTerm: 0.7, shortTerm: 0.35, own: false });
    expect(noxRatios(draft).source).toMatch(/common practice/);
    setNoxRatio(draft, 'shortTerm', 0.5);
    expect((draft.assessment as { noxToNo2: unknown }).noxToNo2).toEqual({ longTerm: 0.7, shortTerm: 0.5 });
    expect(parseScenario(draft).ok).toBe(true);
    chooseLibraryPollutant(draft, 'PM10');
    expect((draft.assessment as Record<string, unknown>).noxToNo2).toBeUndefined();
  });

  it('back to the own pollutant removes the library fields only', () => {
    const draft = fresh();
    chooseLibraryPollutant(draft, 'NOx');
    setNoxRatio(draft, 'longTerm', 1);
    chooseLibraryPollutant(draft, null);
    expect(draft.assessment).toEqual(demo.assessment);
  });
});

describe('the screening weather set as a weather choice', () => {
  it('is a valid weather of the format, and counts its states as sectors x class-speed pairs', () => {
    const draft = fresh();
    draft.weather = { ...SCREENING_SET_DEFAULT };
    expect(parseScenario(draft).ok).toBe(true);
    const { pairs, states } = screeningStateCount(36);
    // class-speed pairs from solver/assessment/screeningWeather.ts: A 4, B 6, C 8, D 10, E 6, F 4 speeds
    expect(pairs).toBe(38);
    expect(states).toBe(36 * 38);
  });
});

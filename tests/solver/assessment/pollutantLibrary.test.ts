/**
 * The pollutant library's values against ../shared/REFERENCES.md (section "Air-quality standards used in
 * screening" [read] and "More standards for the pollutant library" [memory]), and the percentiles the
 * allowed exceedances imply against the EU 2008/50/EC definitions.
 */
import { describe, expect, it } from 'vitest';
import { LIBRARY_POLLUTANTS, STANDARD_SETS } from '../../../scenarios/format/types.ts';
import { percentileForStandard } from '../../../solver/diagnostics/statistics.ts';
import { LIBRARY_POLLUTANT_ENTRIES, LIBRARY_STANDARDS, libraryStandardsFor } from '../../../solver/assessment/pollutantLibrary.ts';

function find(name: string) {
  const standard = LIBRARY_STANDARDS.find((s) => s.name === name);
  if (standard === undefined) throw new Error(`no library standard ${name}`);
  return standard;
}

describe('pollutant library', () => {
  it('holds the EU 2008/50/EC values REFERENCES.md read in the Directive', () => {
    // REFERENCES.md [read]: NO2 1-h 200 (18), NO2 annual 40; PM10 24-h 50 (35), annual 40; SO2 1-h 350 (24); SO2 24-h 125 (3)
    const expected: [string, number, number, number][] = [
      ['NO2 1-hour mean (EU 2008/50/EC)', 200, 1, 18],
      ['NO2 annual mean (EU 2008/50/EC)', 40, 8760, 0],
      ['PM10 24-hour mean (EU 2008/50/EC)', 50, 24, 35],
      ['PM10 annual mean (EU 2008/50/EC)', 40, 8760, 0],
      ['SO2 1-hour mean (EU 2008/50/EC)', 350, 1, 24],
      ['SO2 24-hour mean (EU 2008/50/EC)', 125, 24, 3],
    ];
    for (const [name, limit, averaging, exceedances] of expected) {
      const standard = find(name);
      expect([standard.limit_ug_m3, standard.averaging_h, standard.allowedExceedances]).toEqual([limit, averaging, exceedances]);
      expect(standard.source).toContain('[read');
    }
  });

  it('holds the 2030 values and WHO 2021 guidelines REFERENCES.md read', () => {
    // Directive (EU) 2024/2881 [read]: PM10 annual 20, 24-h 45; PM2.5 annual 10, 24-h 25; NO2 annual 20, 24-h 50
    // WHO 2021 [read]: PM2.5 annual 5, 24-h 15; PM10 annual 15, 24-h 45; NO2 annual 10, 24-h 25
    const expected: [string, number][] = [
      ['PM10 annual mean (EU 2024/2881, 2030)', 20],
      ['PM10 24-hour mean (EU 2024/2881, 2030)', 45],
      ['PM2.5 annual mean (EU 2024/2881, 2030)', 10],
      ['PM2.5 24-hour mean (EU 2024/2881, 2030)', 25],
      ['NO2 annual mean (EU 2024/2881, 2030)', 20],
      ['NO2 24-hour mean (EU 2024/2881, 2030)', 50],
      ['PM2.5 annual mean (WHO 2021)', 5],
      ['PM2.5 24-hour mean (WHO 2021)', 15],
      ['PM10 annual mean (WHO 2021)', 15],
      ['PM10 24-hour mean (WHO 2021)', 45],
      ['NO2 annual mean (WHO 2021)', 10],
      ['NO2 24-hour mean (WHO 2021)', 25],
    ];
    for (const [name, limit] of expected) expect(find(name).limit_ug_m3).toBe(limit);
  });

  it('marks every value REFERENCES.md has only from memory as from memory', () => {
    // REFERENCES.md "More standards" [memory]: CO 8-h 10 mg/m3, benzene 5, PM2.5 annual 25 (2008/50/EC);
    // 2030: NO2 1-h 200 (3), SO2 1-h 350 (3), SO2 24-h 50 (18), CO 24-h 4 mg/m3 (18), benzene 3.4; WHO: SO2 24-h 40, CO 24-h 4 mg/m3;
    // NH3 critical levels 1 and 3 ug/m3 (UNECE 2007)
    const fromMemory: [string, number, number][] = [
      ['CO maximum daily 8-hour mean (EU 2008/50/EC)', 10_000, 0],
      ['benzene annual mean (EU 2008/50/EC)', 5, 0],
      ['PM2.5 annual mean (EU 2008/50/EC)', 25, 0],
      ['NO2 1-hour mean (EU 2024/2881, 2030)', 200, 3],
      ['SO2 1-hour mean (EU 2024/2881, 2030)', 350, 3],
      ['SO2 24-hour mean (EU 2024/2881, 2030)', 50, 18],
      ['CO 24-hour mean (EU 2024/2881, 2030)', 4000, 18],
      ['benzene annual mean (EU 2024/2881, 2030)', 3.4, 0],
      ['SO2 24-hour mean (WHO 2021)', 40, 3],
      ['CO 24-hour mean (WHO 2021)', 4000, 3],
      ['NH3 annual mean, lichens and mosses (UNECE 2007)', 1, 0],
      ['NH3 annual mean, higher plants (UNECE 2007)', 3, 0],
    ];
    for (const [name, limit, exceedances] of fromMemory) {
      const standard = find(name);
      expect([standard.limit_ug_m3, standard.allowedExceedances]).toEqual([limit, exceedances]);
      expect(standard.source).toMatch(/memory/);
    }
  });

  it('gives the percentiles the EU 2008/50/EC allowed exceedances imply', () => {
    // REFERENCES.md [derived] from the Directive's counts: 18 of 8760 hours -> 99.79th, 35 of 365 days -> 90.41st,
    // 24 of 8760 hours -> 99.73rd, 3 of 365 days -> 99.18th
    expect(percentileForStandard(find('NO2 1-hour mean (EU 2008/50/EC)'))).toBeCloseTo(99.79, 2);
    expect(percentileForStandard(find('PM10 24-hour mean (EU 2008/50/EC)'))).toBeCloseTo(90.41, 2);
    expect(percentileForStandard(find('SO2 1-hour mean (EU 2008/50/EC)'))).toBeCloseTo(99.73, 2);
    expect(percentileForStandard(find('SO2 24-hour mean (EU 2008/50/EC)'))).toBeCloseTo(99.18, 2);
  });

  it('has an entry for every pollutant, standards for each, and every standard in a known set', () => {
    for (const pollutant of LIBRARY_POLLUTANTS) {
      expect(LIBRARY_POLLUTANT_ENTRIES[pollutant].name).toBe(pollutant);
      expect(libraryStandardsFor(pollutant).length).toBeGreaterThan(0);
    }
    for (const standard of LIBRARY_STANDARDS) {
      expect(STANDARD_SETS).toContain(standard.set);
      expect(standard.source).toMatch(/\[(read|memory)/);
    }
    // NOx is assessed against NO2's standards
    expect(libraryStandardsFor('NOx').map((s) => s.name)).toEqual(libraryStandardsFor('NO2').map((s) => s.name));
    expect(libraryStandardsFor('PM2.5', ['who-2021']).map((s) => s.limit_ug_m3)).toEqual([15, 5]);
  });

  it('suggests the loss coefficients REFERENCES.md gives, each with its source', () => {
    // VDI 3782 Part 5 [memory]: PM2.5 a 0.3e-4 b 0.8, 2.5-10 um 1.5e-4, SO2 2e-5 b 1.0, NH3 1.2e-4 b 0.6;
    // TA Luft 2002 table 13 [read]: < 2.5 um 0.001 m/s, 2.5-10 um 0.01 m/s
    expect(LIBRARY_POLLUTANT_ENTRIES['PM2.5'].suggestedLosses.washout).toMatchObject({ a_per_s: 0.3e-4, b: 0.8 });
    expect(LIBRARY_POLLUTANT_ENTRIES.PM10.suggestedLosses.washout).toMatchObject({ a_per_s: 1.5e-4, b: 0.8 });
    expect(LIBRARY_POLLUTANT_ENTRIES.SO2.suggestedLosses.washout).toMatchObject({ a_per_s: 2e-5, b: 1 });
    expect(LIBRARY_POLLUTANT_ENTRIES.NH3.suggestedLosses.washout).toMatchObject({ a_per_s: 1.2e-4, b: 0.6 });
    expect(LIBRARY_POLLUTANT_ENTRIES['PM2.5'].suggestedLosses.depositionVelocity_m_s?.value).toBe(0.001);
    expect(LIBRARY_POLLUTANT_ENTRIES.PM10.suggestedLosses.depositionVelocity_m_s?.value).toBe(0.01);
  });
});

/**
 * The assessment of an hourly series: each library standard's figure is the standard's own statistic of
 * NO2 = ratio x NOx (common practice in permit guidance, ratios from memory, REFERENCES.md), so it must
 * equal the ratio times the same statistic of a user standard with the same limit, averaging and
 * allowed exceedances taken on NOx (a positive factor moves every period alike; EU 2008/50/EC percentile
 * definitions in solver/diagnostics/statistics.ts); exceedances are counted on NO2 + background.
 */
import { describe, expect, it } from 'vitest';
import { runScenario } from '../../../solver/drivers/runScenario.ts';
import { hoursFrom, seriesScenario } from '../meteorology/seriesFixture.ts';

const hours = hoursFrom('2026-03-01T00:00:00Z', 48, (h) => ({ windSpeed_m_s: 2 + (h % 5), windFrom_deg: (h * 37) % 360, stability: 'CDEDC'[h % 5] }));

describe('assessment of an hourly series', () => {
  it('gives NO2 library figures as the ratio times the NOx statistic, and verdicts on them', async () => {
    const scenario = seriesScenario({
      weather: { kind: 'hourly', hours },
      assessment: {
        background_ug_m3: 10,
        libraryPollutant: 'NOx',
        standardSets: ['eu-2008-50-ec'],
        standards: [
          { name: 'NOx 1-hour as 2008/50/EC', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 },
          { name: 'NOx annual', limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0 },
        ],
      },
    });
    const result = await runScenario(scenario, {});
    const field = (name: string) => result.standardFields!.find((f) => f.name === name)!;
    const no2Hourly = field('NO2 1-hour mean (EU 2008/50/EC)');
    const noxHourly = field('NOx 1-hour as 2008/50/EC');
    const no2Annual = field('NO2 annual mean (EU 2008/50/EC)');
    const noxAnnual = field('NOx annual');
    for (let r = 0; r < 3; r++) {
      expect(no2Hourly.receptors_ug_m3[r]).toBeCloseTo(0.35 * noxHourly.receptors_ug_m3[r], 12);
      expect(no2Annual.receptors_ug_m3[r]).toBeCloseTo(0.7 * noxAnnual.receptors_ug_m3[r], 12);
    }
    const no2Ground = no2Annual.ground_ug_m3!;
    const noxGround = noxAnnual.ground_ug_m3!;
    let worst = 0;
    for (let c = 0; c < no2Ground.length; c++) worst = Math.max(worst, Math.abs(no2Ground[c] - 0.7 * noxGround[c]));
    expect(worst).toBeLessThan(1e-9);
    const verdict = result.verdicts!.standards.find((s) => s.name === 'NO2 annual mean (EU 2008/50/EC)')!;
    expect(verdict.basis).toBe('statistic');
    expect(verdict.maximum!.where).toBe('ground');
    expect(verdict.maximum!.pc_ug_m3).toBe(Math.max(...no2Ground));
    expect(result.verdicts!.noxToNo2).toMatchObject({ longTerm: 0.7, shortTerm: 0.35 });
    expect(['screenedOut', 'notScreenedOut']).toContain(verdict.maximum!.outcome);
  });
});

/**
 * The screening weather set: its class-speed pairs against the stability table it is read from
 * (Turner 1970 Table 1, read in Boubel et al. 1994 Table 19-3, REFERENCES.md), and the run's maxima
 * against steady runs of the weather it names (the maximum must be one of the set's states exactly).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { screeningClassSpeeds, screeningWeatherStates } from '../../../solver/assessment/screeningWeather.ts';
import { runScenario } from '../../../solver/drivers/runScenario.ts';

const DEMO = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');

function smallDemo(change: (raw: Record<string, any>) => void = () => {}): Scenario {
  const raw = JSON.parse(readFileSync(DEMO, 'utf8'));
  raw.domain = { halfWidth_m: 3000, spacing_m: 300, height_m: 1000, layers: 10 };
  raw.solver = { mode: 'gaussian' };
  change(raw);
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}

describe('screening weather set', () => {
  it('pairs each class with the speed bands the stability table gives it', () => {
    const speedsOf = (cls: string) => screeningClassSpeeds().filter((p) => p.stability === cls).map((p) => p.windSpeed_m_s);
    // Table 19-3: A below 3 m/s (A, A-B), B below 5 (A-B, B, B-C), C from 2 m/s up, E 2-5 at night, F 2-3 at night;
    // D at every speed (overcast); the blank night cells below 2 m/s filled with E and F (stated choice)
    expect(speedsOf('A')).toEqual([1, 1.5, 2, 2.5]);
    expect(speedsOf('B')).toEqual([1, 1.5, 2, 2.5, 3, 4]);
    expect(speedsOf('C')).toEqual([2, 2.5, 3, 4, 5, 7, 10, 15]);
    expect(speedsOf('D')).toEqual([1, 1.5, 2, 2.5, 3, 4, 5, 7, 10, 15]);
    expect(speedsOf('E')).toEqual([1, 1.5, 2, 2.5, 3, 4]);
    expect(speedsOf('F')).toEqual([1, 1.5, 2, 2.5]);
    const states = screeningWeatherStates({ kind: 'screeningSet', sectors: 4, rain_mm_h: 0, airTemperature_K: 288.15, anemometerHeight_m: 10 });
    expect(states.length).toBe(4 * 38);
    expect([...new Set(states.map((s) => s.windFrom_deg))]).toEqual([0, 90, 180, 270]);
  });

  it('gives at each receptor and on the ground the highest hourly PC of the set, equal to a steady run of the weather it names', async () => {
    const scenario = smallDemo((raw) => {
      raw.weather = { kind: 'screeningSet', sectors: 4 };
      raw.assessment = { background_ug_m3: 14, libraryPollutant: 'NOx', standardSets: ['eu-2008-50-ec'] };
    });
    const result = await runScenario(scenario, {});
    expect(result.weatherKind).toBe('screeningSet');
    expect(result.footprintStatistic).toBe('maximum');
    const worst = result.extraSummary.worstWeather as { receptors: { id: string; max_hourly_ug_m3: number; weather: Record<string, unknown> }[] };
    const school = worst.receptors.find((r) => r.id === 'school')!;
    const steady = await runScenario(
      smallDemo((raw) => {
        raw.weather = { kind: 'steady', ...school.weather };
      }),
      {},
    );
    const schoolIndex = scenario.receptors.findIndex((r) => r.id === 'school');
    expect(steady.receptorColumns[0].values[schoolIndex]).toBe(school.max_hourly_ug_m3);
    // and another state of the set is not higher there
    const other = await runScenario(smallDemo((raw) => (raw.weather = { kind: 'steady', windSpeed_m_s: 5, windFrom_deg: 270, stability: 'D' })), {});
    expect(other.receptorColumns[0].values[schoolIndex]).toBeLessThanOrEqual(school.max_hourly_ug_m3);
    // verdicts on the upper bound: each standard carries basis upperBound; NO2 annual = 0.7 x the NOx maximum
    const annual = result.verdicts!.standards.find((s) => s.name === 'NO2 annual mean (EU 2008/50/EC)')!;
    expect(annual.basis).toBe('upperBound');
    expect(annual.receptors![schoolIndex].pc_ug_m3).toBeCloseTo(0.7 * school.max_hourly_ug_m3, 12);
  });
});

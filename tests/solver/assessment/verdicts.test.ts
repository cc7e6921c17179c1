/**
 * Screening verdicts: the two-stage screen (common practice in permit guidance, gov.uk "Air emissions risk
 * assessment for your environmental permit"; thresholds 1 % / 10 % / 70 % from memory, REFERENCES.md), the
 * NOx to NO2 ratios (common practice, 70 % / 35 %, from memory, REFERENCES.md), and what a steady state
 * cannot tell.
 */
import { describe, expect, it } from 'vitest';
import { assessmentPlan, DEFAULT_NOX_TO_NO2, DEFAULT_SCREENING_THRESHOLDS } from '../../../solver/assessment/standards.ts';
import { pointVerdict, screeningVerdicts } from '../../../solver/assessment/verdicts.ts';

const grid = { nx: 3, ny: 2, spacing_m: 10, xWest_m: -15, ySouth_m: -10 };
const receptors = [
  { id: 'near', x_m: 0, y_m: 0 },
  { id: 'far', x_m: 100, y_m: 0 },
];

describe('the two-stage screen', () => {
  it('uses the thresholds REFERENCES.md states: 1 % long-term, 10 % short-term, then PEC 70 % long-term', () => {
    expect(DEFAULT_SCREENING_THRESHOLDS).toEqual({ pcLongTerm_pct: 1, pcShortTerm_pct: 10, pecLongTerm_pct: 70 });
    const t = DEFAULT_SCREENING_THRESHOLDS;
    // long-term 40 ug/m3: 0.39 is 0.975 % -> stage 1
    expect(pointVerdict(0.39, { limit_ug_m3: 40, term: 'long' }, 30, t, 'statistic')).toMatchObject({ stage1: { passed: true }, stage2: null, outcome: 'screenedOut' });
    // 0.41 is 1.025 %: stage 1 fails; PEC 14.41 = 36 % of 40 -> stage 2 passes
    const second = pointVerdict(0.41, { limit_ug_m3: 40, term: 'long' }, 14, t, 'statistic');
    expect(second.stage1.passed).toBe(false);
    expect(second.stage2).toEqual({ threshold_pct: 70, passed: true });
    expect(second.pecPercentOfStandard).toBeCloseTo((100 * 14.41) / 40, 10);
    expect(second.outcome).toBe('screenedOut');
    // PEC 28.41 = 71 %: neither stage
    expect(pointVerdict(0.41, { limit_ug_m3: 40, term: 'long' }, 28, t, 'statistic').outcome).toBe('notScreenedOut');
    // short-term 200: 19.9 is 9.95 % -> screened out; 20.1 is 10.05 % -> not (no second stage for short-term here)
    expect(pointVerdict(19.9, { limit_ug_m3: 200, term: 'short' }, 100, t, 'statistic').outcome).toBe('screenedOut');
    const short = pointVerdict(20.1, { limit_ug_m3: 200, term: 'short' }, 0, t, 'statistic');
    expect([short.stage2, short.outcome]).toEqual([null, 'notScreenedOut']);
  });

  it('treats an upper bound as deciding only a pass, and one weather hour as indicative', () => {
    const t = DEFAULT_SCREENING_THRESHOLDS;
    expect(pointVerdict(0.1, { limit_ug_m3: 40, term: 'long' }, 0, t, 'upperBound').outcome).toBe('screenedOut');
    expect(pointVerdict(30, { limit_ug_m3: 40, term: 'long' }, 0, t, 'upperBound').outcome).toBe('undetermined');
    expect(pointVerdict(0.1, { limit_ug_m3: 200, term: 'short' }, 0, t, 'oneWeatherHour').outcome).toBe('indicative');
  });
});

describe('assessment plan', () => {
  it('converts NOx to NO2 with the long-term ratio for annual and the short-term ratio for hourly standards', () => {
    expect(DEFAULT_NOX_TO_NO2).toEqual({ longTerm: 0.7, shortTerm: 0.35 });
    const plan = assessmentPlan({ background_ug_m3: 14, standards: [], libraryPollutant: 'NOx', standardSets: ['eu-2008-50-ec'] }, 'NOx');
    expect(plan.standards.map((s) => [s.name, s.pcFactor])).toEqual([
      ['NO2 1-hour mean (EU 2008/50/EC)', 0.35],
      ['NO2 annual mean (EU 2008/50/EC)', 0.7],
    ]);
    expect(plan.standards[0].conversion).toMatch(/0\.35 x NOx.*common practice/);
    const worstCase = assessmentPlan(
      { background_ug_m3: 0, standards: [], libraryPollutant: 'NOx', standardSets: ['eu-2008-50-ec'], noxToNo2: { longTerm: 1, shortTerm: 0.5 } },
      'NOx',
    );
    expect(worstCase.standards.map((s) => s.pcFactor)).toEqual([0.5, 1]);
  });

  it('adds user standards at factor 1, refuses one that takes a library name, and leaves CO 8-hour to running means', () => {
    const plan = assessmentPlan(
      { background_ug_m3: 0, standards: [{ name: 'site limit', limit_ug_m3: 100, averaging_h: 1, allowedExceedances: 0 }], libraryPollutant: 'CO', standardSets: ['eu-2008-50-ec'] },
      'CO',
    );
    expect(plan.standards.map((s) => [s.name, s.origin, s.pcFactor])).toEqual([
      ['CO maximum daily 8-hour mean (EU 2008/50/EC)', 'library', 1],
      ['site limit', 'user', 1],
    ]);
    // computed from running 8-hour means (coRunningMean.test.ts)
    expect(plan.standards[0].notComputed).toBeNull();
    expect(plan.standards[0].runningMean).toBe(true);
    expect(() =>
      assessmentPlan({ background_ug_m3: 0, standards: [{ name: 'NO2 annual mean (EU 2008/50/EC)', limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0 }], libraryPollutant: 'NO2' }, 'NO2'),
    ).toThrow(/assessment\.standards\[0\]\.name/);
  });
});

describe('screeningVerdicts', () => {
  const plan = assessmentPlan({ background_ug_m3: 14, standards: [], libraryPollutant: 'NO2', standardSets: ['eu-2008-50-ec'] }, 'NO2');

  it('gives every receptor and the ground maximum (with its cell centre) their PC, PEC and screen', () => {
    const ground = Float64Array.from([0, 1, 2, 3, 8, 5]);
    const verdicts = screeningVerdicts(
      plan,
      [
        { name: 'NO2 1-hour mean (EU 2008/50/EC)', basis: 'statistic', receptors_ug_m3: Float64Array.of(8, 1), ground_ug_m3: ground },
        { name: 'NO2 annual mean (EU 2008/50/EC)', basis: 'statistic', receptors_ug_m3: Float64Array.of(0.5, 0.1), ground_ug_m3: null },
      ],
      { weatherKind: 'hourly', grid, receptors },
    );
    const [hourly, annual] = verdicts.standards;
    // the largest ground value is index 4 = (i 1, j 1): centre x = -15 + 1.5 * 10 = 0, y = -10 + 1.5 * 10 = 5
    expect(hourly.maximum).toMatchObject({ where: 'ground', x_m: 0, y_m: 5, pc_ug_m3: 8, pec_ug_m3: 22, outcome: 'screenedOut' });
    expect(hourly.receptors?.map((r) => r.id)).toEqual(['near', 'far']);
    // annual: no ground map, the maximum over receptors; 0.5 of 40 = 1.25 % -> stage 2: PEC 14.5 = 36 % -> screened out
    expect(annual.maximum).toMatchObject({ where: 'receptors', receptorId: 'near', pc_ug_m3: 0.5, outcome: 'screenedOut' });
    expect(annual.maximum?.stage1.passed).toBe(false);
    expect(verdicts.label).toMatch(/not a legal decision/);
  });

  it('says what one steady state cannot tell instead of a figure', () => {
    const verdicts = screeningVerdicts(
      plan,
      [{ name: 'NO2 1-hour mean (EU 2008/50/EC)', basis: 'oneWeatherHour', receptors_ug_m3: Float64Array.of(3, 1), ground_ug_m3: null }],
      { weatherKind: 'steady', grid, receptors },
    );
    expect(verdicts.standards[0].maximum?.outcome).toBe('indicative');
    expect(verdicts.standards[1].basis).toBeNull();
    expect(verdicts.standards[1].reason).toMatch(/cannot tell an annual mean/);
  });
});

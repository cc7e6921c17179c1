// Behaviour checks of the format 1 schema against ../shared/spec/scenario-format.md: the spec's
// example parses with the defaults the brief lists filled in, and each kind of bad value is refused
// with its field path, the value and what is allowed.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  formatIssues,
  parseIsoTime_ms,
  parseScenario,
  type ScenarioIssue,
} from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';

const readJson = (name: string): Record<string, any> =>
  JSON.parse(readFileSync(new URL(`../../fixtures/valid/${name}`, import.meta.url), 'utf8'));

/** The minimal valid scenario, freshly read (tests change their own copy). */
const minimal = (): Record<string, any> => readJson('minimal.scenario.json');

function issuesOf(raw: unknown): ScenarioIssue[] {
  const outcome = parseScenario(raw);
  if (outcome.ok) throw new Error('expected the scenario to be refused');
  return outcome.issues;
}

function parsed(raw: unknown): Scenario {
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(`expected a valid scenario:\n${formatIssues(outcome.issues)}`);
  return outcome.scenario;
}

describe('valid scenarios', () => {
  it('parses the spec example with every value kept as written', () => {
    const raw = readJson('spec-example.scenario.json');
    const scenario = parsed(raw);
    // Everything in the example is given, so the parsed scenario is the file plus the defaults
    // the example leaves out: solver.hourlyMethod only.
    expect(scenario).toEqual({ ...raw, solver: { mode: 'grid', hourlyMethod: 'independentHours' } });
  });

  it('fills every default of the format in a scenario that gives only the required fields', () => {
    const scenario = parsed(minimal());
    expect(scenario.site.landUse).toBe('rural');
    expect(scenario.domain).toBeUndefined();
    expect(scenario.pollutant).toEqual({ name: 'NOx', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 });
    expect(scenario.weather).toEqual({
      kind: 'steady',
      windSpeed_m_s: 5,
      windFrom_deg: 270,
      stability: 'D',
      rain_mm_h: 0,
      airTemperature_K: 288.15,
      anemometerHeight_m: 10,
    });
    expect(scenario.dispersion).toEqual({ kind: 'stability', curves: 'briggs' });
    expect(scenario.solver).toEqual({ mode: 'grid', hourlyMethod: 'independentHours' });
    expect(scenario.windProfile).toBe('powerLaw');
    const [stack, yard] = scenario.sources;
    expect(stack).toMatchObject({ kind: 'point', name: 'stack-1', plumeRise: true });
    expect(yard).toMatchObject({ kind: 'area', name: 'yard' });
    expect(scenario.receptors[0]).toEqual({ id: 'school', name: 'school', lat: 52.004, lon: 5.03, height_m: 1.5 });
    expect(scenario.assessment).toBeUndefined();
  });

  it('fills the defaults inside nested objects given empty, and keeps explicit nulls', () => {
    const raw: Record<string, any> = { ...minimal(), solver: {}, dispersion: { kind: 'stability' } };
    raw.pollutant.halfLife_h = null;
    const scenario = parsed(raw);
    expect(scenario.solver).toEqual({ mode: 'grid', hourlyMethod: 'independentHours' });
    expect(scenario.dispersion).toEqual({ kind: 'stability', curves: 'briggs' });
    expect(scenario.pollutant.halfLife_h).toBeNull();
  });

  it('accepts constant diffusivities, a wind rose, inline hours and a CSV-backed hourly series', () => {
    const rose = minimal();
    rose.dispersion = { kind: 'constant', horizontal_m2_s: 10, vertical_m2_s: 5 };
    // 0.996: within the 0.005 the format allows for rounding in published roses.
    rose.weather = {
      kind: 'windRose',
      sectorWidth_deg: 180,
      cells: [
        { windFrom_deg: 0, windSpeed_m_s: 3, stability: 'D', frequency: 0.498 },
        { windFrom_deg: 180, windSpeed_m_s: 6, stability: 'C', frequency: 0.498, mixingHeight_m: 900 },
      ],
    };
    expect(parsed(rose).weather).toMatchObject({ kind: 'windRose', rain_mm_h: 0, airTemperature_K: 288.15, anemometerHeight_m: 10 });

    const inline = minimal();
    inline.weather = {
      kind: 'hourly',
      hours: [
        { time: '2024-06-01T10:00:00+02:00', windSpeed_m_s: 3, windFrom_deg: 90, cloudCover_oktas: 2 },
        // a gap of two hours is not an error of the format (the weather runner reports gaps)
        { time: '2024-06-01T10:00Z', windSpeed_m_s: 3, windFrom_deg: 90, temperatureDifference: { lowerHeight_m: 2, upperHeight_m: 10, difference_K: -0.3 } },
      ],
    };
    const hourly = parsed(inline).weather;
    expect(hourly.kind === 'hourly' && hourly.hours.map((hour) => hour.rain_mm_h)).toEqual([0, 0]);

    const fromCsv = minimal();
    fromCsv.weather = { kind: 'hourly', csv: 'weather/hours.csv' };
    // parseScenario does not read files: the hours stay empty until loadScenarioFile fills them.
    expect(parsed(fromCsv).weather).toEqual({ kind: 'hourly', hours: [], csv: 'weather/hours.csv' });
  });

  it('accepts a "$schema" pointer for editors and leaves it out of the parsed scenario', () => {
    const scenario = parsed({ $schema: './scenario.schema.json', ...minimal() });
    expect('$schema' in scenario).toBe(false);
  });
});

describe('issues name the field, the value and what is allowed', () => {
  it('formats an issue as "path: got value; allowed"', () => {
    const raw = minimal();
    raw.sources[0].emission_g_s = -1;
    const issues = issuesOf(raw);
    expect(formatIssues(issues)).toBe('sources[0].emission_g_s: got -1; must be a finite number >= 0 [g/s]');
    expect(issues).toEqual([{ path: 'sources[0].emission_g_s', value: -1, message: 'must be a finite number >= 0 [g/s]' }]);
  });

  // JSON cannot hold NaN or Infinity, but a server or a test may hand parseScenario any object.
  it.each([
    ['NaN', Number.NaN, 'NaN'],
    ['Infinity', Number.POSITIVE_INFINITY, 'Infinity'],
    ['-Infinity', Number.NEGATIVE_INFINITY, '-Infinity'],
    ['a string', '5', '"5"'],
    ['null', null, 'null'],
    ['a boolean', true, 'true'],
  ])('refuses %s as a wind speed', (_label, value, shown) => {
    const raw = minimal();
    raw.weather.windSpeed_m_s = value;
    expect(formatIssues(issuesOf(raw))).toBe(`weather.windSpeed_m_s: got ${shown}; must be a finite number > 0 [m/s]`);
  });

  it('refuses NaN and Infinity deep inside lists, naming the element', () => {
    const raw = minimal();
    raw.sources[1].polygon[2] = [Number.NaN, 52.004];
    raw.receptors[0].height_m = Number.POSITIVE_INFINITY;
    const paths = issuesOf(raw).map((issue) => issue.path);
    expect(paths).toEqual(['sources[1].polygon[2][0]', 'receptors[0].height_m']);
  });

  it('reports every issue of a scenario at once, in document order', () => {
    const raw = minimal();
    delete raw.name;
    raw.site.lon = 181;
    raw.weather.windFrom_deg = 361;
    raw.sources[0].diameter_m = 0;
    raw.sources[0].exitTemperature_K = -5;
    raw.receptors[0].colour = 'red';
    expect(issuesOf(raw).map((issue) => issue.path)).toEqual([
      'name',
      'site.lon',
      'weather.windFrom_deg',
      'sources[0].diameter_m',
      'sources[0].exitTemperature_K',
      'receptors[0].colour',
    ]);
  });

  it('names each unknown field, suggests the nearest allowed name and lists the allowed ones', () => {
    const raw = minimal();
    raw.weather.windspeed_m_s = raw.weather.windSpeed_m_s;
    raw.colour = 'blue';
    const issues = issuesOf(raw);
    const typo = issues.find((issue) => issue.path === 'weather.windspeed_m_s');
    expect(typo?.message).toContain('did you mean "windSpeed_m_s"?');
    expect(typo?.message).toContain('allowed here: kind, windSpeed_m_s, windFrom_deg');
    expect(issues.find((issue) => issue.path === 'colour')?.value).toBe('blue');
  });

  it('names the allowed values of a choice and of a discriminator', () => {
    const raw = minimal();
    raw.site.landUse = 'suburban';
    raw.sources[0].kind = 'line';
    raw.dispersion = { kind: 'random-walk' };
    expect(formatIssues(issuesOf(raw)).split('\n')).toEqual([
      'site.landUse: got "suburban"; must be one of "rural", "urban"',
      'dispersion.kind: got "random-walk"; must be one of "stability", "constant"',
      'sources[0].kind: got "line"; must be one of "point", "area"',
    ]);
  });

  it.each([
    ['domain.layers', 1, 'must be a whole number in [2, 200]'],
    ['domain.layers', 201, 'must be a whole number in [2, 200]'],
    ['domain.spacing_m', 0, 'must be a finite number > 0 [m]'],
    ['domain.halfWidth_m', -100, 'must be a finite number > 0 [m]'],
    ['site.lat', 91, 'must be a finite number in [-90, 90] [deg north]'],
    ['pollutant.halfLife_h', 0, 'must be null (conserved, no decay) or a finite number > 0 [h]'],
    ['pollutant.depositionVelocity_m_s', -0.001, 'must be a finite number >= 0 [m/s]'],
    ['weather.cloudCover_oktas', 9, 'must be a finite number in [0, 8] [oktas]'],
    ['weather.airTemperature_K', 0, 'must be a finite number > 0 [K]'],
    ['weather.rain_mm_h', -1, 'must be a finite number >= 0 [mm/h]'],
    ['weather.anemometerHeight_m', 0, 'must be a finite number > 0 [m]'],
    ['weather.mixingHeight_m', 0, 'must be a finite number > 0 [m]'],
  ])('%s = %s: %s', (path, value, message) => {
    const raw = minimal();
    raw.domain = { halfWidth_m: 3000, spacing_m: 50, height_m: 1000, layers: 20 };
    const [objectName, field] = path.split('.');
    raw[objectName][field] = value;
    expect(issuesOf(raw)).toEqual([{ path, value, message }]);
  });

  it('keeps the poles out: |lat| must stay below 84 degrees for the local grid', () => {
    const raw = minimal();
    raw.receptors[0].lat = -84;
    const [issue] = issuesOf(raw);
    expect(issue.path).toBe('receptors[0].lat');
    expect(issue.message).toContain('|lat| < 84');
  });

  it('requires a stability class or what it is derived from, and says how to give it', () => {
    const steady = minimal();
    delete steady.weather.stability;
    expect(issuesOf(steady)[0]).toMatchObject({ path: 'weather.stability', value: undefined });
    expect(issuesOf(steady)[0].message).toMatch(/cloudCover_oktas.*time.*temperatureDifference/);

    // Sky cover alone is not enough in a steady state: the sun's elevation needs the time.
    steady.weather.cloudCover_oktas = 3;
    expect(issuesOf(steady).map((issue) => issue.path)).toEqual(['weather.time']);
    steady.weather.time = '2024-06-01T13:00:00+02:00';
    expect(parseScenario(steady).ok).toBe(true);

    const hourly = minimal();
    hourly.weather = { kind: 'hourly', hours: [{ time: '2024-06-01T10:00Z', windSpeed_m_s: 3, windFrom_deg: 90 }] };
    expect(issuesOf(hourly).map((issue) => issue.path)).toEqual(['weather.hours[0].stability']);
  });

  it('refuses a mast whose upper thermometer is not above the lower one', () => {
    const raw = minimal();
    delete raw.weather.stability;
    raw.weather.temperatureDifference = { lowerHeight_m: 10, upperHeight_m: 10, difference_K: 0.5 };
    expect(issuesOf(raw).map((issue) => issue.path)).toEqual(['weather.temperatureDifference.upperHeight_m']);
  });

  it('refuses an hourly series with neither or both of hours and csv, or with no hours', () => {
    const raw = minimal();
    raw.weather = { kind: 'hourly' };
    expect(issuesOf(raw)[0]).toMatchObject({ path: 'weather', message: expect.stringContaining('exactly one of hours') });
    raw.weather = { kind: 'hourly', csv: 'a.csv', hours: [{ time: '2024-06-01T10:00Z', windSpeed_m_s: 3, windFrom_deg: 9, stability: 'D' }] };
    expect(issuesOf(raw)[0]).toMatchObject({ path: 'weather', message: expect.stringContaining('not both') });
    raw.weather = { kind: 'hourly', hours: [] };
    expect(issuesOf(raw)[0]).toMatchObject({ path: 'weather.hours', message: 'must be a list of at least 1 weather hours' });
  });

  it('names both hours when a time repeats or goes backwards (across time zones)', () => {
    const raw = minimal();
    const hour = (time: string) => ({ time, windSpeed_m_s: 3, windFrom_deg: 90, stability: 'D' });
    // 11:00+01:00 is 10:00Z: a repeat written differently.
    raw.weather = { kind: 'hourly', hours: [hour('2024-06-01T10:00Z'), hour('2024-06-01T11:00+01:00'), hour('2024-06-01T09:00Z')] };
    const issues = issuesOf(raw);
    expect(issues.map((issue) => issue.path)).toEqual(['weather.hours[1].time', 'weather.hours[2].time']);
    expect(issues[0].message).toContain('hours[1] repeats the time of hours[0]');
    expect(issues[1].message).toContain('hours[2] goes back before hours[1]');
  });

  it('refuses wind-rose frequencies that do not sum to 1 within 0.005, showing the sum', () => {
    const raw = minimal();
    raw.weather = {
      kind: 'windRose',
      sectorWidth_deg: 180,
      cells: [
        { windFrom_deg: 0, windSpeed_m_s: 3, stability: 'D', frequency: 0.5 },
        { windFrom_deg: 180, windSpeed_m_s: 3, stability: 'D', frequency: 0.506 },
      ],
    };
    expect(issuesOf(raw)).toEqual([
      { path: 'weather.cells', value: 1.006, message: "the cells' frequencies must sum to 1 (within 0.005); the value shown is their sum" },
    ]);
    raw.weather.cells[1].frequency = 1.5;
    expect(issuesOf(raw)[0]).toMatchObject({ path: 'weather.cells[1].frequency', message: 'must be a finite number in [0, 1]' });
  });

  it('refuses duplicate ids within the sources and within the receptors, and duplicate standard names', () => {
    const raw = minimal();
    raw.sources[1].id = 'stack-1';
    raw.receptors.push({ id: 'school', lat: 52.01, lon: 5.01 });
    raw.assessment = {
      background_ug_m3: 10,
      standards: [
        { name: 'annual mean', limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0 },
        { name: 'annual mean', limit_ug_m3: 20, averaging_h: 8760, allowedExceedances: 0 },
      ],
    };
    const issues = issuesOf(raw);
    expect(issues.map((issue) => issue.path)).toEqual(['sources[1].id', 'receptors[1].id', 'assessment.standards[1].name']);
    expect(issues[0].message).toBe('must be unique among sources; "stack-1" is also sources[0].id');
  });

  it('a source id may equal a receptor id (they are separate lists)', () => {
    const raw = minimal();
    raw.receptors[0].id = 'yard';
    expect(parseScenario(raw).ok).toBe(true);
  });

  it('refuses an empty source list and a list that is not a list', () => {
    const raw = minimal();
    raw.sources = [];
    expect(issuesOf(raw)[0]).toMatchObject({ path: 'sources', message: 'must be a list of at least 1 sources (point or area)' });
    raw.sources = { kind: 'point' };
    expect(issuesOf(raw)[0].path).toBe('sources');
  });

  it('says which fields an object needs when it is not an object at all', () => {
    expect(formatIssues(issuesOf({ ...minimal(), site: 'Tarnwick' }))).toBe(
      'site: got "Tarnwick"; must be an object with the fields lat, lon, landUse?, boundary? (? = optional)',
    );
    expect(issuesOf(null)[0].path).toBe('(scenario)');
  });
});

describe('site boundary', () => {
  const withBoundary = (boundary: unknown): ScenarioIssue[] => {
    const raw = minimal();
    raw.site.boundary = boundary;
    const outcome = parseScenario(raw);
    return outcome.ok ? [] : outcome.issues;
  };
  const square = [[5.0, 52.0], [5.004, 52.0], [5.004, 52.002], [5.0, 52.002], [5.0, 52.0]];

  it('is optional, and a closed simple ring is accepted', () => {
    expect(withBoundary(undefined)).toEqual([]);
    expect(withBoundary(square)).toEqual([]);
  });

  it('is checked as a ring, with its own field path', () => {
    expect(withBoundary(square.slice(0, 4))[0]).toMatchObject({ path: 'site.boundary', message: expect.stringContaining('not closed') });
    const repeated = [square[0], square[1], square[1], square[2], square[3], square[0]];
    expect(withBoundary(repeated)[0]).toMatchObject({ path: 'site.boundary[2]', message: expect.stringContaining('boundary[1]') });
    const bowTie = [[5.0, 52.0], [5.004, 52.002], [5.004, 52.0], [5.0, 52.002], [5.0, 52.0]];
    expect(withBoundary(bowTie)[0]).toMatchObject({ path: 'site.boundary', message: expect.stringContaining('cross') });
  });
});

describe('polygons', () => {
  const withPolygon = (polygon: unknown): ScenarioIssue[] => {
    const raw = minimal();
    raw.sources[1].polygon = polygon;
    const outcome = parseScenario(raw);
    return outcome.ok ? [] : outcome.issues;
  };
  const square = [[5.003, 52.002], [5.006, 52.002], [5.006, 52.004], [5.003, 52.004], [5.003, 52.002]];

  it('accepts a closed simple ring in either orientation', () => {
    expect(withPolygon(square)).toEqual([]);
    expect(withPolygon([...square].reverse())).toEqual([]);
  });

  it('refuses fewer than 4 positions', () => {
    expect(withPolygon(square.slice(0, 3))[0]).toMatchObject({ path: 'sources[1].polygon', message: expect.stringContaining('at least 4') });
  });

  it('refuses a ring whose last position is not its first', () => {
    const issues = withPolygon([...square.slice(0, 4), [5.003, 52.0021]]);
    expect(issues[0].path).toBe('sources[1].polygon');
    expect(issues[0].message).toContain('not closed');
  });

  it('refuses a bow-tie ring and says where its edges cross', () => {
    const bowTie = [[5.003, 52.002], [5.006, 52.004], [5.006, 52.002], [5.003, 52.004], [5.003, 52.002]];
    const [issue] = withPolygon(bowTie);
    expect(issue.path).toBe('sources[1].polygon');
    // The diagonals of the 0.003 x 0.002 degree box cross at its centre.
    expect(issue.message).toContain('[5.0045, 52.003]');
  });

  it('refuses a ring that encloses no area', () => {
    const line = [[5.003, 52.002], [5.004, 52.002], [5.005, 52.002], [5.003, 52.002]];
    const issues = withPolygon(line);
    expect(issues.map((issue) => issue.path)).toEqual(['sources[1].polygon']);
    expect(issues[0].message).toContain('non-zero area');
  });

  it('refuses a position repeated twice in a row, naming the repeat', () => {
    const repeated = [[5.003, 52.002], [5.006, 52.002], [5.006, 52.002], [5.006, 52.004], [5.003, 52.002]];
    expect(withPolygon(repeated).map((issue) => issue.path)).toEqual(['sources[1].polygon[2]']);
  });

  it('refuses positions that are not [lon, lat] pairs', () => {
    expect(withPolygon([[5.003, 52.002, 10], ...square.slice(1, 4), [5.003, 52.002, 10]])[0].path).toBe('sources[1].polygon[0]');
    expect(withPolygon([[5.003, 95], ...square.slice(1, 4), [5.003, 95]])[0].path).toBe('sources[1].polygon[0][1]');
  });
});

describe('ISO 8601 times', () => {
  it.each([
    ['2024-01-15T06:00:00+01:00', Date.UTC(2024, 0, 15, 5)],
    ['2024-01-15T05:00Z', Date.UTC(2024, 0, 15, 5)],
    ['2024-01-15T05:00:30.5Z', Date.UTC(2024, 0, 15, 5, 0, 30, 500)],
    ['2024-02-29T00:00Z', Date.UTC(2024, 1, 29)], // 2024 is a leap year
    ['2024-07-01T00:00:00-05:30', Date.UTC(2024, 6, 1, 5, 30)],
  ])('accepts %s', (time, expected_ms) => {
    expect(parseIsoTime_ms(time)).toBe(expected_ms);
  });

  it.each([
    '2024-01-15T06:00:00', // no offset: local time of an unknown zone
    '2024-01-15 06:00Z', // a space instead of T
    '2024-02-30T00:00Z', // no such day
    '2023-02-29T00:00Z', // 2023 is not a leap year
    '2024-13-01T00:00Z',
    '2024-01-15T24:00Z',
    '2024-01-15T06:00+0100', // basic-format offset beside an extended-format time
    '2024-01-15',
    '',
  ])('refuses %j', (time) => {
    expect(parseIsoTime_ms(time)).toBeNaN();
    const raw = minimal();
    raw.weather.time = time;
    expect(issuesOf(raw)[0]).toMatchObject({ path: 'weather.time', value: time, message: expect.stringContaining('ISO 8601') });
  });
});

/**
 * The one schema of scenario format 1 (`plumeplan.scenario/1`), shared by the command line and the
 * server, and the source of the editors' JSON Schema (`writeJsonSchema.ts`).
 *
 * `parseScenario(raw)` checks an already-parsed JSON value, fills the defaults and returns either the
 * typed `Scenario` or every issue found, each naming the field path, the value and what is allowed.
 * Unknown fields are rejected (each object is strict), numbers must be finite, and physical
 * quantities carry their unit in the message. Checks that need the local grid (sources inside the
 * domain, the grid's memory) live in `semantics.ts`; reading files lives in `load.ts`.
 *
 * Example:
 *   const outcome = parseScenario(JSON.parse(text));
 *   if (!outcome.ok) console.error(formatIssues(outcome.issues));
 */
import { area as turfArea, kinks as turfKinks, polygon as turfPolygon } from '@turf/turf';
import { z } from 'zod';
import {
  LIBRARY_POLLUTANTS,
  SCENARIO_FORMAT,
  STABILITY_CLASSES,
  STANDARD_SETS,
  type Scenario,
} from './types.ts';

// ---------------------------------------------------------------------------------------------
// Issues
// ---------------------------------------------------------------------------------------------

/** One problem in a scenario: where, what was found, and what is allowed. */
export interface ScenarioIssue {
  /** field path like "sources[1].polygon"; "(scenario)" for the whole document */
  path: string;
  /** the value found there (undefined when the field is missing) */
  value: unknown;
  /** what is allowed, e.g. "must be a finite number >= 0 [g/s]" */
  message: string;
}

export type ParseOutcome = { ok: true; scenario: Scenario } | { ok: false; issues: ScenarioIssue[] };

type PathSegment = string | number;

/** Joins path segments the way a reader writes them: `sources[1].polygon`. */
export function formatPath(segments: readonly PathSegment[]): string {
  let text = '';
  for (const segment of segments) {
    if (typeof segment === 'number') text += `[${segment}]`;
    else text += text === '' ? segment : `.${segment}`;
  }
  return text === '' ? '(scenario)' : text;
}

/** The longest shown value in a message [characters]; longer JSON is cut with an ellipsis. */
const SHOWN_VALUE_MAX_CHARS = 80;

/** Renders a found value for a message: numbers as written (NaN, Infinity too), text quoted. */
export function formatValue(value: unknown): string {
  if (value === undefined) return 'nothing (the field is missing)';
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'bigint') return `${value}n`;
  if (typeof value === 'function' || typeof value === 'symbol') return typeof value;
  // JSON.stringify would turn NaN and Infinity into null; keep them visible.
  const text = JSON.stringify(value, (_key, inner: unknown) =>
    typeof inner === 'number' && !Number.isFinite(inner) ? String(inner) : inner,
  );
  return text.length > SHOWN_VALUE_MAX_CHARS ? `${text.slice(0, SHOWN_VALUE_MAX_CHARS - 3)}...` : text;
}

/**
 * One line per issue: `sources[0].emission_g_s: got -1; must be a finite number >= 0 [g/s]`.
 * @param issues the issues to show, in order
 * @returns the lines joined by newlines (no trailing newline)
 */
export function formatIssues(issues: readonly ScenarioIssue[]): string {
  return issues.map((issue) => `${issue.path}: got ${formatValue(issue.value)}; ${issue.message}`).join('\n');
}

/** The value at a path inside a raw (unchecked) JSON value, or undefined where the path ends early. */
export function valueAtPath(raw: unknown, segments: readonly PathSegment[]): unknown {
  let current: unknown = raw;
  for (const segment of segments) {
    if (current === null || typeof current !== 'object') return undefined;
    if (!Object.prototype.hasOwnProperty.call(current, segment)) return undefined;
    current = (current as Record<PathSegment, unknown>)[segment];
  }
  return current;
}

/** Marker that an object's strict check put in front of its list of allowed field names. */
const UNKNOWN_FIELD_MARKER = 'unknown-field-allowed:';

/**
 * Converts zod's issues into scenario issues: the path as text, the raw value found there, and an
 * unknown-keys issue split into one issue per unknown field (with a spelling suggestion).
 * @param issues zod issues from a safeParse of `raw`
 * @param raw the value that was parsed, to look up the values found
 * @param pathPrefix segments put in front of every issue's path (e.g. for a CSV row)
 */
export function toScenarioIssues(
  issues: readonly z.core.$ZodIssue[],
  raw: unknown,
  pathPrefix: readonly PathSegment[] = [],
): ScenarioIssue[] {
  const result: ScenarioIssue[] = [];
  for (const issue of issues) {
    const segments = issue.path.filter(
      (segment): segment is PathSegment => typeof segment === 'string' || typeof segment === 'number',
    );
    if (issue.code === 'unrecognized_keys' && issue.message.startsWith(UNKNOWN_FIELD_MARKER)) {
      const allowed = issue.message.slice(UNKNOWN_FIELD_MARKER.length).split(',');
      for (const key of issue.keys) {
        const suggestion = closestName(key, allowed);
        result.push({
          path: formatPath([...pathPrefix, ...segments, key]),
          value: valueAtPath(raw, [...segments, key]),
          message:
            `is not a field of format 1${suggestion ? ` (did you mean "${suggestion}"?)` : ''}; ` +
            `allowed here: ${allowed.join(', ')}`,
        });
      }
      continue;
    }
    // A check may state the value it judged (a sum, say) instead of the field's raw content.
    const stated = issue.code === 'custom' ? (issue.params as { value?: unknown } | undefined)?.value : undefined;
    result.push({
      path: formatPath([...pathPrefix, ...segments]),
      value: stated !== undefined ? stated : valueAtPath(raw, segments),
      message: issue.message,
    });
  }
  return result;
}

/** The allowed name nearest to a misspelt one (edit distance at most a third of its length), if any. */
function closestName(name: string, allowed: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestDistance = Math.max(1, Math.floor(name.length / 3)) + 1;
  for (const candidate of allowed) {
    const distance = editDistance(name.toLowerCase(), candidate.toLowerCase());
    if (distance < bestDistance) {
      best = candidate;
      bestDistance = distance;
    }
  }
  return best;
}

/** Levenshtein distance between two short strings. */
function editDistance(a: string, b: string): number {
  let previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const current = [i];
    for (let j = 1; j <= b.length; j++) {
      const substitution = previous[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1);
      current.push(Math.min(previous[j] + 1, current[j - 1] + 1, substitution));
    }
    previous = current;
  }
  return previous[b.length];
}

// ---------------------------------------------------------------------------------------------
// Building blocks: each leaf gives one message stating what is allowed, whatever went wrong
// ---------------------------------------------------------------------------------------------

interface NumberLimits {
  /** inclusive lower bound */
  atLeast?: number;
  /** exclusive lower bound */
  above?: number;
  /** inclusive upper bound */
  atMost?: number;
  /** exclusive upper bound */
  below?: number;
  /** whole numbers only */
  integer?: boolean;
}

/** "a finite number >= 0 [g/s]", "a whole number in [2, 200]" */
function describeNumber(limits: NumberLimits, unit: string | null): string {
  const kind = limits.integer ? 'a whole number' : 'a finite number';
  const parts: string[] = [];
  if (limits.atLeast !== undefined && limits.atMost !== undefined) {
    parts.push(`in [${limits.atLeast}, ${limits.atMost}]`);
  } else {
    if (limits.atLeast !== undefined) parts.push(`>= ${limits.atLeast}`);
    if (limits.above !== undefined) parts.push(`> ${limits.above}`);
    if (limits.atMost !== undefined) parts.push(`<= ${limits.atMost}`);
    if (limits.below !== undefined) parts.push(`< ${limits.below}`);
  }
  const range = parts.length > 0 ? ` ${parts.join(' and ')}` : '';
  return `${kind}${range}${unit ? ` [${unit}]` : ''}`;
}

/**
 * A finite number within limits, with one message for every way it can fail (wrong type, NaN,
 * Infinity, out of range). zod 4's number already rejects NaN and +-Infinity.
 */
function quantity(limits: NumberLimits, unit: string | null, description: string) {
  const allowed = `must be ${describeNumber(limits, unit)}`;
  let schema = z.number({ error: allowed });
  if (limits.integer) schema = schema.int({ error: allowed });
  if (limits.atLeast !== undefined) schema = schema.min(limits.atLeast, { error: allowed });
  if (limits.above !== undefined) schema = schema.gt(limits.above, { error: allowed });
  if (limits.atMost !== undefined) schema = schema.max(limits.atMost, { error: allowed });
  if (limits.below !== undefined) schema = schema.lt(limits.below, { error: allowed });
  return schema.describe(`${description}${unit ? ` [${unit}]` : ''}`);
}

/** Like `quantity`, but null is allowed too, meaning what `nullMeaning` says. */
function nullableQuantity(limits: NumberLimits, unit: string, description: string, nullMeaning: string) {
  const allowed = `must be null (${nullMeaning}) or ${describeNumber(limits, unit)}`;
  let schema = z.number({ error: allowed });
  if (limits.above !== undefined) schema = schema.gt(limits.above, { error: allowed });
  if (limits.atLeast !== undefined) schema = schema.min(limits.atLeast, { error: allowed });
  return schema.nullable().describe(`${description} [${unit}]; null = ${nullMeaning}`);
}

/**
 * Latitude: within [-90, 90], and away from the poles where the local transverse Mercator grid is
 * not used. 84 degrees is where the UTM system hands over to polar stereographic (common practice
 * of map projection); closer to a pole the meridians converge too fast for a plain metre grid.
 */
const POLAR_LIMIT_deg = 84;
function latitude(description: string) {
  const allowed = 'must be a finite number in [-90, 90] [deg north]';
  return z
    .number({ error: allowed })
    .min(-90, { error: allowed, abort: true })
    .max(90, { error: allowed, abort: true })
    .refine((lat) => Math.abs(lat) < POLAR_LIMIT_deg, {
      error:
        `must be within ${POLAR_LIMIT_deg} degrees of the equator (|lat| < ${POLAR_LIMIT_deg}) [deg north]: ` +
        'the local transverse Mercator grid is not used in polar regions',
    })
    .describe(`${description}, WGS 84 [deg north]`);
}

function longitude(description: string) {
  return quantity({ atLeast: -180, atMost: 180 }, 'deg east', `${description}, WGS 84`);
}

function text(description: string) {
  return z.string({ error: 'must be a non-empty string' }).min(1, { error: 'must be a non-empty string' }).describe(description);
}

function choice<const T extends readonly [string, ...string[]]>(values: T, description: string) {
  const allowed = `must be one of ${values.map((value) => JSON.stringify(value)).join(', ')}`;
  return z.enum(values, { error: allowed }).describe(description);
}

function flag(description: string) {
  return z.boolean({ error: 'must be true or false' }).describe(description);
}

/**
 * A strict object: unknown fields are rejected (the allowed names travel in the message so that
 * `toScenarioIssues` can list them), and a non-object says which fields were expected.
 */
function strictObject<const Shape extends z.core.$ZodShape>(shape: Shape, description: string) {
  const names = Object.keys(shape);
  const required = names.filter((name) => {
    const field = shape[name] as z.ZodType;
    return !field.safeParse(undefined).success;
  });
  const fields = names.map((name) => (required.includes(name) ? name : `${name}?`)).join(', ');
  return z
    .strictObject(shape, {
      error: (issue) =>
        issue.code === 'unrecognized_keys'
          ? `${UNKNOWN_FIELD_MARKER}${names.join(',')}`
          : `must be an object with the fields ${fields} (? = optional)`,
    })
    .describe(description);
}

/**
 * ISO 8601 date and time with an explicit offset or Z, to the minute or second (fractions allowed):
 * 2024-01-15T06:00Z, 2024-01-15T06:00:00+01:00.
 */
const ISO_TIME_PATTERN =
  /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?(?:Z|([+-])(\d{2}):(\d{2}))$/;

/** Milliseconds since 1970 of an ISO 8601 time as this format allows it, or NaN if it is not one. */
export function parseIsoTime_ms(value: string): number {
  const match = ISO_TIME_PATTERN.exec(value);
  if (!match) return Number.NaN;
  const [, year, month, day, hour, minute, second, , offsetHour, offsetMinute] = match.map((part) =>
    part === undefined ? undefined : Number(part),
  ) as (number | undefined)[];
  const y = year!, mo = month!, d = day!, h = hour!, mi = minute!, s = second ?? 0;
  if (mo < 1 || mo > 12 || h > 23 || mi > 59 || s > 59) return Number.NaN;
  // Day of month must exist in that month (leap years included): Date.UTC rolls over otherwise.
  const dayStart_ms = Date.UTC(y, mo - 1, d);
  if (d < 1 || new Date(dayStart_ms).getUTCDate() !== d) return Number.NaN;
  if (offsetHour !== undefined && (offsetHour > 14 || offsetMinute! > 59)) return Number.NaN;
  // Date.parse handles the offset and the fraction once the fields are known to be in range.
  return Date.parse(value);
}

const TIME_ALLOWED =
  'must be an ISO 8601 date and time with a time-zone offset or Z, e.g. "2024-01-15T06:00:00+01:00" or "2024-01-15T05:00Z"';

function isoTime(description: string) {
  return z
    .string({ error: TIME_ALLOWED })
    .regex(ISO_TIME_PATTERN, { error: TIME_ALLOWED, abort: true })
    .refine((value) => Number.isFinite(parseIsoTime_ms(value)), { error: TIME_ALLOWED })
    .describe(description);
}

/** A list, with a message saying what each item is when the list itself is wrong. */
function list<T extends z.ZodType>(item: T, itemDescription: string, minimum = 0) {
  const allowed =
    minimum > 0 ? `must be a list of at least ${minimum} ${itemDescription}` : `must be a list of ${itemDescription}`;
  return z.array(item, { error: allowed }).min(minimum, { error: allowed });
}

// ---------------------------------------------------------------------------------------------
// Site, domain, pollutant
// ---------------------------------------------------------------------------------------------

const positionSchema = z
  .tuple([longitude('longitude'), latitude('latitude')], { error: 'must be a [lon, lat] pair of finite numbers' })
  .describe('a GeoJSON position [lon, lat]');

const POLYGON_ALLOWED = 'must be a closed GeoJSON ring of at least 4 [lon, lat] positions (first position = last)';

/** Below this geodesic area a ring encloses nothing [m2] (floating-point slack for collinear points). */
const POLYGON_MINIMUM_AREA_m2 = 1e-3;

/**
 * A closed GeoJSON ring: an area source's polygon or the site boundary.
 * @param field the field's name, used in the messages ("polygon", "boundary")
 * @param description what the ring is, for the JSON Schema
 */
function ringSchema(field: string, description: string) {
  return z
    .array(positionSchema, { error: POLYGON_ALLOWED })
    .min(4, { error: POLYGON_ALLOWED })
    .superRefine((ring, context) => {
      const first = ring[0];
      const last = ring[ring.length - 1];
      if (first[0] !== last[0] || first[1] !== last[1]) {
        context.addIssue({
          code: 'custom',
          path: [],
          message: `${POLYGON_ALLOWED}; the ring is not closed: it starts at [${first}] and ends at [${last}]`,
        });
        return;
      }
      for (let index = 1; index < ring.length; index++) {
        if (ring[index][0] === ring[index - 1][0] && ring[index][1] === ring[index - 1][1]) {
          context.addIssue({
            code: 'custom',
            path: [index],
            message: `must differ from the position before it (${field}[${index - 1}]); remove the repeated position`,
          });
          return;
        }
      }
      const feature = turfPolygon([ring]);
      const crossings = turfKinks(feature).features.map((point) => point.geometry.coordinates);
      if (crossings.length > 0) {
        const where = crossings
          .slice(0, 3)
          .map((position) => `[${position.map((value) => Number(value.toFixed(6))).join(', ')}]`)
          .join(', ');
        context.addIssue({
          code: 'custom',
          path: [],
          message: `must not cross itself; its edges cross at ${where}${crossings.length > 3 ? ' and elsewhere' : ''}`,
        });
        return;
      }
      if (!(turfArea(feature) >= POLYGON_MINIMUM_AREA_m2)) {
        context.addIssue({ code: 'custom', path: [], message: 'must enclose a non-zero area (its positions are collinear or repeated)' });
      }
    })
    .describe(`${description}: GeoJSON [lon, lat] ring, closed (first = last), not crossing itself`);
}

const siteSchema = strictObject(
  {
    lat: latitude('origin of the local projected grid'),
    lon: longitude('origin of the local projected grid'),
    landUse: choice(['rural', 'urban'], 'selects wind-profile exponents and dispersion curves').default('rural'),
    boundary: ringSchema(
      'boundary',
      'the site boundary (optional): peaks and footprint figures are reported off the site, where the public can be',
    ).optional(),
  },
  'the site: origin of the local projected grid',
);

const domainSchema = strictObject(
  {
    halfWidth_m: quantity({ above: 0 }, 'm', 'half the width of the square domain centred on the site'),
    spacing_m: quantity({ above: 0 }, 'm', 'horizontal cell size'),
    height_m: quantity({ above: 0 }, 'm', 'top of the grid, a no-flux lid'),
    layers: quantity({ integer: true, atLeast: 2, atMost: 200 }, null, 'vertical layers, stretched, thinnest at the ground'),
  },
  'the grid domain; absent = derived from the sources and receptors',
);

const washoutSchema = strictObject(
  {
    a_per_s: quantity({ atLeast: 0 }, '1/s', 'coefficient a of Lambda = a * R^b, R in mm/h'),
    b: quantity({ atLeast: 0 }, null, 'exponent b of Lambda = a * R^b'),
  },
  'below-cloud scavenging Lambda = a_per_s * R^b with the rain rate R in mm/h',
);

const pollutantSchema = strictObject(
  {
    name: text('pollutant name, shown in the report'),
    halfLife_h: nullableQuantity({ above: 0 }, 'h', 'first-order decay half-life', 'conserved, no decay').default(null),
    washout: washoutSchema.nullable().default(null),
    depositionVelocity_m_s: quantity({ atLeast: 0 }, 'm/s', 'dry deposition velocity at the ground').default(0),
  },
  'the pollutant and its losses',
);

// ---------------------------------------------------------------------------------------------
// Weather
// ---------------------------------------------------------------------------------------------

const stabilitySchema = choice(STABILITY_CLASSES, 'Pasquill stability class, A (very unstable) to F (moderately stable)');

const temperatureDifferenceSchema = strictObject(
  {
    lowerHeight_m: quantity({ atLeast: 0 }, 'm', 'height of the lower thermometer'),
    upperHeight_m: quantity({ above: 0 }, 'm', 'height of the upper thermometer'),
    difference_K: quantity({}, 'K', 'T(upper) - T(lower)'),
  },
  'a mast temperature difference, used to derive the stability class',
).refine((difference) => difference.upperHeight_m > difference.lowerHeight_m, {
  error: 'upperHeight_m must be greater than lowerHeight_m',
  path: ['upperHeight_m'],
});

/** Defaults of the weather fields, stated once. */
export const WEATHER_DEFAULTS = {
  /** rain rate [mm/h] */
  rain_mm_h: 0,
  /** air temperature near the ground [K] (15 degC, the ICAO standard atmosphere at sea level) */
  airTemperature_K: 288.15,
  /** height of the wind measurement [m] (10 m, the usual synoptic anemometer height: common practice) */
  anemometerHeight_m: 10,
} as const;

const rainSchema = quantity({ atLeast: 0 }, 'mm/h', 'rain rate').default(WEATHER_DEFAULTS.rain_mm_h);
const airTemperatureSchema = quantity({ above: 0 }, 'K', 'air temperature near the ground').default(
  WEATHER_DEFAULTS.airTemperature_K,
);
const anemometerHeightSchema = quantity({ above: 0 }, 'm', 'height of the wind measurement').default(
  WEATHER_DEFAULTS.anemometerHeight_m,
);
const windFromSchema = quantity({ atLeast: 0, atMost: 360 }, 'deg', 'direction the wind blows FROM, clockwise from north');
const windSpeedSchema = quantity({ above: 0 }, 'm/s', 'wind speed at anemometerHeight_m');
const mixingHeightSchema = quantity({ above: 0 }, 'm', 'mixing height; absent = the screening default for the class');

const weatherFieldsShape = {
  windSpeed_m_s: windSpeedSchema,
  windFrom_deg: windFromSchema,
  stability: stabilitySchema.optional(),
  mixingHeight_m: mixingHeightSchema.optional(),
  rain_mm_h: rainSchema,
  airTemperature_K: airTemperatureSchema,
  anemometerHeight_m: anemometerHeightSchema,
  cloudCover_oktas: quantity({ atLeast: 0, atMost: 8 }, 'oktas', 'total cloud cover, used to derive stability').optional(),
  temperatureDifference: temperatureDifferenceSchema.optional(),
};

/** The message when no stability class is given and none can be derived. */
const STABILITY_NEEDED =
  'a stability class is needed: give stability (one of "A".."F"), or cloudCover_oktas (0..8) with time ' +
  '(ISO 8601) to derive it from wind and sky, or temperatureDifference { lowerHeight_m, upperHeight_m, difference_K }';

/** Stability may be left out only when it can be derived from the sky (with a time) or a mast. */
function requireStabilityOrItsInputs(
  fields: { stability?: unknown; cloudCover_oktas?: unknown; temperatureDifference?: unknown; time?: unknown },
  context: z.core.$RefinementCtx,
): void {
  if (fields.stability !== undefined || fields.temperatureDifference !== undefined) return;
  if (fields.cloudCover_oktas !== undefined && fields.time !== undefined) return;
  if (fields.cloudCover_oktas !== undefined) {
    context.addIssue({
      code: 'custom',
      path: ['time'],
      message:
        'time (ISO 8601 with offset) is needed with cloudCover_oktas to derive stability from the sun\'s elevation; ' +
        'or give stability ("A".."F") instead',
    });
    return;
  }
  context.addIssue({ code: 'custom', path: ['stability'], message: STABILITY_NEEDED });
}

const steadyWeatherSchema = strictObject(
  {
    kind: z.literal('steady'),
    ...weatherFieldsShape,
    time: isoTime('optional time, needed only to derive stability from sun and sky').optional(),
  },
  'one steady weather state',
).superRefine(requireStabilityOrItsInputs);

/** One hour of a series; `time` marks the START of the hour. Also used for each row of a weather CSV. */
export const weatherHourSchema = strictObject(
  {
    time: isoTime('start of the hour, ISO 8601 with time-zone offset or Z'),
    ...weatherFieldsShape,
  },
  'one hour of weather',
).superRefine(requireStabilityOrItsInputs);

/** The field names a weather hour may carry, in the order of a CSV header. */
export const WEATHER_HOUR_FIELDS = Object.keys(weatherHourSchema.shape) as (keyof typeof weatherHourSchema.shape)[];

/**
 * Finds every time that is not after the one before it (repeated or going backwards), naming both.
 * Gaps are allowed here: the weather runner counts and reports them.
 * @param times ISO 8601 times, each already checked by `parseIsoTime_ms`
 * @param label how to name the time at an index in a message, e.g. `hours[3]` or `line 5`
 * @returns one entry per offending index, with the message for it
 */
export function findTimesNotIncreasing(
  times: readonly string[],
  label: (index: number) => string,
): { index: number; message: string }[] {
  const problems: { index: number; message: string }[] = [];
  for (let index = 1; index < times.length; index++) {
    const previous_ms = parseIsoTime_ms(times[index - 1]);
    const current_ms = parseIsoTime_ms(times[index]);
    if (!(current_ms > previous_ms)) {
      const relation = current_ms === previous_ms ? 'repeats the time of' : 'goes back before';
      problems.push({
        index,
        message: `must be later than the time before it: ${label(index)} ${relation} ${label(index - 1)} (${times[index - 1]}); times must strictly increase`,
      });
    }
  }
  return problems;
}

const hourlyWeatherSchema = strictObject(
  {
    kind: z.literal('hourly'),
    hours: list(weatherHourSchema, 'weather hours', 1).optional(),
    csv: text('path of a weather CSV file, relative to the scenario file').optional(),
  },
  'an hourly weather series: inline hours or a CSV file',
)
  .superRefine((weather, context) => {
    if (weather.hours !== undefined && weather.csv !== undefined) {
      context.addIssue({ code: 'custom', path: [], message: 'must give exactly one of hours (inline) or csv (a file path), not both' });
    } else if (weather.hours === undefined && weather.csv === undefined) {
      context.addIssue({ code: 'custom', path: [], message: 'must give exactly one of hours (a list of hours) or csv (a file path)' });
    }
    if (weather.hours !== undefined) {
      const times = weather.hours.map((hour) => hour.time);
      for (const problem of findTimesNotIncreasing(times, (index) => `hours[${index}]`)) {
        context.addIssue({ code: 'custom', path: ['hours', problem.index, 'time'], message: problem.message });
      }
    }
  })
  // The result's type is left to inference so that the compile-time check below compares the schema itself.
  .transform(({ kind, hours, csv }) => (csv === undefined ? { kind, hours: hours ?? [] } : { kind, hours: hours ?? [], csv }));

/** How far the wind rose's frequencies may sum from 1 (rounding in published roses). */
const WIND_ROSE_FREQUENCY_TOLERANCE = 0.005;

const windRoseCellSchema = strictObject(
  {
    windFrom_deg: quantity({ atLeast: 0, atMost: 360 }, 'deg', 'centre of the sector the wind blows FROM'),
    windSpeed_m_s: quantity({ above: 0 }, 'm/s', 'representative speed of the speed class at anemometerHeight_m'),
    stability: stabilitySchema,
    frequency: quantity({ atLeast: 0, atMost: 1 }, null, 'fraction of the time in this cell; all cells sum to 1'),
    mixingHeight_m: mixingHeightSchema.optional(),
  },
  'one wind-rose cell: sector, speed class and stability class with its frequency',
);

const windRoseWeatherSchema = strictObject(
  {
    kind: z.literal('windRose'),
    sectorWidth_deg: quantity({ above: 0, atMost: 360 }, 'deg', 'sector width, e.g. 30 for 12 sectors'),
    cells: list(windRoseCellSchema, 'wind-rose cells', 1),
    rain_mm_h: rainSchema,
    airTemperature_K: airTemperatureSchema,
    anemometerHeight_m: anemometerHeightSchema,
  },
  'a wind rose: sector, speed-class and stability frequencies',
).superRefine((rose, context) => {
  const total = rose.cells.reduce((sum, cell) => sum + cell.frequency, 0);
  if (!(Math.abs(total - 1) <= WIND_ROSE_FREQUENCY_TOLERANCE)) {
    context.addIssue({
      code: 'custom',
      path: ['cells'],
      params: { value: Number(total.toFixed(6)) },
      message: `the cells' frequencies must sum to 1 (within ${WIND_ROSE_FREQUENCY_TOLERANCE}); the value shown is their sum`,
    });
  }
});

/** Default sectors of the screening weather set: every 10 deg (common practice for screening). */
export const SCREENING_SET_DEFAULT_SECTORS = 36;

const screeningSetWeatherSchema = strictObject(
  {
    kind: z.literal('screeningSet'),
    sectors: quantity({ integer: true, atLeast: 1, atMost: 360 }, null, 'wind-direction sectors, evenly spaced from north').default(
      SCREENING_SET_DEFAULT_SECTORS,
    ),
    rain_mm_h: rainSchema,
    airTemperature_K: airTemperatureSchema,
    anemometerHeight_m: anemometerHeightSchema,
  },
  'the screening weather set: every stability class with its wind speeds, from every sector',
);

const weatherSchema = z
  .discriminatedUnion('kind', [steadyWeatherSchema, hourlyWeatherSchema, windRoseWeatherSchema, screeningSetWeatherSchema], {
    error: 'must be one of "steady", "hourly", "windRose", "screeningSet"',
  })
  .describe('the weather: a steady state, an hourly series, a wind rose or the screening weather set');

// ---------------------------------------------------------------------------------------------
// Dispersion, solver
// ---------------------------------------------------------------------------------------------

const dispersionSchema = z
  .discriminatedUnion(
    'kind',
    [
      strictObject(
        {
          kind: z.literal('stability'),
          curves: choice(['briggs', 'pasquill-gifford'], 'Gaussian mode curves: Briggs (by landUse) or Pasquill-Gifford').default(
            'briggs',
          ),
        },
        'dispersion from the stability class',
      ),
      strictObject(
        {
          kind: z.literal('constant'),
          horizontal_m2_s: quantity({ above: 0 }, 'm2/s', 'constant horizontal diffusivity'),
          vertical_m2_s: quantity({ above: 0 }, 'm2/s', 'constant vertical diffusivity'),
        },
        'verification: constant diffusivities; Gaussian mode then uses sigma^2 = 2 K x / u',
      ),
    ],
    { error: 'must be one of "stability", "constant"' },
  )
  .default({ kind: 'stability', curves: 'briggs' });

const solverSchema = strictObject(
  {
    mode: choice(['grid', 'gaussian'], '"grid" (advection-diffusion) or "gaussian" (reference)').default('grid'),
    hourlyMethod: choice(
      ['independentHours', 'continuous'],
      'hourly series: each hour to its own steady state, or one continuous time-march',
    ).default('independentHours'),
  },
  'solver options',
).default({ mode: 'grid', hourlyMethod: 'independentHours' });

// ---------------------------------------------------------------------------------------------
// Sources and receptors
// ---------------------------------------------------------------------------------------------

const buildingSchema = strictObject(
  {
    height_m: quantity({ above: 0 }, 'm', 'building height above ground'),
    width_m: quantity({ above: 0 }, 'm', 'building width across the wind'),
    distance_m: quantity({ atLeast: 0 }, 'm', 'distance from the stack to the nearest wall'),
  },
  'a building beside the stack, for the downwash flag',
);

const pointSourceSchema = strictObject(
  {
    kind: z.literal('point'),
    id: text('unique source id'),
    name: text('source name; absent = the id').optional(),
    lat: latitude('stack position'),
    lon: longitude('stack position'),
    height_m: quantity({ atLeast: 0 }, 'm', 'stack height above ground'),
    diameter_m: quantity({ above: 0 }, 'm', 'inner diameter at the exit'),
    exitVelocity_m_s: quantity({ atLeast: 0 }, 'm/s', 'exit velocity'),
    exitTemperature_K: quantity({ above: 0 }, 'K', 'exit temperature'),
    emission_g_s: quantity({ atLeast: 0 }, 'g/s', 'emission rate'),
    plumeRise: flag('false: release at height_m exactly').default(true),
    building: buildingSchema.optional(),
  },
  'a point source (stack)',
).transform((source) => ({ ...source, name: source.name ?? source.id }));

const areaSourceSchema = strictObject(
  {
    kind: z.literal('area'),
    id: text('unique source id'),
    name: text('source name; absent = the id').optional(),
    polygon: ringSchema('polygon', 'the area source'),
    releaseHeight_m: quantity({ atLeast: 0 }, 'm', 'release height above ground'),
    emission_g_s: quantity({ atLeast: 0 }, 'g/s', 'total emission rate of the polygon'),
  },
  'an area source (yard, lagoon)',
).transform((source) => ({ ...source, name: source.name ?? source.id }));

const sourceSchema = z.discriminatedUnion('kind', [pointSourceSchema, areaSourceSchema], {
  error: 'must be one of "point", "area"',
});

/** Default receptor height [m]: breathing height, common practice in air-quality assessment. */
export const RECEPTOR_DEFAULT_HEIGHT_m = 1.5;

const receptorSchema = strictObject(
  {
    id: text('unique receptor id'),
    name: text('receptor name; absent = the id').optional(),
    lat: latitude('receptor position'),
    lon: longitude('receptor position'),
    height_m: quantity({ atLeast: 0 }, 'm', 'height above ground; 0 = at the ground').default(RECEPTOR_DEFAULT_HEIGHT_m),
  },
  'a receptor: a place where concentrations are reported',
).transform((receptor) => ({ ...receptor, name: receptor.name ?? receptor.id }));

/** Ids (or names) must be unique within a list: the second and later uses are reported. */
function requireUnique(field: 'id' | 'name', listName: string) {
  return <T extends object>(items: readonly T[], context: z.core.$RefinementCtx): void => {
    const firstIndex = new Map<unknown, number>();
    items.forEach((item, index) => {
      const value = (item as Record<string, unknown>)[field];
      const earlier = firstIndex.get(value);
      if (earlier === undefined) firstIndex.set(value, index);
      else
        context.addIssue({
          code: 'custom',
          path: [index, field],
          message: `must be unique among ${listName}; ${JSON.stringify(value)} is also ${listName}[${earlier}].${field}`,
        });
    });
  };
}

// ---------------------------------------------------------------------------------------------
// Assessment
// ---------------------------------------------------------------------------------------------

const standardSchema = strictObject(
  {
    name: text('name of the standard, also the name of its result columns'),
    limit_ug_m3: quantity({ above: 0 }, 'ug/m3', 'limit value'),
    averaging_h: quantity(
      { above: 0 },
      'h',
      'averaging period: 1, a divisor of 24 (calendar-aligned means), or 8760 and more for the period mean; with runningMean, a whole number of hours from 2 to 24',
    ),
    allowedExceedances: quantity({ integer: true, atLeast: 0 }, null, 'averaging periods a year allowed above the limit'),
    runningMean: flag(
      'true: each day\'s maximum of the running means over averaging_h hours (the CO standard: the maximum daily 8-hour running mean); allowedExceedances then counts days',
    ).optional(),
  },
  'an air-quality standard',
).superRefine((standard, context) => {
  // The same rule the statistics apply (solver/diagnostics/statistics.ts), checked here so that validate
  // refuses what a run would refuse.
  const h = standard.averaging_h;
  const allowed = standard.runningMean
    ? Number.isInteger(h) && h >= 2 && h <= 24
    : h >= 8760 || (Number.isInteger(h) && h >= 1 && 24 % h === 0);
  if (!allowed) {
    context.addIssue({
      code: 'custom',
      path: ['averaging_h'],
      message: standard.runningMean
        ? 'running means need a whole number of hours from 2 to 24 (8 for the CO standard)'
        : 'is not a supported averaging period: 1, a divisor of 24 (2, 3, 4, 6, 8, 12, 24 h, calendar-aligned), or 8760 and more ' +
          'for the period mean; for running means (the CO standard) set runningMean: true',
    });
  }
});

const assessmentSchema = strictObject(
  {
    background_ug_m3: quantity({ atLeast: 0 }, 'ug/m3', 'background concentration added to the process contribution'),
    standards: list(standardSchema, 'user-defined air-quality standards').superRefine(requireUnique('name', 'standards')).default([]),
    libraryPollutant: choice(LIBRARY_POLLUTANTS, 'a pollutant of the library whose standards apply').optional(),
    standardSets: list(choice(STANDARD_SETS, 'a set of standards in the library'), 'sets of standards', 1).optional(),
    noxToNo2: strictObject(
      {
        longTerm: quantity({ above: 0, atMost: 1 }, null, 'fraction of NOx taken as NO2 for long-term statistics'),
        shortTerm: quantity({ above: 0, atMost: 1 }, null, 'fraction of NOx taken as NO2 for short-term statistics'),
      },
      'NOx to NO2 ratios (common practice in screening)',
    ).optional(),
    screening: strictObject(
      {
        pcLongTerm_pct: quantity({ above: 0, atMost: 100 }, '%', 'PC below this share of a long-term standard is insignificant'),
        pcShortTerm_pct: quantity({ above: 0, atMost: 100 }, '%', 'PC below this share of a short-term standard is insignificant'),
        pecLongTerm_pct: quantity({ above: 0, atMost: 100 }, '%', 'second stage: PEC below this share of a long-term standard'),
      },
      'thresholds of the two-stage screen (common practice in permit guidance, not a legal test)',
    ).optional(),
  },
  'background and the standards to assess against',
);

// ---------------------------------------------------------------------------------------------
// The scenario
// ---------------------------------------------------------------------------------------------

/** The zod schema of scenario format 1; its output is `Scenario` (checked at compile time below). */
export const scenarioSchema = strictObject(
  {
    /** lets an editor find the JSON Schema; not part of the parsed scenario */
    $schema: z.string({ error: 'must be a string (the path or URL of the JSON Schema, for editors)' }).optional(),
    format: z.literal(SCENARIO_FORMAT, { error: `must be "${SCENARIO_FORMAT}"` }),
    name: text('free text, shown in the report'),
    site: siteSchema,
    domain: domainSchema.optional(),
    pollutant: pollutantSchema,
    weather: weatherSchema,
    dispersion: dispersionSchema,
    solver: solverSchema,
    windProfile: choice(['powerLaw', 'uniform'], '"powerLaw" (default) or "uniform" (same speed at every height)').default(
      'powerLaw',
    ),
    sources: list(sourceSchema, 'sources (point or area)', 1).superRefine(requireUnique('id', 'sources')),
    receptors: list(receptorSchema, 'receptors').superRefine(requireUnique('id', 'receptors')),
    assessment: assessmentSchema.optional(),
  },
  'a plumeplan scenario, format 1',
).transform(({ $schema: _editorSchema, ...scenario }) => scenario);

// Compile-time check that the schema and the contract types agree, both ways. (The transforms above
// leave their result types to inference, so this compares the schema's own output with types.ts.)
type AssignableTo<From extends To, To> = From;
export type ScenarioSchemaMatchesTypes = [
  AssignableTo<z.output<typeof scenarioSchema>, Scenario>,
  AssignableTo<Scenario, z.output<typeof scenarioSchema>>,
];

/**
 * Checks a parsed JSON value against format 1 and fills the defaults.
 * @param raw anything, typically `JSON.parse` of a scenario file
 * @returns `{ ok: true, scenario }`, or `{ ok: false, issues }` with every issue found
 * @example parseScenario({ format: 'plumeplan.scenario/1', ... })
 */
export function parseScenario(raw: unknown): ParseOutcome {
  const result = scenarioSchema.safeParse(raw);
  if (result.success) return { ok: true, scenario: result.data };
  return { ok: false, issues: toScenarioIssues(result.error.issues, raw) };
}

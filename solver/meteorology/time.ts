/**
 * ISO 8601 times as the weather uses them: every time carries its time-zone offset ("Z" or
 * "+01:00"), so an hour is one instant, and a calendar day can be taken in the series' own offset.
 *
 * Convention, stated once: an hourly record's `time` marks the START of its hour
 * (scenarios/format/types.ts), so the hour's midpoint is time + 30 minutes.
 */

/** One hour [ms]. */
export const HOUR_MS = 3_600_000;

/** The parts of an ISO 8601 date-time with an explicit offset. */
export interface ParsedTime {
  /** the instant [ms since 1970-01-01T00:00Z] */
  epoch_ms: number;
  /** the offset written in the text, east of UTC positive [min] ("Z" = 0) */
  offsetMinutes: number;
}

// Date and time with seconds optional, fractional seconds allowed, and a mandatory offset.
const ISO_WITH_OFFSET =
  /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?(Z|([+-])(\d{2}):?(\d{2}))$/;

/**
 * Parse an ISO 8601 date-time that states its offset, e.g. "2031-07-01T13:00:00+01:00".
 *
 * @param text the time as written
 * @param field the field path named in an error, e.g. "weather.hours[3].time"
 * @throws RangeError naming the field when the text has no offset or is not a valid time
 * @example parseIsoTime('2031-01-01T00:00Z', 'time') // { epoch_ms: 1924992000000, offsetMinutes: 0 }
 */
export function parseIsoTime(text: string, field = 'time'): ParsedTime {
  const match = typeof text === 'string' ? ISO_WITH_OFFSET.exec(text) : null;
  if (!match) {
    throw new RangeError(
      `${field}: ${JSON.stringify(text)} is not an ISO 8601 date-time with a time-zone offset ` +
        '(allowed: e.g. "2031-07-01T13:00:00+01:00" or "2031-07-01T12:00:00Z")',
    );
  }
  const [, year, month, day, hour, minute, second] = match;
  const offsetMinutes =
    match[7] === 'Z' ? 0 : (match[8] === '-' ? -1 : 1) * (Number(match[9]) * 60 + Number(match[10]));
  const localFields_ms = Date.UTC(
    Number(year),
    Number(month) - 1,
    Number(day),
    Number(hour),
    Number(minute),
    Number(second ?? 0),
  );
  // Date.UTC silently rolls 2031-02-30 over into March; reject any field it had to roll over.
  const check = new Date(localFields_ms);
  if (
    check.getUTCFullYear() !== Number(year) ||
    check.getUTCMonth() !== Number(month) - 1 ||
    check.getUTCDate() !== Number(day) ||
    check.getUTCHours() !== Number(hour) ||
    check.getUTCMinutes() !== Number(minute) ||
    Math.abs(offsetMinutes) > 18 * 60
  ) {
    throw new RangeError(`${field}: ${JSON.stringify(text)} is not a valid date-time (a field is out of range)`);
  }
  return { epoch_ms: localFields_ms - offsetMinutes * 60_000, offsetMinutes };
}

/**
 * The calendar day an instant falls on in a given offset, as "YYYY-MM-DD".
 *
 * @param epoch_ms the instant [ms since 1970-01-01T00:00Z]
 * @param offsetMinutes offset east of UTC [min]
 */
export function calendarDay(epoch_ms: number, offsetMinutes: number): string {
  return new Date(epoch_ms + offsetMinutes * 60_000).toISOString().slice(0, 10);
}

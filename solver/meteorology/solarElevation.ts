/**
 * The sun's elevation above the horizon from date, time and position, for the daytime insolation
 * class of the stability table.
 *
 * Formula: the low-precision solar position of Meeus (Astronomical Algorithms, 1991, ch. 25: mean
 * longitude and anomaly, equation of centre, apparent longitude, obliquity with the nutation term,
 * and the equation of time), as used by the NOAA Solar Calculator spreadsheet. It is good to about
 * 0.01 degree in declination for centuries either side of 2000, far finer than the 35/60 degree
 * class limits it feeds. (Spencer's 1971 Fourier series, in NOAA's "General Solar Position
 * Calculations" note, was considered and dropped: fitted to a mid-century epoch, it runs about 0.35
 * degree behind in declination by the 2030s, which the tests show.)
 * The elevation is geometric (no refraction): refraction lifts the sun by about half a degree only
 * near the horizon (common practice), where the hour is classed as transitional anyway.
 */

const DEGREE = Math.PI / 180;

/** Milliseconds in a day. */
const DAY_MS = 86_400_000;

/** Julian day of the Unix epoch 1970-01-01T00:00Z (Meeus 1991, ch. 7). */
const JULIAN_DAY_OF_UNIX_EPOCH = 2440587.5;

/** Julian day of J2000.0, 2000-01-01T12:00 TT (taken as UT: the 70 s difference is negligible here). */
const JULIAN_DAY_J2000 = 2451545;

/** Solar declination and equation of time at an instant. */
export interface SolarGeometry {
  /** solar declination [rad] */
  declination_rad: number;
  /** equation of time, apparent minus mean solar time [min] */
  equationOfTime_min: number;
}

/**
 * Declination and equation of time (Meeus 1991, ch. 25 and 28, low-precision forms).
 *
 * @param epoch_ms the instant [ms since 1970-01-01T00:00Z]
 */
export function solarGeometry(epoch_ms: number): SolarGeometry {
  // Julian centuries since J2000.0.
  const T = (epoch_ms / DAY_MS + JULIAN_DAY_OF_UNIX_EPOCH - JULIAN_DAY_J2000) / 36525;
  const meanLongitude_deg = (280.46646 + T * (36000.76983 + 0.0003032 * T)) % 360;
  const meanAnomaly_deg = 357.52911 + T * (35999.05029 - 0.0001537 * T);
  const eccentricity = 0.016708634 - T * (0.000042037 + 0.0000001267 * T);
  const M = meanAnomaly_deg * DEGREE;
  const equationOfCentre_deg =
    Math.sin(M) * (1.914602 - T * (0.004817 + 0.000014 * T)) +
    Math.sin(2 * M) * (0.019993 - 0.000101 * T) +
    Math.sin(3 * M) * 0.000289;
  // Longitude of the Moon's ascending node, for nutation and aberration (Meeus 1991, ch. 25).
  const node_rad = (125.04 - 1934.136 * T) * DEGREE;
  const apparentLongitude_rad =
    (meanLongitude_deg + equationOfCentre_deg - 0.00569 - 0.00478 * Math.sin(node_rad)) * DEGREE;
  const meanObliquity_deg = 23 + (26 + (21.448 - T * (46.815 + T * (0.00059 - T * 0.001813))) / 60) / 60;
  const obliquity_rad = (meanObliquity_deg + 0.00256 * Math.cos(node_rad)) * DEGREE;
  const declination_rad = Math.asin(Math.sin(obliquity_rad) * Math.sin(apparentLongitude_rad));
  // Equation of time (Meeus 1991, eq. 28.3, Smart's series).
  const y = Math.tan(obliquity_rad / 2) ** 2;
  const L0 = meanLongitude_deg * DEGREE;
  const equationOfTime_rad =
    y * Math.sin(2 * L0) -
    2 * eccentricity * Math.sin(M) +
    4 * eccentricity * y * Math.sin(M) * Math.cos(2 * L0) -
    0.5 * y * y * Math.sin(4 * L0) -
    1.25 * eccentricity * eccentricity * Math.sin(2 * M);
  // One degree of hour angle is 4 minutes of time.
  return { declination_rad, equationOfTime_min: (4 * equationOfTime_rad) / DEGREE };
}

/**
 * Solar elevation above the horizon [deg] at an instant and a place (geometric, no refraction).
 *
 * @param epoch_ms the instant [ms since 1970-01-01T00:00Z]
 * @param lat_deg latitude, north positive [deg]
 * @param lon_deg longitude, east positive [deg]
 * @returns elevation in [-90, 90] [deg]
 * @example solarElevation_deg(Date.parse('2031-06-21T12:00Z'), 0, 0) // about 66.6
 */
export function solarElevation_deg(epoch_ms: number, lat_deg: number, lon_deg: number): number {
  if (!Number.isFinite(epoch_ms)) throw new RangeError(`time: ${epoch_ms} is not a finite instant`);
  if (!(lat_deg >= -90 && lat_deg <= 90)) throw new RangeError(`site.lat: ${lat_deg} is outside -90..90 degrees`);
  if (!(lon_deg >= -180 && lon_deg <= 360)) throw new RangeError(`site.lon: ${lon_deg} is outside -180..360 degrees`);
  const { declination_rad, equationOfTime_min } = solarGeometry(epoch_ms);
  const minutesIntoUtcDay = (((epoch_ms % DAY_MS) + DAY_MS) % DAY_MS) / 60_000;
  // True solar time [min] = UTC minutes + equation of time + 4 min per degree of east longitude.
  const trueSolarTime_min = minutesIntoUtcDay + equationOfTime_min + 4 * lon_deg;
  const hourAngle_rad = (trueSolarTime_min / 4 - 180) * DEGREE;
  const lat_rad = lat_deg * DEGREE;
  const cosZenith =
    Math.sin(lat_rad) * Math.sin(declination_rad) +
    Math.cos(lat_rad) * Math.cos(declination_rad) * Math.cos(hourAngle_rad);
  return 90 - Math.acos(Math.min(1, Math.max(-1, cosZenith))) / DEGREE;
}

/**
 * Writes the invented met year of the Merrowdene demo: scenarios/merrowdene-heat-plant-year/weather.csv.
 *
 * The weather is SYNTHETIC: made up by a seeded random process, not measured anywhere, and meant only
 * to exercise hourly statistics (percentiles, exceedances, daily means). It has:
 * - 8760 hours of the year 2031 (times in UTC, each marking the START of its hour);
 * - weather regimes of one to four days, most of them from a prevailing west-south-westerly sector,
 *   some north-westerly or easterly, a few from anywhere; wind direction rounded to 10 degrees and
 *   speed to 0.5 m/s, as hourly records are often reported;
 * - cloud cover in whole oktas; no stability column: plumeplan derives each hour's class from the
 *   wind, the cloud and the sun's elevation (Pasquill-Turner table), which gives the diurnal cycle of
 *   unstable afternoons and stable clear nights;
 * - an annual and a daily temperature cycle (rounded to 0.5 K) and rain in spells under thick cloud
 *   (rounded to 0.1 mm/h);
 * - no mixing height column: the screening defaults per class apply.
 *
 * Deterministic: the same seed always writes the same file. Run with
 *   node --import tsx scenarios/merrowdene-heat-plant-year/makeWeather.ts [--seed N] [--out PATH]
 */
import { mkdir, writeFile } from 'node:fs/promises';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** Default seed of the demo year. */
export const DEMO_SEED = 20310101;

const HOURS = 8760;
const START_MS = Date.UTC(2031, 0, 1);

/** Small, fast, seeded generator (mulberry32): deterministic uniform numbers in [0, 1). */
export function seededRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A standard normal number by the Box-Muller transform. */
function normal(random: () => number): number {
  const u = Math.max(random(), 1e-12);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

interface Regime {
  hoursLeft: number;
  direction_deg: number;
  speed_m_s: number;
  cloud_oktas: number;
}

/** The sector a new regime comes from: prevailing WSW, then NW, E, anywhere. */
function newRegime(random: () => number, dayOfYear: number): Regime {
  const pick = random();
  const centre = pick < 0.55 ? 240 : pick < 0.75 ? 320 : pick < 0.9 ? 90 : random() * 360;
  const spread = pick < 0.9 ? 35 : 0;
  const winter = 0.5 + 0.5 * Math.cos((2 * Math.PI * (dayOfYear - 15)) / 365); // 1 in mid-January
  return {
    hoursLeft: 24 + Math.floor(random() * 72),
    direction_deg: centre + spread * normal(random),
    // windier in winter and in westerly regimes
    speed_m_s: Math.max(0.8, (2.6 + 2.2 * winter + (pick < 0.55 ? 1.2 : 0)) * Math.exp(0.4 * normal(random))),
    cloud_oktas: Math.min(8, Math.max(0, (pick < 0.55 ? 5.5 : pick < 0.75 ? 3.5 : 2) + 2.2 * normal(random))),
  };
}

export interface DemoHour {
  time: string;
  windSpeed_m_s: number;
  windFrom_deg: number;
  rain_mm_h: number;
  airTemperature_K: number;
  anemometerHeight_m: number;
  cloudCover_oktas: number;
}

/**
 * The invented year, hour by hour.
 *
 * @param seed generator seed (default DEMO_SEED)
 */
export function makeDemoYear(seed = DEMO_SEED): DemoHour[] {
  const random = seededRandom(seed);
  const hours: DemoHour[] = [];
  let regime = newRegime(random, 0);
  let direction = regime.direction_deg;
  let logSpeed = Math.log(regime.speed_m_s);
  let cloud = regime.cloud_oktas;
  let temperatureNoise = 0;
  let rainHoursLeft = 0;
  let rainRate = 0;
  for (let h = 0; h < HOURS; h++) {
    const time_ms = START_MS + h * 3_600_000;
    const dayOfYear = Math.floor(h / 24);
    const hourOfDay = h % 24;
    if (--regime.hoursLeft <= 0) regime = newRegime(random, dayOfYear);
    // direction and speed relax towards the regime's, with hourly wander (first-order autoregression)
    const turn = ((regime.direction_deg - direction + 540) % 360) - 180;
    direction += 0.12 * turn + 6 * normal(random);
    // daytime mixing brings faster air down to the anemometer; nights are calmer (common practice)
    const diurnal = 0.3 * Math.sin((2 * Math.PI * (hourOfDay - 8)) / 24);
    logSpeed += 0.15 * (Math.log(regime.speed_m_s) + diurnal - logSpeed) + 0.12 * normal(random);
    cloud += 0.15 * (regime.cloud_oktas - cloud) + 0.6 * normal(random);
    cloud = Math.min(8.4, Math.max(-0.4, cloud));
    const oktas = Math.min(8, Math.max(0, Math.round(cloud)));

    if (rainHoursLeft > 0) {
      rainHoursLeft--;
    } else if (oktas >= 6 && random() < 0.05) {
      rainHoursLeft = 1 + Math.floor(-4 * Math.log(Math.max(random(), 1e-9)));
      rainRate = Math.exp(-0.4 + 0.8 * normal(random));
    } else {
      rainRate = 0;
    }
    const rain = rainHoursLeft > 0 && oktas >= 5 ? Math.round(Math.min(12, rainRate * Math.exp(0.3 * normal(random))) * 10) / 10 : 0;

    temperatureNoise = 0.9 * temperatureNoise + 0.5 * normal(random);
    const seasonal = 281.5 + 6.5 * Math.sin((2 * Math.PI * (dayOfYear - 110)) / 365);
    const dailyRange = 2 + 3.5 * (1 - oktas / 8);
    const temperature = seasonal + dailyRange * Math.sin((2 * Math.PI * (hourOfDay - 9)) / 24) + temperatureNoise;

    const speed = Math.max(0.5, Math.round(Math.exp(logSpeed) * 2) / 2); // 0.5 m/s: calm under the calms rule
    const windFrom = ((Math.round(direction / 10) * 10) % 360 + 360) % 360;
    hours.push({
      time: new Date(time_ms).toISOString().replace('.000Z', 'Z'),
      windSpeed_m_s: speed,
      windFrom_deg: windFrom,
      rain_mm_h: rain,
      airTemperature_K: Math.round(temperature * 2) / 2,
      anemometerHeight_m: 10,
      cloudCover_oktas: oktas,
    });
  }
  return hours;
}

/** The CSV text: a header of weather-hour field names, then one row per hour. */
export function demoYearCsv(hours: readonly DemoHour[]): string {
  const columns = ['time', 'windSpeed_m_s', 'windFrom_deg', 'rain_mm_h', 'airTemperature_K', 'anemometerHeight_m', 'cloudCover_oktas'] as const;
  const lines = [columns.join(',')];
  for (const hour of hours) lines.push(columns.map((c) => String(hour[c])).join(','));
  return lines.join('\n') + '\n';
}

async function main(args: string[]): Promise<void> {
  const seedIndex = args.indexOf('--seed');
  const outIndex = args.indexOf('--out');
  const seed = seedIndex >= 0 ? Number(args[seedIndex + 1]) : DEMO_SEED;
  if (!Number.isInteger(seed)) throw new Error(`--seed: ${args[seedIndex + 1]} is not an integer`);
  const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
  const out = outIndex >= 0 ? resolve(args[outIndex + 1]) : resolve(root, 'scenarios/merrowdene-heat-plant-year/weather.csv');
  const hours = makeDemoYear(seed);
  await mkdir(dirname(out), { recursive: true });
  await writeFile(out, demoYearCsv(hours), 'utf8');
  const rainHours = hours.filter((h) => h.rain_mm_h > 0).length;
  process.stdout.write(`wrote ${hours.length} invented hours (seed ${seed}, ${rainHours} rain hours) to ${out}\n`);
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  await main(process.argv.slice(2));
}

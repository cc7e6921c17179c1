/**
 * The Gaussian reference mode for one steady weather state: every source's steady Gaussian plume summed
 * at the centre of every ground column (at groundLevelHeight_m) and at every receptor (at its own height).
 *
 * - Wind direction: windFrom_deg is where the wind blows FROM, clockwise from north; local x is east and
 *   y north, so the wind blows toward the unit vector (-sin theta, -cos theta).
 * - Point sources: Briggs plume rise with the wind at the stack top; the plume centreline follows the
 *   gradual (2/3-law or jet) rise up to the distance of final rise and stays at stack height + final
 *   rise (the reported effective height) beyond it. The plume's transport speed is the profile wind at
 *   that effective height.
 * - Area sources: integrated over their exact cell overlaps (AreaCellShare), not one virtual point:
 *   elements no larger than a tenth of their distance from the receptor, each a crosswind band averaged
 *   analytically (reference/gaussianAreaSource.ts says how).
 * - Losses: decay and washout as exp(-(k + Lambda) x / u); dry deposition by source depletion when the
 *   deposition velocity is positive (see reference/gaussianPlume.ts for the forms).
 * - No mass budget: the analytic plume has none to report (massBudget_g null).
 * The plumes are built by ../reference/sourcePlumes.ts, which the grid mode's sub-grid near field and the
 * siting map use too: one Gaussian point-source plume (and one area plume) everywhere.
 */
import type { PlacedAreaSource, PlacedPointSource, RunControl, SourceReport, SteadyFieldResult, SteadyRunInput } from './types.ts';
import type { GaussianAreaSource } from '../reference/gaussianAreaSource.ts';
import type { GaussianPlume } from '../reference/gaussianPlume.ts';
import { areaSourcePlume, firstOrderRates_per_s, pointSourcePlume, type PointSourcePlume } from '../reference/sourcePlumes.ts';

/** g/m3 -> ug/m3 */
const MICROGRAMS_PER_GRAM = 1e6;

/** Targets between progress reports and cancellation checks. */
const TARGETS_PER_CHECK = 512;

interface PreparedPoint {
  kind: 'point';
  x_m: number;
  y_m: number;
  plume: GaussianPlume;
}

interface PreparedArea {
  kind: 'area';
  area: GaussianAreaSource;
}

type PreparedSource = PreparedPoint | PreparedArea;

function abortError(): Error {
  return new DOMException('Gaussian reference run aborted', 'AbortError');
}

function requireNumber(name: string, value: number, allowed: string, ok: boolean): void {
  if (Number.isNaN(value) || !ok) throw new RangeError(`${name} is ${value}; allowed: ${allowed}`);
}

function format(value: number, digits = 3): string {
  return Number(value.toPrecision(digits)).toString();
}

/**
 * What the Gaussian mode says about one point source's plume (the plume itself comes from
 * ../reference/sourcePlumes.ts, the one place the Gaussian point-source plume is built).
 */
function pointSourceNotes(point: PlacedPointSource, built: PointSourcePlume, mixingHeight_m: number): string[] {
  const notes: string[] = [];
  const { rise, effectiveHeight_m } = built;
  if (rise !== null) {
    notes.push(
      `source ${point.id}: Briggs plume rise (${rise.regime}), ${format(rise.finalRise_m)} m above the ${format(point.height_m)} m stack, ` +
        `reached ${format(rise.distanceToFinalRise_m)} m downwind (gradual rise before that), wind at stack top ${format(rise.windSpeed_m_s)} m/s`,
    );
  }
  if (!built.plume.lidApplied && Number.isFinite(mixingHeight_m)) {
    notes.push(
      `source ${point.id}: effective height ${format(effectiveHeight_m)} m is at or above the mixing height ${format(mixingHeight_m)} m; ` +
        'the lid is ignored for this plume (ground reflection only, a screening choice)',
    );
  }
  return notes;
}

/**
 * Run the Gaussian reference mode for one steady weather state.
 *
 * @param input grid, placed sources and receptors, pollutant, resolved weather, dispersion, land use,
 *   wind profile and the height of the ground-level field
 * @param control optional progress callback and abort signal (checked every 512 targets)
 * @returns the ground-level field and receptor values [ug/m3], each source's effective height, notes;
 *   massBudget_g is null, steps 0 (nothing is time-stepped)
 * @example runGaussianSteady(input).receptors_ug_m3[0]
 */
export function runGaussianSteady(input: SteadyRunInput, control: RunControl = {}): SteadyFieldResult {
  const started = performance.now();
  const { grid, weather, pollutant, windProfile } = input;
  if (!Number.isInteger(grid.nx) || grid.nx < 1 || !Number.isInteger(grid.ny) || grid.ny < 1) {
    throw new RangeError(`grid is ${grid.nx} x ${grid.ny} columns; allowed: positive integers`);
  }
  requireNumber('grid.spacing_m', grid.spacing_m, 'a finite spacing > 0 m', Number.isFinite(grid.spacing_m) && grid.spacing_m > 0);
  requireNumber('weather.mixingHeight_m', weather.mixingHeight_m, 'a height > 0 m', weather.mixingHeight_m > 0);
  requireNumber(
    'weather.windFrom_deg',
    weather.windFrom_deg,
    'a finite direction in degrees',
    Number.isFinite(weather.windFrom_deg),
  );
  requireNumber(
    'groundLevelHeight_m',
    input.groundLevelHeight_m,
    'a finite height >= 0 m',
    Number.isFinite(input.groundLevelHeight_m) && input.groundLevelHeight_m >= 0,
  );
  requireNumber(
    'pollutant.depositionVelocity_m_s',
    pollutant.depositionVelocity_m_s,
    'a finite velocity >= 0 m/s',
    Number.isFinite(pollutant.depositionVelocity_m_s) && pollutant.depositionVelocity_m_s >= 0,
  );

  const { decay_per_s, washout_per_s } = firstOrderRates_per_s(input);
  const depositionVelocity_m_s = pollutant.depositionVelocity_m_s;
  const mixingHeight_m = weather.mixingHeight_m;

  const theta = (weather.windFrom_deg * Math.PI) / 180;
  const downwindX = -Math.sin(theta);
  const downwindY = -Math.cos(theta);

  // Farthest travel within the grid, for the depletion table.
  const extentEast_m = grid.nx * grid.spacing_m;
  const extentNorth_m = grid.ny * grid.spacing_m;
  const notes: string[] = [];
  const reports: SourceReport[] = [];
  const prepared: PreparedSource[] = [];
  let curveDescription = '';

  for (const source of input.sources) {
    if (source.kind === 'point') {
      const point: PlacedPointSource = source;
      const maxDistance_m = Math.hypot(extentEast_m, extentNorth_m) + Math.hypot(point.x_m - grid.xWest_m, point.y_m - grid.ySouth_m) + 1000;
      const built = pointSourcePlume(point, input, maxDistance_m);
      const { plume, effectiveHeight_m: effective_m } = built;
      curveDescription = built.sigmas.description;
      notes.push(...pointSourceNotes(point, built, mixingHeight_m));
      prepared.push({ kind: 'point', x_m: point.x_m, y_m: point.y_m, plume });
      reports.push({ id: point.id, x_m: point.x_m, y_m: point.y_m, effectiveHeight_m: effective_m });
    } else {
      const area: PlacedAreaSource = source;
      const { area: areaPlume, plume, sigmas } = areaSourcePlume(area, grid, input, 2 * Math.hypot(extentEast_m, extentNorth_m) + 1000);
      curveDescription = sigmas.description;
      if (!plume.lidApplied && Number.isFinite(mixingHeight_m)) {
        notes.push(
          `source ${area.id}: release height ${format(area.releaseHeight_m)} m is at or above the mixing height ${format(mixingHeight_m)} m; the lid is ignored for it`,
        );
      }
      prepared.push({ kind: 'area', area: areaPlume });
      reports.push({ id: area.id, x_m: area.x_m, y_m: area.y_m, effectiveHeight_m: area.releaseHeight_m });
      notes.push(
        `source ${area.id}: area integrated over its ${area.shares.length} cell overlaps (elements finer nearer the receptor, each a crosswind band average)`,
      );
    }
  }

  const columns = grid.nx * grid.ny;
  const receptorCount = input.receptors.length;
  const groundLevel = new Float64Array(columns);
  const receptorValues = new Float64Array(receptorCount);
  const totalTargets = columns + receptorCount;
  const signal = control.signal;
  const onProgress = control.onProgress;

  const evaluate = (x_m: number, y_m: number, z_m: number): number => {
    let sum_g_m3 = 0;
    for (let s = 0; s < prepared.length; s++) {
      const source = prepared[s];
      if (source.kind === 'point') {
        const rx = x_m - source.x_m;
        const ry = y_m - source.y_m;
        sum_g_m3 += source.plume.concentration_g_m3(rx * downwindX + ry * downwindY, -rx * downwindY + ry * downwindX, z_m);
      } else {
        sum_g_m3 += source.area.concentration_g_m3(x_m, y_m, z_m, downwindX, downwindY);
      }
    }
    return sum_g_m3 * MICROGRAMS_PER_GRAM;
  };

  const check = (done: number, message: string): void => {
    if (signal?.aborted) throw abortError();
    onProgress?.(done / totalTargets, message);
  };

  check(0, 'Gaussian reference: ground-level field');
  const z_ground = input.groundLevelHeight_m;
  for (let column = 0; column < columns; column++) {
    if (column % TARGETS_PER_CHECK === 0 && column > 0) check(column, 'Gaussian reference: ground-level field');
    const i = column % grid.nx;
    const j = (column - i) / grid.nx;
    groundLevel[column] = evaluate(grid.xWest_m + (i + 0.5) * grid.spacing_m, grid.ySouth_m + (j + 0.5) * grid.spacing_m, z_ground);
  }
  for (let r = 0; r < receptorCount; r++) {
    if (r % TARGETS_PER_CHECK === 0) check(columns + r, 'Gaussian reference: receptors');
    const receptor = input.receptors[r];
    requireNumber(
      `receptor ${receptor.id}: height_m`,
      receptor.height_m,
      'a finite height >= 0 m',
      Number.isFinite(receptor.height_m) && receptor.height_m >= 0,
    );
    receptorValues[r] = evaluate(receptor.x_m, receptor.y_m, receptor.height_m);
    if (receptor.height_m > mixingHeight_m) {
      notes.push(`receptor ${receptor.id} is above the mixing height: plumes trapped below the lid give it nothing`);
    }
  }
  check(totalTargets, 'Gaussian reference: done');

  notes.unshift(
    `Gaussian reference: steady plumes, ${curveDescription || 'no sources'}; ground reflection` +
      (Number.isFinite(mixingHeight_m) ? ` and reflections under the mixing lid at ${format(mixingHeight_m)} m` : ''),
    `wind in the plume formula: ${windProfile === 'uniform' ? 'uniform profile' : 'power-law profile'} at each source's effective height`,
    decay_per_s > 0
      ? `first-order decay applied (half-life ${format(pollutant.halfLife_h ?? 0)} h, k = ${decay_per_s.toExponential(3)} 1/s) over the travel time x / u`
      : 'no first-order decay (conserved pollutant)',
    washout_per_s > 0
      ? `washout applied (Lambda = ${washout_per_s.toExponential(3)} 1/s at ${format(weather.rain_mm_h)} mm/h) over the travel time x / u`
      : pollutant.washout === null
        ? 'no washout (the pollutant has no washout coefficients)'
        : 'no washout (no rain)',
    depositionVelocity_m_s > 0
      ? `dry deposition by source depletion (deposition velocity ${format(depositionVelocity_m_s)} m/s)`
      : 'dry deposition not applied (deposition velocity 0)',
    'no mass budget in the Gaussian reference mode',
  );
  if (weather.calm) notes.push(`wind below the calms threshold, run at ${format(weather.windSpeed_m_s)} m/s`);

  return {
    mode: 'gaussian',
    groundLevel_ug_m3: groundLevel,
    receptors_ug_m3: receptorValues,
    sources: reports,
    massBudget_g: null,
    steps: 0,
    wallSeconds: (performance.now() - started) / 1000,
    notes,
  };
}

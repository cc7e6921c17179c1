/**
 * First-order losses as model parts: each removes mass at a rate proportional to the concentration,
 * dC/dt = -rate C, and books what it removes under its own budget term. The time stepper applies all of
 * them together exactly over a step, C <- C exp(-(k + Lambda) dt), so no step size can make C negative.
 * No losses = an empty list.
 */
import { decayRate_per_s, washoutRate_per_s } from './rates.ts';
import type { Pollutant } from '../../scenarios/format/types.ts';

export interface FirstOrderLoss {
  readonly name: string;
  /** loss rate [1/s], >= 0 */
  readonly rate_per_s: number;
  /** where the removed mass is booked in the mass budget */
  readonly budgetTerm: 'decayed' | 'washedOut';
}

function checkRate(name: string, rate_per_s: number): void {
  if (!Number.isFinite(rate_per_s) || rate_per_s < 0) {
    throw new RangeError(`${name} rate is ${rate_per_s}; allowed: a finite rate >= 0 1/s`);
  }
}

/** Chemical or radioactive decay at rate k [1/s] (k = ln 2 / half-life). */
export function FirstOrderDecay(rate_per_s: number): FirstOrderLoss {
  checkRate('decay', rate_per_s);
  return Object.freeze({ name: `FirstOrderDecay(${rate_per_s} 1/s)`, rate_per_s, budgetTerm: 'decayed' as const });
}

/** Below-cloud washout at coefficient Lambda [1/s], applied through the whole depth of the grid. */
export function Washout(rate_per_s: number): FirstOrderLoss {
  checkRate('washout', rate_per_s);
  return Object.freeze({ name: `Washout(${rate_per_s} 1/s)`, rate_per_s, budgetTerm: 'washedOut' as const });
}

/**
 * The losses of a pollutant in a weather state: decay from the half-life and washout from the rain rate
 * (rates from `./rates.ts`). Zero rates are left out, so a conserved pollutant in dry weather has none.
 */
export function lossesFor(pollutant: Pollutant, rain_mm_h: number): FirstOrderLoss[] {
  const losses: FirstOrderLoss[] = [];
  const decay = decayRate_per_s(pollutant.halfLife_h);
  if (decay > 0) losses.push(FirstOrderDecay(decay));
  const washout = washoutRate_per_s(pollutant.washout, rain_mm_h);
  if (washout > 0) losses.push(Washout(washout));
  return losses;
}

/** Total first-order loss rate [1/s]. */
export function totalLossRate_per_s(losses: readonly FirstOrderLoss[]): number {
  let total = 0;
  for (const loss of losses) total += loss.rate_per_s;
  return total;
}

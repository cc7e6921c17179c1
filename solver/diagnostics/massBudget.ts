/**
 * The mass budget of a grid run: emitted = inDomain + decayed + washedOut + dryDeposited + outflow [g].
 */
import type { BudgetTally } from '../drivers/model.ts';
import type { MassBudget } from '../drivers/types.ts';

/**
 * The budget of a model's running tally, with its relative imbalance.
 *
 * @param tally running budget [g]
 * @param basis what the figures cover, e.g. "time-march, 0 to 3600 s"
 */
export function massBudgetFrom(tally: BudgetTally, basis: string): MassBudget {
  const accounted = tally.inDomain + tally.decayed + tally.washedOut + tally.dryDeposited + tally.outflow;
  return {
    basis,
    emitted: tally.emitted,
    inDomain: tally.inDomain,
    decayed: tally.decayed,
    washedOut: tally.washedOut,
    dryDeposited: tally.dryDeposited,
    outflow: tally.outflow,
    relativeImbalance: tally.emitted > 0 ? (tally.emitted - accounted) / tally.emitted : accounted === 0 ? 0 : -Infinity,
  };
}

/** Scale every mass of a budget (e.g. rates [g/s] to one hour of operation [g]). */
export function scaleMassBudget(budget: MassBudget, factor: number, basis: string): MassBudget {
  return {
    basis,
    emitted: budget.emitted * factor,
    inDomain: budget.inDomain * factor,
    decayed: budget.decayed * factor,
    washedOut: budget.washedOut * factor,
    dryDeposited: budget.dryDeposited * factor,
    outflow: budget.outflow * factor,
    relativeImbalance: budget.relativeImbalance,
  };
}

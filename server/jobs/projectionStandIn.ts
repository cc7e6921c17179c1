/**
 * The grid's projection inside a solver worker thread: solves work in local metres only, so only the
 * definition string travels (functions cannot be cloned); the conversions stay with the caller.
 */
import type { LocalProjection } from '../../solver/grid/types.ts';

/**
 * @param definition the projection's proj4 definition (kept for the result's notes and summary)
 * @returns a LocalProjection whose conversions throw
 */
export function projectionStandIn(definition: string): LocalProjection {
  const unavailable = (): never => {
    throw new Error('the projection is not available inside the solver worker');
  };
  return { definition, toLocal: unavailable, toLonLat: unavailable };
}

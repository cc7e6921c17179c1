/**
 * Advection schemes for the finite-volume transport kernel. A scheme is a small part the model is
 * assembled with; the kernel reads its face-value rule. Both schemes are in flux form, so what leaves one
 * cell enters its neighbour exactly.
 *
 * Face value for a face with the wind blowing from cell U (upwind) to cell D:
 *   c_face = c_U + sign * alpha * slope_U,
 * with slope_U van Leer's limited slope of cell U, the harmonic mean of its two one-sided differences
 * a = c_U - c_UU and b = c_D - c_U when they agree in sign, else 0:
 *   slope = (a |b| + |a| b) / (|a| + |b|)
 * (van Leer 1974, J. Comput. Phys. 14:361), and alpha = (1 - |Courant|) / 2
 * in a time step (the Lax-Wendroff weighting that makes the 1-D scheme second order in space and time) or
 * 1/2 in a steady solve. The limited slope never exceeds twice either one-sided difference, which keeps
 * the face value between the neighbouring cell values: no new extrema, never negative
 * (Sweby 1984, SIAM J. Numer. Anal. 21:995, the TVD region).
 */

export interface AdvectionScheme {
  readonly name: string;
  /** weight of the limited slope in the face value: 1 = second order where smooth, 0 = first-order upwind */
  readonly limitedSlopeWeight: number;
  /** formal order of accuracy where the field is smooth */
  readonly formalOrder: number;
}

/** Second-order where smooth, first order at extrema and fronts (van Leer limiter): the default. */
export const LimitedUpwindAdvection: AdvectionScheme = Object.freeze({
  name: 'LimitedUpwindAdvection(vanLeer)',
  limitedSlopeWeight: 1,
  formalOrder: 2,
});

/** First-order donor cell: diffusive, monotone, for comparisons. */
export const UpwindAdvection: AdvectionScheme = Object.freeze({
  name: 'UpwindAdvection',
  limitedSlopeWeight: 0,
  formalOrder: 1,
});

/**
 * van Leer's limited slope from the backward and forward differences [same unit as the field]; the kernel
 * inlines the same formula. Branch-free, so rough fields cost no mispredicted branches.
 */
export function limitedSlope(backward: number, forward: number): number {
  const absBackward = Math.abs(backward);
  const absForward = Math.abs(forward);
  const sum = absBackward + absForward;
  return sum === 0 ? 0 : (backward * absForward + absBackward * forward) / sum;
}

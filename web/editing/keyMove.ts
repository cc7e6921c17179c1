/**
 * Moving a stack or receptor with the keyboard: an arrow key moves it by a stated step in the site's
 * local metres (east, west, north, south), Shift by the larger step. Pure, for the tests.
 */
import { offsetFromSite } from '../map/offsetWords.ts';

/** Keyboard moves of a focused stack or receptor [m]: an arrow key moves it this far, with Shift the larger step. */
export const KEY_STEP_m = 10;
export const KEY_STEP_LARGE_m = 100;

/** Local metres <-> lon/lat, as the map's frame gives them (web/map/localFrame.ts). */
export interface FrameLike {
  projection: { toLocal(lon: number, lat: number): [number, number]; toLonLat(x_m: number, y_m: number): [number, number] };
}

/**
 * Where an arrow key moves a point: east, west, north or south by the step, in the site's local metres
 * (so a step is the same distance wherever the site is).
 *
 * @returns the new lon/lat (rounded to 7 decimals) and local position, or null for a key that is no arrow
 */
export function keyMove(
  key: string,
  large: boolean,
  at: { lat: number; lon: number },
  frame: FrameLike,
): { lat: number; lon: number; x_m: number; y_m: number; dx_m: number; dy_m: number } | null {
  const step = large ? KEY_STEP_LARGE_m : KEY_STEP_m;
  const delta: Record<string, [number, number]> = { ArrowRight: [step, 0], ArrowLeft: [-step, 0], ArrowUp: [0, step], ArrowDown: [0, -step] };
  const d = delta[key];
  if (d === undefined) return null;
  const [x, y] = frame.projection.toLocal(at.lon, at.lat);
  const [lon, lat] = frame.projection.toLonLat(x + d[0], y + d[1]);
  const rounded = { lon: round7(lon), lat: round7(lat) };
  const [x_m, y_m] = frame.projection.toLocal(rounded.lon, rounded.lat);
  return { ...rounded, x_m, y_m, dx_m: d[0], dy_m: d[1] };
}

/** The sentence a screen reader hears after a keyboard move. */
export function moveAnnouncement(what: string, name: string, dx_m: number, dy_m: number, x_m: number, y_m: number): string {
  const direction = dx_m > 0 ? 'east' : dx_m < 0 ? 'west' : dy_m > 0 ? 'north' : 'south';
  const distance = Math.abs(dx_m) + Math.abs(dy_m);
  return `${what} ${name} moved ${distance} m ${direction}, now ${offsetFromSite(x_m, y_m)}`;
}


function round7(value: number): number {
  return Math.round(value * 1e7) / 1e7;
}

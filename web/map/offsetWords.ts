/**
 * A place in local metres as a person reads it: "62 m west and 10 m north of the site" rather than
 * "-62 m east, 10 m north" (whole metres, the signs turned into compass words). Pure: no DOM and no
 * Leaflet, so the tables, the study answers and the keyboard announcements share it.
 */
export function offsetFromSite(x_m: number, y_m: number): string {
  const east = Math.round(x_m);
  const north = Math.round(y_m);
  return `${Math.abs(east)} m ${east < 0 ? 'west' : 'east'} and ${Math.abs(north)} m ${north < 0 ? 'south' : 'north'} of the site`;
}

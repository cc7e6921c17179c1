/**
 * A quiet metric grid in local metres (east and north of the site), drawn instead of a tile map so the
 * page works offline: lines every 100 m, 200 m, 500 m, 1 km ... chosen so that about six to twelve lines
 * cross the view, each labelled at the view's north and west edges with its distance from the site.
 * Lines of the local grid are straight in local metres; they are drawn through points 1/8 of the view
 * apart, so the small curvature against the web map's projection is followed.
 */
import L from 'leaflet';
import type { LocalFrame } from './localFrame.ts';

/** Grid spacings to choose from [m]. */
const SPACINGS_m = [10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10_000, 20_000, 50_000];

/** Fewest lines across the view's wider side. */
const MINIMUM_LINES = 6;

/** The spacing giving at least `MINIMUM_LINES` lines across a view `extent_m` wide [m]. */
export function gridSpacingFor(extent_m: number): number {
  for (let n = SPACINGS_m.length - 1; n >= 0; n--) if (extent_m / SPACINGS_m[n] >= MINIMUM_LINES) return SPACINGS_m[n];
  return SPACINGS_m[0];
}

function label(value_m: number, axis: 'x' | 'y'): string {
  const direction = axis === 'x' ? (value_m < 0 ? 'W' : 'E') : value_m < 0 ? 'S' : 'N';
  if (value_m === 0) return axis === 'x' ? 'x 0' : 'y 0';
  const magnitude = Math.abs(value_m);
  return magnitude >= 1000 ? `${magnitude / 1000} km ${direction}` : `${magnitude} m ${direction}`;
}

export class MetricGridLayer extends L.Layer {
  private group = L.layerGroup();

  constructor(private readonly frame: LocalFrame) {
    super();
  }

  override onAdd(map: L.Map): this {
    this.group.addTo(map);
    this.redraw();
    return this;
  }

  override onRemove(): this {
    this.group.remove();
    return this;
  }

  override getEvents(): { [name: string]: L.LeafletEventHandlerFn } {
    return { moveend: () => this.redraw() };
  }

  private redraw(): void {
    const map = this._map;
    if (!map) return;
    this.group.clearLayers();
    const bounds = map.getBounds();
    const corners = [bounds.getSouthWest(), bounds.getNorthEast(), bounds.getNorthWest(), bounds.getSouthEast()].map((c) => this.frame.toLocal(c));
    const xs = corners.map((c) => c[0]);
    const ys = corners.map((c) => c[1]);
    const xMin = Math.min(...xs), xMax = Math.max(...xs), yMin = Math.min(...ys), yMax = Math.max(...ys);
    const spacing = gridSpacingFor(Math.max(xMax - xMin, yMax - yMin));
    const style: L.PolylineOptions = { color: '#8a94a6', weight: 1, opacity: 0.55, interactive: false };
    const axisStyle: L.PolylineOptions = { ...style, color: '#5d6678', weight: 1.5, opacity: 0.8 };
    const steps = 8;
    for (let x = Math.ceil(xMin / spacing) * spacing; x <= xMax; x += spacing) {
      const points: L.LatLng[] = [];
      for (let s = 0; s <= steps; s++) points.push(this.frame.toLatLng(x, yMin + ((yMax - yMin) * s) / steps));
      L.polyline(points, x === 0 ? axisStyle : style).addTo(this.group);
      const at = map.latLngToContainerPoint(this.frame.toLatLng(x, yMin));
      this.addLabel(map.containerPointToLatLng([at.x, 4]), label(x, 'x'), 'grid-label grid-label-x');
    }
    for (let y = Math.ceil(yMin / spacing) * spacing; y <= yMax; y += spacing) {
      const points: L.LatLng[] = [];
      for (let s = 0; s <= steps; s++) points.push(this.frame.toLatLng(xMin + ((xMax - xMin) * s) / steps, y));
      L.polyline(points, y === 0 ? axisStyle : style).addTo(this.group);
      const at = map.latLngToContainerPoint(this.frame.toLatLng(xMin, y));
      this.addLabel(map.containerPointToLatLng([4, at.y]), label(y, 'y'), 'grid-label grid-label-y');
    }
  }

  private addLabel(at: L.LatLng, text: string, className: string): void {
    L.marker(at, {
      icon: L.divIcon({ className, html: `<span>${text}</span>`, iconSize: undefined }),
      interactive: false,
      keyboard: false,
    }).addTo(this.group);
  }
}

/**
 * The concentration overlay: the ground-level field painted one pixel per grid column into a canvas, which
 * Leaflet places over the grid's extent and scales with the map (Leaflet's image-overlay placement and
 * zoom animation, with a canvas in place of an image, so no picture URL is ever made).
 *
 * Placement: the grid is square in local metres; its corners are converted to lat/lon and the canvas
 * is stretched over their bounding box. The local transverse Mercator and the web map differ by the
 * meridian convergence, zero on the site's meridian and about 0.06 degree 5 km east or west of it at 54 N,
 * which moves the grid's corner by about 5 m: a tenth of a 50 m cell, not worth reprojecting every pixel.
 */
import L from 'leaflet';
import { contours } from 'd3-contour';
import { ColourScale, DifferenceScale, paintField, rampColour, rgbToHex, type ScaleKind } from '../colour/colourScale.ts';
import { formatConcentration } from '../colour/legendLevels.ts';
import type { GroundField } from '../field/groundField.ts';
import type { LocalFrame } from './localFrame.ts';

/** An image overlay whose picture is a canvas (see the module comment). */
const CanvasOverlay = L.ImageOverlay.extend({
  _initImage(this: L.ImageOverlay & { _image: HTMLElement; _url: unknown; _zoomAnimated: boolean; options: L.ImageOverlayOptions }) {
    const canvas = this._url as HTMLCanvasElement;
    this._image = canvas;
    L.DomUtil.addClass(canvas, 'leaflet-image-layer');
    L.DomUtil.addClass(canvas, 'field-canvas');
    if (this._zoomAnimated) L.DomUtil.addClass(canvas, 'leaflet-zoom-animated');
    if (this.options.className) L.DomUtil.addClass(canvas, this.options.className);
    (this as unknown as { _updateOpacity(): void })._updateOpacity();
  },
}) as unknown as new (canvas: HTMLCanvasElement, bounds: L.LatLngBounds, options?: L.ImageOverlayOptions) => L.ImageOverlay;

export interface OverlayStyle {
  scale: ColourScale | DifferenceScale;
  /** 0..1 */
  opacity: number;
}

export class FieldOverlay {
  private readonly canvas = document.createElement('canvas');
  private overlay: L.ImageOverlay | null = null;
  private pixels: Uint8ClampedArray | null = null;

  constructor(private readonly map: L.Map, private readonly frame: LocalFrame) {
    this.canvas.setAttribute('aria-hidden', 'true');
  }

  /** Paint a field with a style and show it. */
  show(field: GroundField, style: OverlayStyle): void {
    const { nx, ny, spacing_m, xWest_m, ySouth_m } = field.grid;
    if (this.canvas.width !== nx || this.canvas.height !== ny) {
      this.canvas.width = nx;
      this.canvas.height = ny;
      this.pixels = null;
    }
    this.pixels ??= new Uint8ClampedArray(4 * nx * ny);
    paintField(field.values, nx, ny, style.scale, this.pixels);
    const context = this.canvas.getContext('2d');
    if (context === null) return;
    context.putImageData(new ImageData(this.pixels as Uint8ClampedArray<ArrayBuffer>, nx, ny), 0, 0);
    const bounds = this.frame.boundsOf(xWest_m, ySouth_m, xWest_m + nx * spacing_m, ySouth_m + ny * spacing_m);
    if (this.overlay === null) {
      this.overlay = new CanvasOverlay(this.canvas, bounds, { opacity: style.opacity, interactive: false, pane: 'fieldPane' });
      this.overlay.addTo(this.map);
    } else {
      this.overlay.setBounds(bounds);
      this.overlay.setOpacity(style.opacity);
    }
  }

  setOpacity(opacity: number): void {
    this.overlay?.setOpacity(opacity);
  }

  clear(): void {
    this.overlay?.remove();
    this.overlay = null;
  }
}

/**
 * Isopleth lines at the given levels: d3-contour on the field in grid units (value i + nx * j at the
 * point (i + 0.5, j + 0.5), row 0 south, as server/writers/footprint.ts uses it), converted to local
 * metres and then to lat/lon.
 */
export class IsoplethLayer {
  private readonly group = L.layerGroup();

  constructor(private readonly map: L.Map, private readonly frame: LocalFrame) {
    this.group.addTo(map);
  }

  show(field: GroundField, levels_ug_m3: readonly number[], scale: ColourScale): void {
    this.group.clearLayers();
    const { nx, ny, spacing_m, xWest_m, ySouth_m } = field.grid;
    const generator = contours().size([nx, ny]).smooth(true);
    const values = field.values as unknown as number[];
    for (const level of levels_ug_m3) {
      const shape = generator.contour(values, level);
      const rings = shape.coordinates.flatMap((polygon) =>
        polygon.map((ring) => ring.map(([u, v]) => this.frame.toLatLng(xWest_m + u * spacing_m, ySouth_m + v * spacing_m))),
      );
      if (rings.length === 0) continue;
      const t = scale.position(level);
      const colour = Number.isNaN(t) ? '#2b3240' : rgbToHex(rampColour(t));
      // A dark casing under a line in the level's own colour keeps each line visible over any part of the ramp.
      L.polyline(rings, { color: '#1b1f27', weight: 3.5, opacity: 0.75, interactive: false, pane: 'isoplethPane' }).addTo(this.group);
      L.polyline(rings, { color: colour, weight: 1.6, opacity: 1, interactive: true, pane: 'isoplethPane' })
        .bindTooltip(`${formatConcentration(level)} µg/m³ isopleth`, { sticky: true })
        .addTo(this.group);
    }
  }

  clear(): void {
    this.group.clearLayers();
  }
}

export type { ScaleKind };

/**
 * Small map controls of our own: the north arrow and the pointer read-out (lon/lat, local metres, and
 * the value of the field on show under the pointer with its share of the chosen standard).
 */
import L from 'leaflet';
import { escapeHtml } from './escapeHtml.ts';
import { formatConcentration } from '../colour/legendLevels.ts';
import { formatDegrees, formatMetres, type LocalFrame } from './localFrame.ts';

/**
 * North arrow. The map is drawn in the web map projection, where true north is straight up everywhere;
 * the local grid's north differs from it by the meridian convergence (zero at the site, under 0.1 degree
 * across a 10 km domain at mid latitudes), too little to draw.
 */
export class NorthArrowControl extends L.Control {
  constructor() {
    super({ position: 'topright' });
  }

  override onAdd(): HTMLElement {
    const element = L.DomUtil.create('div', 'north-arrow');
    element.setAttribute('role', 'img');
    element.setAttribute('aria-label', 'North is up');
    element.innerHTML =
      '<svg viewBox="0 0 32 44" width="28" height="38" aria-hidden="true">' +
      '<path d="M16 3 L25 31 L16 25 L7 31 Z" fill="#2b3240" stroke="#2b3240" stroke-width="1.5" stroke-linejoin="round"/>' +
      '<path d="M16 3 L16 25 L7 31 Z" fill="#f4f1ea"/>' +
      '<text x="16" y="42" text-anchor="middle" font-size="10" font-family="inherit" fill="#2b3240">N</text></svg>';
    return element;
  }
}

/** What the read-out asks about the field under the pointer. */
export interface FieldProbe {
  /** the value at a local position, or null outside the field [ug/m3] */
  valueAt(x_m: number, y_m: number): number | null;
  /** "preview" or "grid run", shown beside the value */
  label: string;
  /** the standard the share is given of, if one is chosen */
  standard: { name: string; limit_ug_m3: number } | null;
}

export class PointerReadoutControl extends L.Control {
  private element: HTMLElement | null = null;
  private probe: FieldProbe | null = null;
  private last: L.LatLng | null = null;
  /** a further line under the value (the siting map's), or null */
  private extraLine: ((latlng: L.LatLng) => string | null) | null = null;

  constructor(private readonly frame: LocalFrame) {
    super({ position: 'bottomleft' });
  }

  override onAdd(map: L.Map): HTMLElement {
    const element = (this.element = L.DomUtil.create('div', 'pointer-readout'));
    element.setAttribute('aria-live', 'off');
    element.dataset.testid = 'pointer-readout';
    L.DomEvent.disableClickPropagation(element);
    map.on('mousemove', this.onMove, this);
    map.on('mouseout', () => this.show(null));
    this.show(null);
    return element;
  }

  override onRemove(map: L.Map): void {
    map.off('mousemove', this.onMove, this);
  }

  setProbe(probe: FieldProbe | null): void {
    this.probe = probe;
    this.show(this.last);
  }

  /** A further line for the read-out (the siting map's value), or null for none. */
  setExtraLine(line: ((latlng: L.LatLng) => string | null) | null): void {
    this.extraLine = line;
    this.element?.classList.toggle('with-extra', line !== null);
    this.show(this.last);
  }

  private onMove(event: L.LeafletMouseEvent): void {
    this.show(event.latlng);
  }

  /** Show the read-out for a position (null: the hint). Public so keyboard users can probe the centre. */
  show(latlng: L.LatLng | null): void {
    this.last = latlng;
    if (this.element === null) return;
    if (latlng === null) {
      this.element.innerHTML = '<span class="muted">Move the pointer over the map for positions and values</span>';
      return;
    }
    const [x, y] = this.frame.toLocal(latlng);
    let valueLine = '';
    if (this.probe !== null) {
      const value = this.probe.valueAt(x, y);
      if (value !== null) {
        const share =
          this.probe.standard !== null
            ? ` <span class="share">${formatShare(value / this.probe.standard.limit_ug_m3)} of ${escapeHtml(this.probe.standard.name)} (${formatConcentration(this.probe.standard.limit_ug_m3)} µg/m³)</span>`
            : '';
        valueLine = `<div class="value" data-testid="pointer-value"><b>${formatConcentration(value)} µg/m³</b> <span class="muted">${escapeHtml(this.probe.label)}</span>${share}</div>`;
      }
    }
    const extra = this.extraLine?.(latlng) ?? null;
    this.element.innerHTML =
      `<div>lat ${formatDegrees(latlng.lat)}, lon ${formatDegrees(latlng.lng)}</div>` +
      `<div>x ${formatMetres(x)} m, y ${formatMetres(y)} m from the site</div>` +
      valueLine +
      (extra ? `<div class="value" data-testid="pointer-siting">${escapeHtml(extra)}</div>` : '');
  }
}

/** A ratio as a percentage with sensible digits. */
export function formatShare(ratio: number): string {
  const percent = ratio * 100;
  if (percent >= 10) return `${Math.round(percent)} %`;
  if (percent >= 0.1) return `${percent.toFixed(1)} %`;
  return percent > 0 ? '< 0.1 %' : '0 %';
}

export { escapeHtml };

/**
 * The siting result on the map: the map's bands (siting.geojson) in the page's ramp, the site outline,
 * the candidates with their rank, the best position with "move the stack here", and a map control that
 * switches the concentration overlay and the siting map on and off and carries the siting legend. The
 * control sits over the map's corner, so nothing on the page moves when a result arrives.
 */
import L from 'leaflet';
import { SCREENING_CAUTION } from '../../server/writers/caution.ts';
import type { ScaleKind } from '../colour/colourScale.ts';
import { formatConcentration } from '../colour/legendLevels.ts';
import { escapeHtml } from '../map/escapeHtml.ts';
import { outcomeName } from '../results/studyResults.ts';
import { bandAt, sitingBandStyles, sitingReadout, sitingValueAt, type BandStyle, type SitingMapContent, type SitingRaster } from './sitingMap.ts';

/** Candidates beyond this rank are drawn as dots without their number (a fine lattice has hundreds). */
export const NUMBERED_CANDIDATES = 12;

/** The caution's first sentence ("Screening estimate only."), from the one caution text. */
const CAUTION_HEAD = SCREENING_CAUTION.split(/(?<=\.)\s/)[0];

export interface SitingShown {
  content: SitingMapContent;
  raster: SitingRaster | null;
  /** the stack the study placed */
  stackId: string;
  /** e.g. "one steady weather state" or "long-term mean" */
  statistic: string;
  /** "gaussian" or "grid" */
  mode: string;
  combination: string;
}

export class SitingLayer {
  private readonly bands = L.layerGroup();
  private readonly marks = L.layerGroup();
  private shown: SitingShown | null = null;
  private styles: BandStyle[] = [];
  private visible = false;
  private readonly control: MapLayersControl;

  constructor(
    private readonly map: L.Map,
    /** move the stack to a position (an edit of the scenario) */
    private readonly moveStack: (stackId: string, lat: number, lon: number) => void,
    /** show or hide the concentration overlay and its isopleths */
    showConcentrations: (on: boolean) => void,
    private readonly onVisibility: () => void,
  ) {
    map.createPane('sitingPane').style.zIndex = '365';
    map.getPane('sitingPane')!.style.pointerEvents = 'none';
    map.createPane('sitingMarkPane').style.zIndex = '630';
    this.control = new MapLayersControl(showConcentrations, (on) => this.setVisible(on)).addTo(map);
  }

  get isShown(): boolean {
    return this.visible && this.shown !== null;
  }

  /** Draw a siting result and switch it on (the concentration overlay off, so the two do not mix). */
  show(shown: SitingShown, scaleKind: ScaleKind, opacity: number): void {
    this.shown = shown;
    this.redraw(scaleKind, opacity);
    this.control.setSiting(true, legendHtml(shown, this.styles));
    this.setVisible(true);
    this.control.setConcentrations(false);
    const ring = shown.content.siteRing;
    const points = ring ?? shown.content.candidates.map((c) => [c.lon, c.lat] as [number, number]);
    if (points.length > 0) this.map.fitBounds(L.latLngBounds(points.map(([lon, lat]) => L.latLng(lat, lon))), { paddingTopLeft: [60, 60], paddingBottomRight: [this.control.width() + 30, 90], maxZoom: 17 });
  }

  /** Redraw with the view's colour scale kind and opacity. */
  redraw(scaleKind: ScaleKind, opacity: number): void {
    this.bands.clearLayers();
    this.marks.clearLayers();
    const shown = this.shown;
    if (shown === null) return;
    const { content } = shown;
    this.styles = sitingBandStyles(content.bands.map((band) => band.lower_ug_m3), scaleKind);
    const colourOf = new Map(this.styles.map((style) => [style.lower_ug_m3, style.colour]));
    for (const band of content.bands) {
      L.geoJSON({ type: 'Feature', properties: {}, geometry: band.geometry } as never, {
        pane: 'sitingPane',
        interactive: false,
        style: { stroke: true, color: '#1b1f27', weight: 0.6, opacity: 0.35, fillColor: colourOf.get(band.lower_ug_m3) ?? '#888888', fillOpacity: opacity },
      }).addTo(this.bands);
    }
    if (content.siteRing !== null) {
      const ring = content.siteRing.map(([lon, lat]) => L.latLng(lat, lon));
      L.polygon(ring, { pane: 'sitingPane', interactive: false, fill: false, color: '#ffffff', weight: 4, opacity: 0.9 }).addTo(this.bands);
      L.polygon(ring, { pane: 'sitingPane', interactive: false, fill: false, color: '#1b1f27', weight: 1.8, dashArray: '6 4' }).addTo(this.bands);
    }
    content.candidates.forEach((candidate) => {
      const numbered = candidate.rank <= NUMBERED_CANDIDATES;
      const marker = L.marker([candidate.lat, candidate.lon], {
        pane: 'sitingMarkPane',
        keyboard: numbered,
        icon: L.divIcon({
          className: `siting-candidate${numbered ? '' : ' siting-candidate-dot'}`,
          html: numbered ? `<span>${candidate.rank}</span>` : '',
          iconSize: numbered ? [20, 20] : [8, 8],
        }),
        title: `Candidate ${candidate.rank} (${candidate.id}): ${formatConcentration(candidate.combined_ug_m3)} µg/m³`,
      });
      marker.bindTooltip(`Rank ${candidate.rank}, ${escapeHtml(candidate.id)}: ${formatConcentration(candidate.combined_ug_m3)} µg/m³${candidate.verdict ? `, ${outcomeName(candidate.verdict)}` : ''}`);
      marker.on('add', () => marker.getElement()?.setAttribute('data-testid', `siting-candidate-${candidate.rank}`));
      marker.addTo(this.marks);
    });
    const best = content.best;
    if (best !== null) {
      const marker = L.marker([best.lat, best.lon], {
        pane: 'sitingMarkPane',
        keyboard: true,
        zIndexOffset: 1000,
        title: `Best position: ${formatConcentration(best.combined_ug_m3)} µg/m³`,
        icon: L.divIcon({
          className: 'siting-best',
          iconSize: [30, 30],
          html: '<svg viewBox="0 0 30 30" width="30" height="30" aria-hidden="true"><circle cx="15" cy="15" r="11" /><path d="M15 1v8M15 21v8M1 15h8M21 15h8" /><circle class="dot" cx="15" cy="15" r="3" /></svg>',
        }),
      });
      const popup = document.createElement('div');
      popup.className = 'siting-popup';
      popup.innerHTML =
        `<b>Best position for ${escapeHtml(shown.stackId)}</b><br>${formatConcentration(best.combined_ug_m3)} µg/m³, ${escapeHtml(shown.combination)} if the stack stood here` +
        `<br><span class="muted">${escapeHtml(CAUTION_HEAD)}</span><br>`;
      const move = document.createElement('button');
      move.type = 'button';
      move.className = 'primary';
      move.dataset.testid = 'siting-move-stack-popup';
      move.textContent = 'Move the stack here';
      move.addEventListener('click', () => {
        this.moveStack(shown.stackId, best.lat, best.lon);
        marker.closePopup();
      });
      popup.append(move);
      marker.bindPopup(popup);
      marker.bindTooltip(`Best position: ${formatConcentration(best.combined_ug_m3)} µg/m³ (click to move the stack here)`);
      marker.on('add', () => marker.getElement()?.setAttribute('data-testid', 'siting-best-marker'));
      marker.addTo(this.marks);
    }
  }

  /**
   * Take the siting map away (another scenario was opened: the map answered a question about the
   * previous one). The concentration overlay comes back on.
   */
  clear(): void {
    if (this.shown === null) return;
    this.shown = null;
    this.bands.clearLayers();
    this.marks.clearLayers();
    this.setVisible(false);
    this.control.setSiting(false, '');
    this.control.setConcentrations(true);
  }

  setVisible(on: boolean): void {
    this.visible = on && this.shown !== null;
    for (const group of [this.bands, this.marks]) {
      if (this.visible) group.addTo(this.map);
      else group.remove();
    }
    this.control.setSitingChecked(this.visible);
    this.onVisibility();
  }

  /** The read-out line at a position, or null when the siting map is not on show. */
  readoutAt(lat: number, lon: number): string | null {
    if (!this.isShown || this.shown === null) return null;
    const value = this.shown.raster === null ? null : sitingValueAt(this.shown.raster, lon, lat);
    const band = value === null ? bandAt(this.shown.content.bands, lon, lat) : null;
    const style = band === null ? null : (this.styles.find((s) => s.lower_ug_m3 === band.lower_ug_m3) ?? null);
    return sitingReadout(value, this.styles, style);
  }
}

/** The siting legend: what the map is, the bands lowest last, the symbols, the caution's head. */
function legendHtml(shown: SitingShown, styles: readonly BandStyle[]): string {
  const rows = [...styles]
    .reverse()
    .map((style) => `<li><span class="swatch" data-colour="${style.colour}"></span>${escapeHtml(style.label)}</li>`)
    .join('');
  const below = styles.length > 0 ? `<li><span class="swatch swatch-empty"></span>below ${formatConcentration(styles[0].lower_ug_m3)}</li>` : '';
  return (
    `<div class="siting-legend" data-testid="siting-legend"><div class="legend-title">${/^highest/i.test(shown.combination) ? 'Highest PC' : `${escapeHtml(capitalised(shown.combination))} of the PCs`} at the sensitive receptors if the stack stood here <span class="unit">[µg/m³]</span></div>` +
    `<div class="legend-sub">${escapeHtml(shown.combination)}; ${escapeHtml(shown.statistic)}; ${escapeHtml(shown.mode)} mode; stack ${escapeHtml(shown.stackId)}</div>` +
    `<ul class="siting-bands">${rows}${below}</ul>` +
    '<div class="siting-key"><span><span class="siting-best-key" aria-hidden="true"></span> best position</span> <span><span class="siting-candidate-key" aria-hidden="true">1</span> candidate rank</span> <span><span class="siting-site-key" aria-hidden="true"></span> site</span></div>' +
    `<div class="siting-caution">${escapeHtml(CAUTION_HEAD)} See the caution beside the results.</div></div>`
  );
}

function capitalised(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** The map's layer switches (concentrations, siting map) and the siting legend, top right. */
class MapLayersControl extends L.Control {
  private element: HTMLElement | null = null;

  constructor(
    private readonly onConcentrations: (on: boolean) => void,
    private readonly onSiting: (on: boolean) => void,
  ) {
    super({ position: 'topright' });
  }

  override onAdd(): HTMLElement {
    const element = (this.element = L.DomUtil.create('div', 'map-layers'));
    element.dataset.testid = 'map-layers';
    element.innerHTML =
      '<fieldset><legend>On the map</legend>' +
      '<label><input type="checkbox" data-layer="concentrations" checked /> Concentrations</label>' +
      '<label title="Run a siting study (Studies tab) first"><input type="checkbox" data-layer="siting" data-testid="siting-toggle" disabled /> Siting map</label>' +
      '</fieldset><div class="siting-legend-slot"></div>';
    L.DomEvent.disableClickPropagation(element);
    L.DomEvent.disableScrollPropagation(element);
    const concentrations = element.querySelector('[data-layer="concentrations"]') as HTMLInputElement;
    const siting = element.querySelector('[data-layer="siting"]') as HTMLInputElement;
    concentrations.addEventListener('change', () => this.onConcentrations(concentrations.checked));
    siting.addEventListener('change', () => this.onSiting(siting.checked));
    return element;
  }

  /** Width on screen [px] (0 before it is on the map), to keep fitted views clear of it. */
  width(): number {
    return this.element?.offsetWidth ?? 0;
  }

  setConcentrations(on: boolean): void {
    const box = this.element?.querySelector('[data-layer="concentrations"]') as HTMLInputElement | null;
    if (box) box.checked = on;
    this.onConcentrations(on);
  }

  setSiting(available: boolean, legend: string): void {
    const box = this.element?.querySelector('[data-layer="siting"]') as HTMLInputElement | null;
    if (box) {
      box.disabled = !available;
      if (available) box.parentElement?.removeAttribute('title');
      else box.parentElement?.setAttribute('title', 'Run a siting study (Studies tab) first');
    }
    const slot = this.element?.querySelector('.siting-legend-slot') as HTMLElement | null;
    if (slot) {
      slot.innerHTML = legend;
      // colours through the style object: the page's content security policy refuses style attributes
      for (const swatch of Array.from(slot.querySelectorAll<HTMLElement>('.swatch[data-colour]'))) swatch.style.background = swatch.dataset.colour ?? '';
    }
  }

  setSitingChecked(on: boolean): void {
    const box = this.element?.querySelector('[data-layer="siting"]') as HTMLInputElement | null;
    if (box) box.checked = on;
    this.element?.classList.toggle('siting-on', on);
  }
}

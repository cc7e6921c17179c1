/**
 * Sources and receptors on the map, and the tools that place, move, draw and delete them.
 *
 * - Stacks and receptors are markers: a click with "Add stack" or "Add receptor" places one, a drag
 *   moves it (the preview follows the drag), Delete removes the selected one.
 * - Area sources are polygons drawn and reshaped with the geoman drawing plugin.
 * - The scenario document is the one truth: every finished edit goes into it (and onto the undo list);
 *   the layer redraws from it. While a marker is dragged, `onDragPreview` gets the scenario as it would
 *   be, so the preview can follow without filling the undo list.
 */
import L from 'leaflet';
import '@geoman-io/leaflet-geoman-free';
import type { RawScenario, ScenarioDocument } from '../state/scenarioDocument.ts';
import { escapeHtml } from '../map/mapControls.ts';
import { keyMove, moveAnnouncement, type FrameLike } from './keyMove.ts';

export type Tool = 'select' | 'stack' | 'receptor' | 'area';

export { KEY_STEP_m, KEY_STEP_LARGE_m, keyMove, moveAnnouncement, type FrameLike } from './keyMove.ts';

/** What is selected: a source or receptor by its index in the scenario's list. */
export type Selection = { list: 'sources' | 'receptors'; index: number } | null;

interface RawSource {
  kind?: string;
  id?: string;
  name?: string;
  lat?: number;
  lon?: number;
  polygon?: [number, number][];
}

interface RawReceptor {
  id?: string;
  name?: string;
  lat?: number;
  lon?: number;
}

/** Defaults of a new stack: a modest boiler flue (invented, plausible figures; edit them in the form). */
export const NEW_STACK_DEFAULTS = {
  height_m: 20,
  diameter_m: 0.6,
  exitVelocity_m_s: 10,
  exitTemperature_K: 400,
  emission_g_s: 0.5,
  plumeRise: true,
} as const;

/** Defaults of a new area source: released at 1 m. */
export const NEW_AREA_DEFAULTS = { releaseHeight_m: 1, emission_g_s: 0.05 } as const;

/** A fresh id like "stack-3" not yet used in a list. */
export function freshId(prefix: string, items: readonly { id?: unknown }[]): string {
  const used = new Set(items.map((item) => item.id));
  for (let n = 1; ; n++) if (!used.has(`${prefix}-${n}`)) return `${prefix}-${n}`;
}

const stackIcon = (selected: boolean) =>
  L.divIcon({
    className: `map-symbol stack-symbol${selected ? ' selected' : ''}`,
    html: '<svg viewBox="0 0 24 24" width="24" height="24" aria-hidden="true"><rect x="9" y="4" width="6" height="16" rx="1"/><path d="M4 20h16" /><circle cx="12" cy="4" r="2.4"/></svg>',
    iconSize: [24, 24],
    iconAnchor: [12, 20],
  });

const receptorIcon = (selected: boolean) =>
  L.divIcon({
    className: `map-symbol receptor-symbol${selected ? ' selected' : ''}`,
    html: '<svg viewBox="0 0 20 20" width="20" height="20" aria-hidden="true"><path d="M10 2 L18 10 L10 18 L2 10 Z"/></svg>',
    iconSize: [20, 20],
    iconAnchor: [10, 10],
  });

export class EditLayer {
  private readonly group = L.featureGroup();
  private tool: Tool = 'select';
  selection: Selection = null;
  private readonly selectionListeners = new Set<(selection: Selection) => void>();
  private readonly toolListeners = new Set<(tool: Tool) => void>();

  /** the marker to give the keyboard focus back to after the redraw an edit causes */
  private refocus: { list: 'sources' | 'receptors'; index: number } | null = null;

  constructor(
    private readonly map: L.Map,
    private readonly document: ScenarioDocument,
    private readonly onDragPreview: (scenario: RawScenario) => void,
    /** the map's current local frame (it changes with the site) */
    private readonly frameOf: () => FrameLike | null = () => null,
    /** tell screen readers what happened (a polite live region) */
    private readonly announce: (text: string) => void = () => undefined,
  ) {
    this.group.addTo(map);
    map.pm.setGlobalOptions({ allowSelfIntersection: false, snappable: false } as never);
    map.on('click', (event: L.LeafletMouseEvent) => this.placeAt(event.latlng));
    map.on('pm:create', (event: { layer: L.Layer }) => this.finishArea(event.layer as L.Polygon));
    document.subscribe(() => this.redraw());
    this.redraw();
  }

  onSelection(listener: (selection: Selection) => void): void {
    this.selectionListeners.add(listener);
  }

  onTool(listener: (tool: Tool) => void): void {
    this.toolListeners.add(listener);
  }

  get currentTool(): Tool {
    return this.tool;
  }

  setTool(tool: Tool): void {
    if (this.map.pm.globalDrawModeEnabled()) this.map.pm.disableDraw();
    this.tool = tool;
    this.map.getContainer().classList.toggle('placing', tool === 'stack' || tool === 'receptor');
    if (tool === 'area') {
      this.map.pm.enableDraw('Polygon', {
        allowSelfIntersection: false,
        pathOptions: { color: '#a2472f', weight: 2, fillOpacity: 0.15 },
        templineStyle: { color: '#a2472f' },
        hintlineStyle: { color: '#a2472f', dashArray: '4 4' },
      } as never);
    }
    for (const listener of this.toolListeners) listener(tool);
  }

  select(selection: Selection): void {
    this.selection = selection;
    this.redraw();
    for (const listener of this.selectionListeners) listener(selection);
  }

  /** Delete the selected source or receptor. */
  deleteSelected(): void {
    const selection = this.selection;
    if (selection === null) return;
    const list = this.document.view[selection.list] as { id?: string }[] | undefined;
    const id = list?.[selection.index]?.id ?? '';
    this.selection = null;
    this.document.edit(`delete ${selection.list === 'sources' ? 'source' : 'receptor'} ${id}`, (draft) => {
      (draft[selection.list] as unknown[]).splice(selection.index, 1);
    });
    for (const listener of this.selectionListeners) listener(null);
  }

  /** Add a stack or receptor at a position (the click of the tool, or the keyboard's "at the map centre"). */
  placeAt(latlng: L.LatLng): void {
    if (this.tool !== 'stack' && this.tool !== 'receptor') return;
    const lat = round7(latlng.lat);
    const lon = round7(latlng.lng);
    if (this.tool === 'stack') {
      const sources = (this.document.view.sources as RawSource[] | undefined) ?? [];
      const id = freshId('stack', sources);
      this.document.edit(`add stack ${id}`, (draft) => {
        (draft.sources as unknown[]) ??= [];
        (draft.sources as unknown[]).push({ kind: 'point', id, name: `New stack ${id.split('-')[1]}`, lat, lon, ...NEW_STACK_DEFAULTS });
      });
      this.select({ list: 'sources', index: ((this.document.view.sources as unknown[]) ?? []).length - 1 });
    } else {
      const receptors = (this.document.view.receptors as RawReceptor[] | undefined) ?? [];
      const id = freshId('receptor', receptors);
      this.document.edit(`add receptor ${id}`, (draft) => {
        (draft.receptors as unknown[]) ??= [];
        (draft.receptors as unknown[]).push({ id, name: `Receptor ${id.split('-')[1]}`, lat, lon, height_m: 1.5 });
      });
      this.select({ list: 'receptors', index: ((this.document.view.receptors as unknown[]) ?? []).length - 1 });
    }
    this.setTool('select');
  }

  private finishArea(layer: L.Polygon): void {
    layer.remove();
    const ring = ringOf(layer);
    if (ring === null) return;
    const sources = (this.document.view.sources as RawSource[] | undefined) ?? [];
    const id = freshId('area', sources);
    this.document.edit(`draw area source ${id}`, (draft) => {
      (draft.sources as unknown[]) ??= [];
      (draft.sources as unknown[]).push({ kind: 'area', id, name: `Area source ${id.split('-')[1]}`, polygon: ring, ...NEW_AREA_DEFAULTS });
    });
    this.setTool('select');
    this.select({ list: 'sources', index: ((this.document.view.sources as unknown[]) ?? []).length - 1 });
  }

  /** Draw every source and receptor from the document. */
  redraw(): void {
    this.group.clearLayers();
    const sources = (this.document.view.sources as RawSource[] | undefined) ?? [];
    const receptors = (this.document.view.receptors as RawReceptor[] | undefined) ?? [];
    // The site boundary (the fence), when the scenario gives one: peaks are reported outside it.
    const boundary = (this.document.view.site as { boundary?: [number, number][] } | undefined)?.boundary;
    if (Array.isArray(boundary) && boundary.length >= 4) {
      L.polygon(
        boundary.slice(0, -1).map(([lon, lat]) => L.latLng(lat, lon)),
        { color: '#2b3240', weight: 1.5, dashArray: '5 4', fill: false, interactive: false, pane: 'contextPane' },
      ).addTo(this.group);
    }
    sources.forEach((source, index) => {
      const selected = this.selection?.list === 'sources' && this.selection.index === index;
      if (source.kind === 'area' && Array.isArray(source.polygon) && source.polygon.length >= 3) {
        const polygon = L.polygon(
          source.polygon.slice(0, -1).map(([lon, lat]) => L.latLng(lat, lon)),
          { color: '#a2472f', weight: selected ? 3 : 2, fillColor: '#d9825f', fillOpacity: selected ? 0.35 : 0.22, pane: 'editPane' },
        );
        polygon.bindTooltip(escapeHtml(source.name ?? source.id ?? 'area source'));
        polygon.on('click', (event) => {
          L.DomEvent.stopPropagation(event);
          if (this.tool === 'select') this.select({ list: 'sources', index });
        });
        polygon.addTo(this.group);
        if (selected) {
          polygon.pm.enable({ allowSelfIntersection: false, draggable: true } as never);
          const commit = () => {
            const ring = ringOf(polygon);
            if (ring === null) return;
            this.document.edit(`reshape area source ${source.id ?? ''}`, (draft) => {
              ((draft.sources as RawSource[])[index] as RawSource).polygon = ring;
            });
          };
          polygon.on('pm:markerdragend pm:vertexadded pm:vertexremoved pm:dragend', commit);
        }
      } else if (typeof source.lat === 'number' && typeof source.lon === 'number') {
        this.addMarker('sources', index, source, stackIcon(selected), `stack ${source.id ?? ''}`);
      }
    });
    receptors.forEach((receptor, index) => {
      if (typeof receptor.lat !== 'number' || typeof receptor.lon !== 'number') return;
      const selected = this.selection?.list === 'receptors' && this.selection.index === index;
      this.addMarker('receptors', index, receptor, receptorIcon(selected), `receptor ${receptor.id ?? ''}`);
    });
  }

  private addMarker(list: 'sources' | 'receptors', index: number, item: RawSource | RawReceptor, icon: L.DivIcon, what: string): void {
    const marker = L.marker([item.lat as number, item.lon as number], {
      icon,
      draggable: true,
      autoPan: true,
      keyboard: true,
      title: item.name ?? item.id ?? what,
      alt: what,
      pane: 'editPane',
      riseOnHover: true,
    });
    marker.bindTooltip(escapeHtml(item.name ?? item.id ?? what), { direction: 'top', offset: [0, -14] });
    marker.on('click', (event) => {
      L.DomEvent.stopPropagation(event);
      this.select({ list, index });
    });
    marker.on('keypress', (event) => {
      const key = (event as unknown as { originalEvent: KeyboardEvent }).originalEvent.key;
      if (key === 'Enter' || key === ' ') this.select({ list, index });
    });
    marker.on('drag', () => {
      const position = marker.getLatLng();
      const scenario = this.document.scenario;
      const target = (scenario[list] as Record<string, unknown>[])[index];
      target.lat = round7(position.lat);
      target.lon = round7(position.lng);
      this.onDragPreview(scenario);
    });
    marker.on('dragend', () => {
      const position = marker.getLatLng();
      this.selection = { list, index };
      this.document.edit(`move ${what}`, (draft) => {
        const target = (draft[list] as Record<string, unknown>[])[index];
        target.lat = round7(position.lat);
        target.lon = round7(position.lng);
      });
      for (const listener of this.selectionListeners) listener(this.selection);
    });
    marker.addTo(this.group);
    const element = marker.getElement();
    if (element) {
      element.dataset.testid = `${list === 'sources' ? 'source' : 'receptor'}-marker-${item.id ?? index}`;
      const kind = list === 'sources' ? 'Stack' : 'Receptor';
      element.setAttribute('aria-label', `${kind} ${item.name ?? item.id ?? ''}`);
      element.setAttribute('aria-describedby', 'marker-keys-hint');
      element.setAttribute('aria-keyshortcuts', 'ArrowUp ArrowDown ArrowLeft ArrowRight Shift+ArrowUp Shift+ArrowDown Shift+ArrowLeft Shift+ArrowRight Delete');
      element.addEventListener('keydown', (event) => this.onMarkerKey(event, list, index, item, kind));
      if (this.refocus !== null && this.refocus.list === list && this.refocus.index === index) {
        this.refocus = null;
        element.focus();
      }
    }
  }

  /** Arrow keys on a focused stack or receptor: select it and move it by the stated step. */
  private onMarkerKey(event: KeyboardEvent, list: 'sources' | 'receptors', index: number, item: RawSource | RawReceptor, kind: string): void {
    const frame = this.frameOf();
    if (frame === null || typeof item.lat !== 'number' || typeof item.lon !== 'number') return;
    const moved = keyMove(event.key, event.shiftKey, { lat: item.lat, lon: item.lon }, frame);
    if (moved === null) return;
    // the map would pan on the same keys: this key is the marker's
    event.preventDefault();
    event.stopPropagation();
    this.selection = { list, index };
    this.refocus = { list, index };
    this.document.edit(`move ${kind.toLowerCase()} ${item.id ?? ''} by keyboard`, (draft) => {
      const target = (draft[list] as Record<string, unknown>[])[index];
      target.lat = moved.lat;
      target.lon = moved.lon;
    });
    for (const listener of this.selectionListeners) listener(this.selection);
    this.announce(moveAnnouncement(kind, item.name ?? item.id ?? '', moved.dx_m, moved.dy_m, moved.x_m, moved.y_m));
  }
}

/** The closed [lon, lat] ring of a drawn polygon, rounded to 7 decimals, or null if too few points. */
export function ringOf(layer: L.Polygon): [number, number][] | null {
  const latlngs = layer.getLatLngs();
  const outer = (Array.isArray(latlngs[0]) ? latlngs[0] : latlngs) as L.LatLng[];
  if (outer.length < 3) return null;
  const ring = outer.map((p) => [round7(p.lng), round7(p.lat)] as [number, number]);
  ring.push([ring[0][0], ring[0][1]]);
  return ring;
}

function round7(value: number): number {
  return Math.round(value * 1e7) / 1e7;
}

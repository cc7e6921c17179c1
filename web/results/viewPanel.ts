/**
 * The "View" panel: how the field is drawn (scale, decades, opacity, isopleth levels, the standard the
 * read-out compares with, which hour the preview shows), an optional tile URL, and context layers
 * imported from the user's files. Settings are kept in the browser.
 */
import type L from 'leaflet';
import type { ScaleKind } from '../colour/colourScale.ts';
import { DEFAULT_LOG_DECADES } from '../colour/legendLevels.ts';
import { contextLayerOf, readContextFile, type ContextLayer } from '../map/contextLayers.ts';
import { escapeHtml } from '../map/mapControls.ts';
import type { KeyValueStorage } from '../state/scenarioDocument.ts';

export interface ViewSettings {
  scaleKind: ScaleKind;
  /** decades below the peak shaded on a log scale */
  decades: number;
  /** overlay opacity 0..1 */
  opacity: number;
  /** isopleth levels [ug/m3]; null = the default 1-2-5 levels */
  isopleths: number[] | null;
  /** name of the standard the read-out gives a share of ("" = the first) */
  standardName: string;
  /** which hour of a series the preview shows (0-based) */
  previewHour: number;
  /** optional tile URL template ({z}/{x}/{y}); "" = none, the page stays offline */
  tileUrl: string;
}

export const DEFAULT_VIEW_SETTINGS: ViewSettings = {
  scaleKind: 'log',
  decades: DEFAULT_LOG_DECADES,
  opacity: 0.75,
  isopleths: null,
  standardName: '',
  previewHour: 0,
  tileUrl: '',
};

const SETTINGS_KEY = 'plumeplan.view.v1';

export function loadViewSettings(storage: KeyValueStorage | null): ViewSettings {
  try {
    const text = storage?.getItem(SETTINGS_KEY);
    return text ? { ...DEFAULT_VIEW_SETTINGS, ...(JSON.parse(text) as Partial<ViewSettings>) } : { ...DEFAULT_VIEW_SETTINGS };
  } catch {
    return { ...DEFAULT_VIEW_SETTINGS };
  }
}

/**
 * Parse a list of isopleth levels typed by the user: positive, strictly increasing numbers.
 *
 * @returns the levels, null for an empty text (the default levels), or an error message
 */
export function parseLevels(text: string): number[] | null | { error: string } {
  const parts = text.split(/[,;\s]+/).filter(Boolean);
  if (parts.length === 0) return null;
  const levels = parts.map(Number);
  for (let n = 0; n < levels.length; n++) {
    if (!Number.isFinite(levels[n]) || levels[n] <= 0) return { error: `level ${n + 1}: ${JSON.stringify(parts[n])} is not allowed; every level must be a positive number of µg/m³` };
    if (n > 0 && levels[n] <= levels[n - 1]) return { error: `level ${n + 1}: ${levels[n]} does not exceed the level before it (${levels[n - 1]}); levels must increase` };
  }
  return levels;
}

export class ViewPanel {
  private readonly contextLayers: ContextLayer[] = [];

  constructor(
    private readonly element: HTMLElement,
    private readonly map: L.Map,
    private readonly storage: KeyValueStorage | null,
    private settings: ViewSettings,
    private readonly onChange: (settings: ViewSettings) => void,
  ) {
    this.render();
  }

  private update(patch: Partial<ViewSettings>): void {
    this.settings = { ...this.settings, ...patch };
    try {
      this.storage?.setItem(SETTINGS_KEY, JSON.stringify(this.settings));
    } catch {
      // storage unavailable: the setting holds for this visit only
    }
    this.onChange(this.settings);
  }

  private render(): void {
    const s = this.settings;
    this.element.innerHTML = `
      <fieldset class="group"><legend>Concentration overlay</legend>
        <p class="explain">How the field on the map is coloured; the numbers in the tables do not change.</p>
        <div class="field"><label for="view-scale">Colour scale</label>
          <select id="view-scale"><option value="log">Logarithmic (decades)</option><option value="linear">Linear</option></select>
          <div class="hint">log shows the faint edge of the plume as well as its core</div></div>
        <div class="field"><label for="view-decades">Decades shaded below the peak</label>
          <input id="view-decades" type="number" min="1" max="8" step="1" />
          <div class="hint">log scale only; below this the map is left clear</div></div>
        <div class="field"><label for="view-opacity">Overlay opacity <output id="view-opacity-out"></output></label>
          <input id="view-opacity" type="range" min="0.1" max="1" step="0.05" /></div>
        <div class="field"><label for="view-levels">Isopleth levels <span class="unit">[µg/m³]</span></label>
          <input id="view-levels" type="text" placeholder="automatic (1-2-5 steps)" aria-describedby="view-levels-hint view-levels-error" />
          <div id="view-levels-hint" class="hint">comma-separated, increasing; empty = the seven highest 1-2-5 values below the peak</div>
          <div id="view-levels-error" class="error" role="alert"></div></div>
        <div class="field"><label for="view-hour">Preview hour (hourly series)</label>
          <input id="view-hour" type="number" min="1" step="1" />
          <div class="hint">which hour of an hourly series the instant preview shows</div></div>
      </fieldset>
      <fieldset class="group"><legend>Context layers</legend>
        <p class="explain">Your own site boundary, buildings or roads, drawn under the sources. They stay in this page and are not saved with the scenario.</p>
        <div class="field"><label for="view-context">Import a file</label>
          <input id="view-context" type="file" accept=".geojson,.json,.kml,.zip" aria-describedby="view-context-hint view-context-error" />
          <div id="view-context-hint" class="hint">GeoJSON, KML or a zipped shapefile, in WGS 84</div>
          <div id="view-context-error" class="error" role="alert"></div></div>
        <ul class="context-list" data-testid="context-list"></ul>
      </fieldset>
      <fieldset class="group"><legend>Background map</legend>
        <p class="explain">By default the page uses no tile server: it works offline over the metric grid. A deployment with its own tile server can give its address here.</p>
        <div class="field"><label for="view-tiles">Tile URL template</label>
          <input id="view-tiles" type="url" placeholder="https://tiles.example.org/{z}/{x}/{y}.png" />
          <div class="hint">leave empty to stay offline; the page then makes no request to another site</div></div>
      </fieldset>`;
    const q = <T extends HTMLElement>(id: string) => this.element.querySelector(`#${id}`) as T;
    const scale = q<HTMLSelectElement>('view-scale');
    scale.value = s.scaleKind;
    scale.addEventListener('change', () => this.update({ scaleKind: scale.value as ScaleKind }));
    const decades = q<HTMLInputElement>('view-decades');
    decades.value = String(s.decades);
    decades.addEventListener('change', () => {
      const value = Math.round(Number(decades.value));
      if (value >= 1 && value <= 8) this.update({ decades: value });
    });
    const opacity = q<HTMLInputElement>('view-opacity');
    const opacityOut = q<HTMLOutputElement>('view-opacity-out');
    opacity.value = String(s.opacity);
    opacityOut.textContent = `${Math.round(s.opacity * 100)} %`;
    opacity.addEventListener('input', () => {
      opacityOut.textContent = `${Math.round(Number(opacity.value) * 100)} %`;
      this.update({ opacity: Number(opacity.value) });
    });
    const levels = q<HTMLInputElement>('view-levels');
    levels.value = s.isopleths?.join(', ') ?? '';
    levels.addEventListener('change', () => {
      const parsed = parseLevels(levels.value);
      const error = q<HTMLElement>('view-levels-error');
      if (parsed !== null && !Array.isArray(parsed)) {
        error.textContent = parsed.error;
        levels.setAttribute('aria-invalid', 'true');
        return;
      }
      error.textContent = '';
      levels.setAttribute('aria-invalid', 'false');
      this.update({ isopleths: parsed });
    });
    const hour = q<HTMLInputElement>('view-hour');
    hour.value = String(s.previewHour + 1);
    hour.addEventListener('change', () => {
      const value = Math.round(Number(hour.value));
      if (value >= 1) this.update({ previewHour: value - 1 });
    });
    const tiles = q<HTMLInputElement>('view-tiles');
    tiles.value = s.tileUrl;
    tiles.addEventListener('change', () => this.update({ tileUrl: tiles.value.trim() }));
    const file = q<HTMLInputElement>('view-context');
    file.addEventListener('change', async () => {
      const chosen = file.files?.[0];
      if (!chosen) return;
      const error = q<HTMLElement>('view-context-error');
      try {
        const collection = await readContextFile(chosen);
        const layer = contextLayerOf(collection).addTo(this.map);
        this.contextLayers.push({ name: chosen.name, features: collection.features.length, layer });
        error.textContent = '';
        const bounds = layer.getBounds();
        if (bounds.isValid()) this.map.fitBounds(bounds, { maxZoom: 16, padding: [20, 20] });
      } catch (caught) {
        error.textContent = caught instanceof Error ? caught.message : String(caught);
      }
      file.value = '';
      this.renderContextList();
    });
    this.renderContextList();
  }

  private renderContextList(): void {
    const list = this.element.querySelector('.context-list') as HTMLElement;
    list.replaceChildren();
    this.contextLayers.forEach((entry, index) => {
      const item = document.createElement('li');
      item.innerHTML = `<span>${escapeHtml(entry.name)} (${entry.features} feature${entry.features === 1 ? '' : 's'})</span> `;
      const remove = document.createElement('button');
      remove.type = 'button';
      remove.textContent = 'Remove';
      remove.setAttribute('aria-label', `Remove context layer ${entry.name}`);
      remove.addEventListener('click', () => {
        entry.layer.remove();
        this.contextLayers.splice(index, 1);
        this.renderContextList();
      });
      item.append(remove);
      list.append(item);
    });
  }
}

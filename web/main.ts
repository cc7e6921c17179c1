/**
 * The map page: puts the parts together. The map (offline: a metric grid instead of tiles), the
 * editing layer and forms over one scenario document, the Gaussian preview in a worker, the overlay
 * and legend, and the results panel that talks to the server.
 */
import 'leaflet/dist/leaflet.css';
import '@geoman-io/leaflet-geoman-free/dist/leaflet-geoman.css';
import './styles.css';
import L from 'leaflet';
import demoScenario from '../scenarios/merrowdene-heat-plant/scenario.json';
import { parseScenario } from '../scenarios/format/schema.ts';
import { ColourScale, DifferenceScale } from './colour/colourScale.ts';
import { defaultColourRange, isoplethLevels } from './colour/legendLevels.ts';
import { EditLayer, KEY_STEP_LARGE_m, KEY_STEP_m, type Tool } from './editing/editLayer.ts';
import { largestDifference } from './field/compare.ts';
import { valueAt, type GroundField } from './field/groundField.ts';
import { ConditionsPanel } from './forms/conditionsPanel.ts';
import { ObjectPanel } from './forms/objectPanel.ts';
import { FieldOverlay, IsoplethLayer } from './map/fieldOverlay.ts';
import { LocalFrame } from './map/localFrame.ts';
import { NorthArrowControl, PointerReadoutControl } from './map/mapControls.ts';
import { MetricGridLayer } from './map/metricGrid.ts';
import { PreviewClient } from './preview/previewClient.ts';
import { ResultsPanel } from './results/resultsPanel.ts';
import { LibraryPanel } from './results/libraryPanel.ts';
import { StudiesPanel } from './results/studiesPanel.ts';
import { ViewPanel, loadViewSettings, type ViewSettings } from './results/viewPanel.ts';
import { ApiClient } from './api/client.ts';
import { ScenarioDocument, type RawScenario } from './state/scenarioDocument.ts';
import { SitingLayer } from './siting/sitingLayer.ts';
import { decodeSitingRaster, readSitingGeoJson } from './siting/sitingMap.ts';
import type { SitingFile } from './results/studyResults.ts';
import type { RunRecord } from './api/client.ts';

/** Fired on window when the page has drawn a field (the end-to-end tests and the bench wait for it). */
export const FIELD_DRAWN_EVENT = 'plumeplan:field-drawn';

/** Fired on window when the page has drawn a siting map (the end-to-end tests wait for it). */
export const SITING_DRAWN_EVENT = 'plumeplan:siting-drawn';

function byId<T extends HTMLElement>(id: string): T {
  const element = document.getElementById(id);
  if (element === null) throw new Error(`page: #${id} is missing from index.html`);
  return element as T;
}

function storageOrNull(): Storage | null {
  try {
    const storage = window.localStorage;
    storage.getItem('probe');
    return storage;
  } catch {
    return null;
  }
}

async function start(): Promise<void> {
  const storage = storageOrNull();
  const api = new ApiClient('');
  const draft = storage ? ScenarioDocument.readDraft(storage) : null;
  // An unsaved draft in this browser comes first; else the server's copy of the demo (or its newest
  // scenario); else, with no server, the demo bundled in the page.
  const fromServer = draft ? null : await openFromServer(api);
  const doc = draft
    ? new ScenarioDocument(draft.scenario, storage, draft.saved, draft.dirty)
    : fromServer
      ? new ScenarioDocument(fromServer.scenario, storage, { id: fromServer.id, revision: fromServer.revision })
      : new ScenarioDocument(demoScenario as unknown as RawScenario, storage);

  const site = siteOf(doc.view) ?? { lat: 54.0612, lon: -2.2841 };
  let frame = new LocalFrame(site);

  // --- the map ---------------------------------------------------------------------------------
  const map = L.map(byId('map'), { zoomControl: true, attributionControl: true, keyboard: true, zoomSnap: 0.25, minZoom: 3, maxZoom: 20 });
  map.attributionControl.setPrefix('Leaflet');
  for (const [name, z] of [['contextPane', 350], ['fieldPane', 360], ['isoplethPane', 420], ['editPane', 620]] as const) {
    map.createPane(name).style.zIndex = String(z);
  }
  map.getPane('fieldPane')!.style.pointerEvents = 'none';
  let gridLayer = new MetricGridLayer(frame).addTo(map);
  L.control.scale({ metric: true, imperial: false, position: 'bottomright', maxWidth: 160 }).addTo(map);
  new NorthArrowControl().addTo(map);
  let readout = new PointerReadoutControl(frame).addTo(map);
  map.setView([site.lat, site.lon], 13);

  let settings: ViewSettings = loadViewSettings(storage);
  let tiles: L.TileLayer | null = null;
  const applyTiles = () => {
    tiles?.remove();
    tiles = settings.tileUrl ? L.tileLayer(settings.tileUrl, { maxZoom: 20, attribution: 'tiles: your deployment' }).addTo(map) : null;
  };
  applyTiles();

  const overlay = new FieldOverlay(map, frame);
  const isopleths = new IsoplethLayer(map, frame);

  // --- the field on show -------------------------------------------------------------------------
  let shown: GroundField | null = null;
  /** the layer switch of the concentration overlay: off, the read-out gives no concentration either */
  let concentrationsOn = true;
  const results = new ResultsPanel(byId('results-panel'), doc, api, {
    showField: (field) => drawField(field),
    showDifference: (field) => drawDifference(field),
    currentSettings: () => settings,
  });

  function drawDifference(field: GroundField): void {
    shown = field;
    const largest = largestDifference(field);
    isopleths.clear();
    if (largest > 0) {
      const scale = new DifferenceScale(largest, largest * 1e-3);
      overlay.show(field, { scale, opacity: settings.opacity });
      results.setLegend({ scale, statistic: field.statistic, origin: field.origin, height_m: field.height_m, isopleths_ug_m3: [] });
    } else {
      overlay.clear();
      results.setLegend(null);
    }
    results.setAreas(null, []);
    readout.setProbe({ valueAt: (x, y) => (shown && concentrationsOn ? valueAt(shown, x, y) : null), label: 'A − B', standard: null });
    window.dispatchEvent(new CustomEvent(FIELD_DRAWN_EVENT, { detail: { origin: field.origin } }));
  }

  function drawField(field: GroundField | null): void {
    shown = field;
    if (field === null) {
      overlay.clear();
      isopleths.clear();
      results.setLegend(null);
      readout.setProbe(null);
      return;
    }
    const range = defaultColourRange(field.values, settings.scaleKind, settings.decades);
    if (range === null) {
      overlay.clear();
      isopleths.clear();
      results.setLegend(null);
    } else {
      const scale = new ColourScale(settings.scaleKind === 'log' ? range.floor : 0, range.ceiling, { kind: settings.scaleKind });
      const levels = settings.isopleths ?? isoplethLevels(field.values);
      overlay.show(field, { scale, opacity: settings.opacity });
      isopleths.show(field, levels, scale);
      results.setLegend({
        scale,
        statistic: field.statistic,
        origin: field.origin,
        height_m: field.height_m,
        isopleths_ug_m3: levels,
      });
      results.setAreas(field, levels, placesInFrame());
    }
    readout.setProbe({
      valueAt: (x, y) => (shown && concentrationsOn ? valueAt(shown, x, y) : null),
      label: field.origin,
      standard: chosenStandard(),
    });
    window.dispatchEvent(new CustomEvent(FIELD_DRAWN_EVENT, { detail: { origin: field.origin } }));
  }

  /** Sources (stacks; areas by their first corner) and receptors in local metres, for the footprint areas. */
  function placesInFrame(): { sources: { id: string; x_m: number; y_m: number }[]; receptors: { id: string; name: string; x_m: number; y_m: number }[] } {
    const view = doc.view as { sources?: { id?: string; lat?: number; lon?: number; polygon?: [number, number][] }[]; receptors?: { id?: string; name?: string; lat?: number; lon?: number }[] };
    const local = (lon: number, lat: number) => frame.projection.toLocal(lon, lat);
    const sources = (view.sources ?? []).flatMap((s) => {
      const at = typeof s.lat === 'number' && typeof s.lon === 'number' ? [s.lon, s.lat] : Array.isArray(s.polygon) && s.polygon.length > 0 ? s.polygon[0] : null;
      if (at === null || typeof s.id !== 'string') return [];
      const [x_m, y_m] = local(at[0], at[1]);
      return [{ id: s.id, x_m, y_m }];
    });
    const receptors = (view.receptors ?? []).flatMap((r) => {
      if (typeof r.lat !== 'number' || typeof r.lon !== 'number' || typeof r.id !== 'string') return [];
      const [x_m, y_m] = local(r.lon, r.lat);
      return [{ id: r.id, name: r.name ?? r.id, x_m, y_m }];
    });
    return { sources, receptors };
  }

  function chosenStandard(): { name: string; limit_ug_m3: number } | null {
    return results.chosenStandard;
  }

  // --- the preview ---------------------------------------------------------------------------------
  const preview = new PreviewClient((answer) => {
    if (answer.result === null) {
      results.setPreviewStatus(`Preview not available: ${answer.error ?? 'unknown error'}`, true);
      return;
    }
    const r = answer.result;
    results.setPreviewStatus(
      `Gaussian preview of ${r.weatherLabel}; peak ${r.peak.value_ug_m3.toPrecision(3)} µg/m³; ${r.grid.nx} × ${r.grid.ny} cells of ${r.grid.spacing_m} m${r.coarsened ? ' (coarsened for speed)' : ''}; ${Math.round(answer.roundTrip_ms)} ms`,
      false,
    );
    results.setPreviewReceptors(r.receptors_ug_m3, r.peak);
    // The bench reads these (tests/bench/mapPage.ts): request-to-answer and the worker's own time.
    (window as unknown as { plumeplanPreviewTimes?: { roundTrip_ms: number; compute_ms: number }[] }).plumeplanPreviewTimes?.push({ roundTrip_ms: answer.roundTrip_ms, compute_ms: r.compute_ms });
    if (results.showsPreview) {
      drawField({ grid: r.grid, values: r.field_ug_m3, statistic: 'concentration, one weather state', origin: 'Gaussian preview', height_m: 1.5 });
    }
  });
  const requestPreview = (raw: RawScenario) => {
    const outcome = doc.validation.ok && raw === doc.view ? doc.validation : parseScenario(raw);
    if (outcome.ok) preview.request(outcome.scenario, { hourIndex: settings.previewHour });
    else results.setPreviewStatus('Preview waits for the scenario to be valid: see the fields marked in the left panel.', true);
  };

  // --- editing -----------------------------------------------------------------------------------
  const announcer = byId('map-announcer');
  byId('marker-keys-hint').textContent = `Arrow keys move this symbol ${KEY_STEP_m} m east, west, north or south; with Shift ${KEY_STEP_LARGE_m} m. Delete removes it.`;
  const editLayer = new EditLayer(
    map,
    doc,
    (scenario) => requestPreview(scenario),
    () => frame,
    (text) => {
      // a fresh text each time, so a repeated move is announced again
      announcer.textContent = '';
      window.setTimeout(() => (announcer.textContent = text), 30);
    },
  );
  new ObjectPanel(byId('panel-objects'), doc, editLayer);
  new ConditionsPanel(byId('panel-conditions'), doc);
  new LibraryPanel(byId('panel-library'), doc, api, results);
  // --- the siting map ------------------------------------------------------------------------------
  const moveStack = (stackId: string, lat: number, lon: number) => {
    const sources = (doc.view.sources as { id?: string }[] | undefined) ?? [];
    const index = sources.findIndex((s) => s.id === stackId);
    if (index < 0) return;
    doc.edit(`move stack ${stackId} to the best siting position`, (draft) => {
      const target = (draft.sources as { lat?: number; lon?: number }[])[index];
      target.lat = lat;
      target.lon = lon;
    });
  };
  const showConcentrations = (on: boolean) => {
    concentrationsOn = on;
    readout.show(null);
    for (const pane of ['fieldPane', 'isoplethPane']) map.getPane(pane)!.style.display = on ? '' : 'none';
  };
  const siting = new SitingLayer(map, moveStack, showConcentrations, () =>
    readout.setExtraLine(siting.isShown ? (latlng) => siting.readoutAt(latlng.lat, latlng.lng) : null),
  );
  const showSiting = async (run: RunRecord, file: SitingFile & { mode?: string; map: { meaning: string; combination?: string }; statistic: string; weatherKind?: string }) => {
    const geojsonFile = run.results.find((f) => f.name === 'siting.geojson');
    const tifFile = run.results.find((f) => f.name === 'siting-map.tif');
    if (!geojsonFile) return;
    const content = readSitingGeoJson(await api.resultJson(geojsonFile));
    let raster = null;
    try {
      raster = tifFile ? await decodeSitingRaster(await api.resultBytes(tifFile)) : null;
    } catch (error) {
      // the bands still show; the read-out then gives each band's range only
      console.warn(`siting-map.tif could not be read: ${error instanceof Error ? error.message : String(error)}`);
    }
    const statistic = file.statistic === 'mean' ? 'long-term mean' : file.weatherKind === 'windRose' ? 'wind rose' : 'one steady weather state';
    siting.show({ content, raster, stackId: file.stack.id, statistic, mode: file.mode ?? run.mode, combination: file.map.combination ?? 'highest' }, settings.scaleKind, settings.opacity);
    window.dispatchEvent(new CustomEvent(SITING_DRAWN_EVENT, { detail: { best: content.best, candidates: content.candidates.length } }));
  };
  new StudiesPanel(
    byId('panel-studies'),
    doc,
    api,
    async () => {
      if ((doc.dirty || doc.saved === null) && !(await results.save())) return null;
      return doc.saved;
    },
    (run, file) => void showSiting(run, file as Parameters<typeof showSiting>[1]).catch((error: unknown) => console.warn(`the siting map could not be drawn: ${error instanceof Error ? error.message : String(error)}`)),
    moveStack,
  );
  new ViewPanel(byId('panel-view'), map, storage, settings, (next) => {
    const tileChanged = next.tileUrl !== settings.tileUrl;
    settings = next;
    if (tileChanged) applyTiles();
    drawField(shown);
    siting.redraw(settings.scaleKind, settings.opacity);
    results.refreshVerdicts();
  });

  doc.subscribe((_doc, reason) => {
    const nextSite = siteOf(doc.view);
    if (nextSite && (nextSite.lat !== frame.site.lat || nextSite.lon !== frame.site.lon)) {
      // A new site moves the local frame: rebuild what depends on it.
      frame = new LocalFrame(nextSite);
      gridLayer.remove();
      gridLayer = new MetricGridLayer(frame).addTo(map);
      readout.remove();
      readout = new PointerReadoutControl(frame).addTo(map);
      readout.setExtraLine(siting.isShown ? (latlng) => siting.readoutAt(latlng.lat, latlng.lng) : null);
      map.setView([nextSite.lat, nextSite.lon], map.getZoom());
    }
    // a siting map belongs to the scenario it was made for; opening another (or a new one) takes it away
    if (reason === 'open' || reason === 'new' || reason.startsWith('open revision')) siting.clear();
    updateTopbar();
    if (reason !== 'saved') {
      results.scenarioEdited();
      requestPreview(doc.view);
    }
  });
  document.addEventListener('plumeplan:preview-wanted', () => requestPreview(doc.view));

  // --- tools, keyboard and the top bar -----------------------------------------------------------
  const hint = byId('tool-hint');
  const toolButtons = Array.from(document.querySelectorAll<HTMLButtonElement>('.toolstrip button[data-tool]'));
  const hints: Record<Tool, string> = {
    select: `Drag to pan; click a symbol to select it. With the keyboard: Tab to a symbol, arrow keys move it ${KEY_STEP_m} m (Shift: ${KEY_STEP_LARGE_m} m).`,
    stack: 'Click on the map to place the stack (Enter places it at the map centre).',
    receptor: 'Click on the map to place the receptor (Enter places it at the map centre).',
    area: 'Click the corners of the area; click the first corner to finish.',
  };
  for (const button of toolButtons) button.addEventListener('click', () => editLayer.setTool(button.dataset.tool as Tool));
  editLayer.onTool((tool) => {
    for (const button of toolButtons) button.setAttribute('aria-pressed', String(button.dataset.tool === tool));
    hint.textContent = hints[tool];
  });
  hint.textContent = hints.select;
  map.getContainer().addEventListener('keydown', (event) => {
    if (event.key === 'Enter' && (editLayer.currentTool === 'stack' || editLayer.currentTool === 'receptor')) editLayer.placeAt(map.getCenter());
  });
  document.addEventListener('keydown', (event) => {
    const target = event.target as HTMLElement;
    const typing = target.closest('input, textarea, select') !== null;
    if ((event.ctrlKey || event.metaKey) && event.key.toLowerCase() === 'z' && !typing) {
      event.preventDefault();
      if (event.shiftKey) doc.redo();
      else doc.undo();
    } else if ((event.key === 'Delete' || event.key === 'Backspace') && !typing && editLayer.selection !== null) {
      editLayer.deleteSelected();
    } else if (event.key === 'Escape' && editLayer.currentTool !== 'select') {
      editLayer.setTool('select');
    }
  });

  const nameInput = byId<HTMLInputElement>('scenario-name');
  nameInput.addEventListener('change', () => doc.edit('set scenario name', (draft) => void (draft.name = nameInput.value)));
  byId('undo-button').addEventListener('click', () => doc.undo());
  byId('redo-button').addEventListener('click', () => doc.redo());
  byId('save-button').addEventListener('click', () => void results.save());
  function updateTopbar(): void {
    if (document.activeElement !== nameInput) nameInput.value = String(doc.view.name ?? '');
    const undo = byId<HTMLButtonElement>('undo-button');
    undo.disabled = !doc.canUndo;
    undo.title = doc.undoLabel ? `Undo: ${doc.undoLabel} (Ctrl+Z)` : 'Nothing to undo';
    byId<HTMLButtonElement>('redo-button').disabled = !doc.canRedo;
    byId('save-status').textContent = doc.dirty ? 'Unsaved changes (kept in this browser)' : doc.saved ? `Saved, revision ${doc.saved.revision}` : '';
  }
  setUpTabs();
  updateTopbar();
  if (draft?.dirty) byId('save-status').textContent = 'Unsaved changes restored from this browser';

  fitToScenario(map, frame, doc.view);
  requestPreview(doc.view);
  await results.connect();
  (window as unknown as { plumeplan?: unknown }).plumeplan = { doc, map, editLayer, results, siting };
}

/** The server's copy of the demo, or its most recently changed scenario; null without a server. */
async function openFromServer(api: ApiClient): Promise<{ id: string; revision: number; scenario: RawScenario } | null> {
  try {
    const { items } = await api.listScenarios(100, 0);
    const chosen = items.find((item) => item.name === (demoScenario as { name: string }).name) ?? items[0];
    if (chosen === undefined) return null;
    const record = await api.getScenario(chosen.id);
    return { id: record.id, revision: record.revision, scenario: record.scenario };
  } catch {
    return null;
  }
}

function siteOf(raw: Readonly<RawScenario>): { lat: number; lon: number } | null {
  const site = raw.site as { lat?: unknown; lon?: unknown } | undefined;
  return typeof site?.lat === 'number' && typeof site.lon === 'number' && Math.abs(site.lat) < 84 ? { lat: site.lat, lon: site.lon } : null;
}

/** Fit the view to the domain (or to the sources and receptors when the domain is derived). */
function fitToScenario(map: L.Map, frame: LocalFrame, raw: Readonly<RawScenario>): void {
  const domain = raw.domain as { halfWidth_m?: number } | undefined;
  const half = typeof domain?.halfWidth_m === 'number' ? Math.min(domain.halfWidth_m, 4000) : 2500;
  map.fitBounds(frame.boundsOf(-half, -half, half, half), { padding: [10, 10] });
}

function setUpTabs(): void {
  const tabs = Array.from(document.querySelectorAll<HTMLButtonElement>('[role="tab"]'));
  const choose = (tab: HTMLButtonElement) => {
    for (const other of tabs) {
      const selected = other === tab;
      other.setAttribute('aria-selected', String(selected));
      other.tabIndex = selected ? 0 : -1;
      const panel = document.getElementById(other.getAttribute('aria-controls') ?? '');
      if (panel) panel.hidden = !selected;
    }
  };
  tabs.forEach((tab, n) => {
    tab.addEventListener('click', () => choose(tab));
    tab.addEventListener('keydown', (event) => {
      const step = event.key === 'ArrowRight' ? 1 : event.key === 'ArrowLeft' ? -1 : 0;
      if (step === 0) return;
      const next = tabs[(n + step + tabs.length) % tabs.length];
      choose(next);
      next.focus();
    });
  });
}

void start().catch((error: unknown) => {
  const box = document.createElement('div');
  box.className = 'fatal';
  box.setAttribute('role', 'alert');
  box.textContent = `The page could not start: ${error instanceof Error ? error.message : String(error)}`;
  document.body.prepend(box);
  throw error;
});

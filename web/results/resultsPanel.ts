/**
 * The results column: the screening caution (always on show), the preview's status, the grid run with
 * its progress bar, time left and cancel, the legend, the receptor table with each figure's share of the
 * standards, the ground area inside each isopleth, and the run's files to download. Every section keeps
 * its place from the start, so nothing jumps when results arrive.
 */
import { SCREENING_CAUTION } from '../../server/writers/caution.ts';
import { formatConcentration } from '../colour/legendLevels.ts';
import { differenceField, receptorDeltas, type ReceptorFigures } from '../field/compare.ts';
import { decodeGroundField, type GroundField } from '../field/groundField.ts';
import { levelAreas, type NamedPoint } from '../../solver/assessment/footprintAreas.ts';
import { assessmentPlan, type AssessedStandard } from '../../solver/assessment/standards.ts';
import { DEFAULT_SCREENING_THRESHOLDS } from '../../solver/assessment/standards.ts';
import { SCREENING_LABEL } from '../../solver/assessment/verdicts.ts';
import { areasTableHtml, outcomeKeyHtml, previewVerdicts, thresholdsLine, verdictTableHtml, type VerdictSet } from './verdictTable.ts';
import { escapeHtml } from '../map/mapControls.ts';
import type { ScenarioDocument } from '../state/scenarioDocument.ts';
import { ApiClient, ApiError, FINAL_RUN_STATUSES, type RunRecord, type RunUpdate } from '../api/client.ts';
import { renderLegend, type LegendContent } from './legend.ts';
import { downloadsHtml } from './downloads.ts';
import { comparisonResultHtml, type ComparisonFile } from './studyResults.ts';
import type { ViewSettings } from './viewPanel.ts';

export interface ResultsPanelHooks {
  showField(field: GroundField | null): void;
  /** show a difference field (A - B) with the diverging scale */
  showDifference(field: GroundField): void;
  currentSettings(): ViewSettings;
}

interface SummaryReceptor {
  id: string;
  name: string;
  [figure: string]: unknown;
}

interface RunSummary {
  receptors?: SummaryReceptor[];
  verdicts?: VerdictSet;
  peak?: { concentration_ug_m3?: number; x_m?: number; y_m?: number };
  notes?: string[];
  weatherKind?: string;
}

export class ResultsPanel {
  private readonly root: HTMLElement;
  private previewReceptors: number[] | null = null;
  private previewPeak: { value_ug_m3: number; x_m: number; y_m: number } | null = null;
  /** the run's screening verdicts (summary.json), or null without an assessment */
  private runVerdicts: VerdictSet | null = null;
  private runReceptors: { columns: string[]; rows: SummaryReceptor[] } | null = null;
  private run: RunRecord | null = null;
  private stopFollowing: (() => void) | null = null;
  private runStarted_ms = 0;
  private serverAvailable = false;
  /** true while the map shows the preview (false once a run's field is on show) */
  showsPreview = true;
  private runField: GroundField | null = null;
  /** the time from pressing Run to the overlay drawn [ms], for the bench */
  lastRunToOverlay_ms: number | null = null;

  constructor(
    element: HTMLElement,
    private readonly doc: ScenarioDocument,
    private readonly api: ApiClient,
    private readonly hooks: ResultsPanelHooks,
  ) {
    this.root = element;
    element.innerHTML = `
      <aside class="caution" role="note" aria-label="Screening caution" data-testid="caution"><strong>Screening estimate.</strong> ${escapeHtml(SCREENING_CAUTION.replace(/^Screening estimate only\.\s*/, ''))}</aside>
      <section class="result-block" aria-labelledby="run-heading">
        <h2 id="run-heading">Run</h2>
        <p class="preview-status" data-testid="preview-status" aria-live="polite"></p>
        <div class="run-controls">
          <button type="button" class="primary" data-action="run" data-testid="run-button">Run the scenario</button>
          <button type="button" data-action="cancel" data-testid="cancel-button" disabled>Cancel</button>
          <button type="button" data-action="show-preview" disabled>Show preview</button>
        </div>
        <label class="inline-field">Files <select data-testid="pack-choice" aria-label="Files the run makes">
          <option value="none">core results (quickest)</option>
          <option value="quick">with the consultation pack: report page, GeoTIFF, map, zip</option>
          <option value="full">with the full pack: also the report PDF and map PNG (slowest)</option>
        </select></label>
        <div class="progress-wrap">
          <progress max="1" value="0" data-testid="run-progress" aria-label="Run progress"></progress>
          <div class="run-status" data-testid="run-status" role="status" aria-live="polite">No run yet.</div>
        </div>
      </section>
      <section class="result-block" aria-labelledby="legend-heading">
        <h2 id="legend-heading">Legend</h2>
        <div class="legend" data-testid="legend"></div>
      </section>
      <section class="result-block" aria-labelledby="receptors-heading">
        <h2 id="receptors-heading">Receptors and screen</h2>
        <label class="inline-field">Standard <select data-testid="standard-choice" aria-label="Standard to screen against"></select></label>
        <div class="receptor-table" data-testid="receptor-table"></div>
        <p class="hint thresholds" data-testid="thresholds"></p>
        <p class="hint outcome-key">${outcomeKeyHtml()}</p>
      </section>
      <section class="result-block" aria-labelledby="areas-heading">
        <h2 id="areas-heading">Footprint areas</h2>
        <div class="areas" data-testid="areas"></div>
      </section>
      <section class="result-block" aria-labelledby="compare-heading">
        <h2 id="compare-heading">Compare</h2>
        <div class="compare" data-testid="compare"><p class="muted">Run this scenario, then choose Compare beside another saved scenario (Scenarios tab) to see the difference on the map and at each receptor.</p></div>
      </section>
      <section class="result-block" aria-labelledby="files-heading">
        <h2 id="files-heading">Downloads</h2>
        <div class="downloads" data-testid="downloads"><p class="muted">The files of a finished run appear here.</p></div>
      </section>`;
    this.q('[data-action="run"]').addEventListener('click', () => void this.startRun());
    this.q('[data-action="cancel"]').addEventListener('click', () => void this.cancelRun());
    this.q('[data-action="show-preview"]').addEventListener('click', () => this.showPreviewAgain());
    this.q<HTMLSelectElement>('[data-testid="standard-choice"]').addEventListener('change', () => this.refreshVerdicts());
    doc.subscribe(() => this.refreshStandards());
    this.refreshStandards();
    renderLegend(this.q('[data-testid="legend"]'), null);
    this.setAreas(null, []);
  }

  private q<T extends HTMLElement = HTMLElement>(selector: string): T {
    return this.root.querySelector(selector) as T;
  }

  /** The standards on offer: the run's verdicts' while a run is on show, else the scenario's plan (library and own). */
  private standardsOnOffer(): { name: string; limit_ug_m3: number }[] {
    if (!this.showsPreview && this.runVerdicts !== null) return this.runVerdicts.standards;
    return this.plannedStandards();
  }

  /** The scenario's assessed standards (library and own, with their NOx to NO2 factors); [] when it has none or is invalid. */
  private plannedStandards(): AssessedStandard[] {
    const outcome = this.doc.validation;
    if (!outcome.ok || outcome.scenario.assessment === undefined) return [];
    try {
      return assessmentPlan(outcome.scenario.assessment, outcome.scenario.pollutant.name).standards;
    } catch {
      return [];
    }
  }

  /** The standard chosen for shares and verdicts, if any. */
  get chosenStandard(): { name: string; limit_ug_m3: number } | null {
    const standards = this.standardsOnOffer();
    const name = this.q<HTMLSelectElement>('[data-testid="standard-choice"]').value;
    return standards.find((s) => s.name === name) ?? standards[0] ?? null;
  }

  private refreshStandards(): void {
    const select = this.q<HTMLSelectElement>('[data-testid="standard-choice"]');
    const standards = this.standardsOnOffer();
    const before = select.value;
    select.innerHTML =
      standards.length === 0
        ? '<option value="">(no standards in this scenario)</option>'
        : standards.map((s) => `<option value="${escapeHtml(s.name)}">${escapeHtml(s.name)} (${formatConcentration(s.limit_ug_m3)} µg/m³)</option>`).join('');
    if (standards.some((s) => s.name === before)) select.value = before;
    this.refreshVerdicts();
  }

  /** Ask the server whether it is there; without it, the page still edits and previews. */
  async connect(): Promise<void> {
    try {
      await this.api.listScenarios(1, 0);
      this.serverAvailable = true;
    } catch {
      this.serverAvailable = false;
      this.setRunStatus('The server is not reachable: edits are kept in this browser and the preview works; runs and saving need the server.');
      (this.q('[data-action="run"]') as HTMLButtonElement).disabled = true;
    }
  }

  setPreviewStatus(text: string, problem: boolean): void {
    const element = this.q('[data-testid="preview-status"]');
    element.textContent = text;
    element.classList.toggle('problem', problem);
  }

  setPreviewReceptors(values: number[], peak?: { value_ug_m3: number; x_m: number; y_m: number }): void {
    this.previewReceptors = values;
    if (peak) this.previewPeak = peak;
    if (this.showsPreview) this.refreshVerdicts();
  }

  setLegend(content: LegendContent | null): void {
    renderLegend(this.q('[data-testid="legend"]'), content);
  }

  /**
   * The footprint areas of the field on show, per isopleth level: area, farthest reach from the sources
   * and receptors inside (the solver's level arithmetic, solver/assessment/footprintAreas.ts).
   *
   * @param places sources and receptors in local metres (from the map's frame)
   */
  setAreas(field: GroundField | null, levels: readonly number[], places: { sources: NamedPoint[]; receptors: (NamedPoint & { name: string })[] } = { sources: [], receptors: [] }): void {
    const element = this.q('[data-testid="areas"]');
    const positive = levels.filter((level) => Number.isFinite(level) && level > 0);
    if (field === null || positive.length === 0) {
      element.innerHTML = '<p class="muted">Ground area at or above each isopleth level, how far it reaches from the sources and which receptors it holds, once a field is on the map.</p>';
      return;
    }
    const areas = levelAreas(field.values, field.grid, positive, { sources: places.sources, receptors: places.receptors });
    element.innerHTML = areasTableHtml(areas, places.receptors, field.origin, field.grid.spacing_m);
  }

  private setRunStatus(text: string): void {
    this.q('[data-testid="run-status"]').textContent = text;
  }

  /**
   * Redraw the receptor table: the screen against the chosen standard (the run's verdicts, or the
   * preview's indicative figures), or plain concentrations when the scenario has no standard.
   */
  refreshVerdicts(): void {
    const element = this.q('[data-testid="receptor-table"]');
    const thresholdsElement = this.q('[data-testid="thresholds"]');
    const outcome = this.doc.validation;
    const chosen = this.chosenStandard;
    const receptors = outcome.ok ? outcome.scenario.receptors.map((r) => ({ id: r.id, name: r.name })) : [];
    if (!this.showsPreview && this.runVerdicts !== null && this.run !== null) {
      const verdicts = this.runVerdicts;
      const standard = verdicts.standards.find((s) => s.name === chosen?.name) ?? verdicts.standards[0];
      const names = (this.runReceptors?.rows ?? []).map((r) => ({ id: r.id, name: String(r.name ?? r.id) }));
      element.innerHTML = standard
        ? verdictTableHtml(standard, names, `${this.run.mode} run, revision ${this.run.revision}`)
        : '<p class="muted">The run has no standard to screen against.</p>';
      thresholdsElement.textContent = thresholdsLine(verdicts);
      return;
    }
    if (!this.showsPreview && this.runReceptors !== null) {
      // a run of a scenario without an assessment: its figures as they are
      const { columns, rows } = this.runReceptors;
      element.innerHTML =
        `<table class="results"><caption>Grid run figures [µg/m³], process contribution at receptor height</caption><thead><tr><th scope="col">receptor</th>` +
        columns.map((c) => `<th scope="col">${escapeHtml(c.replace(/_ug_m3$/, ''))}</th>`).join('') +
        '</tr></thead><tbody>' +
        rows
          .map(
            (row) =>
              `<tr><th scope="row">${escapeHtml(String(row.name ?? row.id))}</th>` +
              columns.map((c) => `<td>${typeof row[c] === 'number' ? formatConcentration(row[c] as number) : escapeHtml(String(row[c] ?? ''))}</td>`).join('') +
              '</tr>',
          )
          .join('') +
        '</tbody></table>';
      thresholdsElement.textContent = 'No background or standards in this scenario: add them under Conditions for a screen.';
      return;
    }
    if (receptors.length === 0) {
      element.innerHTML = '<p class="muted">No receptors: add one with the map tools.</p>';
      thresholdsElement.textContent = '';
      return;
    }
    const planned = this.plannedStandards();
    const standard = planned.find((s) => s.name === chosen?.name) ?? planned[0];
    const assessment = outcome.ok ? outcome.scenario.assessment : undefined;
    if (standard !== undefined && assessment !== undefined) {
      const thresholds = assessment.screening ?? DEFAULT_SCREENING_THRESHOLDS;
      const figures =
        this.previewReceptors !== null && this.previewPeak !== null
          ? previewVerdicts(standard, this.previewPeak, this.previewReceptors, receptors, assessment.background_ug_m3, thresholds)
          : { name: standard.name, limit_ug_m3: standard.limit_ug_m3, term: standard.term, basisNote: 'waiting for the preview…', maximum: undefined, receptors: [] };
      element.innerHTML = verdictTableHtml(figures, receptors, 'Gaussian preview, one weather state');
      const ratios = standard.pcFactor !== 1 && assessment.libraryPollutant === 'NOx' ? { longTerm: assessment.noxToNo2?.longTerm ?? 0.7, shortTerm: assessment.noxToNo2?.shortTerm ?? 0.35, source: '' } : null;
      thresholdsElement.textContent = thresholdsLine({ label: SCREENING_LABEL, thresholds, background_ug_m3: assessment.background_ug_m3, noxToNo2: ratios });
      return;
    }
    const values = this.previewReceptors;
    element.innerHTML =
      '<table class="results"><caption>Gaussian preview [µg/m³], one weather state, process contribution</caption><thead><tr><th scope="col">receptor</th><th scope="col">concentration</th></tr></thead><tbody>' +
      receptors.map((r, n) => `<tr><th scope="row">${escapeHtml(r.name)}</th><td>${values?.[n] === undefined ? '…' : formatConcentration(values[n])}</td></tr>`).join('') +
      '</tbody></table>';
    thresholdsElement.textContent = 'No background or standards in this scenario: add them under Conditions for a screen.';
  }

  /** Save the scenario: a new scenario, or a new revision of the one it came from. */
  async save(): Promise<boolean> {
    const status = document.getElementById('save-status');
    const outcome = this.doc.validation;
    if (!outcome.ok) {
      if (status) status.textContent = `Not saved: ${outcome.issues.length} field${outcome.issues.length === 1 ? '' : 's'} to fix (marked in the left panel)`;
      return false;
    }
    try {
      const record = this.doc.saved
        ? await this.api.updateScenario(this.doc.saved.id, this.doc.scenario, this.doc.saved.revision)
        : await this.api.createScenario(this.doc.scenario);
      this.doc.markSaved({ id: record.id, revision: record.revision });
      return true;
    } catch (error) {
      if (status) {
        status.textContent =
          error instanceof ApiError && error.status === 409
            ? 'Not saved: someone saved a newer revision meanwhile; open it from Scenarios (your edits stay here)'
            : `Not saved: ${error instanceof Error ? error.message : String(error)}`;
      }
      return false;
    }
  }

  private async startRun(): Promise<void> {
    this.runStarted_ms = performance.now();
    this.lastRunToOverlay_ms = null;
    if (this.doc.dirty || this.doc.saved === null) {
      this.setRunStatus('Saving before the run…');
      if (!(await this.save())) {
        this.setRunStatus('The run needs a saved, valid scenario; see the message at the top.');
        return;
      }
    }
    const saved = this.doc.saved;
    if (saved === null) return;
    this.stopFollowing?.();
    try {
      const pack = this.q<HTMLSelectElement>('[data-testid="pack-choice"]').value as 'none' | 'quick' | 'full';
      const accepted = await this.api.startRun(saved.id, saved.revision, undefined, pack);
      this.setRunning(true);
      this.setRunStatus(accepted.reused ? 'Same scenario run before: using its results.' : 'Queued…');
      this.stopFollowing = this.api.followRun(accepted.id, (update) => void this.onUpdate(update));
    } catch (error) {
      this.setRunStatus(`The run was refused: ${error instanceof Error ? error.message : String(error)}`);
    }
  }

  private setRunning(running: boolean): void {
    (this.q('[data-action="run"]') as HTMLButtonElement).disabled = running;
    (this.q('[data-action="cancel"]') as HTMLButtonElement).disabled = !running;
    this.root.dataset.running = String(running);
  }

  private currentRunId: string | null = null;

  private async onUpdate(update: RunUpdate): Promise<void> {
    this.currentRunId = update.id;
    // Every update the page received, for the end-to-end tests and the bench to read.
    ((window as unknown as { plumeplanRunLog?: RunUpdate[] }).plumeplanRunLog ??= []).push(update);
    const progress = this.q<HTMLProgressElement>('[data-testid="run-progress"]');
    progress.value = update.progress;
    if (!FINAL_RUN_STATUSES.includes(update.status)) {
      const elapsed_s = (performance.now() - this.runStarted_ms) / 1000;
      const left = update.progress > 0.02 ? ` about ${formatDuration((elapsed_s / update.progress) * (1 - update.progress))} left` : '';
      this.setRunStatus(`${update.status === 'queued' ? 'Queued' : 'Running'}: ${Math.round(update.progress * 100)} %${left}${update.message ? `, ${update.message}` : ''}`);
      return;
    }
    this.setRunning(false);
    if (update.status !== 'done') {
      this.setRunStatus(update.status === 'cancelled' ? 'Run cancelled; nothing was kept.' : `Run ${update.status}: ${update.error?.error ?? update.message}`);
      return;
    }
    this.setRunStatus('Finished: loading the results…');
    await this.loadRun(update.id);
  }

  /** A finished run's ground field and receptor figures, fetched from the server. */
  private async fetchRunResults(run: RunRecord): Promise<{ field: GroundField | null; receptors: { columns: string[]; rows: SummaryReceptor[] } | null; verdicts: VerdictSet | null }> {
    const fieldFile = run.results.find((file) => file.name === 'ground-field.bin');
    const summaryFile = run.results.find((file) => file.name === 'summary.json');
    let field: GroundField | null = null;
    let receptors: { columns: string[]; rows: SummaryReceptor[] } | null = null;
    let verdicts: VerdictSet | null = null;
    if (fieldFile) {
      const decoded = decodeGroundField(await this.api.resultBytes(fieldFile));
      field = {
        grid: decoded.grid,
        values: decoded.values,
        statistic: decoded.header.statistic === 'mean' ? 'mean over the weather' : 'concentration, one weather state',
        origin: `${run.mode} run, revision ${run.revision}`,
        height_m: decoded.header.height_m ?? 1.5,
      };
    }
    if (summaryFile) {
      const summary = await this.api.resultJson<RunSummary>(summaryFile);
      const rows = summary.receptors ?? [];
      const columns = rows.length > 0 ? Object.keys(rows[0]).filter((key) => /_ug_m3$/.test(key)) : [];
      receptors = { columns, rows };
      verdicts = summary.verdicts ?? null;
    }
    // The assessment route gives the verdicts on their own (docs/http-api.md); summary.json holds them too.
    try {
      const assessed = await this.api.getAssessment(run.id);
      verdicts = verdictsOf(assessed) ?? verdicts;
    } catch {
      // an older server without the route: summary.json's verdicts stand
    }
    return { field, receptors, verdicts };
  }

  /** Show a finished run's field, figures and files. */
  async loadRun(runId: string): Promise<void> {
    const run = await this.api.getRun(runId);
    this.run = run;
    const { field, receptors, verdicts } = await this.fetchRunResults(run);
    this.runVerdicts = verdicts;
    if (field) {
      this.runField = field;
      this.showsPreview = false;
      (this.q('[data-action="show-preview"]') as HTMLButtonElement).disabled = false;
      this.hooks.showField(this.runField);
      this.lastRunToOverlay_ms = performance.now() - this.runStarted_ms;
    }
    this.runReceptors = receptors;
    this.refreshStandards();
    this.renderDownloads(run);
    this.setRunStatus(`Done: ${run.mode} run of revision ${run.revision}${run.startedAt && run.finishedAt ? `, ${formatDuration((Date.parse(run.finishedAt) - Date.parse(run.startedAt)) / 1000)}` : ''}.`);
  }

  private renderDownloads(run: RunRecord): void {
    this.q('[data-testid="downloads"]').innerHTML = downloadsHtml(run);
  }

  /** Run (or reuse the run of) another saved scenario and compare it with this scenario's run. */
  async compareWith(scenarioId: string): Promise<void> {
    const element = this.q('[data-testid="compare"]');
    if (this.run === null || this.runField === null || this.runReceptors === null) {
      element.innerHTML = '<p class="problem">Run this scenario first: the comparison is between two finished runs.</p>';
      return;
    }
    const mine = this.run;
    const mineField = this.runField;
    const mineReceptors = this.runReceptors;
    try {
      const other = await this.api.getScenario(scenarioId);
      element.innerHTML = `<p>Running <b>${escapeHtml(other.name)}</b> (revision ${other.revision}) for the comparison…</p>`;
      const accepted = await this.api.startRun(other.id, other.revision, mine.mode);
      const finalUpdate = await new Promise<RunUpdate>((resolve) => {
        this.api.followRun(accepted.id, (update) => {
          if (FINAL_RUN_STATUSES.includes(update.status)) resolve(update);
        });
      });
      if (finalUpdate.status !== 'done') {
        element.innerHTML = `<p class="problem">The run of ${escapeHtml(other.name)} ended ${escapeHtml(finalUpdate.status)}: ${escapeHtml(finalUpdate.error?.error ?? finalUpdate.message)}</p>`;
        return;
      }
      const theirs = await this.fetchRunResults(await this.api.getRun(accepted.id));
      if (theirs.field === null || theirs.receptors === null) throw new Error('the other run has no ground field or summary');
      const label = `difference: this scenario (A, rev. ${mine.revision}) minus ${other.name} (B, rev. ${other.revision})`;
      const difference = differenceField(mineField, theirs.field, label);
      this.showsPreview = false;
      (this.q('[data-action="show-preview"]') as HTMLButtonElement).disabled = false;
      this.hooks.showDifference(difference);
      const column = mineReceptors.columns[0] ?? 'concentration_ug_m3';
      const deltas = receptorDeltas(mineReceptors.rows as ReceptorFigures[], theirs.receptors.rows as ReceptorFigures[], column);
      const number = (value: number | null, signed = false) => (value === null ? '–' : `${signed && value > 0 ? '+' : ''}${formatConcentration(value)}`);
      element.innerHTML =
        `<p>A: <b>${escapeHtml(String(this.doc.view.name ?? 'this scenario'))}</b> (rev. ${mine.revision}); B: <b>${escapeHtml(other.name)}</b> (rev. ${other.revision}); both ${escapeHtml(mine.mode)} runs.</p>` +
        `<table class="results" data-testid="compare-table"><caption>Receptor ${escapeHtml(column.replace(/_ug_m3$/, ''))} [µg/m³]</caption><thead><tr><th scope="col">receptor</th><th scope="col">A</th><th scope="col">B</th><th scope="col">A − B</th></tr></thead><tbody>` +
        deltas.map((d) => `<tr><th scope="row">${escapeHtml(d.name)}</th><td>${number(d.a_ug_m3)}</td><td>${number(d.b_ug_m3)}</td><td>${number(d.delta_ug_m3, true)}</td></tr>`).join('') +
        '</tbody></table><button type="button" data-action="back-to-run">Show this scenario\'s run again</button> ' +
        '<button type="button" data-action="server-compare" data-testid="server-compare-button">Areas and verdicts that change</button>' +
        '<div class="study-status" role="status" aria-live="polite" data-testid="server-compare-status"></div><div data-testid="server-compare"></div>';
      element.querySelector('[data-action="back-to-run"]')?.addEventListener('click', () => this.hooks.showField(mineField));
      const serverButton = element.querySelector('[data-action="server-compare"]') as HTMLButtonElement;
      serverButton.addEventListener('click', () => void this.serverComparison(mine.id, accepted.id, serverButton));
    } catch (error) {
      element.innerHTML = `<p class="problem">The comparison could not be made: ${escapeHtml(error instanceof Error ? error.message : String(error))}</p>`;
    }
  }

  /**
   * The server's comparison of the two runs (run kind `compare`, B against A): each level's area and
   * every screening verdict that changes, with its files. Both sides are run again on the server (the
   * solver is deterministic, so the figures are the runs').
   */
  private async serverComparison(runA: string, runB: string, button: HTMLButtonElement): Promise<void> {
    const status = this.q('[data-testid="server-compare-status"]');
    button.disabled = true;
    try {
      const accepted = await this.api.startStudy({ kind: 'compare', a: { runId: runA }, b: { runId: runB } });
      status.textContent = 'Comparing on the server…';
      const final = await new Promise<RunUpdate>((resolve) => {
        this.api.followRun(accepted.id, (update) => {
          if (FINAL_RUN_STATUSES.includes(update.status)) resolve(update);
          else status.textContent = `Comparing: ${Math.round(update.progress * 100)} %`;
        });
      });
      if (final.status !== 'done') {
        status.textContent = `The comparison ended ${final.status}: ${final.error?.error ?? final.message}`;
        return;
      }
      const run = await this.api.getRun(accepted.id);
      const file = run.results.find((f) => f.name === 'comparison.json');
      if (!file) return;
      const comparison = await this.api.resultJson<ComparisonFile>(file);
      const names = new Map((this.runReceptors?.rows ?? []).map((r) => [r.id, String(r.name ?? r.id)]));
      status.textContent = 'Done.';
      this.q('[data-testid="server-compare"]').innerHTML = comparisonResultHtml(comparison, names) + downloadsHtml(run);
    } catch (error) {
      status.textContent = `The comparison was refused: ${error instanceof Error ? error.message : String(error)}`;
    } finally {
      button.disabled = false;
    }
  }

  private async cancelRun(): Promise<void> {
    if (this.currentRunId === null) return;
    try {
      await this.api.cancelRun(this.currentRunId);
      this.setRunStatus('Cancelling…');
    } catch (error) {
      this.setRunStatus(`Cancel refused: ${error instanceof Error ? error.message : String(error)}`);
    }
  }

  private showPreviewAgain(): void {
    this.showsPreview = true;
    (this.q('[data-action="show-preview"]') as HTMLButtonElement).disabled = true;
    this.refreshStandards();
    this.hooks.showField(null);
    document.dispatchEvent(new CustomEvent('plumeplan:preview-wanted'));
  }

  /** Called when the scenario is edited after a run: the run's figures no longer describe it. */
  scenarioEdited(): void {
    if (!this.showsPreview) this.showPreviewAgain();
  }

  get isServerAvailable(): boolean {
    return this.serverAvailable;
  }
}

/** The verdicts in an answer of `GET /api/runs/:id/assessment`, wherever the server puts them; null if none. */
export function verdictsOf(answer: unknown): VerdictSet | null {
  const candidates = [answer, (answer as { assessment?: unknown } | null)?.assessment];
  for (const candidate of candidates) {
    const found = (candidate as { verdicts?: unknown } | null | undefined)?.verdicts;
    if (found && typeof found === 'object' && Array.isArray((found as { standards?: unknown }).standards)) return found as VerdictSet;
  }
  return null;
}

function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return '–';
  if (seconds < 1) return 'under a second';
  if (seconds < 90) return `${Math.round(seconds)} s`;
  return `${Math.round(seconds / 60)} min`;
}



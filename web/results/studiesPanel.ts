/**
 * The "Studies" panel: a sweep of one parameter and the stack-height search, run on the server as runs of
 * kind `sweep` and `stack-height` (docs/http-api.md), each with progress, then its answer as a table and
 * a chart, the files to download, and the screening caution the files carry.
 */
import { SWEEP_PARAMETERS, type SweepParameter } from '../../solver/assessment/sweep.ts';
import { assessmentPlan } from '../../solver/assessment/standards.ts';
import { ApiClient, FINAL_RUN_STATUSES, type RunRecord } from '../api/client.ts';
import { escapeHtml } from '../map/escapeHtml.ts';
import type { ScenarioDocument } from '../state/scenarioDocument.ts';
import { sitingResultHtml, stackHeightResultHtml, sweepResultHtml, type SitingFile, type StackHeightFile, type SweepFile } from './studyResults.ts';
import { downloadsHtml } from './downloads.ts';

type Obj = Record<string, unknown>;

/** A sweep's starting values for each parameter (plausible spans to edit; the server checks each). */
const SWEEP_STARTING_VALUES: Record<SweepParameter, string> = {
  stackHeight_m: '20, 30, 40, 50, 60',
  exitVelocity_m_s: '5, 10, 15, 20',
  emission_g_s: '0.5, 1, 1.5, 2',
  emissionScale: '0.5, 1, 1.5, 2',
  washoutA_per_s: '0, 5e-5, 1e-4, 2e-4',
  washoutB: '0.6, 0.8, 1',
  halfLife_h: '1, 5, 24, 100',
  rain_mm_h: '0, 1, 2, 5',
  depositionVelocity_m_s: '0, 0.001, 0.01, 0.02',
};

export class StudiesPanel {
  constructor(
    private readonly element: HTMLElement,
    private readonly doc: ScenarioDocument,
    private readonly api: ApiClient,
    /** save the scenario if need be; the saved reference, or null when it cannot be saved */
    private readonly ensureSaved: () => Promise<{ id: string; revision: number } | null>,
    /** a finished siting study: draw it on the map; `move` puts the stack at the best position */
    private readonly onSiting?: (run: RunRecord, siting: SitingFile) => void,
    private readonly moveStack?: (stackId: string, lat: number, lon: number) => void,
  ) {
    this.render();
    doc.subscribe(() => this.refreshChoices());
  }

  private render(): void {
    const parameterOptions = (Object.keys(SWEEP_PARAMETERS) as SweepParameter[])
      .map((key) => `<option value="${key}">${escapeHtml(SWEEP_PARAMETERS[key].description)} [${escapeHtml(SWEEP_PARAMETERS[key].unit)}]</option>`)
      .join('');
    this.element.innerHTML = `
      <fieldset class="group"><legend>Sweep one parameter</legend>
        <p class="explain">Runs the scenario once for each value and shows how the highest process contribution and each receptor's answer change with it.</p>
        <div class="field"><label for="sweep-parameter">Parameter</label><select id="sweep-parameter">${parameterOptions}</select></div>
        <div class="field" data-per-source><label for="sweep-source">Source</label><select id="sweep-source"></select></div>
        <div class="field"><label for="sweep-values">Values</label><input id="sweep-values" type="text" aria-describedby="sweep-values-hint sweep-values-error" />
          <div id="sweep-values-hint" class="hint">comma-separated, 1 to 50 values, in the parameter's unit</div>
          <div id="sweep-values-error" class="error" role="alert"></div></div>
        <div class="field"><label for="sweep-mode">Solver</label><select id="sweep-mode"><option value="gaussian">Gaussian plume (quick)</option><option value="grid">Grid (each member a full grid run)</option></select></div>
        <button type="button" class="primary" data-action="sweep" data-testid="sweep-button">Run the sweep</button>
        <div class="study-status" role="status" aria-live="polite" data-testid="sweep-status"></div>
        <div class="study-result" data-testid="sweep-result"></div>
      </fieldset>
      <fieldset class="group"><legend>Stack height for a target</legend>
        <p class="explain">Finds the lowest height of a stack at which the highest process contribution falls below a target: a share of a standard or a concentration.</p>
        <div class="field"><label for="height-source">Stack</label><select id="height-source"></select></div>
        <div class="field"><label for="height-target-kind">Target</label><select id="height-target-kind"><option value="percent">a share of a standard</option><option value="concentration">a concentration</option></select></div>
        <div class="field" data-target="percent"><label for="height-standard">Standard</label><select id="height-standard"></select></div>
        <div class="field" data-target="percent"><label for="height-percent">Share of the limit <span class="unit">[%]</span></label><input id="height-percent" type="number" min="0" step="any" value="10" /></div>
        <div class="field" data-target="concentration" hidden><label for="height-target">Target PC <span class="unit">[µg/m³]</span></label><input id="height-target" type="number" min="0" step="any" value="10" /></div>
        <div class="field"><label for="height-range">Heights to search <span class="unit">[m]</span></label>
          <div class="inline-pair"><input id="height-range" type="number" min="0" step="any" value="10" aria-label="lowest height [m]" /> to <input id="height-max" type="number" min="1" step="any" value="120" aria-label="highest height [m]" /></div>
          <div class="hint">the highest must stay below the grid's top; the answer is found to within 1 m</div></div>
        <div class="field"><label for="height-mode">Solver</label><select id="height-mode"><option value="gaussian">Gaussian plume (quick)</option><option value="grid">Grid</option></select></div>
        <button type="button" class="primary" data-action="stack-height" data-testid="stack-height-button">Find the height</button>
        <div class="study-status" role="status" aria-live="polite" data-testid="stack-height-status"></div>
        <div class="study-result" data-testid="stack-height-result"></div>
      </fieldset>
      <fieldset class="group"><legend>Where on the site</legend>
        <p class="explain">Tries the stack at every point of the site (the scenario's site boundary, on a lattice) and ranks the positions by the highest process contribution at the receptors. Steady weather or a wind rose.</p>
        <div class="field"><label for="site-stack">Stack</label><select id="site-stack"></select></div>
        <div class="field"><label for="site-spacing">Lattice spacing <span class="unit">[m]</span></label><input id="site-spacing" type="number" min="1" step="any" placeholder="the grid's cell size" />
          <div class="hint">empty = the grid's cell size</div></div>
        <div class="field"><label for="site-mode">Solver</label><select id="site-mode"><option value="gaussian">Gaussian plume (quick)</option><option value="grid">Grid</option></select></div>
        <button type="button" class="primary" data-action="site" data-testid="site-button">Rank the positions</button>
        <div class="study-status" role="status" aria-live="polite" data-testid="site-status"></div>
        <div class="study-result" data-testid="site-result"></div>
      </fieldset>`;
    const parameter = this.q<HTMLSelectElement>('#sweep-parameter');
    const values = this.q<HTMLInputElement>('#sweep-values');
    const showParameter = () => {
      values.value = SWEEP_STARTING_VALUES[parameter.value as SweepParameter];
      (this.q('[data-per-source]') as HTMLElement).hidden = !SWEEP_PARAMETERS[parameter.value as SweepParameter].perSource;
    };
    parameter.addEventListener('change', showParameter);
    showParameter();
    const targetKind = this.q<HTMLSelectElement>('#height-target-kind');
    targetKind.addEventListener('change', () => {
      for (const field of Array.from(this.element.querySelectorAll<HTMLElement>('[data-target]'))) field.hidden = field.dataset.target !== targetKind.value;
    });
    this.q('[data-action="sweep"]').addEventListener('click', () => void this.runSweep());
    this.q('[data-action="stack-height"]').addEventListener('click', () => void this.runStackHeight());
    this.q('[data-action="site"]').addEventListener('click', () => void this.runSiting());
    this.refreshChoices();
  }

  private q<T extends HTMLElement = HTMLElement>(selector: string): T {
    return this.element.querySelector(selector) as T;
  }

  /** Sources, stacks and standards of the scenario as it is now. */
  private refreshChoices(): void {
    const sources = ((this.doc.view.sources as Obj[] | undefined) ?? []).filter((s) => typeof s.id === 'string');
    const fill = (select: HTMLSelectElement, html: string) => {
      const before = select.value;
      if (select.innerHTML === html) return;
      select.innerHTML = html;
      if (Array.from(select.options).some((option) => option.value === before)) select.value = before;
    };
    const options = (list: Obj[]) => list.map((s) => `<option value="${escapeHtml(String(s.id))}">${escapeHtml(String(s.name ?? s.id))}</option>`).join('');
    fill(this.q<HTMLSelectElement>('#sweep-source'), options(sources));
    fill(this.q<HTMLSelectElement>('#height-source'), options(sources.filter((s) => s.kind === 'point')));
    fill(this.q<HTMLSelectElement>('#site-stack'), options(sources.filter((s) => s.kind === 'point')));
    const outcome = this.doc.validation;
    let standards: string[] = [];
    if (outcome.ok && outcome.scenario.assessment) {
      try {
        standards = assessmentPlan(outcome.scenario.assessment, outcome.scenario.pollutant.name).standards.map((s) => s.name);
      } catch {
        standards = [];
      }
    }
    fill(
      this.q<HTMLSelectElement>('#height-standard'),
      standards.length === 0 ? '<option value="">(no standards in this scenario)</option>' : standards.map((name) => `<option value="${escapeHtml(name)}">${escapeHtml(name)}</option>`).join(''),
    );
  }

  private receptorNames(): Map<string, string> {
    return new Map(((this.doc.view.receptors as Obj[] | undefined) ?? []).map((r) => [String(r.id), String(r.name ?? r.id)]));
  }

  /** Start a run of another kind, follow it, and hand its record over when it is done. */
  private async runStudy(body: Obj, statusSelector: string, button: HTMLButtonElement): Promise<RunRecord | null> {
    const status = this.q(statusSelector);
    const saved = await this.ensureSaved();
    if (saved === null) {
      status.textContent = 'The study needs a saved, valid scenario; see the message at the top.';
      return null;
    }
    button.disabled = true;
    try {
      const accepted = await this.api.startStudy({ ...body, scenarioId: saved.id, revision: saved.revision });
      status.textContent = accepted.reused ? 'Same study run before: using its results.' : 'Queued…';
      const final = await new Promise<{ status: string; message: string; error: { error: string } | null }>((resolve) => {
        this.api.followRun(accepted.id, (update) => {
          if (FINAL_RUN_STATUSES.includes(update.status)) resolve(update);
          else status.textContent = `Running: ${Math.round(update.progress * 100)} %${update.message ? `, ${update.message}` : ''}`;
        });
      });
      if (final.status !== 'done') {
        status.textContent = `The study ended ${final.status}: ${final.error?.error ?? final.message}`;
        return null;
      }
      status.textContent = 'Done.';
      return await this.api.getRun(accepted.id);
    } catch (error) {
      status.textContent = `The study was refused: ${error instanceof Error ? error.message : String(error)}`;
      return null;
    } finally {
      button.disabled = false;
    }
  }

  private async runSweep(): Promise<void> {
    const parameter = this.q<HTMLSelectElement>('#sweep-parameter').value as SweepParameter;
    const parsed = this.q<HTMLInputElement>('#sweep-values').value.split(/[,;\s]+/).filter(Boolean).map(Number);
    const error = this.q('#sweep-values-error');
    const bad = parsed.findIndex((value) => !Number.isFinite(value));
    if (parsed.length === 0 || bad >= 0 || parsed.length > 50) {
      error.textContent = parsed.length === 0 ? 'give at least one value' : bad >= 0 ? `value ${bad + 1} is not a number` : 'at most 50 values';
      return;
    }
    error.textContent = '';
    const body: Obj = { kind: 'sweep', parameter, values: parsed, mode: this.q<HTMLSelectElement>('#sweep-mode').value };
    if (SWEEP_PARAMETERS[parameter].perSource) body.sourceId = this.q<HTMLSelectElement>('#sweep-source').value;
    const run = await this.runStudy(body, '[data-testid="sweep-status"]', this.q<HTMLButtonElement>('[data-action="sweep"]'));
    if (run === null) return;
    const file = run.results.find((f) => f.name === 'sweep.json');
    if (!file) return;
    const sweep = await this.api.resultJson<SweepFile>(file);
    this.q('[data-testid="sweep-result"]').innerHTML = sweepResultHtml(sweep, this.receptorNames()) + downloadsHtml(run);
  }

  private async runStackHeight(): Promise<void> {
    const body: Obj = {
      kind: 'stack-height',
      sourceId: this.q<HTMLSelectElement>('#height-source').value,
      minHeight_m: Number(this.q<HTMLInputElement>('#height-range').value),
      maxHeight_m: Number(this.q<HTMLInputElement>('#height-max').value),
      mode: this.q<HTMLSelectElement>('#height-mode').value,
    };
    if (this.q<HTMLSelectElement>('#height-target-kind').value === 'percent') {
      body.targetPercent = Number(this.q<HTMLInputElement>('#height-percent').value);
      body.standard = this.q<HTMLSelectElement>('#height-standard').value;
    } else {
      body.target_ug_m3 = Number(this.q<HTMLInputElement>('#height-target').value);
    }
    const run = await this.runStudy(body, '[data-testid="stack-height-status"]', this.q<HTMLButtonElement>('[data-action="stack-height"]'));
    if (run === null) return;
    const file = run.results.find((f) => f.name === 'stack-height.json');
    if (!file) return;
    const result = await this.api.resultJson<StackHeightFile>(file);
    this.q('[data-testid="stack-height-result"]').innerHTML = stackHeightResultHtml(result) + downloadsHtml(run);
  }

  private async runSiting(): Promise<void> {
    const body: Obj = { kind: 'site', stackId: this.q<HTMLSelectElement>('#site-stack').value, mode: this.q<HTMLSelectElement>('#site-mode').value };
    const spacing = this.q<HTMLInputElement>('#site-spacing').value.trim();
    if (spacing !== '') body.spacing_m = Number(spacing);
    const run = await this.runStudy(body, '[data-testid="site-status"]', this.q<HTMLButtonElement>('[data-action="site"]'));
    if (run === null) return;
    const file = run.results.find((f) => f.name === 'siting.json');
    if (!file) return;
    const siting = await this.api.resultJson<SitingFile>(file);
    const result = this.q('[data-testid="site-result"]');
    result.innerHTML = sitingResultHtml(siting, this.receptorNames()) + downloadsHtml(run);
    if (this.moveStack) {
      const move = document.createElement('button');
      move.type = 'button';
      move.dataset.testid = 'siting-move-stack';
      move.textContent = `Move ${siting.stack.id} to the best position`;
      move.title = 'An edit of the scenario: Undo takes it back';
      move.addEventListener('click', () => this.moveStack?.(siting.stack.id, siting.best.lat, siting.best.lon));
      result.querySelector('[data-testid="siting-answer"]')?.after(move);
    }
    this.onSiting?.(run, siting);
  }
}

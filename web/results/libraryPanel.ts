/**
 * The "Scenarios" panel: the scenarios kept on the server, each with its revisions; open one (or an
 * older revision), duplicate, delete (recoverable on the server), and start a new one from the demo.
 */
import demoScenario from '../../scenarios/merrowdene-heat-plant/scenario.json';
import { ApiClient, type RevisionRecord, type ScenarioRecord } from '../api/client.ts';
import { escapeHtml } from '../map/mapControls.ts';
import type { RawScenario, ScenarioDocument } from '../state/scenarioDocument.ts';
import type { ResultsPanel } from './resultsPanel.ts';

export class LibraryPanel {
  private items: ScenarioRecord[] = [];
  private revisions = new Map<string, RevisionRecord[]>();
  private message = '';

  constructor(
    private readonly element: HTMLElement,
    private readonly doc: ScenarioDocument,
    private readonly api: ApiClient,
    private readonly results: ResultsPanel,
  ) {
    doc.subscribe((_d, reason) => {
      if (reason === 'saved') void this.refresh();
    });
    // Other clients save too: the list is fetched again whenever its tab is opened.
    document.getElementById('tab-library')?.addEventListener('click', () => void this.refresh());
    void this.refresh();
  }

  async refresh(): Promise<void> {
    try {
      this.items = (await this.api.listScenarios(100, 0)).items;
      this.message = '';
    } catch (error) {
      this.items = [];
      this.message = `The scenario list needs the server (${error instanceof Error ? error.message : String(error)}).`;
    }
    this.render();
  }

  private confirmDiscard(): boolean {
    return !this.doc.dirty || window.confirm('Your unsaved changes would be replaced. Open anyway?');
  }

  private render(): void {
    const current = this.doc.saved;
    this.element.innerHTML =
      '<h2>Saved scenarios</h2>' +
      (this.message ? `<p class="muted">${escapeHtml(this.message)}</p>` : '') +
      '<div class="library-actions"><button type="button" data-act="new">New from the demo</button> <button type="button" data-act="duplicate">Duplicate the open scenario</button></div>' +
      '<ul class="library" data-testid="scenario-list">' +
      this.items
        .map((item) => {
          const open = current?.id === item.id;
          const revisions = this.revisions.get(item.id);
          return (
            `<li class="${open ? 'open' : ''}"><div class="library-row"><span class="library-name">${escapeHtml(item.name)}</span> <span class="muted">rev. ${item.revision}, ${escapeHtml(item.updatedAt.slice(0, 16).replace('T', ' '))} UTC</span></div>` +
            `<div class="library-row"><button type="button" data-act="open" data-id="${item.id}">Open</button> ` +
            `<button type="button" data-act="revisions" data-id="${item.id}" aria-expanded="${revisions !== undefined}">Revisions</button> ` +
            (open ? '' : `<button type="button" data-act="compare" data-id="${item.id}" data-testid="compare-${item.id}">Compare</button> `) +
            `<button type="button" data-act="delete" data-id="${item.id}" class="danger">Delete</button></div>` +
            (revisions
              ? '<ol class="revisions">' +
                revisions
                  .map((r) => `<li><button type="button" class="link" data-act="open-revision" data-id="${item.id}" data-revision="${r.revision}">Revision ${r.revision}</button> <span class="muted">${escapeHtml(r.createdAt.slice(0, 16).replace('T', ' '))} UTC, ${escapeHtml(r.name)}</span></li>`)
                  .join('') +
                '</ol>'
              : '') +
            '</li>'
          );
        })
        .join('') +
      '</ul>';
    this.element.querySelectorAll<HTMLButtonElement>('button[data-act]').forEach((button) => {
      button.addEventListener('click', () => void this.act(button.dataset.act ?? '', button.dataset.id ?? '', Number(button.dataset.revision)));
    });
  }

  private async act(action: string, id: string, revision: number): Promise<void> {
    try {
      switch (action) {
        case 'new':
          if (!this.confirmDiscard()) return;
          this.doc.load(demoScenario as unknown as RawScenario, null, 'new', true);
          break;
        case 'duplicate':
          this.doc.load({ ...this.doc.scenario, name: `${String(this.doc.view.name ?? 'Scenario')} (copy)` }, null, 'duplicate', true);
          await this.results.save();
          break;
        case 'open': {
          if (!this.confirmDiscard()) return;
          const record = await this.api.getScenario(id);
          this.doc.load(record.scenario, { id: record.id, revision: record.revision }, 'open');
          break;
        }
        case 'open-revision': {
          if (!this.confirmDiscard()) return;
          const record = await this.api.getRevision(id, revision);
          // An older revision opens as an edit of the latest: saving it makes it the newest revision.
          const latest = this.items.find((item) => item.id === id)?.revision ?? revision;
          this.doc.load(record.scenario, { id, revision: latest }, `open revision ${revision}`, revision !== latest);
          break;
        }
        case 'revisions':
          if (this.revisions.has(id)) this.revisions.delete(id);
          else this.revisions.set(id, (await this.api.listRevisions(id)).items);
          break;
        case 'compare':
          await this.results.compareWith(id);
          return;
        case 'delete':
          if (!window.confirm('Delete this scenario? It can be recovered on the server.')) return;
          await this.api.deleteScenario(id);
          break;
      }
      await this.refresh();
    } catch (error) {
      this.message = `That did not work: ${error instanceof Error ? error.message : String(error)}`;
      this.render();
    }
  }
}

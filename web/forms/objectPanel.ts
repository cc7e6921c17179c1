/**
 * The "Map objects" panel: the list of sources and receptors, and the form of the selected one with
 * units, allowed ranges and the schema's errors beside each field.
 */
import type { EditLayer, Selection } from '../editing/editLayer.ts';
import { escapeHtml } from '../map/mapControls.ts';
import type { RawScenario, ScenarioDocument } from '../state/scenarioDocument.ts';
import { choiceField, fieldGroup, numberField, showIssues, textField } from './formKit.ts';

type Item = Record<string, unknown>;

export class ObjectPanel {
  constructor(
    private readonly element: HTMLElement,
    private readonly document: ScenarioDocument,
    private readonly editLayer: EditLayer,
  ) {
    // A field's own change keeps the form (and the keyboard focus) where it is; anything else redraws it.
    document.subscribe((_doc, reason) => this.render(!reason.startsWith('set ')));
    editLayer.onSelection(() => this.render());
    this.render();
  }

  render(withForm = true): void {
    const view = this.document.view;
    const sources = (view.sources as Item[] | undefined) ?? [];
    const receptors = (view.receptors as Item[] | undefined) ?? [];
    const selection = this.editLayer.selection;
    const keptForm = withForm ? null : this.element.querySelector('.object-form');
    this.element.replaceChildren();

    const list = document.createElement('div');
    list.className = 'object-list';
    list.innerHTML =
      '<h2>Sources</h2>' +
      listHtml(sources, 'sources', selection, (s) => (s.kind === 'area' ? 'area' : 'stack')) +
      '<h2>Receptors</h2>' +
      listHtml(receptors, 'receptors', selection, () => 'receptor') +
      '<p class="explain">Choose a tool above the map to add a stack or receptor with a click, or to draw an area source. ' +
      'Drag a symbol to move it; select one to edit it here; Delete removes it.</p>';
    list.querySelectorAll<HTMLButtonElement>('button[data-list]').forEach((button) => {
      button.addEventListener('click', () => this.editLayer.select({ list: button.dataset.list as 'sources' | 'receptors', index: Number(button.dataset.index) }));
    });
    this.element.append(list);

    if (keptForm !== null) this.element.append(keptForm);
    else if (selection !== null) {
      const item = (selection.list === 'sources' ? sources : receptors)[selection.index];
      if (item !== undefined) this.element.append(this.form(selection, item));
    }
    const outcome = this.document.validation;
    const unplaced = showIssues(this.element, outcome.ok ? [] : outcome.issues.filter((i) => /^(sources|receptors)/.test(i.path)));
    if (unplaced.length > 0) {
      const box = document.createElement('div');
      box.className = 'issues';
      box.setAttribute('role', 'alert');
      box.innerHTML = '<h3>To fix before a run</h3><ul>' + unplaced.map((i) => `<li><code>${escapeHtml(i.path)}</code>: ${escapeHtml(i.message)}</li>`).join('') + '</ul>';
      this.element.append(box);
    }
  }

  private form(selection: NonNullable<Selection>, item: Item): HTMLElement {
    const base = `${selection.list}[${selection.index}]`;
    const set = (field: string, label: string) => (value: unknown) =>
      this.document.edit(`set ${label} of ${String(item.id ?? '')}`, (draft: RawScenario) => {
        const target = (draft[selection.list] as Item[])[selection.index];
        if (value === null || value === undefined) delete target[field];
        else target[field] = value;
      });
    const kind = selection.list === 'receptors' ? 'receptor' : item.kind === 'area' ? 'area' : 'point';
    const schemaBase = selection.list === 'receptors' ? ['receptors'] : ['sources', kind];
    const num = (field: string, label: string, extra: Partial<Parameters<typeof numberField>[0]> = {}) =>
      numberField({ schemaPath: [...schemaBase, field], issuePath: `${base}.${field}`, label, value: item[field], onChange: set(field, label), ...extra });
    const fields: HTMLElement[] = [
      textField({ issuePath: `${base}.id`, label: 'Id', value: item.id, hint: 'unique, used in result files', onChange: set('id', 'id') }),
      textField({ issuePath: `${base}.name`, label: 'Name', value: item.name, hint: 'shown in reports', onChange: set('name', 'name') }),
    ];
    let title: string;
    if (kind === 'point') {
      title = 'Stack';
      fields.push(
        num('height_m', 'Stack height'),
        num('diameter_m', 'Inner diameter'),
        num('exitVelocity_m_s', 'Exit velocity'),
        num('exitTemperature_K', 'Exit temperature'),
        num('emission_g_s', 'Emission rate'),
        choiceField({
          issuePath: `${base}.plumeRise`,
          label: 'Plume rise',
          value: item.plumeRise === false ? 'false' : 'true',
          choices: [
            { value: 'true', label: 'Buoyant and momentum rise (Briggs)' },
            { value: 'false', label: 'None: release at the stack top' },
          ],
          hint: 'whether the hot, fast exit gases lift the plume above the stack',
          onChange: (value) => set('plumeRise', 'plume rise')(value === 'true'),
        }),
        num('lat', 'Latitude', { step: '0.0000001' }),
        num('lon', 'Longitude', { step: '0.0000001' }),
      );
    } else if (kind === 'area') {
      title = 'Area source';
      fields.push(num('releaseHeight_m', 'Release height'), num('emission_g_s', 'Emission rate (whole polygon)'));
    } else {
      title = 'Receptor';
      fields.push(num('height_m', 'Height above ground'), num('lat', 'Latitude', { step: '0.0000001' }), num('lon', 'Longitude', { step: '0.0000001' }));
    }
    const group = fieldGroup(
      `${title}: ${String(item.name ?? item.id ?? '')}`,
      kind === 'area' ? 'Drag the corner handles on the map to reshape the polygon.' : 'Drag the symbol on the map to move it, or type a position.',
      fields,
    );
    group.classList.add('object-form');
    const remove = document.createElement('button');
    remove.type = 'button';
    remove.className = 'danger';
    remove.textContent = `Delete this ${title.toLowerCase()}`;
    remove.addEventListener('click', () => this.editLayer.deleteSelected());
    group.append(remove);
    return group;
  }
}

function listHtml(items: Item[], list: string, selection: Selection, kindOf: (item: Item) => string): string {
  if (items.length === 0) return '<p class="muted">None yet.</p>';
  return (
    '<ul class="objects">' +
    items
      .map((item, index) => {
        const selected = selection?.list === list && selection.index === index;
        return `<li><button type="button" data-list="${list}" data-index="${index}" aria-pressed="${selected}" class="object-button${selected ? ' selected' : ''}"><span class="kind kind-${kindOf(item)}">${kindOf(item)}</span> ${escapeHtml(String(item.name ?? item.id ?? ''))}</button></li>`;
      })
      .join('') +
    '</ul>'
  );
}

/**
 * Building blocks of the side forms. Every numeric field takes its explanation, unit and allowed range
 * from the scenario's JSON Schema (scenarios/format/scenario.schema.json, generated from the same zod
 * schema that validates the scenario on the page and on the server), so the form and the check can never
 * disagree. Errors from the schema are shown beside the field they name.
 */
import jsonSchema from '../../scenarios/format/scenario.schema.json';
import type { ScenarioIssue } from '../../scenarios/format/schema.ts';
import { escapeHtml } from '../map/escapeHtml.ts';

type SchemaNode = {
  type?: string | string[];
  description?: string;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  enum?: string[];
  properties?: Record<string, SchemaNode>;
  items?: SchemaNode;
  oneOf?: SchemaNode[];
  anyOf?: SchemaNode[];
  const?: string;
  default?: unknown;
};

/**
 * The schema node of a field. `path` lists property names; where a list or a choice of kinds stands,
 * give the kind (`['sources', 'point', 'height_m']`, `['weather', 'steady', 'windSpeed_m_s']`).
 */
export function schemaNode(path: readonly string[]): SchemaNode | null {
  let node: SchemaNode | undefined = jsonSchema as unknown as SchemaNode;
  for (const segment of path) {
    if (node === undefined) return null;
    if (node.items) node = node.items;
    if (node.oneOf) {
      const chosen: SchemaNode | undefined = node.oneOf.find((option) => option.properties?.kind?.const === segment);
      if (chosen) {
        node = chosen;
        continue;
      }
    }
    if (node.anyOf) node = node.anyOf.find((option) => option.properties) ?? node;
    node = node.properties?.[segment];
  }
  return node ?? null;
}

/** Split "stack height above ground [m]" into its text and unit. */
export function splitUnit(description: string): { text: string; unit: string | null } {
  const match = /^(.*?)\s*\[([^\]]+)\]\s*(.*)$/.exec(description);
  if (match === null) return { text: description, unit: null };
  const rest = match[3] ? ` ${match[3]}` : '';
  return { text: `${match[1]}${rest}`.replace(/\s*;\s*$/, ''), unit: match[2] };
}

/** The allowed range of a numeric node, in words: "> 0", "0 to 360", ">= 0". */
export function rangeText(node: SchemaNode | null): string {
  if (node === null) return '';
  const numberNode = node.anyOf?.find((option) => option.type === 'number' || option.type === 'integer') ?? node;
  const low =
    numberNode.exclusiveMinimum !== undefined ? `> ${numberNode.exclusiveMinimum}` : numberNode.minimum !== undefined ? `${numberNode.minimum}` : null;
  const high = numberNode.maximum !== undefined && numberNode.maximum < 1e15 ? `${numberNode.maximum}` : null;
  if (low !== null && high !== null && numberNode.exclusiveMinimum === undefined) return `${low} to ${high}`;
  if (low !== null && high !== null) return `${low}, <= ${high}`;
  if (low !== null) return numberNode.exclusiveMinimum !== undefined ? low : `>= ${low}`;
  if (high !== null) return `<= ${high}`;
  return '';
}

let fieldCounter = 0;

export interface NumberFieldOptions {
  /** JSON Schema path (with kinds), for the explanation, unit and range */
  schemaPath: readonly string[];
  /** field path in the scenario as the schema's issues name it, e.g. "sources[0].height_m" */
  issuePath: string;
  label: string;
  value: unknown;
  /** called with the new value (a number, or null when cleared and `nullable`) */
  onChange: (value: number | null) => void;
  /** allow an empty field (meaning null or absent) */
  nullable?: boolean;
  /** what an empty field means */
  emptyMeaning?: string;
  step?: string;
}

/**
 * A labelled number input with its unit, its allowed range, a one-line explanation and a slot for errors.
 */
export function numberField(options: NumberFieldOptions): HTMLElement {
  const node = schemaNode(options.schemaPath);
  const { text, unit } = splitUnit(node?.description ?? '');
  const range = rangeText(node);
  const id = `field-${++fieldCounter}`;
  const wrapper = document.createElement('div');
  wrapper.className = 'field';
  wrapper.dataset.issuePath = options.issuePath;
  const hintParts = [text, range ? `allowed ${range}${unit ? ` ${unit}` : ''}` : '', options.nullable && options.emptyMeaning ? `empty = ${options.emptyMeaning}` : ''].filter(Boolean);
  wrapper.innerHTML =
    `<label for="${id}">${escapeHtml(options.label)}${unit ? ` <span class="unit">[${escapeHtml(unit)}]</span>` : ''}</label>` +
    `<input id="${id}" type="number" inputmode="decimal" step="${options.step ?? 'any'}" aria-describedby="${id}-hint ${id}-error" />` +
    `<div id="${id}-hint" class="hint">${escapeHtml(hintParts.join('; '))}</div>` +
    `<div id="${id}-error" class="error" role="alert"></div>`;
  const input = wrapper.querySelector('input') as HTMLInputElement;
  input.value = typeof options.value === 'number' ? String(options.value) : '';
  input.dataset.issuePath = options.issuePath;
  input.addEventListener('change', () => {
    const raw = input.value.trim();
    if (raw === '') {
      if (options.nullable) options.onChange(null);
      else showFieldError(wrapper, 'a value is needed here');
      return;
    }
    const value = Number(raw);
    if (!Number.isFinite(value)) {
      showFieldError(wrapper, `${JSON.stringify(raw)} is not a number`);
      return;
    }
    options.onChange(value);
  });
  return wrapper;
}

export interface ChoiceFieldOptions {
  issuePath: string;
  label: string;
  value: string;
  choices: { value: string; label: string }[];
  hint?: string;
  onChange: (value: string) => void;
}

/** A labelled select with a one-line explanation. */
export function choiceField(options: ChoiceFieldOptions): HTMLElement {
  const id = `field-${++fieldCounter}`;
  const wrapper = document.createElement('div');
  wrapper.className = 'field';
  wrapper.dataset.issuePath = options.issuePath;
  wrapper.innerHTML =
    `<label for="${id}">${escapeHtml(options.label)}</label>` +
    `<select id="${id}" aria-describedby="${id}-hint ${id}-error">` +
    options.choices.map((c) => `<option value="${escapeHtml(c.value)}">${escapeHtml(c.label)}</option>`).join('') +
    '</select>' +
    `<div id="${id}-hint" class="hint">${escapeHtml(options.hint ?? '')}</div>` +
    `<div id="${id}-error" class="error" role="alert"></div>`;
  const select = wrapper.querySelector('select') as HTMLSelectElement;
  select.value = options.value;
  select.addEventListener('change', () => options.onChange(select.value));
  return wrapper;
}

export interface TextFieldOptions {
  issuePath: string;
  label: string;
  value: unknown;
  hint?: string;
  onChange: (value: string) => void;
}

/** A labelled text input. */
export function textField(options: TextFieldOptions): HTMLElement {
  const id = `field-${++fieldCounter}`;
  const wrapper = document.createElement('div');
  wrapper.className = 'field';
  wrapper.dataset.issuePath = options.issuePath;
  wrapper.innerHTML =
    `<label for="${id}">${escapeHtml(options.label)}</label>` +
    `<input id="${id}" type="text" autocomplete="off" aria-describedby="${id}-hint ${id}-error" />` +
    `<div id="${id}-hint" class="hint">${escapeHtml(options.hint ?? '')}</div>` +
    `<div id="${id}-error" class="error" role="alert"></div>`;
  const input = wrapper.querySelector('input') as HTMLInputElement;
  input.value = typeof options.value === 'string' ? options.value : '';
  input.addEventListener('change', () => options.onChange(input.value));
  return wrapper;
}

/** Show an error under a field (and mark its input invalid). */
export function showFieldError(wrapper: HTMLElement, message: string): void {
  const slot = wrapper.querySelector('.error');
  if (slot) slot.textContent = message;
  wrapper.querySelector('input, select')?.setAttribute('aria-invalid', message ? 'true' : 'false');
  wrapper.classList.toggle('has-error', message !== '');
}

/**
 * Put each schema issue beside the field it names, within a container; issues no field shows are
 * returned (so the panel can list them).
 */
export function showIssues(container: HTMLElement, issues: readonly ScenarioIssue[]): ScenarioIssue[] {
  const fields = Array.from(container.querySelectorAll<HTMLElement>('.field[data-issue-path]'));
  for (const field of fields) showFieldError(field, '');
  const unplaced: ScenarioIssue[] = [];
  for (const issue of issues) {
    const field = fields.find((f) => f.dataset.issuePath === issue.path);
    if (field) showFieldError(field, issue.message);
    else unplaced.push(issue);
  }
  return unplaced;
}

/** A titled group of fields. */
export function fieldGroup(title: string, explanation: string, children: HTMLElement[]): HTMLElement {
  const group = document.createElement('fieldset');
  group.className = 'group';
  group.innerHTML = `<legend>${escapeHtml(title)}</legend><p class="explain">${escapeHtml(explanation)}</p>`;
  for (const child of children) group.append(child);
  return group;
}

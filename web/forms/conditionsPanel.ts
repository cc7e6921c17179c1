/**
 * The "Conditions" panel: pollutant, weather (one steady state, an hourly CSV with a preview of what was
 * read, or a wind-rose table), domain and solver, and the assessment's background and standards. Each
 * group says in one line what it changes.
 */
import { hoursSummary, readWeatherUpload } from './weatherUpload.ts';
import { escapeHtml } from '../map/escapeHtml.ts';
import type { RawScenario, ScenarioDocument } from '../state/scenarioDocument.ts';
import { choiceField, fieldGroup, numberField, showIssues, textField } from './formKit.ts';
import type { LibraryPollutant } from '../../scenarios/format/types.ts';
import {
  chooseLibraryPollutant,
  chosenLibraryPollutant,
  chosenStandards,
  LIBRARY_POLLUTANTS,
  libraryLosses,
  noxRatios,
  SCREENING_SET_DEFAULT,
  SCREENING_SET_ORIGIN,
  screeningStateCount,
  setNoxRatio,
  setsWithStandards,
  STANDARD_SET_TITLES,
  STANDARD_SETS,
  toggleStandardSet,
  useLibraryLoss,
} from './libraryChoice.ts';

type Obj = Record<string, unknown>;

const STABILITY_CHOICES = [
  { value: 'A', label: 'A: very unstable (strong sun, light wind)' },
  { value: 'B', label: 'B: unstable' },
  { value: 'C', label: 'C: slightly unstable' },
  { value: 'D', label: 'D: neutral (overcast or windy)' },
  { value: 'E', label: 'E: slightly stable (night, light wind)' },
  { value: 'F', label: 'F: moderately stable (clear night, calm)' },
];

/** The steady weather a new or converted scenario starts from (neutral, 5 m/s from the west-south-west). */
const STEADY_DEFAULT = { kind: 'steady', windSpeed_m_s: 5, windFrom_deg: 250, stability: 'D', rain_mm_h: 0, airTemperature_K: 283.15, anemometerHeight_m: 10 };

/** What each kind of weather changes, in one line (shown under the choice). */
const WEATHER_KIND_HINTS: Record<string, string> = {
  steady: 'one hour of one weather: the picture of that hour; standards over a day or a year cannot be judged from it',
  hourly: 'every hour of your series: means, percentiles and exceedances exactly as the standards define them',
  windRose: 'how often each wind blows: long-term means; no time order, so no daily or hourly percentiles',
  screeningSet: 'every class and speed from every direction: the worst hour, an upper bound that screens out without met data',
};

/** A wind-rose row as the table's text holds it. */
const ROSE_HEADER = 'windFrom_deg,windSpeed_m_s,stability,frequency';

/** Parse the wind-rose table's text into cells (checked afterwards by the schema with the rest). */
export function parseRoseTable(text: string): { cells: Obj[]; problems: string[] } {
  const cells: Obj[] = [];
  const problems: string[] = [];
  text
    .split(/\r?\n/)
    .map((line) => line.trim())
    .forEach((line, n) => {
      if (line === '' || line.startsWith('#') || line.replace(/\s/g, '') === ROSE_HEADER) return;
      const parts = line.split(',').map((part) => part.trim());
      if (parts.length !== 4) {
        problems.push(`line ${n + 1}: ${JSON.stringify(line)} has ${parts.length} values; give ${ROSE_HEADER}`);
        return;
      }
      const [from, speed, stability, frequency] = parts;
      cells.push({ windFrom_deg: Number(from), windSpeed_m_s: Number(speed), stability: stability.toUpperCase(), frequency: Number(frequency) });
    });
  return { cells, problems };
}

export class ConditionsPanel {
  private csvSummary = '';

  constructor(private readonly element: HTMLElement, private readonly document: ScenarioDocument) {
    document.subscribe((_doc, reason) => {
      // Re-render on outside changes (undo, open); a field's own change keeps focus where it is.
      if (!reason.startsWith('set ')) this.render();
      else this.showIssues();
    });
    this.render();
  }

  private set(label: string, change: (draft: RawScenario) => void): void {
    this.document.edit(`set ${label}`, change);
  }

  render(): void {
    const view = this.document.scenario;
    this.element.replaceChildren(
      this.pollutantGroup(view),
      this.weatherGroup(view),
      this.siteAndDomainGroup(view),
      this.solverGroup(view),
      this.assessmentGroup(view),
    );
    this.showIssues();
  }

  private showIssues(): void {
    const outcome = this.document.validation;
    const issues = outcome.ok ? [] : outcome.issues.filter((i) => !/^(sources|receptors)/.test(i.path));
    const unplaced = showIssues(this.element, issues);
    this.element.querySelector('.issues')?.remove();
    if (unplaced.length > 0) {
      const box = document.createElement('div');
      box.className = 'issues';
      box.setAttribute('role', 'alert');
      box.innerHTML = '<h3>To fix before a run</h3><ul>' + unplaced.map((i) => `<li><code>${escapeHtml(i.path)}</code>: ${escapeHtml(i.message)}</li>`).join('') + '</ul>';
      this.element.prepend(box);
    }
  }

  private pollutantGroup(view: RawScenario): HTMLElement {
    const pollutant = (view.pollutant as Obj | undefined) ?? {};
    const washout = pollutant.washout as Obj | null | undefined;
    const setP = (field: string) => (value: unknown) =>
      this.set(`pollutant ${field}`, (draft) => {
        const target = ((draft.pollutant as Obj) ??= {});
        target[field] = value;
      });
    const setWashout = (field: 'a_per_s' | 'b') => (value: number | null) =>
      this.set(`washout ${field}`, (draft) => {
        const target = ((draft.pollutant as Obj) ??= {});
        if (value === null) {
          target.washout = null;
          return;
        }
        const current = (target.washout as Obj | null) ?? { a_per_s: 0, b: 0.8 };
        target.washout = { ...current, [field]: value };
      });
    const chosen = chosenLibraryPollutant(view);
    const children: HTMLElement[] = [
      choiceField({
        issuePath: 'assessment.libraryPollutant',
        label: 'From the library',
        value: chosen ?? '',
        choices: [
          { value: '', label: 'None: my own pollutant and standards' },
          ...LIBRARY_POLLUTANTS.map((name) => ({ value: name, label: `${name}: ${libraryLosses(name).description}` })),
        ],
        hint: 'a library pollutant brings its air-quality standards into the verdicts and offers loss values from the literature',
        onChange: (value) => {
          this.set('library pollutant', (draft) => chooseLibraryPollutant(draft, value === '' ? null : (value as LibraryPollutant)));
          this.render();
        },
      }),
    ];
    if (chosen !== null) children.push(this.libraryDetails(view, chosen));
    children.push(
      textField({ issuePath: 'pollutant.name', label: 'Name', value: pollutant.name, hint: 'shown in reports', onChange: setP('name') }),
      numberField({ schemaPath: ['pollutant', 'halfLife_h'], issuePath: 'pollutant.halfLife_h', label: 'Half-life', value: pollutant.halfLife_h, nullable: true, emptyMeaning: 'conserved (no decay)', onChange: setP('halfLife_h') }),
      numberField({ schemaPath: ['pollutant', 'washout', 'a_per_s'], issuePath: 'pollutant.washout.a_per_s', label: 'Washout coefficient a', value: washout?.a_per_s, nullable: true, emptyMeaning: 'no washout', onChange: setWashout('a_per_s') }),
      numberField({ schemaPath: ['pollutant', 'washout', 'b'], issuePath: 'pollutant.washout.b', label: 'Washout exponent b', value: washout?.b, nullable: true, emptyMeaning: 'no washout', onChange: setWashout('b') }),
      numberField({ schemaPath: ['pollutant', 'depositionVelocity_m_s'], issuePath: 'pollutant.depositionVelocity_m_s', label: 'Dry deposition velocity', value: pollutant.depositionVelocity_m_s ?? 0, onChange: setP('depositionVelocity_m_s') }),
    );
    return fieldGroup('Pollutant', 'What is emitted and how it is lost on the way: decay shortens the footprint downwind, washout matters only in rain, deposition thins a low plume.', children);
  }

  /** What the library holds for the chosen pollutant: losses with their sources, standards, NOx ratios. */
  private libraryDetails(view: RawScenario, name: LibraryPollutant): HTMLElement {
    const box = document.createElement('div');
    box.className = 'library-card';
    box.dataset.testid = 'library-card';
    const losses = libraryLosses(name);
    const pollutant = (view.pollutant as Obj | undefined) ?? {};
    const currentWashout = pollutant.washout as { a_per_s?: number; b?: number } | null | undefined;
    const washoutInUse = losses.washout !== null && currentWashout?.a_per_s === losses.washout.a_per_s && currentWashout?.b === losses.washout.b;
    const depositionInUse = losses.depositionVelocity !== null && pollutant.depositionVelocity_m_s === losses.depositionVelocity.value_m_s;
    const standards = chosenStandards(view);
    const sets = setsWithStandards(name);
    const takenSets = new Set(((view.assessment as Obj | undefined)?.standardSets as string[] | undefined) ?? STANDARD_SETS);
    box.innerHTML =
      `<h3>${escapeHtml(name)} in the library</h3>` +
      '<dl class="library-facts">' +
      `<dt>Half-life</dt><dd>${escapeHtml(losses.halfLife)}</dd>` +
      `<dt>Washout</dt><dd>${
        losses.washout
          ? `Λ = a R<sup>b</sup> with a = ${losses.washout.a_per_s.toExponential(1)} s⁻¹, b = ${losses.washout.b} <span class="source">${escapeHtml(losses.washout.source)}</span> ` +
            (washoutInUse ? '<span class="in-use">in use</span>' : '<button type="button" class="small" data-use="washout">Use these</button>')
          : 'none suggested: no washout unless you give one'
      }</dd>` +
      `<dt>Dry deposition</dt><dd>${
        losses.depositionVelocity
          ? `${losses.depositionVelocity.value_m_s} m/s <span class="source">${escapeHtml(losses.depositionVelocity.source)}</span> ` +
            (depositionInUse ? '<span class="in-use">in use</span>' : '<button type="button" class="small" data-use="deposition">Use this</button>')
          : 'none suggested: the velocity below applies'
      }</dd></dl>`;
    for (const button of Array.from(box.querySelectorAll<HTMLButtonElement>('button[data-use]'))) {
      const which = button.dataset.use as 'washout' | 'deposition';
      button.setAttribute('aria-label', which === 'washout' ? `Use the library's washout for ${name}` : `Use the library's deposition velocity for ${name}`);
      button.addEventListener('click', () => {
        this.set(`library ${which}`, (draft) => useLibraryLoss(draft, name, which));
        this.render();
      });
    }
    if (sets.length > 1) {
      const fieldset = document.createElement('fieldset');
      fieldset.className = 'set-choice';
      fieldset.innerHTML = '<legend>Standards from</legend>';
      for (const set of sets) {
        const label = document.createElement('label');
        const input = document.createElement('input');
        input.type = 'checkbox';
        input.checked = takenSets.has(set);
        input.addEventListener('change', () => {
          this.set('standard sets', (draft) => toggleStandardSet(draft, set, input.checked));
          this.render();
        });
        label.append(input, ` ${STANDARD_SET_TITLES[set]}`);
        fieldset.append(label);
      }
      box.append(fieldset);
    }
    const table = document.createElement('details');
    table.className = 'library-standards-box';
    table.innerHTML =
      `<summary>${standards.length} library standard${standards.length === 1 ? '' : 's'} the verdicts use</summary>` +
      (standards.length === 0
        ? '<p class="muted">No library standard from the sets ticked.</p>'
        : '<table class="mini library-standards"><caption class="visually-hidden">Library standards with their sources</caption><thead><tr><th scope="col">standard</th><th scope="col">limit [µg/m³]</th><th scope="col">allowed a year</th></tr></thead><tbody>' +
          standards
            .map(
              (s) =>
                `<tr><td>${escapeHtml(s.name)}<span class="source">${escapeHtml(s.kind)}; ${escapeHtml(s.source)}</span></td><td>${s.limit_ug_m3}</td><td>${s.allowedExceedances}</td></tr>`,
            )
            .join('') +
          '</tbody></table>');
    box.append(table);
    if (name === 'NOx') {
      const ratios = noxRatios(view);
      const ratioBox = document.createElement('div');
      ratioBox.className = 'nox-ratios';
      ratioBox.innerHTML = `<p class="explain">NOx is emitted, NO2 is assessed: the process contribution is multiplied by these shares. <span class="source">${escapeHtml(ratios.source)}</span></p>`;
      ratioBox.append(
        numberField({ schemaPath: ['assessment', 'noxToNo2', 'longTerm'], issuePath: 'assessment.noxToNo2.longTerm', label: 'NO2 share of NOx, long-term', value: ratios.longTerm, onChange: (value) => this.set('NOx ratio long-term', (draft) => setNoxRatio(draft, 'longTerm', value)) }),
        numberField({ schemaPath: ['assessment', 'noxToNo2', 'shortTerm'], issuePath: 'assessment.noxToNo2.shortTerm', label: 'NO2 share of NOx, short-term', value: ratios.shortTerm, onChange: (value) => this.set('NOx ratio short-term', (draft) => setNoxRatio(draft, 'shortTerm', value)) }),
      );
      if (ratios.own) {
        const reset = document.createElement('button');
        reset.type = 'button';
        reset.className = 'small';
        reset.textContent = 'Back to the default shares';
        reset.addEventListener('click', () => {
          this.set('NOx ratios default', (draft) => setNoxRatio(draft, 'longTerm', null));
          this.render();
        });
        ratioBox.append(reset);
      }
      box.append(ratioBox);
    }
    return box;
  }

  private weatherGroup(view: RawScenario): HTMLElement {
    const weather = (view.weather as Obj | undefined) ?? { kind: 'steady' };
    const kind = String(weather.kind ?? 'steady');
    const children: HTMLElement[] = [
      choiceField({
        issuePath: 'weather.kind',
        label: 'Kind of weather',
        value: kind,
        choices: [
          { value: 'steady', label: 'One steady state' },
          { value: 'hourly', label: 'Hourly series (CSV upload)' },
          { value: 'windRose', label: 'Wind rose table' },
          { value: 'screeningSet', label: 'Screening weather set (no met data needed)' },
        ],
        hint: WEATHER_KIND_HINTS[kind] ?? '',
        onChange: (value) => {
          this.set('weather kind', (draft) => {
            if (value === 'steady') draft.weather = { ...STEADY_DEFAULT };
            else if (value === 'screeningSet') draft.weather = { ...SCREENING_SET_DEFAULT };
            else if (value === 'hourly') draft.weather = { kind: 'hourly', hours: [{ time: '2026-01-01T00:00Z', windSpeed_m_s: 5, windFrom_deg: 250, stability: 'D' }] };
            else draft.weather = { kind: 'windRose', sectorWidth_deg: 30, cells: [{ windFrom_deg: 240, windSpeed_m_s: 5, stability: 'D', frequency: 1 }], rain_mm_h: 0, airTemperature_K: 283.15, anemometerHeight_m: 10 };
          });
          // after the edit (the form of the new kind reads the edited scenario)
          this.render();
        },
      }),
    ];
    const setW = (field: string) => (value: unknown) =>
      this.set(`weather ${field}`, (draft) => {
        const target = draft.weather as Obj;
        if (value === null) delete target[field];
        else target[field] = value;
      });
    const w = (field: string, label: string, extra: Partial<Parameters<typeof numberField>[0]> = {}) =>
      numberField({ schemaPath: ['weather', kind, field], issuePath: `weather.${field}`, label, value: weather[field], onChange: setW(field), ...extra });
    if (kind === 'steady') {
      children.push(
        w('windSpeed_m_s', 'Wind speed'),
        w('windFrom_deg', 'Wind from'),
        choiceField({ issuePath: 'weather.stability', label: 'Stability class', value: String(weather.stability ?? 'D'), choices: STABILITY_CHOICES, hint: 'Pasquill class: how strongly the air mixes vertically', onChange: setW('stability') }),
        w('mixingHeight_m', 'Mixing height', { nullable: true, emptyMeaning: 'screening default for the class' }),
        w('rain_mm_h', 'Rain rate'),
        w('airTemperature_K', 'Air temperature'),
        w('anemometerHeight_m', 'Anemometer height'),
      );
    } else if (kind === 'hourly') {
      children.push(this.csvUpload(weather));
    } else if (kind === 'screeningSet') {
      const sectors = typeof weather.sectors === 'number' ? weather.sectors : SCREENING_SET_DEFAULT.sectors;
      const { pairs, states } = screeningStateCount(sectors);
      const about = document.createElement('div');
      about.className = 'set-about';
      about.dataset.testid = 'screening-set-about';
      about.innerHTML =
        `<p>${pairs} stability-class and wind-speed pairs from each of ${sectors} directions: ${states} steady states, one run. ` +
        'The result is the highest hourly process contribution at each place, an upper bound of every annual mean and percentile: ' +
        'a pass on it is a pass; a fail means an hourly series is needed to decide.</p>' +
        `<p class="source">${escapeHtml(SCREENING_SET_ORIGIN)}</p>`;
      children.push(
        about,
        w('sectors', 'Direction sectors', { step: '1' }),
        w('rain_mm_h', 'Rain rate'),
        w('airTemperature_K', 'Air temperature'),
        w('anemometerHeight_m', 'Anemometer height'),
      );
    } else {
      children.push(w('sectorWidth_deg', 'Sector width'), this.roseTable(weather), w('rain_mm_h', 'Rain rate'), w('airTemperature_K', 'Air temperature'), w('anemometerHeight_m', 'Anemometer height'));
    }
    return fieldGroup('Weather', 'Sets where the plume goes and how fast it spreads; the preview follows one state of it.', children);
  }

  private csvUpload(weather: Obj): HTMLElement {
    const wrapper = document.createElement('div');
    wrapper.className = 'field';
    wrapper.dataset.issuePath = 'weather.hours';
    const hours = (weather.hours as Obj[] | undefined) ?? [];
    wrapper.innerHTML =
      '<label for="weather-csv">Hourly weather CSV</label>' +
      '<input id="weather-csv" type="file" accept=".csv,text/csv" aria-describedby="weather-csv-hint weather-csv-error" />' +
      '<div id="weather-csv-hint" class="hint">columns time, windSpeed_m_s, windFrom_deg and optionally stability, mixingHeight_m, rain_mm_h, airTemperature_K, anemometerHeight_m, cloudCover_oktas; each time marks the start of its hour</div>' +
      '<div id="weather-csv-error" class="error" role="alert"></div>' +
      `<div class="csv-preview" data-testid="csv-preview">${this.csvSummary || hoursSummary(hours)}</div>`;
    const input = wrapper.querySelector('input') as HTMLInputElement;
    input.addEventListener('change', async () => {
      const file = input.files?.[0];
      if (!file) return;
      const read = readWeatherUpload(await file.text(), file.name);
      const errorSlot = wrapper.querySelector('.error') as HTMLElement;
      if (!read.ok) {
        errorSlot.textContent = read.errorText;
        return;
      }
      errorSlot.textContent = '';
      this.csvSummary = read.summaryHtml;
      const hoursRead = read.hours;
      this.set('weather hourly series', (draft) => {
        draft.weather = { kind: 'hourly', hours: hoursRead };
      });
      this.render();
    });
    return wrapper;
  }

  private roseTable(weather: Obj): HTMLElement {
    const wrapper = document.createElement('div');
    wrapper.className = 'field';
    wrapper.dataset.issuePath = 'weather.cells';
    const cells = (weather.cells as Obj[] | undefined) ?? [];
    const text = [ROSE_HEADER, ...cells.map((c) => `${c.windFrom_deg},${c.windSpeed_m_s},${c.stability},${c.frequency}`)].join('\n');
    wrapper.innerHTML =
      '<label for="rose-table">Wind rose cells</label>' +
      '<textarea id="rose-table" rows="8" spellcheck="false" aria-describedby="rose-hint rose-error"></textarea>' +
      `<div id="rose-hint" class="hint">one row per cell: ${ROSE_HEADER} (frequency as a fraction; all rows sum to 1); the preview shows the most frequent cell</div>` +
      '<div id="rose-error" class="error" role="alert"></div>';
    const area = wrapper.querySelector('textarea') as HTMLTextAreaElement;
    area.value = text;
    area.addEventListener('change', () => {
      const { cells: parsed, problems } = parseRoseTable(area.value);
      (wrapper.querySelector('.error') as HTMLElement).textContent = problems.join('\n');
      if (problems.length === 0) this.set('wind rose cells', (draft) => void ((draft.weather as Obj).cells = parsed));
    });
    return wrapper;
  }

  private siteAndDomainGroup(view: RawScenario): HTMLElement {
    const site = (view.site as Obj | undefined) ?? {};
    const domain = view.domain as Obj | undefined;
    const children: HTMLElement[] = [
      choiceField({
        issuePath: 'site.landUse',
        label: 'Land use around the site',
        value: String(site.landUse ?? 'rural'),
        choices: [
          { value: 'rural', label: 'Rural' },
          { value: 'urban', label: 'Urban' },
        ],
        hint: 'urban roughness mixes plumes faster near the ground',
        onChange: (value) => this.set('land use', (draft) => void ((draft.site as Obj).landUse = value)),
      }),
      choiceField({
        issuePath: 'domain',
        label: 'Domain',
        value: domain === undefined ? 'derived' : 'given',
        choices: [
          { value: 'derived', label: 'Derived from the sources and receptors' },
          { value: 'given', label: 'Given below' },
        ],
        hint: 'the square of ground the grid covers, centred on the site',
        onChange: (value) => {
          this.set('domain choice', (draft) => {
            if (value === 'derived') delete draft.domain;
            else draft.domain = { halfWidth_m: 5000, spacing_m: 50, height_m: 1000, layers: 25 };
          });
          this.render();
        },
      }),
    ];
    if (domain !== undefined) {
      const setD = (field: string) => (value: unknown) => this.set(`domain ${field}`, (draft) => void ((draft.domain as Obj)[field] = value));
      for (const [field, label] of [
        ['halfWidth_m', 'Half-width'],
        ['spacing_m', 'Cell size'],
        ['height_m', 'Grid top'],
        ['layers', 'Vertical layers'],
      ] as const) {
        children.push(numberField({ schemaPath: ['domain', field], issuePath: `domain.${field}`, label, value: domain[field], onChange: setD(field) }));
      }
    }
    return fieldGroup('Site and domain', 'Finer cells resolve the near field better and cost more time and memory in a grid run.', children);
  }

  private solverGroup(view: RawScenario): HTMLElement {
    const solver = (view.solver as Obj | undefined) ?? {};
    const dispersion = (view.dispersion as Obj | undefined) ?? { kind: 'stability', curves: 'briggs' };
    return fieldGroup('Solver', 'How the run computes the footprint; the preview is always the quick Gaussian plume.', [
      choiceField({
        issuePath: 'solver.mode',
        label: 'Run mode',
        value: String(solver.mode ?? 'grid'),
        choices: [
          { value: 'grid', label: 'Grid: advection-diffusion on the local grid' },
          { value: 'gaussian', label: 'Gaussian plume (quick reference)' },
        ],
        hint: 'the grid solver follows the wind profile and the mixing lid cell by cell',
        onChange: (value) => this.set('run mode', (draft) => void ((draft.solver ??= {}) as Obj, ((draft.solver as Obj).mode = value))),
      }),
      choiceField({
        issuePath: 'dispersion.curves',
        label: 'Dispersion curves (Gaussian)',
        value: String(dispersion.curves ?? 'briggs'),
        choices: [
          { value: 'briggs', label: 'Briggs (rural or urban by land use)' },
          { value: 'pasquill-gifford', label: 'Pasquill-Gifford' },
        ],
        hint: 'how plume width grows with distance in the Gaussian preview and mode',
        onChange: (value) => this.set('dispersion curves', (draft) => void (draft.dispersion = { kind: 'stability', curves: value })),
      }),
      choiceField({
        issuePath: 'windProfile',
        label: 'Wind profile',
        value: String(view.windProfile ?? 'powerLaw'),
        choices: [
          { value: 'powerLaw', label: 'Power law (stronger wind aloft)' },
          { value: 'uniform', label: 'Uniform with height' },
        ],
        hint: 'the wind a tall stack\'s plume travels in',
        onChange: (value) => this.set('wind profile', (draft) => void (draft.windProfile = value)),
      }),
    ]);
  }

  private assessmentGroup(view: RawScenario): HTMLElement {
    const assessment = view.assessment as Obj | undefined;
    const standards = (assessment?.standards as Obj[] | undefined) ?? [];
    const children: HTMLElement[] = [];
    if (assessment === undefined) {
      const add = document.createElement('button');
      add.type = 'button';
      add.textContent = 'Add background and standards';
      add.addEventListener('click', () => {
        this.set('assessment', (draft) => void (draft.assessment = { background_ug_m3: 0, standards: [] }));
        this.render();
      });
      children.push(add);
    } else {
      children.push(
        numberField({
          schemaPath: ['assessment', 'background_ug_m3'],
          issuePath: 'assessment.background_ug_m3',
          label: 'Background',
          value: assessment.background_ug_m3,
          onChange: (value) => this.set('background', (draft) => void ((draft.assessment as Obj).background_ug_m3 = value)),
        }),
      );
      standards.forEach((standard, index) => {
        const setS = (field: string) => (value: unknown) => this.set(`standard ${field}`, (draft) => void (((draft.assessment as Obj).standards as Obj[])[index][field] = value));
        const base = `assessment.standards[${index}]`;
        const box = document.createElement('div');
        box.className = 'standard';
        box.append(
          textField({ issuePath: `${base}.name`, label: `Standard ${index + 1}: name`, value: standard.name, onChange: setS('name') }),
          numberField({ schemaPath: ['assessment', 'standards', 'limit_ug_m3'], issuePath: `${base}.limit_ug_m3`, label: 'Limit', value: standard.limit_ug_m3, onChange: setS('limit_ug_m3') }),
          numberField({ schemaPath: ['assessment', 'standards', 'averaging_h'], issuePath: `${base}.averaging_h`, label: 'Averaging period', value: standard.averaging_h, onChange: setS('averaging_h') }),
          numberField({ schemaPath: ['assessment', 'standards', 'allowedExceedances'], issuePath: `${base}.allowedExceedances`, label: 'Allowed exceedances a year', value: standard.allowedExceedances, step: '1', onChange: setS('allowedExceedances') }),
        );
        children.push(box);
      });
      const add = document.createElement('button');
      add.type = 'button';
      add.textContent = 'Add a standard';
      add.addEventListener('click', () => {
        this.set('new standard', (draft) => void ((draft.assessment as Obj).standards as Obj[]).push({ name: `Standard ${standards.length + 1}`, limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0 }));
        this.render();
      });
      children.push(add);
    }
    return fieldGroup('Background and standards', 'The process contribution is added to the background and compared with each standard\'s limit.', children);
  }
}

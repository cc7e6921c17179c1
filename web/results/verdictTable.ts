/**
 * The receptor table with the screening verdicts, and the footprint areas per level, as HTML. Pure (no
 * DOM), so the tests read the tables as text.
 *
 * A run's verdicts come from the server (summary.json's `verdicts`, written by the solver's
 * solver/assessment/verdicts.ts and rounded there). The preview has none: it is one weather state, so
 * the page forms the same figures with the solver's own `pointVerdict` on the basis of one weather hour,
 * which the solver calls indicative. Both tables have the same columns and the same rows (the point of
 * maximum impact, then each receptor), so the column keeps its height when a run's figures replace the
 * preview's.
 */
import { pointVerdict, type PointVerdict, type ScreenOutcome } from '../../solver/assessment/verdicts.ts';
import type { LevelArea } from '../../solver/assessment/footprintAreas.ts';
import type { ScreeningThresholds } from '../../scenarios/format/types.ts';
import { formatConcentration } from '../colour/legendLevels.ts';
import { escapeHtml } from '../map/escapeHtml.ts';
import { offsetFromSite } from '../map/offsetWords.ts';

/** A standard's verdicts as summary.json holds them (the fields the table reads). */
export interface VerdictStandard {
  name: string;
  limit_ug_m3: number;
  term: 'long' | 'short';
  basisNote: string;
  reason?: string;
  conversion?: string | null;
  maximum?: PointVerdict & { where: 'ground' | 'receptors'; searched?: string; x_m: number; y_m: number; receptorId?: string };
  receptors?: (PointVerdict & { id: string })[];
}

export interface VerdictSet {
  label: string;
  thresholds: ScreeningThresholds;
  background_ug_m3: number;
  noxToNo2: { longTerm: number; shortTerm: number; source: string } | null;
  standards: VerdictStandard[];
}

/** Words for each outcome of the screen (our own; the solver's names are for machines). */
export const OUTCOME_WORDS: Readonly<Record<ScreenOutcome, { text: string; css: string; meaning: string }>> = {
  screenedOut: { text: 'insignificant', css: 'ok', meaning: 'screened out: below the threshold of the screen' },
  notScreenedOut: { text: 'assess further', css: 'bad', meaning: 'not screened out: a detailed assessment is the usual next step' },
  undetermined: { text: 'undecided', css: 'maybe', meaning: 'an upper bound failed the screen: run an hourly series to decide' },
  indicative: { text: 'indicative', css: 'info', meaning: 'one weather hour: no screen decision' },
};

/** A percentage with two significant figures (decision figures, as the server rounds them). */
export function formatPercent(percent: number): string {
  if (!Number.isFinite(percent)) return '–';
  if (percent === 0) return '0 %';
  if (Math.abs(percent) < 0.01) return '< 0.01 %';
  return `${Number(percent.toPrecision(2))} %`;
}

/** Where the maximum is, in a few words: local metres from the site, and what was searched. */
function maximumPlace(maximum: NonNullable<VerdictStandard['maximum']>, receptorNames: ReadonlyMap<string, string>): string {
  if (maximum.where === 'receptors') return `maximum: ${escapeHtml(receptorNames.get(maximum.receptorId ?? '') ?? maximum.receptorId ?? '')}`;
  const east = Math.round(maximum.x_m);
  const north = Math.round(maximum.y_m);
  const title = `the point of maximum impact on the ground, ${offsetFromSite(maximum.x_m, maximum.y_m)}${maximum.searched ? `, ${maximum.searched}` : ''}`;
  return `<span title="${escapeHtml(title)}">maximum <span class="where">x ${east}, y ${north} m</span></span>`;
}

function row(place: string, verdict: PointVerdict | undefined, testId: string, header = false): string {
  const cells =
    verdict === undefined
      ? '<td>…</td><td>…</td><td>…</td><td>…</td><td>…</td><td>…</td>'
      : `<td>${formatConcentration(verdict.pc_ug_m3)}</td><td>${formatPercent(verdict.pcPercentOfStandard)}</td>` +
        `<td>${formatConcentration(verdict.background_ug_m3)}</td><td>${formatConcentration(verdict.pec_ug_m3)}</td>` +
        `<td>${formatPercent(verdict.pecPercentOfStandard)}</td>` +
        `<td class="verdict verdict-${OUTCOME_WORDS[verdict.outcome].css}" title="${OUTCOME_WORDS[verdict.outcome].meaning}">${OUTCOME_WORDS[verdict.outcome].text}</td>`;
  return `<tr data-testid="${testId}"${header ? ' class="maximum-row"' : ''}><th scope="row">${place}</th>${cells}</tr>`;
}

/**
 * The verdict table of one standard: the point of maximum impact first, then every receptor.
 *
 * @param standard the standard's verdicts (or its reason for having none)
 * @param receptors the scenario's receptors in order (id and name)
 * @param origin what the figures are from, e.g. "grid run, revision 3" or "Gaussian preview"
 */
export function verdictTableHtml(standard: VerdictStandard, receptors: readonly { id: string; name: string }[], origin: string): string {
  const names = new Map(receptors.map((r) => [r.id, r.name]));
  const head =
    `<table class="results verdicts" data-testid="verdict-table"><caption>${escapeHtml(origin)}; µg/m³ and % of the ${formatConcentration(standard.limit_ug_m3)} µg/m³ limit</caption>` +
    '<thead><tr><th scope="col">place</th><th scope="col"><abbr title="process contribution [µg/m³]">PC</abbr></th><th scope="col"><abbr title="PC as % of the limit">%</abbr></th>' +
    '<th scope="col"><abbr title="background [µg/m³]">bkg</abbr></th><th scope="col"><abbr title="predicted environmental concentration, PC + background [µg/m³]">PEC</abbr></th><th scope="col"><abbr title="PEC as % of the limit">%</abbr></th><th scope="col">screen</th></tr></thead><tbody>';
  if (standard.maximum === undefined && standard.receptors === undefined) {
    const body =
      `<tr><th scope="row">maximum</th><td colspan="6" class="no-figure">no figure</td></tr>` +
      receptors.map((r) => `<tr><th scope="row">${escapeHtml(r.name)}</th><td colspan="6" class="no-figure">no figure</td></tr>`).join('');
    return `${head}${body}</tbody></table><p class="hint verdict-note" data-testid="verdict-note">${escapeHtml(standard.reason ?? standard.basisNote)}</p>`;
  }
  const byId = new Map((standard.receptors ?? []).map((v) => [v.id, v]));
  const body =
    (standard.maximum ? row(maximumPlace(standard.maximum, names), standard.maximum, 'verdict-maximum', true) : row('maximum', undefined, 'verdict-maximum', true)) +
    receptors.map((r) => row(escapeHtml(r.name), byId.get(r.id), `verdict-${escapeHtml(r.id)}`)).join('');
  const note = [standard.basisNote, standard.conversion ?? ''].filter(Boolean).join('; ');
  return `${head}${body}</tbody></table><p class="hint verdict-note" data-testid="verdict-note">${escapeHtml(note)}</p>`;
}

/** The screen's thresholds and background, in one line, beside every verdict table. */
export function thresholdsLine(set: Pick<VerdictSet, 'label' | 'thresholds' | 'background_ug_m3' | 'noxToNo2'>): string {
  const t = set.thresholds;
  return (
    `Screen: PC under ${t.pcLongTerm_pct} % of a long-term or ${t.pcShortTerm_pct} % of a short-term limit is insignificant; ` +
    `else, for a long-term limit, PEC under ${t.pecLongTerm_pct} %. Background ${formatConcentration(set.background_ug_m3)} µg/m³.` +
    (set.noxToNo2 ? ` NO2 = ${set.noxToNo2.longTerm} (long-term), ${set.noxToNo2.shortTerm} (short-term) × NOx.` : '') +
    ` ${set.label}.`
  );
}

/**
 * The preview's figures for one standard: the solver's point verdict on the basis of one weather hour
 * (indicative), at the preview's peak and at each receptor, with the standard's PC factor (NOx to NO2).
 */
export function previewVerdicts(
  standard: { name: string; limit_ug_m3: number; term: 'long' | 'short'; pcFactor: number; conversion: string | null },
  peak: { value_ug_m3: number; x_m: number; y_m: number },
  receptorValues: readonly number[],
  receptors: readonly { id: string }[],
  background_ug_m3: number,
  thresholds: ScreeningThresholds,
): VerdictStandard {
  const at = (value: number) => pointVerdict(Math.max(0, standard.pcFactor * value), standard, background_ug_m3, thresholds, 'oneWeatherHour');
  return {
    name: standard.name,
    limit_ug_m3: standard.limit_ug_m3,
    term: standard.term,
    basisNote:
      'preview of the hourly PC of one weather state: whether it is the worst hour of a year, and how often it occurs, is unknown',
    conversion: standard.conversion,
    maximum: { where: 'ground', x_m: peak.x_m, y_m: peak.y_m, ...at(peak.value_ug_m3) },
    receptors: receptors.map((r, n) => ({ id: r.id, ...at(receptorValues[n] ?? 0) })),
  };
}

/**
 * The footprint areas per level: the ground at or above each level, the farthest reach from any source,
 * and the receptors inside. A region that reaches the grid's edge is a lower bound (marked ≥).
 */
export function areasTableHtml(areas: readonly LevelArea[], receptors: readonly { id: string; name: string }[], origin: string, spacing_m: number): string {
  const names = new Map(receptors.map((r) => [r.id, r.name]));
  const bound = (area: LevelArea) => (area.reachesGridEdge ? '≥ ' : '');
  return (
    `<table class="mini areas-table" data-testid="areas-table"><caption>Ground at or above each level: ${escapeHtml(origin)}, ${spacing_m} m cells</caption>` +
    '<thead><tr><th scope="col">level [µg/m³]</th><th scope="col">area [ha]</th><th scope="col">farthest [m]</th><th scope="col">receptors inside</th></tr></thead><tbody>' +
    areas
      .map((area) => {
        const reach = Math.max(-1, ...area.farthest.map((f) => f.distance_m ?? -1));
        const inside = area.receptorsInside.map((id) => names.get(id) ?? id);
        return (
          `<tr><td>${formatConcentration(area.level_ug_m3)}</td><td>${bound(area)}${formatArea_ha(area.area_ha)}</td>` +
          `<td>${reach < 0 ? '–' : `${bound(area)}${Number(reach.toPrecision(2))}`}</td>` +
          `<td title="${escapeHtml(inside.join(', '))}">${inside.length}</td></tr>`
        );
      })
      .join('') +
    '</tbody></table>' +
    (areas.some((a) => a.reachesGridEdge) ? '<p class="hint">≥: the level reaches the edge of the grid; the true area is larger.</p>' : '<p class="hint">Every level closes inside the grid.</p>')
  );
}

/** The verdict words and what each means, for the line under the table. */
export function outcomeKeyHtml(): string {
  return (Object.keys(OUTCOME_WORDS) as ScreenOutcome[])
    .map((key) => `<span class="verdict-${OUTCOME_WORDS[key].css}"><b>${OUTCOME_WORDS[key].text}</b></span>: ${OUTCOME_WORDS[key].meaning}`)
    .join('; ');
}

function formatArea_ha(ha: number): string {
  if (ha === 0) return '0';
  return ha >= 100 ? String(Math.round(ha)) : String(Number(ha.toPrecision(2)));
}

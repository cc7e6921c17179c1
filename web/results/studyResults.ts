/**
 * Sweep and stack-height results as the page shows them: a table and a chart from the run's JSON
 * (`sweep.json`, format plumeplan.sweep/1; `stack-height.json`, plumeplan.stackHeight/1, written by
 * server/writers/sweepFiles.ts), with the caution the file carries. Pure: no DOM.
 */
import { formatConcentration } from '../colour/legendLevels.ts';
import { escapeHtml } from '../map/escapeHtml.ts';
import { offsetFromSite } from '../map/offsetWords.ts';
import { OUTCOME_WORDS } from './verdictTable.ts';
import type { ScreenOutcome } from '../../solver/assessment/verdicts.ts';
import { lineChartSvg, type LineSeries } from './lineChart.ts';

export interface SweepFile {
  format: string;
  parameter: string;
  unit: string;
  description: string;
  sourceId: string | null;
  statistic: string;
  members: {
    value: number;
    groundMax_ug_m3: number;
    receptors: { id: string; pc_ug_m3: number }[];
    standards: { name: string; max_ug_m3: number }[];
  }[];
  notes: string[];
  caution: string;
}

export interface StackHeightFile {
  format: string;
  found: boolean;
  height_m: number | null;
  bracket_m: [number, number] | null;
  tolerance_m: number;
  target_ug_m3: number;
  targetBasis: string;
  sourceId: string;
  at: 'ground' | string[];
  standard: string | null;
  message: string;
  monotone: boolean;
  curve: { height_m: number; pc_ug_m3: number; meetsTarget: boolean }[];
  downwash: { flagged: boolean; message: string } | null;
  caution: string;
}

/** Most receptor lines a chart draws (beyond them the table still lists every receptor). */
const MAX_CHART_RECEPTORS = 4;

/** A parameter's description as a column heading: "a point source's stack height" -> "stack height". */
export function shortParameterName(description: string): string {
  return description.replace(/\s*\(.*\)$/, '').replace(/^(an?|the)\s+/i, '').replace(/^[\w -]*?source's\s+/i, '');
}

/** The sweep's table and chart. */
export function sweepResultHtml(sweep: SweepFile, receptorNames: ReadonlyMap<string, string>): string {
  const name = (id: string) => receptorNames.get(id) ?? id;
  const receptorIds = sweep.members[0]?.receptors.map((r) => r.id) ?? [];
  const standardNames = sweep.members[0]?.standards.map((s) => s.name) ?? [];
  const xLabel = `${sweep.description} [${sweep.unit}]`;
  const series: LineSeries[] = [
    { name: 'highest on the ground', points: sweep.members.map((m) => ({ x: m.value, y: m.groundMax_ug_m3 })) },
    ...receptorIds.slice(0, MAX_CHART_RECEPTORS).map((id, r) => ({ name: name(id), points: sweep.members.map((m) => ({ x: m.value, y: m.receptors[r]?.pc_ug_m3 ?? 0 })) })),
  ];
  const chart = lineChartSvg(series, { title: `Process contribution against ${sweep.description}`, xLabel, yLabel: 'PC [µg/m³]' });
  const table =
    `<table class="results study-table" data-testid="sweep-table"><caption>${escapeHtml(sweep.statistic)} [µg/m³] for each value of ${escapeHtml(sweep.description)}${sweep.sourceId ? ` (${escapeHtml(sweep.sourceId)})` : ''}</caption>` +
    `<thead><tr><th scope="col">${escapeHtml(shortParameterName(sweep.description))} [${escapeHtml(sweep.unit)}]</th><th scope="col">ground max.</th>` +
    receptorIds.map((id) => `<th scope="col">${escapeHtml(name(id))}</th>`).join('') +
    standardNames.map((s) => `<th scope="col">${escapeHtml(s)} max.</th>`).join('') +
    '</tr></thead><tbody>' +
    sweep.members
      .map(
        (m) =>
          `<tr><th scope="row">${m.value}</th><td>${formatConcentration(m.groundMax_ug_m3)}</td>` +
          m.receptors.map((r) => `<td>${formatConcentration(r.pc_ug_m3)}</td>`).join('') +
          m.standards.map((s) => `<td>${formatConcentration(s.max_ug_m3)}</td>`).join('') +
          '</tr>',
      )
      .join('') +
    '</tbody></table>';
  return (
    `<div class="chart-box">${chart}</div><div class="table-scroll" tabindex="0" role="region" aria-label="sweep figures (scrolls sideways)">${table}</div>` +
    (sweep.notes.length > 0 ? `<ul class="notes">${sweep.notes.map((note) => `<li>${escapeHtml(note)}</li>`).join('')}</ul>` : '') +
    `<p class="caution-inline" data-testid="study-caution">${escapeHtml(sweep.caution)}</p>`
  );
}

/** The stack-height answer, its curve as a table and a chart with the target and the answer. */
export function stackHeightResultHtml(result: StackHeightFile): string {
  const answer = result.found && result.height_m !== null ? `${result.height_m} m` : 'no height in the range meets the target';
  const chart = lineChartSvg([{ name: `highest PC ${result.at === 'ground' ? 'on the ground' : 'at the receptors'}`, points: result.curve.map((p) => ({ x: p.height_m, y: p.pc_ug_m3 })) }], {
    title: `Highest process contribution against the height of ${result.sourceId}`,
    xLabel: `height of ${result.sourceId} [m]`,
    yLabel: 'PC [µg/m³]',
    reference: { y: result.target_ug_m3, label: `target ${formatConcentration(result.target_ug_m3)}` },
    marker: result.found && result.height_m !== null ? { x: result.height_m, label: `${result.height_m} m` } : undefined,
  });
  const table =
    '<table class="results study-table" data-testid="stack-height-table"><caption>Every height run</caption>' +
    '<thead><tr><th scope="col">height [m]</th><th scope="col">highest PC [µg/m³]</th><th scope="col">meets the target</th></tr></thead><tbody>' +
    [...result.curve]
      .sort((a, b) => a.height_m - b.height_m)
      .map((p) => `<tr><th scope="row">${p.height_m}</th><td>${formatConcentration(p.pc_ug_m3)}</td><td>${p.meetsTarget ? 'yes' : 'no'}</td></tr>`)
      .join('') +
    '</tbody></table>';
  return (
    `<p class="study-answer" data-testid="stack-height-answer"><b>Lowest height meeting the target: ${escapeHtml(answer)}</b> ` +
    `(target ${formatConcentration(result.target_ug_m3)} µg/m³, ${escapeHtml(result.targetBasis)}; within ${result.tolerance_m} m).</p>` +
    `<p class="hint">${escapeHtml(result.message)}${result.monotone ? '' : ' The curve is not monotone: check the heights above the answer.'}</p>` +
    (result.downwash?.flagged ? `<p class="problem">${escapeHtml(result.downwash.message)}</p>` : '') +
    `<div class="chart-box">${chart}</div><div class="table-scroll" tabindex="0" role="region" aria-label="height curve (scrolls sideways)">${table}</div>` +
    `<p class="caution-inline" data-testid="study-caution">${escapeHtml(result.caution)}</p>`
  );
}

export interface SitingFile {
  format: string;
  caution: string;
  statistic: string;
  map: { meaning: string };
  stack: { id: string };
  standard: { name: string; limit_ug_m3: number } | string | null;
  best: { id?: string; x_m: number; y_m: number; lon: number; lat: number; combined_ug_m3: number };
  candidates: {
    rank: number;
    id: string;
    x_m: number;
    y_m: number;
    combined_ug_m3: number;
    highestPc_ug_m3: number;
    highestReceptor: string;
    percentOfStandard: number | null;
    verdict: string | null;
  }[];
}

/** Most candidates the page lists (candidates.csv holds them all). */
const MAX_LISTED_CANDIDATES = 12;

/** The siting answer: the best position and the ranked candidates. */
export function sitingResultHtml(siting: SitingFile, receptorNames: ReadonlyMap<string, string>): string {
  const listed = siting.candidates.slice(0, MAX_LISTED_CANDIDATES);
  const standardName = typeof siting.standard === 'string' ? siting.standard : (siting.standard?.name ?? null);
  return (
    `<p class="study-answer" data-testid="siting-answer"><b>Best position for ${escapeHtml(siting.stack.id)}: ${offsetFromSite(siting.best.x_m, siting.best.y_m)}</b> ` +
    `(lon ${siting.best.lon}, lat ${siting.best.lat}; ${formatConcentration(siting.best.combined_ug_m3)} µg/m³).</p>` +
    `<p class="hint">${escapeHtml(siting.map.meaning)}.</p>` +
    '<div class="table-scroll" tabindex="0" role="region" aria-label="candidate positions, scrolls sideways"><table class="results study-table" data-testid="siting-table">' +
    `<caption>The ${listed.length} best of ${siting.candidates.length} candidate positions</caption>` +
    '<thead><tr><th scope="col">rank</th><th scope="col">position [m]</th><th scope="col">combined [µg/m³]</th><th scope="col">highest PC at</th>' +
    (standardName ? `<th scope="col">% of ${escapeHtml(standardName)}</th>` : '') +
    '</tr></thead><tbody>' +
    listed
      .map(
        (c) =>
          `<tr><th scope="row">${c.rank}</th><td>x ${Math.round(c.x_m)}, y ${Math.round(c.y_m)}</td><td>${formatConcentration(c.combined_ug_m3)}</td>` +
          `<td>${escapeHtml(receptorNames.get(c.highestReceptor) ?? c.highestReceptor)} (${formatConcentration(c.highestPc_ug_m3)})</td>` +
          (standardName ? `<td>${c.percentOfStandard === null ? '–' : `${c.percentOfStandard} %`}</td>` : '') +
          '</tr>',
      )
      .join('') +
    '</tbody></table></div>' +
    `<p class="caution-inline" data-testid="study-caution">${escapeHtml(siting.caution)}</p>`
  );
}

export interface ComparisonFile {
  format: string;
  a: { label: string };
  b: { label: string };
  levels: { basis: string; areas: { level_ug_m3: number; a_m2: number; b_m2: number; change_m2: number; change_pct: number | null }[] };
  verdictChanges: { standard: string; where: string; a: string; b: string; a_pc_ug_m3: number; b_pc_ug_m3: number }[];
  notes: string[];
  caution: string;
}

/** The screen's words for an outcome the server names (verdictTable.ts's), or the name itself when unknown. */
export function outcomeName(outcome: string): string {
  return escapeHtml(OUTCOME_WORDS[outcome as ScreenOutcome]?.text ?? outcome);
}

/** The server's comparison: each level's area in A and B, and every screening verdict that changes. */
export function comparisonResultHtml(comparison: ComparisonFile, receptorNames: ReadonlyMap<string, string>): string {
  const ha = (m2: number) => String(Number((m2 / 10_000).toPrecision(2)));
  const areas =
    '<table class="results mini" data-testid="compare-areas"><caption>Ground at or above each level [ha], B against A</caption>' +
    '<thead><tr><th scope="col">level [µg/m³]</th><th scope="col">A</th><th scope="col">B</th><th scope="col">B − A</th></tr></thead><tbody>' +
    comparison.levels.areas
      .map((l) => `<tr><td>${formatConcentration(l.level_ug_m3)}</td><td>${ha(l.a_m2)}</td><td>${ha(l.b_m2)}</td><td>${l.change_m2 > 0 ? '+' : ''}${ha(l.change_m2)}${l.change_pct === null ? '' : ` (${l.change_pct > 0 ? '+' : ''}${l.change_pct} %)`}</td></tr>`)
      .join('') +
    '</tbody></table>';
  const verdicts =
    comparison.verdictChanges.length === 0
      ? '<p class="hint" data-testid="compare-verdicts">No screening verdict changes between A and B.</p>'
      : '<ul class="notes" data-testid="compare-verdicts">' +
        comparison.verdictChanges
          .map((v) => {
            const where = v.where === 'maximum' ? 'the point of maximum impact' : (receptorNames.get(v.where) ?? v.where);
            return `<li>${escapeHtml(v.standard)} at ${escapeHtml(where)}: ${outcomeName(v.a)} (A, ${formatConcentration(v.a_pc_ug_m3)} µg/m³) → ${outcomeName(v.b)} (B, ${formatConcentration(v.b_pc_ug_m3)} µg/m³)</li>`;
          })
          .join('') +
        '</ul>';
  return (
    `<p class="hint">A: ${escapeHtml(comparison.a.label)}; B: ${escapeHtml(comparison.b.label)}. ${escapeHtml(comparison.levels.basis)}.</p>` +
    areas +
    verdicts +
    (comparison.notes.length > 0 ? `<ul class="notes">${comparison.notes.map((n) => `<li>${escapeHtml(n)}</li>`).join('')}</ul>` : '') +
    `<p class="caution-inline">${escapeHtml(comparison.caution)}</p>`
  );
}

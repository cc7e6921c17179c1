/**
 * Files of a sweep and of a stack-height search: a table (CSV, RFC 4180, machine-clean like
 * receptors.csv, so its caution travels in the JSON beside it), an SVG chart of PC against the parameter
 * (the caution written under the chart), and the JSON with everything and the caution.
 */
import type { StackHeightResult } from '../../solver/assessment/stackHeight.ts';
import type { SweepResult } from '../../solver/assessment/sweep.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { CONCENTRATION_SIGNIFICANT_FIGURES, roundSignificant } from './rounding.ts';

const concentration = (value: number): number => roundSignificant(value, CONCENTRATION_SIGNIFICANT_FIGURES);

/** One CSV field, quoted only where RFC 4180 needs it. */
function csvField(value: string | number | null): string {
  const text = value === null ? '' : String(value);
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

function csv(rows: (string | number | null)[][]): string {
  return rows.map((row) => row.map(csvField).join(',')).join('\r\n') + '\r\n';
}

/**
 * sweep.csv: one row per member: the value, the highest ground PC, then each receptor's PC and each
 * standard's highest PC.
 */
export function sweepCsv(sweep: SweepResult): string {
  const standards = sweep.members[0]?.standards.map((s) => s.name) ?? [];
  const header = [
    `${sweep.parameter}`,
    'ground_max_ug_m3',
    ...sweep.receptorIds.map((id) => `${id}_ug_m3`),
    ...standards.map((name) => `${name} max_ug_m3`),
  ];
  const rows = sweep.members.map((member) => [
    member.value,
    concentration(member.groundMax_ug_m3),
    ...member.receptors_ug_m3.map(concentration),
    ...member.standards.map((s) => concentration(s.max_ug_m3)),
  ]);
  return csv([header, ...rows]);
}

/** sweep.json: the sweep's figures, rounded, with the caution. */
export function sweepJson(sweep: SweepResult, scenarioName: string): Record<string, unknown> {
  return {
    format: 'plumeplan.sweep/1',
    scenario: scenarioName,
    parameter: sweep.parameter,
    unit: sweep.unit,
    description: sweep.description,
    sourceId: sweep.sourceId,
    statistic: sweep.statistic,
    receptorColumn: sweep.receptorColumn,
    method: sweep.method,
    runs: sweep.runs,
    members: sweep.members.map((member) => ({
      value: member.value,
      groundMax_ug_m3: concentration(member.groundMax_ug_m3),
      groundMaxAt: { x_m: Math.round(member.groundMaxAt.x_m * 10) / 10, y_m: Math.round(member.groundMaxAt.y_m * 10) / 10 },
      receptors: sweep.receptorIds.map((id, r) => ({ id, pc_ug_m3: concentration(member.receptors_ug_m3[r]) })),
      standards: member.standards.map((s) => ({ name: s.name, max_ug_m3: concentration(s.max_ug_m3) })),
    })),
    notes: sweep.notes,
    files: { table: 'sweep.csv', chart: 'sweep.svg' },
    caution: SCREENING_CAUTION,
  };
}

/** stack-height.csv: the curve, one row per height run. */
export function stackHeightCsv(result: StackHeightResult): string {
  return csv([
    ['height_m', 'pc_ug_m3', 'meets_target'],
    ...result.curve.map((point) => [point.height_m, concentration(point.pc_ug_m3), point.meetsTarget ? 'yes' : 'no']),
  ]);
}

/** stack-height.json: the answer, the curve and the caution. */
export function stackHeightJson(result: StackHeightResult, scenarioName: string, targetBasis: string): Record<string, unknown> {
  return {
    format: 'plumeplan.stackHeight/1',
    scenario: scenarioName,
    found: result.found,
    height_m: result.height_m,
    bracket_m: result.bracket,
    tolerance_m: result.tolerance_m,
    target_ug_m3: result.target_ug_m3,
    targetBasis,
    sourceId: result.sourceId,
    at: result.at,
    standard: result.standard,
    message: result.message,
    monotone: result.monotone,
    runs: result.runs,
    curve: result.curve.map((point) => ({ ...point, pc_ug_m3: concentration(point.pc_ug_m3) })),
    downwash: result.downwash,
    files: { table: 'stack-height.csv', chart: 'stack-height.svg' },
    caution: SCREENING_CAUTION,
  };
}

export interface ChartSeries {
  name: string;
  points: { x: number; y: number }[];
}

export interface LineChartOptions {
  title: string;
  /** a second, smaller line under the title (the scenario's name) */
  subtitle?: string;
  xLabel: string;
  yLabel: string;
  /** a horizontal line, e.g. the target */
  reference?: { y: number; label: string };
  /** a vertical line, e.g. the answer */
  marker?: { x: number; label: string };
}

/** Colours for the lines, chosen to stay apart for most colour vision (Okabe-Ito palette). */
const LINE_COLOURS = ['#000000', '#0072b2', '#d55e00', '#009e73', '#cc79a7', '#e69f00', '#56b4e9'];

function escapeXml(text: string): string {
  return text.replaceAll('&', '&amp;').replaceAll('<', '&lt;').replaceAll('>', '&gt;').replaceAll('"', '&quot;');
}

/** Round tick values across a range: 1-2-5 steps, about five of them. */
function ticks(min: number, max: number): number[] {
  if (!(max > min)) return [min];
  const rough = (max - min) / 5;
  const power = 10 ** Math.floor(Math.log10(rough));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= rough) ?? 10 * power;
  const out: number[] = [];
  for (let value = Math.ceil(min / step) * step; value <= max + step * 1e-9; value += step) out.push(Number(value.toPrecision(12)));
  return out;
}

/**
 * A line chart as SVG text: lines of PC against the parameter, optional target line and answer marker,
 * the caution under the plot.
 */
export function lineChartSvg(series: readonly ChartSeries[], options: LineChartOptions): string {
  const width = 760;
  const height = 480;
  const left = 80;
  const right = 190;
  const top = 60;
  const bottom = 110;
  const plotW = width - left - right;
  const plotH = height - top - bottom;
  const xs = series.flatMap((s) => s.points.map((p) => p.x));
  const ys = series.flatMap((s) => s.points.map((p) => p.y));
  if (options.reference) ys.push(options.reference.y);
  const xMin = Math.min(...xs);
  const xMax = Math.max(...xs) > xMin ? Math.max(...xs) : xMin + 1;
  const yMax = Math.max(...ys, 0) > 0 ? Math.max(...ys) * 1.05 : 1;
  const sx = (x: number) => left + ((x - xMin) / (xMax - xMin)) * plotW;
  const sy = (y: number) => top + plotH - (y / yMax) * plotH;
  const parts: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="sans-serif" font-size="12">`,
    `<title>${escapeXml(options.title)}</title>`,
    `<rect width="${width}" height="${height}" fill="#ffffff"/>`,
    `<text x="${left}" y="24" font-size="15" font-weight="bold">${escapeXml(options.title)}</text>`,
    ...(options.subtitle ? [`<text x="${left}" y="41" font-size="11" fill="#444">${escapeXml(options.subtitle)}</text>`] : []),
    `<line x1="${left}" y1="${top + plotH}" x2="${left + plotW}" y2="${top + plotH}" stroke="#333"/>`,
    `<line x1="${left}" y1="${top}" x2="${left}" y2="${top + plotH}" stroke="#333"/>`,
  ];
  for (const t of ticks(xMin, xMax)) {
    parts.push(`<line x1="${sx(t)}" y1="${top + plotH}" x2="${sx(t)}" y2="${top + plotH + 5}" stroke="#333"/>`);
    parts.push(`<text x="${sx(t)}" y="${top + plotH + 18}" text-anchor="middle">${t}</text>`);
  }
  for (const t of ticks(0, yMax)) {
    parts.push(`<line x1="${left - 5}" y1="${sy(t)}" x2="${left + plotW}" y2="${sy(t)}" stroke="#ddd"/>`);
    parts.push(`<text x="${left - 8}" y="${sy(t) + 4}" text-anchor="end">${t}</text>`);
  }
  parts.push(`<text x="${left + plotW / 2}" y="${top + plotH + 40}" text-anchor="middle">${escapeXml(options.xLabel)}</text>`);
  parts.push(`<text transform="translate(20 ${top + plotH / 2}) rotate(-90)" text-anchor="middle">${escapeXml(options.yLabel)}</text>`);
  if (options.reference) {
    const y = sy(options.reference.y);
    parts.push(`<line x1="${left}" y1="${y}" x2="${left + plotW}" y2="${y}" stroke="#d55e00" stroke-dasharray="6 4"/>`);
    parts.push(`<text x="${left + plotW - 4}" y="${y - 6}" text-anchor="end" fill="#d55e00">${escapeXml(options.reference.label)}</text>`);
  }
  if (options.marker) {
    const x = sx(options.marker.x);
    parts.push(`<line x1="${x}" y1="${top}" x2="${x}" y2="${top + plotH}" stroke="#009e73" stroke-dasharray="3 3"/>`);
    parts.push(`<text x="${x + 4}" y="${top + 12}" fill="#009e73">${escapeXml(options.marker.label)}</text>`);
  }
  series.forEach((s, k) => {
    const colour = LINE_COLOURS[k % LINE_COLOURS.length];
    const path = s.points.map((p, i) => `${i === 0 ? 'M' : 'L'}${sx(p.x).toFixed(1)} ${sy(p.y).toFixed(1)}`).join(' ');
    parts.push(`<path d="${path}" fill="none" stroke="${colour}" stroke-width="2"${k === 0 ? '' : ' stroke-dasharray="5 3"'}/>`);
    for (const p of s.points) parts.push(`<circle cx="${sx(p.x).toFixed(1)}" cy="${sy(p.y).toFixed(1)}" r="3" fill="${colour}"/>`);
    parts.push(`<line x1="${left + plotW + 15}" y1="${top + 10 + 18 * k}" x2="${left + plotW + 35}" y2="${top + 10 + 18 * k}" stroke="${colour}" stroke-width="2"/>`);
    parts.push(`<text x="${left + plotW + 40}" y="${top + 14 + 18 * k}">${escapeXml(s.name)}</text>`);
  });
  const words = SCREENING_CAUTION.split(' ');
  const lines: string[] = [];
  let line = '';
  for (const word of words) {
    if ((line + ' ' + word).length > 120) {
      lines.push(line);
      line = word;
    } else line = line === '' ? word : `${line} ${word}`;
  }
  lines.push(line);
  lines.forEach((text, i) => parts.push(`<text x="${left - 60}" y="${height - 50 + 14 * i}" font-size="10" fill="#444">${escapeXml(text)}</text>`));
  parts.push('</svg>');
  return `${parts.join('\n')}\n`;
}

/** sweep.svg: the highest ground PC and each receptor's PC against the parameter. */
export function sweepSvg(sweep: SweepResult, scenarioName: string): string {
  const series: ChartSeries[] = [
    { name: 'highest on the ground', points: sweep.members.map((m) => ({ x: m.value, y: m.groundMax_ug_m3 })) },
    ...sweep.receptorIds.map((id, r) => ({ name: id, points: sweep.members.map((m) => ({ x: m.value, y: m.receptors_ug_m3[r] })) })),
  ];
  return lineChartSvg(series, {
    title: `Process contribution against ${sweep.parameter}`,
    subtitle: scenarioName,
    xLabel: `${sweep.description}${sweep.sourceId ? ` (${sweep.sourceId})` : ''} [${sweep.unit}]`,
    yLabel: `process contribution, ${sweep.statistic} [ug/m3]`,
  });
}

/** stack-height.svg: the highest PC against stack height, the target and the answer. */
export function stackHeightSvg(result: StackHeightResult, scenarioName: string): string {
  return lineChartSvg([{ name: result.at === 'ground' ? 'highest on the ground' : `highest at ${result.at.join(', ')}`, points: result.curve.map((p) => ({ x: p.height_m, y: p.pc_ug_m3 })) }], {
    title: `Highest process contribution against the height of ${result.sourceId}`,
    subtitle: scenarioName,
    xLabel: 'stack height [m]',
    yLabel: `${result.standard ?? 'process contribution'} [ug/m3]`,
    reference: { y: result.target_ug_m3, label: `target ${result.target_ug_m3} ug/m3` },
    ...(result.height_m !== null ? { marker: { x: result.height_m, label: `${result.height_m} m` } } : {}),
  });
}

/**
 * A small line chart as SVG text, drawn by our own code: process contribution against a swept parameter
 * or a stack height, with an optional horizontal target and a vertical marker at the answer. Pure (no
 * DOM), so the tests read the SVG as text.
 */
import { escapeHtml } from '../map/escapeHtml.ts';

export interface LineSeries {
  name: string;
  points: readonly { x: number; y: number }[];
}

export interface LineChartOptions {
  /** what the chart shows, for screen readers (the SVG's title) */
  title: string;
  xLabel: string;
  yLabel: string;
  reference?: { y: number; label: string };
  marker?: { x: number; label: string };
  width?: number;
  height?: number;
}

/** Line colours of the page (sources terracotta, receptors teal, then ink, ochre, plum, moss, slate). */
export const SERIES_COLOURS = ['#a2472f', '#1f6f78', '#232833', '#b07d12', '#6b4c9a', '#4f7a28', '#7a8699'];

/** About five round ticks (1-2-5 steps) across [min, max]. */
export function niceTicks(min: number, max: number): number[] {
  if (!(Number.isFinite(min) && Number.isFinite(max))) return [];
  if (!(max > min)) return [min];
  const rough = (max - min) / 5;
  const power = 10 ** Math.floor(Math.log10(rough));
  // the round step nearest above three quarters of the rough one: five or six ticks, never two
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= 0.75 * rough) ?? 10 * power;
  const ticks: number[] = [];
  for (let value = Math.ceil(min / step - 1e-9) * step; value <= max + step * 1e-9; value += step) ticks.push(Number(value.toPrecision(12)));
  return ticks;
}

function label(value: number): string {
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude < 1e-3 || magnitude >= 1e5)) return value.toExponential(1);
  return String(Number(value.toPrecision(4)));
}

/**
 * The chart.
 *
 * @returns `<svg>` text with a title, axes with round ticks, one polyline and dots per series, a legend
 *   under the plot, and the reference and marker lines when given
 */
export function lineChartSvg(series: readonly LineSeries[], options: LineChartOptions): string {
  const width = options.width ?? 340;
  const legendRows = series.length;
  const height = (options.height ?? 210) + legendRows * 14;
  const left = 46;
  const right = 10;
  const top = 12;
  const bottom = 34 + legendRows * 14;
  const plotW = width - left - right;
  const plotH = height - top - bottom;
  const xs = series.flatMap((s) => s.points.map((p) => p.x)).concat(options.marker ? [options.marker.x] : []);
  const ys = series.flatMap((s) => s.points.map((p) => p.y)).concat(options.reference ? [options.reference.y] : [], [0]);
  let xMin = Math.min(...xs);
  let xMax = Math.max(...xs);
  if (!(xMax > xMin)) {
    xMin -= 1;
    xMax += 1;
  }
  const yMin = Math.min(...ys);
  const yMax = Math.max(Math.max(...ys) * 1.05, yMin + 1e-12);
  const yTicks = niceTicks(yMin, yMax);
  const px = (x: number) => left + ((x - xMin) / (xMax - xMin)) * plotW;
  const py = (y: number) => top + plotH - ((y - yMin) / (yMax - yMin)) * plotH;
  const parts: string[] = [];
  parts.push(`<rect x="${left}" y="${top}" width="${plotW}" height="${plotH}" fill="#fffdf8" stroke="#cfc8b8"/>`);
  for (const tick of yTicks) {
    const y = py(tick).toFixed(1);
    parts.push(`<line x1="${left}" x2="${left + plotW}" y1="${y}" y2="${y}" stroke="#ebe6da"/>`);
    parts.push(`<text x="${left - 4}" y="${y}" text-anchor="end" dominant-baseline="middle" font-size="10">${label(tick)}</text>`);
  }
  for (const tick of niceTicks(xMin, xMax)) {
    const x = px(tick).toFixed(1);
    parts.push(`<line x1="${x}" x2="${x}" y1="${top + plotH}" y2="${top + plotH + 4}" stroke="#4f5869"/>`);
    parts.push(`<text x="${x}" y="${top + plotH + 14}" text-anchor="middle" font-size="10">${label(tick)}</text>`);
  }
  parts.push(`<text x="${left + plotW / 2}" y="${top + plotH + 27}" text-anchor="middle" font-size="10.5">${escapeHtml(options.xLabel)}</text>`);
  parts.push(`<text transform="translate(11 ${top + plotH / 2}) rotate(-90)" text-anchor="middle" font-size="10.5">${escapeHtml(options.yLabel)}</text>`);
  if (options.reference) {
    const y = py(options.reference.y).toFixed(1);
    parts.push(`<line x1="${left}" x2="${left + plotW}" y1="${y}" y2="${y}" stroke="#9b2c2c" stroke-dasharray="5 3" stroke-width="1.5"/>`);
    parts.push(`<text x="${left + plotW - 3}" y="${Number(y) - 4}" text-anchor="end" font-size="10" fill="#9b2c2c">${escapeHtml(options.reference.label)}</text>`);
  }
  if (options.marker) {
    const x = px(options.marker.x).toFixed(1);
    parts.push(`<line x1="${x}" x2="${x}" y1="${top}" y2="${top + plotH}" stroke="#232833" stroke-dasharray="2 3"/>`);
    parts.push(`<text x="${Number(x) + 3}" y="${top + 11}" font-size="10">${escapeHtml(options.marker.label)}</text>`);
  }
  series.forEach((s, n) => {
    const colour = SERIES_COLOURS[n % SERIES_COLOURS.length];
    const points = [...s.points].sort((a, b) => a.x - b.x);
    parts.push(`<polyline fill="none" stroke="${colour}" stroke-width="1.8" points="${points.map((p) => `${px(p.x).toFixed(1)},${py(p.y).toFixed(1)}`).join(' ')}"/>`);
    for (const p of points) parts.push(`<circle cx="${px(p.x).toFixed(1)}" cy="${py(p.y).toFixed(1)}" r="2.4" fill="${colour}"/>`);
    const lx = left;
    const ly = top + plotH + 40 + n * 14;
    parts.push(`<line x1="${lx}" x2="${lx + 14}" y1="${ly - 3}" y2="${ly - 3}" stroke="${colour}" stroke-width="2"/>`);
    parts.push(`<text x="${lx + 18}" y="${ly}" font-size="10">${escapeHtml(s.name.length > 48 ? `${s.name.slice(0, 47)}…` : s.name)}</text>`);
  });
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="100%" role="img" aria-labelledby="chart-title-${hash(options.title)}" class="line-chart">` +
    `<title id="chart-title-${hash(options.title)}">${escapeHtml(options.title)}</title>` +
    `<g font-family="system-ui, sans-serif" fill="#232833">${parts.join('')}</g></svg>`
  );
}

function hash(text: string): string {
  let h = 0;
  for (let i = 0; i < text.length; i++) h = (h * 31 + text.charCodeAt(i)) | 0;
  return (h >>> 0).toString(36);
}

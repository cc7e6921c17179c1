/**
 * The legend of the concentration overlay: the colour ramp as a bar with its ticks, the units, the
 * statistic shown and where the field came from, and the isopleth levels drawn.
 */
import { type ColourScale, DifferenceScale, divergingColour, rampColour, rgbToHex } from '../colour/colourScale.ts';
import { formatConcentration, legendTicks } from '../colour/legendLevels.ts';
import { escapeHtml } from '../map/mapControls.ts';

export interface LegendContent {
  scale: ColourScale | DifferenceScale;
  /** e.g. "concentration, one steady weather state" */
  statistic: string;
  /** e.g. "Gaussian preview" or "grid run 12" */
  origin: string;
  height_m: number;
  isopleths_ug_m3: readonly number[];
}

/** Render the legend into an element (replacing what was there). */
export function renderLegend(element: HTMLElement, content: LegendContent | null): void {
  if (content === null) {
    element.innerHTML = '<p class="muted legend-empty">No field on the map yet.</p>';
    return;
  }
  const { scale } = content;
  if (scale instanceof DifferenceScale) {
    renderDifferenceLegend(element, content, scale);
    return;
  }
  const stops: string[] = [];
  for (let n = 0; n <= 10; n++) stops.push(`${rgbToHex(rampColour(n / 10))} ${n * 10}%`);
  const ticks = legendTicks(scale.floor, scale.ceiling, scale.kind);
  element.innerHTML =
    `<div class="legend-title">Ground-level ${escapeHtml(content.statistic)} <span class="unit">[µg/m³]</span></div>` +
    `<div class="legend-sub">${escapeHtml(content.origin)}, at ${content.height_m} m above ground, ${scale.kind === 'log' ? 'log' : 'linear'} scale</div>` +
    '<div class="legend-bar-wrap"><div class="legend-bar" role="img"></div><div class="legend-ticks"></div></div>' +
    `<div class="legend-range">below ${formatConcentration(scale.floor)} µg/m³ not shaded; top colour ${formatConcentration(scale.ceiling)} µg/m³ and above</div>` +
    (content.isopleths_ug_m3.length > 0
      ? `<div class="legend-isopleths">Isopleths at ${content.isopleths_ug_m3.map(formatConcentration).join(', ')} µg/m³</div>`
      : '');
  const bar = element.querySelector('.legend-bar') as HTMLElement;
  bar.style.background = `linear-gradient(to right, ${stops.join(', ')})`;
  bar.setAttribute('aria-label', `Colour scale from ${formatConcentration(scale.floor)} to ${formatConcentration(scale.ceiling)} µg/m³, dark violet (low) to yellow (high)`);
  const tickHolder = element.querySelector('.legend-ticks') as HTMLElement;
  for (const tick of ticks) {
    const mark = document.createElement('span');
    mark.className = 'legend-tick';
    mark.style.left = `${(100 * scale.position(tick)).toFixed(2)}%`;
    mark.textContent = formatConcentration(tick);
    tickHolder.append(mark);
  }
}

/** The legend of a difference overlay: the diverging bar from -limit to +limit. */
function renderDifferenceLegend(element: HTMLElement, content: LegendContent, scale: DifferenceScale): void {
  const stops: string[] = [];
  for (let n = 0; n <= 10; n++) stops.push(`${rgbToHex(divergingColour(n / 10))} ${n * 10}%`);
  element.innerHTML =
    `<div class="legend-title">Ground-level ${escapeHtml(content.statistic)} <span class="unit">[µg/m³]</span></div>` +
    `<div class="legend-sub">${escapeHtml(content.origin)}, at ${content.height_m} m above ground, linear scale</div>` +
    '<div class="legend-bar-wrap"><div class="legend-bar" role="img"></div><div class="legend-ticks"></div></div>' +
    `<div class="legend-range">brown: A higher; purple: B higher; differences under ${formatConcentration(scale.floor)} µg/m³ not shaded</div>`;
  const bar = element.querySelector('.legend-bar') as HTMLElement;
  bar.style.background = `linear-gradient(to right, ${stops.join(', ')})`;
  bar.setAttribute('aria-label', `Difference scale from ${formatConcentration(-scale.limit)} (purple, B higher) through 0 (white) to ${formatConcentration(scale.limit)} µg/m³ (brown, A higher)`);
  const tickHolder = element.querySelector('.legend-ticks') as HTMLElement;
  for (const t of [0, 0.25, 0.5, 0.75, 1]) {
    const mark = document.createElement('span');
    mark.className = 'legend-tick';
    mark.style.left = `${t * 100}%`;
    const value = scale.valueAt(t);
    mark.textContent = value > 0 ? `+${formatConcentration(value)}` : formatConcentration(value);
    tickHolder.append(mark);
  }
}

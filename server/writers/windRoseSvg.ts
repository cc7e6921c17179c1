/**
 * A wind-rose picture (SVG) of the weather a run used: one wedge per direction sector, stacked by
 * speed class, frequency rings in per cent, the calm share in the middle, a legend, a strip of
 * stability-class frequencies and a caption. Plumeplan's own plain look; pure string building.
 *
 * Wedges point the way the wind blows FROM (the usual wind-rose reading, common practice).
 */
import type { StabilityClass } from '../../scenarios/format/types.ts';
import type { WindRoseTable } from '../../solver/meteorology/windRoseTable.ts';

/** Fill colours of the speed classes, lightest for the lightest winds (plumeplan's palette). */
const SPEED_COLOURS = ['#e3ecf3', '#bcd3e6', '#8fb4d3', '#6193bd', '#3c72a1', '#22507a', '#12324f'];

const STABILITY_ORDER: readonly StabilityClass[] = ['A', 'B', 'C', 'D', 'E', 'F'];

export interface WindRoseSvgOptions {
  /** caption under the picture, e.g. the scenario name and the period */
  caption: string;
  /** picture title */
  title?: string;
}

function escapeXml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** A round ring step for a largest value in per cent (1, 2 or 5 times a power of ten). */
function ringStep_percent(largest_percent: number): number {
  const rough = Math.max(largest_percent, 1e-6) / 4;
  const power = Math.pow(10, Math.floor(Math.log10(rough)));
  for (const factor of [1, 2, 5, 10]) if (factor * power >= rough) return factor * power;
  return 10 * power;
}

const fixed = (value: number, digits = 1) => Number(value.toFixed(digits)).toString();

/**
 * Draw a wind rose.
 *
 * @param table frequencies by sector and speed class, calm fraction and stability frequencies
 * @param options caption and title
 * @returns an SVG document as text
 * @example windRoseSvg(windRoseFromHours(hours), { caption: 'Merrowdene, invented year' })
 */
export function windRoseSvg(table: WindRoseTable, options: WindRoseSvgOptions): string {
  const width = 560;
  const centreX = 230;
  const centreY = 250;
  const radius = 180;
  const calmRadius = 18;
  const sectors = table.sectorCentres_deg.length;
  const totals = table.frequency.map((row) => row.reduce((sum, f) => sum + f, 0));
  const largest_percent = Math.max(...totals, 0) * 100;
  const step = ringStep_percent(largest_percent);
  const rings = Math.max(1, Math.ceil(largest_percent / step));
  const scale_percent = rings * step;
  const radiusOf = (fraction: number) => calmRadius + ((radius - calmRadius) * fraction * 100) / scale_percent;
  const point = (angle_deg: number, r: number): [number, number] => {
    const a = (angle_deg * Math.PI) / 180;
    return [centreX + r * Math.sin(a), centreY - r * Math.cos(a)];
  };
  const xy = ([x, y]: [number, number]) => `${fixed(x, 2)} ${fixed(y, 2)}`;

  const parts: string[] = [];
  const stabilityTop = 470;
  const height = stabilityTop + 130;
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="sans-serif" font-size="12">`,
    `<title>${escapeXml(options.title ?? 'Wind rose of the weather used')}</title>`,
    `<rect width="${width}" height="${height}" fill="#ffffff"/>`,
    `<text x="16" y="24" font-size="15" font-weight="bold">${escapeXml(options.title ?? 'Wind rose of the weather used')}</text>`,
  );
  // frequency rings and their labels
  for (let ring = 1; ring <= rings; ring++) {
    const r = radiusOf((ring * step) / 100);
    parts.push(`<circle cx="${centreX}" cy="${centreY}" r="${fixed(r, 2)}" fill="none" stroke="#c8c8c8" stroke-width="0.8"/>`);
    const [lx, ly] = point(22, r);
    parts.push(`<text x="${fixed(lx + 3, 1)}" y="${fixed(ly, 1)}" fill="#777777" font-size="10">${fixed(ring * step, 2)} %</text>`);
  }
  // compass spokes and labels
  for (const [angle, label] of [[0, 'N'], [90, 'E'], [180, 'S'], [270, 'W']] as const) {
    parts.push(`<line x1="${centreX}" y1="${centreY}" x2="${fixed(point(angle, radius + 6)[0], 2)}" y2="${fixed(point(angle, radius + 6)[1], 2)}" stroke="#d8d8d8" stroke-width="0.8"/>`);
    const [tx, ty] = point(angle, radius + 20);
    parts.push(`<text x="${fixed(tx, 1)}" y="${fixed(ty + 4, 1)}" text-anchor="middle" font-weight="bold">${label}</text>`);
  }
  // wedges, stacked from the lightest speed class outward
  const halfWidth_deg = (table.sectorWidth_deg / 2) * 0.86;
  for (let s = 0; s < sectors; s++) {
    const centre_deg = table.sectorCentres_deg[s];
    let inner = 0;
    table.frequency[s].forEach((fraction, speedClass) => {
      if (fraction <= 0) return;
      const outer = inner + fraction;
      const r0 = radiusOf(inner);
      const r1 = radiusOf(outer);
      const a0 = centre_deg - halfWidth_deg;
      const a1 = centre_deg + halfWidth_deg;
      const largeArc = 2 * halfWidth_deg > 180 ? 1 : 0;
      const path =
        `M ${xy(point(a0, r0))} L ${xy(point(a0, r1))} A ${fixed(r1, 2)} ${fixed(r1, 2)} 0 ${largeArc} 1 ${xy(point(a1, r1))} ` +
        `L ${xy(point(a1, r0))} A ${fixed(r0, 2)} ${fixed(r0, 2)} 0 ${largeArc} 0 ${xy(point(a0, r0))} Z`;
      parts.push(
        `<path d="${path}" fill="${SPEED_COLOURS[Math.min(speedClass, SPEED_COLOURS.length - 1)]}" stroke="#ffffff" stroke-width="0.6">` +
          `<title>from ${fixed(centre_deg, 0)} deg, ${speedLabel(table.speedClassEdges_m_s, speedClass)}: ${fixed(fraction * 100, 2)} %</title></path>`,
      );
      inner = outer;
    });
  }
  // calm share in the middle
  parts.push(
    `<circle cx="${centreX}" cy="${centreY}" r="${calmRadius}" fill="#ffffff" stroke="#999999" stroke-width="0.8"/>`,
    `<text x="${centreX}" y="${centreY - 1}" text-anchor="middle" font-size="9">calm</text>`,
    `<text x="${centreX}" y="${centreY + 10}" text-anchor="middle" font-size="9">${fixed(table.calmFraction * 100, 1)} %</text>`,
  );
  // legend
  const legendX = 440;
  parts.push(`<text x="${legendX}" y="70" font-weight="bold">Wind speed</text>`);
  table.speedClassEdges_m_s.forEach((_, speedClass) => {
    const y = 82 + speedClass * 20;
    parts.push(
      `<rect x="${legendX}" y="${y}" width="14" height="14" fill="${SPEED_COLOURS[Math.min(speedClass, SPEED_COLOURS.length - 1)]}" stroke="#999999" stroke-width="0.5"/>`,
      `<text x="${legendX + 20}" y="${y + 11}">${escapeXml(speedLabel(table.speedClassEdges_m_s, speedClass))}</text>`,
    );
  });
  parts.push(`<text x="${legendX}" y="${82 + table.speedClassEdges_m_s.length * 20 + 14}" fill="#555555" font-size="10">wedges: wind blowing from</text>`);
  // stability strip
  parts.push(`<text x="16" y="${stabilityTop}" font-weight="bold">Stability class frequency</text>`);
  const barLeft = 40;
  const barWidth = 300;
  const largestStability = Math.max(...STABILITY_ORDER.map((c) => table.stabilityFrequency[c]), 1e-9);
  STABILITY_ORDER.forEach((stability, index) => {
    const y = stabilityTop + 10 + index * 16;
    const fraction = table.stabilityFrequency[stability];
    parts.push(
      `<text x="16" y="${y + 11}">${stability}</text>`,
      `<rect x="${barLeft}" y="${y + 2}" width="${fixed((barWidth * fraction) / largestStability, 2)}" height="11" fill="#7a8c99"/>`,
      `<text x="${fixed(barLeft + (barWidth * fraction) / largestStability + 6, 1)}" y="${y + 11}" font-size="11">${fixed(fraction * 100, 1)} %</text>`,
    );
  });
  // caption
  parts.push(
    `<text x="16" y="${height - 14}" fill="#333333" font-size="11">${escapeXml(options.caption)} (${escapeXml(table.basis)})</text>`,
    '</svg>',
  );
  return parts.join('\n') + '\n';
}

/** Label of a speed class, e.g. "3-5 m/s" or ">= 11 m/s". */
export function speedLabel(edges: readonly number[], speedClass: number): string {
  const low = edges[speedClass];
  const high = edges[speedClass + 1];
  return high === undefined ? `>= ${low} m/s` : `${low}-${high} m/s`;
}

/**
 * Small helpers for SVG built as text: escaping, number formatting and line wrapping.
 *
 * Wrapping measures text with an average advance of 0.58 em, a little above DejaVu Sans's mean for
 * English prose (about 0.55 em, measured with pdfkit on the caution), so wrapped lines never overrun.
 */

/** Average advance width of a character, in ems, for wrapping (see above). */
const AVERAGE_ADVANCE_EM = 0.58;

export function escapeXml(text: string): string {
  return text
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;');
}

/** A coordinate for SVG: at most `digits` decimals, no trailing zeros. */
export function num(value: number, digits = 1): string {
  const rounded = Number(value.toFixed(digits));
  return String(rounded === 0 ? 0 : rounded);
}

/**
 * Split text into lines no wider than `width_px` at `fontSize_px`, breaking at spaces.
 *
 * @example wrapText('one two three', 40, 10) // ['one two', 'three']
 */
export function wrapText(text: string, width_px: number, fontSize_px: number): string[] {
  const perLine = Math.max(8, Math.floor(width_px / (fontSize_px * AVERAGE_ADVANCE_EM)));
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/).filter((w) => w !== '')) {
    if (line === '') line = word;
    else if (line.length + 1 + word.length <= perLine) line += ` ${word}`;
    else {
      lines.push(line);
      line = word;
    }
  }
  if (line !== '') lines.push(line);
  return lines;
}

/** A round step (1, 2 or 5 times a power of ten) giving about `count` steps over `span`. */
export function roundStep(span: number, count: number): number {
  const rough = span / count;
  const power = 10 ** Math.floor(Math.log10(rough));
  for (const factor of [1, 2, 5, 10]) if (factor * power >= rough) return factor * power;
  return 10 * power;
}

/** A grid coordinate for a tick label: whole units with thin grouping, e.g. 5 990 000. */
export function groupedInteger(value: number): string {
  const sign = value < 0 ? '-' : '';
  return sign + Math.round(Math.abs(value)).toString().replace(/\B(?=(\d{3})+(?!\d))/g, ' ');
}

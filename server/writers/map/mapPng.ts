/**
 * map.png: the map figure rendered from its SVG by resvg (@resvg/resvg-js), with the shipped DejaVu Sans
 * fonts and no system fonts, so the picture is the same on every machine, fonts installed or not.
 */
import { Resvg } from '@resvg/resvg-js';
import { BOLD_FONT_FILE, FIGURE_FONT_FAMILY, REGULAR_FONT_FILE } from '../fonts/fonts.ts';

/** Pixels per SVG unit of the PNG: 2 gives a 2000 x 1580 picture of the 1000 x 790 figure, sharp in print at about 17 cm wide. */
export const MAP_PNG_SCALE = 2;

/**
 * Render an SVG figure to PNG bytes.
 *
 * @param svg the SVG text (its width attribute sets the size at scale 1)
 * @param scale pixels per SVG unit; default MAP_PNG_SCALE
 * @returns the PNG's bytes, its width and height in pixels
 * @example const png = renderSvgToPng(renderMapSvg(scenario, result).svg);
 */
export function renderSvgToPng(svg: string, scale = MAP_PNG_SCALE): { bytes: Uint8Array; width: number; height: number } {
  if (!Number.isFinite(scale) || scale <= 0 || scale > 8) {
    throw new RangeError(`scale: ${scale} is not allowed; give a number of pixels per SVG unit above 0, at most 8`);
  }
  const renderer = new Resvg(svg, {
    fitTo: { mode: 'zoom', value: scale },
    font: {
      fontFiles: [REGULAR_FONT_FILE, BOLD_FONT_FILE],
      loadSystemFonts: false,
      defaultFontFamily: FIGURE_FONT_FAMILY,
      sansSerifFamily: FIGURE_FONT_FAMILY,
    },
    background: '#ffffff',
  });
  const image = renderer.render();
  return { bytes: new Uint8Array(image.asPng()), width: image.width, height: image.height };
}

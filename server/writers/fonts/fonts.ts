/**
 * The fonts every picture and PDF is drawn with, shipped in the repository so that text renders the same
 * on a machine with no fonts installed: DejaVu Sans, regular and bold (version 2.37 from Debian's
 * fonts-dejavu-core; the Bitstream Vera licence, which allows redistribution, is in LICENSE-DejaVu.txt).
 */
import { fileURLToPath } from 'node:url';

/** Family name the SVG figures ask for; the PNG renderer and the PDF map it to the files below. */
export const FIGURE_FONT_FAMILY = 'DejaVu Sans';

export const REGULAR_FONT_FILE = fileURLToPath(new URL('./DejaVuSans.ttf', import.meta.url));
export const BOLD_FONT_FILE = fileURLToPath(new URL('./DejaVuSans-Bold.ttf', import.meta.url));

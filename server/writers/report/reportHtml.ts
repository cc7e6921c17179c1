/**
 * report.html: the consultation report as one self-contained HTML page (styles and figures inline, no
 * network), rendered by EJS from the report model, with a print stylesheet for A4 (report.css).
 */
import { readFileSync } from 'node:fs';
import ejs from 'ejs';
import type { ReportModel } from './reportModel.ts';

const TEMPLATE = readFileSync(new URL('./report.ejs', import.meta.url), 'utf8');
const CSS = readFileSync(new URL('./report.css', import.meta.url), 'utf8');

/**
 * Render the report model as HTML.
 *
 * @param report the model (buildReportModel)
 * @returns the page's text
 * @example const html = renderReportHtml(buildReportModel(input));
 */
export function renderReportHtml(report: ReportModel): string {
  return ejs.render(TEMPLATE, { report, css: CSS });
}

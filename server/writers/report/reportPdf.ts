/**
 * report.pdf: the same content as report.html (the same report model), laid out on A4 by pdfkit, the map
 * and wind rose drawn from their SVG by svg-to-pdfkit as vector graphics, text in the shipped DejaVu Sans
 * (embedded in the PDF, so it prints the same anywhere).
 *
 * Page one carries the title, the screening caution and the site map; every page's footer repeats a
 * short caution line, the page number and the version.
 */
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';
import { BOLD_FONT_FILE, REGULAR_FONT_FILE } from '../fonts/fonts.ts';
import type { ReportModel, ReportSection, ReportTable } from './reportModel.ts';

/** A4 in PDF points (ISO 216: 210 x 297 mm, 72 pt to the inch). */
export const A4_POINTS: [number, number] = [595.28, 841.89];

const MARGIN = 42;
const FOOTER_SPACE = 30;
const INK = '#2b2622';
const MUTED = '#5a524b';
const RULE = '#d8d0c4';
const REGULAR = 'plumeplan-regular';
const BOLD = 'plumeplan-bold';

type Doc = PDFKit.PDFDocument;

/**
 * Write the report as a PDF.
 *
 * @param report the model (buildReportModel)
 * @returns the PDF's bytes
 * @example const bytes = await writeReportPdf(buildReportModel(input));
 */
export async function writeReportPdf(report: ReportModel): Promise<Uint8Array> {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN + FOOTER_SPACE, left: MARGIN, right: MARGIN },
    bufferPages: true,
    info: {
      Title: `${report.title}: ${report.subtitle}`,
      Author: `plumeplan ${report.provenance.version}`,
      Subject: report.caution,
      Keywords: 'air quality, dispersion, screening estimate',
      CreationDate: new Date(report.provenance.runDate),
    },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (chunk: Buffer) => chunks.push(chunk));
  const finished = new Promise<void>((resolve, reject) => {
    doc.on('end', () => resolve());
    doc.on('error', reject);
  });
  doc.registerFont(REGULAR, REGULAR_FONT_FILE);
  doc.registerFont(BOLD, BOLD_FONT_FILE);

  titleBlock(doc, report);
  for (const section of report.sections) drawSection(doc, section);
  footers(doc, report);
  doc.end();
  await finished;
  return new Uint8Array(Buffer.concat(chunks));
}

const textWidth = (doc: Doc): number => doc.page.width - doc.page.margins.left - doc.page.margins.right;
const pageBottom = (doc: Doc): number => doc.page.height - doc.page.margins.bottom;

function ensureRoom(doc: Doc, height: number): void {
  if (doc.y + height > pageBottom(doc)) doc.addPage();
}

function titleBlock(doc: Doc, report: ReportModel): void {
  const left = doc.page.margins.left;
  doc.font(REGULAR).fontSize(7.5).fillColor(MUTED).text('PLUMEPLAN · SCREENING ESTIMATE', left, MARGIN, { characterSpacing: 0.8 });
  doc.moveDown(0.3);
  doc.font(BOLD).fontSize(19).fillColor(INK).text(report.title);
  doc.font(REGULAR).fontSize(11.5).text(report.subtitle);
  doc.moveDown(0.2);
  doc.fontSize(8.5).fillColor(MUTED).text(report.runLine);
  doc.moveDown(0.8);

  // The caution, in a box of its own, before anything else on the page.
  const width = textWidth(doc);
  const inner = width - 20;
  doc.font(REGULAR).fontSize(9.5);
  const body = `Caution. ${report.caution}`;
  const height = doc.heightOfString(body, { width: inner }) + 14;
  const top = doc.y;
  doc.save().rect(left, top, width, height).fill('#fff4e0').restore();
  doc.save().rect(left, top, 4, height).fill('#c9a66b').restore();
  doc.save().lineWidth(0.8).strokeColor('#c9a66b').rect(left, top, width, height).stroke().restore();
  doc.fillColor(INK).font(BOLD).text('Caution. ', left + 12, top + 7, { width: inner, continued: true }).font(REGULAR).text(report.caution);
  doc.x = left;
  doc.y = top + height + 10;
}

function heading(doc: Doc, text: string): void {
  ensureRoom(doc, 60);
  const left = doc.page.margins.left;
  doc.moveDown(0.6);
  doc.font(BOLD).fontSize(12.5).fillColor(INK).text(text, left, doc.y);
  const y = doc.y + 2;
  doc.save().moveTo(left, y).lineTo(left + textWidth(doc), y).lineWidth(0.7).strokeColor(RULE).stroke().restore();
  doc.y = y + 6;
}

function paragraph(doc: Doc, text: string, options: { size?: number; colour?: string } = {}): void {
  doc.font(REGULAR).fontSize(options.size ?? 9.5).fillColor(options.colour ?? INK);
  ensureRoom(doc, doc.heightOfString(text, { width: textWidth(doc) }));
  doc.text(text, doc.page.margins.left, doc.y, { width: textWidth(doc) });
  doc.moveDown(0.4);
}

function drawSection(doc: Doc, section: ReportSection): void {
  // Keep the heading with what follows it: the paragraphs and the first table when that table is short.
  doc.font(REGULAR).fontSize(9.5);
  let following = section.paragraphs.reduce((sum, text) => sum + doc.heightOfString(text, { width: textWidth(doc) }) + 5, 0);
  if (section.figure !== undefined) {
    // keep the heading with its figure: a heading alone at the foot of a page reads as a lost section
    following += (0.8 * figureWidth(doc, section) * section.figure.height) / section.figure.width + 30;
  } else if (section.tables.length > 0) {
    const first = tableHeight(doc, section.tables[0]);
    if (first < (pageBottom(doc) - doc.page.margins.top) / 2) following += first;
  }
  ensureRoom(doc, 40 + following);
  heading(doc, section.heading);
  for (const text of section.paragraphs) paragraph(doc, text);
  if (section.figure !== undefined) {
    let width = figureWidth(doc, section);
    // A full-width figure that nearly fits under what is above it is drawn a little smaller (down to 80 %)
    // rather than leaving most of the page empty.
    const room = pageBottom(doc) - doc.y - 30 - 24;
    const full = (width * section.figure.height) / section.figure.width;
    if (full > room && full * 0.8 <= room) width = (room / full) * width;
    const height = (width * section.figure.height) / section.figure.width;
    ensureRoom(doc, height + 30);
    const top = doc.y;
    // The figure's own width and height (in px) would fix its size; give the root the size wanted here and
    // keep its viewBox, so the drawing scales into it.
    const svg = section.figure.svg.replace(/^<svg([^>]*?) width="[^"]*" height="[^"]*"/, `<svg$1 width="${width}" height="${height}"`);
    const left = doc.page.margins.left + (section.id === 'map' ? (textWidth(doc) - width) / 2 : 0);
    SVGtoPDF(doc, svg, left, top, {
      width,
      height,
      assumePt: true,
      fontCallback: (_family: string, bold: boolean) => (bold ? BOLD : REGULAR),
    });
    doc.y = top + height + 4;
    paragraph(doc, section.figure.caption, { size: 8, colour: MUTED });
  }
  for (const table of section.tables) drawTable(doc, table);
  for (const text of section.after ?? []) paragraph(doc, text, { size: 8, colour: MUTED });
}

/** Width a section's figure is drawn at: the map across the page, other figures (the wind rose) smaller. */
function figureWidth(doc: Doc, section: ReportSection): number {
  return section.id === 'map' ? textWidth(doc) : Math.min(textWidth(doc), 300);
}

/** Height a table takes when drawn whole: caption, heading row and every row. */
function tableHeight(doc: Doc, table: ReportTable): number {
  const width = textWidth(doc);
  const total = table.widths.reduce((sum, w) => sum + w, 0);
  const columns = table.widths.map((w) => (w / total) * width);
  const rowHeight = (cells: string[], font: string): number => {
    doc.font(font).fontSize(8);
    return Math.max(...cells.map((cell, c) => doc.heightOfString(cell, { width: columns[c] - 6 }))) + 6;
  };
  return 14 + rowHeight(table.headings, BOLD) + table.rows.reduce((sum, row) => sum + rowHeight(row, REGULAR), 0);
}

/** A table with a shaded heading row, repeated at the top of each page it runs onto. */
function drawTable(doc: Doc, table: ReportTable): void {
  const left = doc.page.margins.left;
  const width = textWidth(doc);
  const total = table.widths.reduce((sum, w) => sum + w, 0);
  const columns = table.widths.map((w) => (w / total) * width);
  const pad = 3;
  const size = 8;

  const rowHeight = (cells: string[], font: string): number => {
    doc.font(font).fontSize(size);
    return Math.max(...cells.map((cell, c) => doc.heightOfString(cell, { width: columns[c] - 2 * pad }))) + 2 * pad;
  };
  const drawRow = (cells: string[], font: string, shade: boolean): void => {
    const height = rowHeight(cells, font);
    const top = doc.y;
    if (shade) doc.save().rect(left, top, width, height).fill('#fbf8f1').restore();
    let x = left;
    doc.font(font).fontSize(size).fillColor(INK);
    cells.forEach((cell, c) => {
      doc.text(cell, x + pad, top + pad, { width: columns[c] - 2 * pad, align: table.numeric[c] ? 'right' : 'left' });
      x += columns[c];
    });
    doc.save().moveTo(left, top + height).lineTo(left + width, top + height).lineWidth(0.5).strokeColor(RULE).stroke().restore();
    doc.x = left;
    doc.y = top + height;
  };

  // A table shorter than half a page is kept on one page; a longer one starts with at least one row.
  const whole = tableHeight(doc, table);
  const usable = pageBottom(doc) - doc.page.margins.top;
  doc.font(BOLD).fontSize(9);
  ensureRoom(doc, whole < usable / 2 ? whole : 14 + rowHeight(table.headings, BOLD) + (table.rows.length > 0 ? rowHeight(table.rows[0], REGULAR) : 0));
  doc.fillColor(INK).text(table.caption, left, doc.y, { width });
  doc.y += 2;
  drawRow(table.headings, BOLD, true);
  for (const row of table.rows) {
    if (doc.y + rowHeight(row, REGULAR) > pageBottom(doc)) {
      doc.addPage();
      drawRow(table.headings, BOLD, true);
    }
    drawRow(row, REGULAR, false);
  }
  doc.y += 3;
  if (table.note !== undefined) paragraph(doc, table.note, { size: 7.5, colour: MUTED });
  doc.moveDown(0.3);
}

/** Each page's footer: a short caution, the page number and the version. */
function footers(doc: Doc, report: ReportModel): void {
  const range = doc.bufferedPageRange();
  for (let index = range.start; index < range.start + range.count; index += 1) {
    doc.switchToPage(index);
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    const y = doc.page.height - MARGIN - 4;
    const line =
      `Screening estimate only; defers to regulatory models, the local authority and licensed practice; not for emergency response ` +
      `(full caution on page 1). plumeplan ${report.provenance.version} · page ${index + 1} of ${range.count}`;
    doc.save().moveTo(MARGIN, y - 5).lineTo(doc.page.width - MARGIN, y - 5).lineWidth(0.5).strokeColor(RULE).stroke().restore();
    doc.font(REGULAR).fontSize(7).fillColor(MUTED).text(line, MARGIN, y, { width: doc.page.width - 2 * MARGIN, lineBreak: true });
    doc.page.margins.bottom = bottom;
  }
}

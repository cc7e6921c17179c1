/**
 * receptors.csv: one row per receptor, `id,name,lat,lon,x_m,y_m,height_m,` then the run's figure
 * columns (each name carries its unit, e.g. `concentration_ug_m3`), in the scenario's receptor order.
 *
 * The file is kept machine-clean for spreadsheets and scripts: RFC 4180 (comma separated, CRLF line
 * ends, a header row, fields holding a comma, a double quote or a line break enclosed in double quotes
 * with inner quotes doubled) and nothing else, no comment lines. CSV has no place for the screening
 * caution, so the caution travels in summary.json and footprint.geojson, and the README says so.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { checkReceptorColumns, roundFigure } from './summary.ts';
import { roundDecimals } from './rounding.ts';

/** The columns every receptors.csv starts with, before the run's figures. */
export const RECEPTOR_CSV_LEADING_COLUMNS = ['id', 'name', 'lat', 'lon', 'x_m', 'y_m', 'height_m'] as const;

/** RFC 4180 line end. */
const LINE_END = '\r\n';

/**
 * Quote one CSV field when RFC 4180 requires it (a comma, a double quote, CR or LF inside).
 *
 * @param text the field's text
 * @returns the field as written, e.g. csvField('Elm "Old" House, west') === '"Elm ""Old"" House, west"'
 */
export function csvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

/**
 * Build receptors.csv's text.
 *
 * @param scenario the parsed scenario (receptor names, positions and heights)
 * @param result the run (its projection and receptor columns)
 * @returns the CSV text, header first, every line ended by CRLF
 */
export function buildReceptorsCsv(scenario: Scenario, result: ScenarioRunResult): string {
  checkReceptorColumns(scenario, result);
  const header = [...RECEPTOR_CSV_LEADING_COLUMNS, ...result.receptorColumns.map((column) => column.key)];
  const lines = [header.map(csvField).join(',')];
  scenario.receptors.forEach((receptor, index) => {
    const [x_m, y_m] = result.grid.projection.toLocal(receptor.lon, receptor.lat);
    const fields = [
      receptor.id,
      receptor.name,
      String(receptor.lat),
      String(receptor.lon),
      String(roundDecimals(x_m, 1)),
      String(roundDecimals(y_m, 1)),
      String(receptor.height_m),
      ...result.receptorColumns.map((column) => String(roundFigure(column.key, column.values[index]))),
    ];
    lines.push(fields.map(csvField).join(','));
  });
  return lines.join(LINE_END) + LINE_END;
}

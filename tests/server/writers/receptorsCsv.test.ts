/**
 * receptors.csv: the spec's leading columns, units in the header names, and RFC 4180 quoting
 * (RFC 4180, section 2: CRLF line ends; fields holding commas, double quotes or line breaks are
 * enclosed in double quotes; a double quote inside is written twice).
 */
import { describe, expect, it } from 'vitest';
import { buildReceptorsCsv, csvField } from '../../../server/writers/receptorsCsv.ts';
import { makeTestGrid, makeTestRunResult, makeTestScenario } from './helpers.ts';

/** A minimal RFC 4180 reader, to read the file back the way a spreadsheet would. */
function readCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let index = 0; index < text.length; index += 1) {
    const char = text[index];
    if (quoted) {
      if (char === '"' && text[index + 1] === '"') {
        field += '"';
        index += 1;
      } else if (char === '"') quoted = false;
      else field += char;
    } else if (char === '"') quoted = true;
    else if (char === ',') {
      row.push(field);
      field = '';
    } else if (char === '\r' && text[index + 1] === '\n') {
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
      index += 1;
    } else field += char;
  }
  if (field !== '' || row.length > 0) throw new Error('last record not ended by CRLF');
  return rows;
}

describe('receptors.csv', () => {
  it('quotes only the fields that need it', () => {
    expect(csvField('plain text')).toBe('plain text');
    expect(csvField('Elm "Old" House, west')).toBe('"Elm ""Old"" House, west"');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField('carriage\rreturn')).toBe('"carriage\rreturn"');
  });

  it('writes the spec columns, then the figures, one CRLF-ended row per receptor', () => {
    const scenario = makeTestScenario(['Hollins Lane "Little Acorns" school, annexe', 'Care home\nnorth wing']);
    const grid = makeTestGrid({ site: scenario.site, nx: 10, ny: 10, spacing_m: 100, xWest_m: -500, ySouth_m: -500 });
    const text = buildReceptorsCsv(scenario, makeTestRunResult(grid));
    const lines = text.split('\r\n');
    expect(lines[0]).toBe('id,name,lat,lon,x_m,y_m,height_m,concentration_ug_m3');
    expect(lines[1]).toMatch(/^school,"Hollins Lane ""Little Acorns"" school, annexe",54.1241,-2.4531,-?\d+(\.\d)?,-?\d+(\.\d)?,1.5,3.14$/);
    expect(text.endsWith('\r\n')).toBe(true);

    const rows = readCsv(text);
    expect(rows).toHaveLength(3);
    expect(rows.every((row) => row.length === 8)).toBe(true);
    expect(rows[1][1]).toBe(scenario.receptors[0].name);
    expect(rows[2][1]).toBe('Care home\nnorth wing');
    expect(rows[2][0]).toBe('care-home');
    expect(Number(rows[2][7])).toBe(0.000123);
    const [x_m, y_m] = grid.projection.toLocal(scenario.receptors[1].lon, scenario.receptors[1].lat);
    expect(Number(rows[2][4])).toBeCloseTo(x_m, 1);
    expect(Number(rows[2][5])).toBeCloseTo(y_m, 1);
  });

  it('has a column per figure of a series run, in the driver order', () => {
    const scenario = makeTestScenario();
    const grid = makeTestGrid({ site: scenario.site, nx: 10, ny: 10, spacing_m: 100, xWest_m: -500, ySouth_m: -500 });
    const result = makeTestRunResult(grid, {
      weatherKind: 'hourly',
      receptorColumns: [
        { key: 'mean_ug_m3', values: Float64Array.of(1, 2) },
        { key: 'max_ug_m3', values: Float64Array.of(10, 20) },
      ],
    });
    expect(buildReceptorsCsv(scenario, result).split('\r\n')[0]).toBe('id,name,lat,lon,x_m,y_m,height_m,mean_ug_m3,max_ug_m3');
  });
});

/**
 * map.png read by GDAL's PNG driver (Debian gdal-bin), an outside reader: the stated size, and content
 * that is not blank (dark ink, the warm bands and white paper all present); text drawn with the shipped
 * fonts only, system fonts switched off.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { renderMapSvg } from '../../../../server/writers/map/mapSvg.ts';
import { MAP_PNG_SCALE, renderSvgToPng } from '../../../../server/writers/map/mapPng.ts';
import { makePackScenario, packRunResult } from '../packFixture.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-png-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

interface BandStatistics {
  minimum: number;
  maximum: number;
  mean: number;
  stdDev: number;
}

function pngStatistics(bytes: Uint8Array, name: string): { size: [number, number]; bands: BandStatistics[] } {
  const file = path.join(scratch, name);
  writeFileSync(file, bytes);
  const info = JSON.parse(execFileSync('gdalinfo', ['-json', '-stats', file], { encoding: 'utf8' })) as {
    driverShortName: string;
    size: [number, number];
    bands: BandStatistics[];
  };
  expect(info.driverShortName).toBe('PNG');
  return info;
}

describe('map.png', () => {
  it('has the stated size (2 px per SVG unit: 2000 x 1580) and ink, colour and paper in it', async () => {
    const figure = renderMapSvg(makePackScenario(), await packRunResult());
    const png = renderSvgToPng(figure.svg);
    expect([png.width, png.height]).toEqual([figure.width * MAP_PNG_SCALE, figure.height * MAP_PNG_SCALE]);
    const { size, bands } = pngStatistics(png.bytes, 'map.png');
    expect(size).toEqual([2000, 1580]);
    const [red, green, blue] = bands;
    for (const band of [red, green, blue]) {
      expect(band.maximum).toBe(255); // white paper
      expect(band.minimum).toBeLessThan(60); // dark ink: text, frame, symbols
      expect(band.stdDev).toBeGreaterThan(10);
    }
    // The bands are warm: somewhere red exceeds blue, so the mean of red is above the mean of blue.
    expect(red.mean).toBeGreaterThan(blue.mean);
  });

  it('draws text with the shipped fonts when no system font may be loaded', () => {
    const svg =
      '<svg xmlns="http://www.w3.org/2000/svg" width="200" height="40"><rect width="200" height="40" fill="#fff"/>' +
      '<text x="10" y="28" font-family="DejaVu Sans" font-size="24" fill="#000">Caution</text></svg>';
    const empty = '<svg xmlns="http://www.w3.org/2000/svg" width="200" height="40"><rect width="200" height="40" fill="#fff"/></svg>';
    const withText = pngStatistics(renderSvgToPng(svg, 1).bytes, 'text.png').bands[0];
    const without = pngStatistics(renderSvgToPng(empty, 1).bytes, 'empty.png').bands[0];
    expect(without.minimum).toBe(255);
    expect(withText.minimum).toBeLessThan(50);
  });

  it('refuses a scale out of range, naming it', () => {
    expect(() => renderSvgToPng('<svg xmlns="http://www.w3.org/2000/svg" width="1" height="1"/>', 0)).toThrow(/scale: 0 is not allowed/);
  });
});

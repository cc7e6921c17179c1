/**
 * Export CRSs against PROJ's own cs2cs (Debian proj-bin): every named system, a WGS 84 and an ETRS89 UTM
 * zone, at the Merrowdene site; and the UTM zone rule with its two exceptions (the UTM grid's definition:
 * zone 32 widened over south-west Norway, the Svalbard zones 31/33/35/37; common practice of mapping).
 */
import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { lonLatConverter, resolveCrs, siteUtmCrs, utmZone } from '../../../server/writers/crs.ts';

function cs2cs(epsg: number, lon: number, lat: number): [number, number] {
  // EPSG:4326 takes latitude first in PROJ; -f prints enough decimals.
  const output = execFileSync('cs2cs', ['-f', '%.6f', 'EPSG:4326', `EPSG:${epsg}`], { input: `${lat} ${lon}\n`, encoding: 'utf8' });
  const [first, second] = output.trim().split(/\s+/).map(Number);
  return [first, second];
}

describe('export CRSs', () => {
  it('chooses the UTM zone by the standard rule and its exceptions', () => {
    expect(utmZone(-2.2841, 54.0612)).toBe(30);
    expect(utmZone(5.33, 60.39)).toBe(32); // Norway's widened zone (the standard rule alone gives 31)
    expect(utmZone(15.6, 78.2)).toBe(33); // Svalbard
    expect(utmZone(174.8, -36.9)).toBe(60);
    expect(siteUtmCrs({ lat: -33.9, lon: 18.4 }).epsg).toBe(32734);
    expect(siteUtmCrs({ lat: 54.0612, lon: -2.2841 })).toMatchObject({ epsg: 32630, name: 'WGS 84 / UTM zone 30N' });
  });

  // Tolerance 1 mm for systems on the same datum as WGS 84 (the algorithms agree); the OSGB36 Helmert
  // shift is the same transformation PROJ picks without the OSTN15 grid, so 1 mm holds there too.
  it.each([27700, 2157, 3035, 2154, 3857, 32630, 25830, 32734])('EPSG:%i agrees with cs2cs within 1 mm', (epsg) => {
    const [lon, lat] = epsg === 32734 ? [18.4, -33.9] : [-2.2841, 54.0612];
    const [x, y] = lonLatConverter(resolveCrs(`EPSG:${epsg}`)).forward([lon, lat]);
    // EPSG:3035 lists northing before easting, and cs2cs answers in the CRS's own axis order.
    const reference = cs2cs(epsg, lon, lat);
    const [xRef, yRef] = epsg === 3035 ? [reference[1], reference[0]] : reference;
    expect(Math.abs(x - xRef)).toBeLessThan(1e-3);
    expect(Math.abs(y - yRef)).toBeLessThan(1e-3);
  });

  it('names the value and what is allowed for a code it does not know', () => {
    expect(() => resolveCrs('EPSG:9999', '--crs')).toThrow(/--crs: EPSG:9999 is not one plumeplan knows; allowed: .*EPSG:27700/);
    expect(() => resolveCrs('british grid')).toThrow(/crs: "british grid" is not allowed/);
    expect(() => resolveCrs({ epsg: 28992, proj4: '+proj=nonsense', name: 'RD', geographic: false })).toThrow(/crs.proj4/);
  });
});

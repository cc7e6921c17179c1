/**
 * Keyboard moves of stacks and receptors: an arrow key moves a point 10 m (Shift: 100 m) east, west,
 * north or south in the site's local metres. Checked against the projection PROJ gives for the same
 * local transverse Mercator: the tests compare with `cs2cs`'s answer where it is installed (Debian's PROJ,
 * the reference tool), and always with the round trip of the solver's own frame.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import { KEY_STEP_LARGE_m, KEY_STEP_m, keyMove, moveAnnouncement } from '../../../web/editing/keyMove.ts';

const site = { lat: 54.0612, lon: -2.2841 };
const frame = { projection: createLocalProjection(site) };

describe('keyboard moves', () => {
  it('moves by the stated step in local metres, Shift by the larger one', () => {
    const east = keyMove('ArrowRight', false, site, frame)!;
    expect(east.x_m).toBeCloseTo(KEY_STEP_m, 1);
    expect(east.y_m).toBeCloseTo(0, 1);
    const north = keyMove('ArrowUp', true, site, frame)!;
    expect(north.y_m).toBeCloseTo(KEY_STEP_LARGE_m, 1);
    expect(north.x_m).toBeCloseTo(0, 1);
    expect(keyMove('ArrowDown', false, site, frame)!.y_m).toBeCloseTo(-KEY_STEP_m, 1);
    expect(keyMove('ArrowLeft', true, site, frame)!.x_m).toBeCloseTo(-KEY_STEP_LARGE_m, 1);
    expect(keyMove('Enter', false, site, frame)).toBeNull();
  });

  it('puts 100 m north where PROJ puts it (cs2cs, local transverse Mercator of the site)', () => {
    const north = keyMove('ArrowUp', true, site, frame)!;
    const definition = frame.projection.definition;
    const run = spawnSync('cs2cs', ['-f', '%.8f', ...definition.split(' '), '+to', '+proj=longlat', '+datum=WGS84'], { input: '0 100\n', encoding: 'utf8' });
    if (run.status !== 0 || run.error) {
      // without PROJ's tools the round trip above still holds; say so rather than pass silently
      expect.soft(run.error?.message ?? run.stderr, 'cs2cs not available').toBe('');
      return;
    }
    const [lon, lat] = run.stdout.trim().split(/\s+/).map(Number);
    expect(north.lon).toBeCloseTo(lon, 6);
    expect(north.lat).toBeCloseTo(lat, 6);
  });

  it('announces what moved, how far, which way and where it is now', () => {
    expect(moveAnnouncement('Stack', 'Boiler house stack', 0, -100, 12.4, -87.6)).toBe(
      'Stack Boiler house stack moved 100 m south, now 12 m east and 88 m south of the site',
    );
    expect(moveAnnouncement('Receptor', 'School', 10, 0, 10, 0)).toMatch(/moved 10 m east/);
  });
});

/**
 * The run's zip, read back by Info-ZIP's `unzip` and checked by coreutils' `sha256sum` (Debian), the
 * outside readers: every file the manifest lists is there with the SHA-256 it states, nothing is
 * missing from the list, and scenario.json's checksum is the scenario checksum of the report.
 */
import { execFileSync } from 'node:child_process';
import { appendFileSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { runProvenance } from '../../../server/writers/provenance.ts';
import { buildRunZip, type PackManifest } from '../../../server/writers/runZip.ts';
import { makePackScenario } from './packFixture.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-zip-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const scenario = makePackScenario();
const provenance = runProvenance(scenario, { runDate: new Date('2026-12-02T03:00:00Z'), command: 'plumeplan run pack.json --out out/pack' });

describe('buildRunZip', () => {
  it('unzips to the listed files, each with the SHA-256 its manifest states', () => {
    const binary = Uint8Array.from({ length: 3000 }, (_, index) => (index * 37) % 256);
    const { bytes } = buildRunZip(
      [
        { name: 'summary.json', data: '{"caution": "…"}\n' },
        { name: 'map.png', data: binary },
        { name: 'receptors.csv', data: 'id,name\r\nschool,"Tansy, Hill"\r\n' },
      ],
      scenario,
      provenance,
    );
    const zipFile = path.join(scratch, 'run.zip');
    const folder = path.join(scratch, 'unzipped');
    writeFileSync(zipFile, bytes);
    execFileSync('unzip', ['-q', '-o', zipFile, '-d', folder]);
    const manifest = JSON.parse(readFileSync(path.join(folder, 'manifest.json'), 'utf8')) as PackManifest;
    expect(manifest.caution).toBe(SCREENING_CAUTION);
    expect(manifest.plumeplanVersion).toBe(provenance.version);
    expect(manifest.command).toBe('plumeplan run pack.json --out out/pack');
    expect(manifest.files.map((file) => file.name)).toEqual(['summary.json', 'map.png', 'receptors.csv', 'scenario.json']);
    expect(readdirSync(folder).sort()).toEqual([...manifest.files.map((file) => file.name), 'manifest.json'].sort());
    const checklist = manifest.files.map((file) => `${file.sha256}  ${file.name}`).join('\n') + '\n';
    const verdict = execFileSync('sha256sum', ['-c', '-'], { cwd: folder, input: checklist, encoding: 'utf8' });
    expect(verdict.trim().split('\n')).toEqual(manifest.files.map((file) => `${file.name}: OK`));
    // The scenario checksum of the report is sha256sum of scenario.json.
    const scenarioSum = execFileSync('sha256sum', ['scenario.json'], { cwd: folder, encoding: 'utf8' }).split(' ')[0];
    expect(scenarioSum).toBe(provenance.scenarioSha256);
    expect(manifest.scenario).toEqual({ name: scenario.name, file: 'scenario.json', sha256: provenance.scenarioSha256 });
    expect(JSON.parse(readFileSync(path.join(folder, 'scenario.json'), 'utf8')).receptors).toEqual(scenario.receptors);
  });

  it('a changed file fails the check (the check can fail)', () => {
    const { bytes, manifest } = buildRunZip([{ name: 'summary.json', data: '{}' }], scenario, provenance);
    const zipFile = path.join(scratch, 'tampered.zip');
    const folder = path.join(scratch, 'tampered');
    writeFileSync(zipFile, bytes);
    execFileSync('unzip', ['-q', '-o', zipFile, '-d', folder]);
    appendFileSync(path.join(folder, 'summary.json'), ' ');
    const checklist = manifest.files.map((file) => `${file.sha256}  ${file.name}`).join('\n') + '\n';
    expect(() => execFileSync('sha256sum', ['-c', '--quiet', '-'], { cwd: folder, input: checklist, stdio: 'pipe' })).toThrow();
  });

  it('gives the same bytes for the same run (entries dated with the run)', () => {
    const files = [{ name: 'summary.json', data: '{}' }];
    expect(Buffer.from(buildRunZip(files, scenario, provenance).bytes).equals(Buffer.from(buildRunZip(files, scenario, provenance).bytes))).toBe(true);
  });

  it('refuses a name with a folder in it, a repeated name and its own reserved names', () => {
    expect(() => buildRunZip([{ name: '../x.json', data: '' }], scenario, provenance)).toThrow(/"..\/x.json" is not allowed/);
    expect(() => buildRunZip([{ name: 'a.csv', data: '' }, { name: 'a.csv', data: '' }], scenario, provenance)).toThrow(/given twice/);
    expect(() => buildRunZip([{ name: 'manifest.json', data: '' }], scenario, provenance)).toThrow(/pack's own files/);
  });
});

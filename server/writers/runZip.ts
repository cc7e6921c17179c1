/**
 * One zip per run (fflate): every file of the result folder, the scenario as run (scenario.json, its
 * canonical JSON) and manifest.json, which lists every other file with its size and SHA-256, the scenario's
 * name and checksum, the plumeplan version, the run date, the command and the screening caution. A reader
 * can check the pack with nothing but `unzip` and `sha256sum`.
 */
import { strToU8, zipSync, type Zippable } from 'fflate';
import type { Scenario } from '../../scenarios/format/types.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { canonicalJson, sha256Hex, type RunProvenance } from './provenance.ts';

export const MANIFEST_FILE = 'manifest.json';
export const SCENARIO_FILE = 'scenario.json';
export const PACK_FORMAT = 'plumeplan.pack/1';

export interface PackFile {
  name: string;
  data: string | Uint8Array;
}

export interface PackManifest {
  format: typeof PACK_FORMAT;
  caution: string;
  plumeplanVersion: string;
  scenario: { name: string; file: string; sha256: string };
  runDate: string;
  command: string;
  /** every file in the zip except the manifest itself, in the order stored */
  files: { name: string; bytes: number; sha256: string }[];
}

/**
 * Build a run's zip.
 *
 * @param files the result folder's files (names without folders), in the order they should be listed
 * @param scenario the scenario as run (stored as scenario.json)
 * @param provenance version, checksum, date and command
 * @returns the zip's bytes and the manifest written into it
 * @throws RangeError for a file name that is empty, has a folder in it, repeats, or is reserved
 * @example const { bytes } = buildRunZip([{ name: 'summary.json', data: text }], scenario, provenance);
 */
export function buildRunZip(files: readonly PackFile[], scenario: Scenario, provenance: RunProvenance): { bytes: Uint8Array; manifest: PackManifest } {
  // No line end after it: `sha256sum scenario.json` then gives the scenario checksum of the report.
  const scenarioText = canonicalJson(scenario);
  const entries: { name: string; bytes: Uint8Array }[] = [];
  const seen = new Set<string>([MANIFEST_FILE, SCENARIO_FILE]);
  for (const file of files) {
    if (file.name === '' || /[\\/]/.test(file.name) || file.name.startsWith('.')) {
      throw new RangeError(`files: "${file.name}" is not allowed; give plain file names without folders`);
    }
    if (seen.has(file.name)) {
      throw new RangeError(`files: "${file.name}" is given twice or is one of the pack's own files (${MANIFEST_FILE}, ${SCENARIO_FILE})`);
    }
    seen.add(file.name);
    entries.push({ name: file.name, bytes: typeof file.data === 'string' ? strToU8(file.data) : file.data });
  }
  entries.push({ name: SCENARIO_FILE, bytes: strToU8(scenarioText) });
  const manifest: PackManifest = {
    format: PACK_FORMAT,
    caution: SCREENING_CAUTION,
    plumeplanVersion: provenance.version,
    scenario: { name: scenario.name, file: SCENARIO_FILE, sha256: sha256Hex(scenarioText) },
    runDate: provenance.runDate,
    command: provenance.command,
    files: entries.map((entry) => ({ name: entry.name, bytes: entry.bytes.length, sha256: sha256Hex(entry.bytes) })),
  };
  const zippable: Zippable = {};
  // Every entry dated with the run, so the same run zips to the same bytes.
  const mtime = new Date(provenance.runDate);
  zippable[MANIFEST_FILE] = [strToU8(`${JSON.stringify(manifest, null, 2)}\n`), { mtime }];
  for (const entry of entries) {
    // PNG and PDF are compressed already: stored as they are. (ground.tif is not compressed inside; deflate it.)
    const stored = /\.(png|pdf)$/i.test(entry.name);
    zippable[entry.name] = [entry.bytes, { level: stored ? 0 : 6, mtime }];
  }
  return { bytes: zipSync(zippable), manifest };
}

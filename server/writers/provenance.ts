/**
 * What makes a run reproducible, carried by the report, the figures and the zip's manifest: the plumeplan
 * version, a checksum of the scenario as it was run, the run date and the command.
 *
 * The checksum is the SHA-256 of the scenario's canonical JSON (keys sorted, no spaces), the text the zip
 * stores as scenario.json, so anyone can check it with `sha256sum scenario.json`. It is taken from the
 * scenario as parsed, with an hourly CSV's rows already read in, so a change to the weather file changes it.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import type { Scenario } from '../../scenarios/format/types.ts';

export interface RunProvenance {
  /** plumeplan's version, from package.json */
  version: string;
  /** SHA-256 of the canonical scenario JSON, hex */
  scenarioSha256: string;
  /** when the run was made, ISO 8601 UTC */
  runDate: string;
  /** the command that made it, e.g. "plumeplan run scenario.json --out out/demo" */
  command: string;
}

let cachedVersion: string | undefined;

/** plumeplan's version as package.json gives it, e.g. "0.1.0". */
export function plumeplanVersion(): string {
  if (cachedVersion === undefined) {
    const packageJson = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
    cachedVersion = packageJson.version;
  }
  return cachedVersion;
}

/**
 * JSON with object keys sorted at every level and no whitespace: the same scenario always gives the
 * same text. Arrays keep their order (the order of sources and receptors means something).
 */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(sortKeys);
  if (value !== null && typeof value === 'object') {
    return Object.fromEntries(
      Object.keys(value as Record<string, unknown>)
        .sort()
        .filter((key) => (value as Record<string, unknown>)[key] !== undefined)
        .map((key) => [key, sortKeys((value as Record<string, unknown>)[key])]),
    );
  }
  return value;
}

/** SHA-256 of bytes or text, hex. */
export function sha256Hex(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/** SHA-256 of a scenario's canonical JSON. */
export function scenarioChecksum(scenario: Scenario): string {
  return sha256Hex(canonicalJson(scenario));
}

/**
 * The provenance of a run.
 *
 * @param scenario the scenario as run
 * @param options the run date (default now) and the command (default "plumeplan run")
 */
export function runProvenance(scenario: Scenario, options: { runDate?: Date; command?: string } = {}): RunProvenance {
  return {
    version: plumeplanVersion(),
    scenarioSha256: scenarioChecksum(scenario),
    runDate: (options.runDate ?? new Date()).toISOString().replace(/\.\d{3}Z$/, 'Z'),
    command: options.command ?? 'plumeplan run',
  };
}

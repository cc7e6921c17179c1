/**
 * Generates `scenarios/format/scenario.schema.json`, the JSON Schema editors use to complete and check
 * scenario files, from the same zod schema the command line and the server use (`schema.ts`).
 * Run `npm run schema` after changing the schema; a test regenerates it in memory and compares.
 *
 * The JSON Schema describes the file as written (zod's "input" side: fields with defaults are
 * optional). Checks that JSON Schema cannot express (a closed, non-crossing polygon; frequencies
 * summing to 1; unique ids; exactly one of hours and csv) are made by `parseScenario` only.
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { z } from 'zod';
import { SCENARIO_FORMAT } from './types.ts';
import { scenarioSchema } from './schema.ts';

/** Where the checked-in JSON Schema lives. */
export const JSON_SCHEMA_PATH = fileURLToPath(new URL('./scenario.schema.json', import.meta.url));

/**
 * The JSON Schema of scenario format 1 as text, formatted as it is checked in.
 * @returns the file content, two-space indented, ending in a newline
 */
export function renderScenarioJsonSchema(): string {
  const generated = z.toJSONSchema(scenarioSchema, { io: 'input', target: 'draft-2020-12' });
  const { $schema, ...rest } = generated;
  const document = {
    $schema,
    title: `plumeplan scenario (${SCENARIO_FORMAT})`,
    ...rest,
  };
  return `${JSON.stringify(document, null, 2)}\n`;
}

/** Writes the JSON Schema file and returns its path. */
export function writeScenarioJsonSchema(path: string = JSON_SCHEMA_PATH): string {
  writeFileSync(path, renderScenarioJsonSchema());
  return path;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  console.log(`wrote ${writeScenarioJsonSchema()}`);
}

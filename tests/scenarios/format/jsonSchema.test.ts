// Fixture comparison: the checked-in scenarios/format/scenario.schema.json is what the zod schema generates
// now (run `npm run schema` after changing scenarios/format/schema.ts), and it describes the files the
// schema accepts.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { JSON_SCHEMA_PATH, renderScenarioJsonSchema } from '../../../scenarios/format/writeJsonSchema.ts';

describe('scenario.schema.json', () => {
  it('matches the schema regenerated in memory (run `npm run schema` if this fails)', () => {
    expect(readFileSync(JSON_SCHEMA_PATH, 'utf8')).toBe(renderScenarioJsonSchema());
  });

  it('describes the file as written: strict objects, fields with defaults optional, limits and units kept', () => {
    const schema = JSON.parse(renderScenarioJsonSchema());
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
    expect(schema.additionalProperties).toBe(false);
    expect(schema.required).toEqual(['format', 'name', 'site', 'pollutant', 'weather', 'sources', 'receptors']);
    expect(schema.properties.format).toEqual({ type: 'string', const: 'plumeplan.scenario/1' });
    const point = schema.properties.sources.items.oneOf.find((option: any) => option.properties.kind.const === 'point');
    expect(point.additionalProperties).toBe(false);
    expect(point.properties.emission_g_s).toMatchObject({ type: 'number', minimum: 0, description: 'emission rate [g/s]' });
    expect(point.properties.diameter_m).toMatchObject({ exclusiveMinimum: 0 });
    expect(point.properties.plumeRise.default).toBe(true);
    expect(point.required).not.toContain('name');
    expect(schema.properties.domain.properties.layers).toMatchObject({ type: 'integer', minimum: 2, maximum: 200 });
    const kinds = schema.properties.weather.oneOf.map((option: any) => option.properties.kind.const);
    expect(kinds).toEqual(['steady', 'hourly', 'windRose', 'screeningSet']);
  });
});

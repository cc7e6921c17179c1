/**
 * The zod schemas of the API's requests and responses: routes check requests with them, and
 * `openapi.ts` turns the same schemas into the OpenAPI document, so the two cannot drift apart.
 * (The scenario itself is checked by `parseScenario`, scenarios/format/schema.ts.)
 */
import { z } from 'zod';
import { ID_PATTERN } from '../storage/ids.ts';
import { RUN_STATUSES } from '../storage/runStore.ts';
import { PACK_CHOICES, RUN_KINDS } from '../jobs/runExecutor.ts';
import { SWEEP_PARAMETERS, type SweepParameter } from '../../solver/assessment/sweep.ts';
import { MAX_SWEEP_VALUES } from '../analyses/sweep.ts';
import { STACK_HEIGHT_DEFAULTS } from '../analyses/stackHeight.ts';
import { badRequest } from './errors.ts';

export const idSchema = z.string().regex(ID_PATTERN).describe('an id the server made (a lower-case version-4 UUID)');
const revisionNumber = z.number().int().min(1).describe('revision number, from 1');

/** Body of POST /api/scenarios and POST /api/validate: the scenario (format plumeplan.scenario/1). */
export const scenarioEnvelopeSchema = z.strictObject({
  scenario: z.unknown().describe('the scenario, format plumeplan.scenario/1 (see scenarios/format/scenario.schema.json)'),
});

/** Body of PUT /api/scenarios/:id: the new content and the revision it was edited from (or an If-Match header). */
export const scenarioUpdateSchema = z.strictObject({
  scenario: z.unknown().describe('the scenario, format plumeplan.scenario/1'),
  revision: revisionNumber.optional().describe('the revision the edit started from; or send If-Match: "N"'),
});

const modeField = z.enum(['grid', 'gaussian']).optional().describe("default: the scenario's solver.mode");
const levelsField = z
  .array(z.number().positive())
  .min(1)
  .max(20)
  .optional()
  .describe('footprint levels [ug/m3], positive and increasing; default: round numbers (1-2-5 series) across the range');

/** Body of POST /api/runs for one run of a scenario (kind "scenario", the default). */
export const runRequestSchema = z.strictObject({
  kind: z.literal('scenario').optional().describe('default: "scenario" (one run of the scenario)'),
  scenarioId: idSchema,
  revision: revisionNumber.optional().describe('default: the latest'),
  mode: modeField,
  levels_ug_m3: levelsField.describe(
    "footprint levels [ug/m3], positive and increasing (plumeplan run's --levels); with percentOf, percentages of that standard's limit; default: round numbers (1-2-5 series) across the field's range",
  ),
  percentOf: z
    .string()
    .min(1)
    .max(200)
    .optional()
    .describe("read levels_ug_m3 as percentages of this assessed standard's limit (--percent-of); without levels: 1, 10, 50, 100 %"),
  resolutionCheck: z.boolean().optional().describe('steady grid runs: solve again at half the cell size and report the change (--resolution-check); default: only when the finer grid is small'),
  pack: z
    .enum(PACK_CHOICES)
    .optional()
    .describe(
      'the consultation pack plumeplan run writes, made in the run: "full" (ground.tif, map.svg, map.png, report.html, report.pdf, receptors-with-caution.csv, plumeplan-run.zip), "quick" (all but map.png and report.pdf, the slow ones) or "none" (default)',
    ),
  crs: z
    .union([z.string().min(1).max(40), z.number().int().positive()], { error: 'an EPSG code, e.g. "EPSG:27700"' })
    .optional()
    .describe("with a pack: CRS of ground.tif and the map figure, an EPSG code plumeplan knows (the CLI's --crs); default the site's WGS 84 UTM zone"),
  contextLayers: z
    .array(z.strictObject({ name: z.string().min(1).max(100), features: z.unknown().describe('a GeoJSON FeatureCollection or a list of Features, WGS 84 lon/lat') }))
    .max(20)
    .optional()
    .describe("with a pack: the user's own layers (roads, houses...) drawn thinly on the map figure"),
});

/** One side of a comparison: a stored scenario (and revision), or a finished run of a scenario. */
export const comparedSideSchema = z
  .strictObject({
    scenarioId: idSchema.optional().describe('a stored scenario; give this or runId'),
    revision: revisionNumber.optional().describe('with scenarioId; default: the latest'),
    runId: idSchema.optional().describe('a finished run of kind "scenario": its scenario revision and mode are run again'),
  })
  .describe('{scenarioId, revision?} or {runId}');

/** Body of POST /api/runs for a comparison: how B differs from A (the CLI's plumeplan compare). */
export const compareRequestSchema = z.strictObject({
  kind: z.literal('compare'),
  a: comparedSideSchema.describe('the reference side'),
  b: comparedSideSchema.describe('the side compared with it'),
  mode: modeField.describe("both sides given by scenarioId; default: each scenario's solver.mode (a side given by runId keeps its run's mode)"),
  levels_ug_m3: levelsField.describe('levels whose areas are compared [ug/m3]; default: round numbers across the larger peak'),
});

/** Body of POST /api/runs for a sweep of one parameter (the CLI's plumeplan sweep). */
export const sweepRequestSchema = z.strictObject({
  kind: z.literal('sweep'),
  scenarioId: idSchema,
  revision: revisionNumber.optional().describe('default: the latest'),
  mode: modeField,
  parameter: z.enum(Object.keys(SWEEP_PARAMETERS) as [SweepParameter, ...SweepParameter[]]).describe('the parameter to vary'),
  values: z.array(z.number()).min(1).max(MAX_SWEEP_VALUES).describe(`its values, 1 to ${MAX_SWEEP_VALUES}, each allowed for the parameter`),
  sourceId: z.string().min(1).max(200).optional().describe('the source, for a per-source parameter; default: the only candidate'),
});

/** Body of POST /api/runs for the stack-height search (the CLI's plumeplan stack-height). */
export const stackHeightRequestSchema = z.strictObject({
  kind: z.literal('stack-height'),
  scenarioId: idSchema,
  revision: revisionNumber.optional().describe('default: the latest'),
  mode: modeField,
  target_ug_m3: z.number().positive().optional().describe('the target PC [ug/m3]; or targetPercent with standard'),
  targetPercent: z.number().positive().optional().describe("the target as a percentage of the standard's limit [%]"),
  standard: z.string().min(1).max(200).optional().describe('the assessed standard targetPercent refers to (its figure is then compared)'),
  at: z
    .union([z.literal('ground'), z.array(z.string().min(1).max(200)).min(1).max(100)], { error: '"ground" or a list of receptor ids' })
    .optional()
    .describe('"ground" (default) or receptor ids'),
  minHeight_m: z.number().min(0).optional().describe(`lowest allowed height [m]; default ${STACK_HEIGHT_DEFAULTS.minHeight_m}`),
  maxHeight_m: z.number().positive().optional().describe(`highest allowed height [m], below the grid's top; default ${STACK_HEIGHT_DEFAULTS.maxHeight_m}`),
  tolerance_m: z.number().positive().optional().describe(`width of the final bracket [m]; default ${STACK_HEIGHT_DEFAULTS.tolerance_m}`),
  sourceId: z.string().min(1).max(200).optional().describe('the stack; default: the only point source'),
});

/** Body of POST /api/runs for siting a stack (the CLI's plumeplan site). */
export const siteRequestSchema = z.strictObject({
  kind: z.literal('site'),
  scenarioId: idSchema,
  revision: revisionNumber.optional().describe('default: the latest'),
  mode: modeField,
  stackId: z.string().min(1).max(200).optional().describe("the point source to site; default: the scenario's first"),
  receptorIds: z.array(z.string().min(1).max(200)).min(1).max(500).optional().describe('sensitive receptors; default: every receptor'),
  weights: z.array(z.number().min(0)).min(1).max(500).optional().describe('combine the receptors as a weighted sum (one weight each) instead of the highest'),
  candidates: z
    .unknown()
    .optional()
    .describe('candidate positions: a GeoJSON FeatureCollection of Points (id from the feature id or properties.id) or a list of {id?, lon, lat} (WGS 84 degrees)'),
  sitePolygon: z.unknown().optional().describe("the site as a GeoJSON Polygon (or a Feature or FeatureCollection of one); default: the scenario's site.boundary"),
  spacing_m: z.number().positive().optional().describe('lattice spacing the site polygon is sampled at for candidates [m]; default: the grid spacing'),
  standard: z.string().min(1).max(200).optional().describe('the assessed standard to compare with; default: chosen by the weather (see plumeplan site --help)'),
  level_ug_m3: z.number().positive().optional().describe("ground level whose area each forward run reports [ug/m3]; default: the standard's screening threshold"),
  forwardRuns: z.number().int().min(0).max(500).optional().describe('forward runs of the best-ranked candidates; default: every candidate, at most 50 in grid mode'),
  footprints: z.boolean().optional().describe('also store footprint-ID.geojson for each forward-run candidate'),
  levels_ug_m3: levelsField.describe("the map's isopleth levels [ug/m3]; default: round numbers"),
  quick: z.boolean().optional().describe('leave out the slow rendered files, siting-map.png and siting-report.pdf (plumeplan site --quick); default false'),
});

/** Every body POST /api/runs takes, by kind. */
export const RUN_REQUEST_SCHEMAS = {
  scenario: runRequestSchema,
  compare: compareRequestSchema,
  sweep: sweepRequestSchema,
  'stack-height': stackHeightRequestSchema,
  site: siteRequestSchema,
} as const satisfies Record<(typeof RUN_KINDS)[number], z.ZodType>;

/** Query of the list routes. */
export const pageQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(100).default(20).describe('items per page, 1 to 100'),
  offset: z.coerce.number().int().min(0).default(0).describe('items to skip'),
});

export const errorSchema = z
  .object({
    error: z.string(),
    field: z.string().nullable(),
    value: z.unknown().optional(),
    allowed: z.string().optional(),
    issues: z.array(z.object({ field: z.string(), value: z.unknown().optional(), allowed: z.string() })).optional(),
  })
  .describe('every error: what is wrong, the field, the value found and what is allowed');

export const scenarioRecordSchema = z.object({
  id: idSchema,
  revision: revisionNumber,
  name: z.string(),
  createdAt: z.string().describe('ISO 8601 UTC'),
  updatedAt: z.string().describe('ISO 8601 UTC'),
  deletedAt: z.string().nullable().describe('ISO 8601 UTC, or null'),
});

export const scenarioPageSchema = z.object({
  items: z.array(scenarioRecordSchema),
  total: z.number().int(),
  limit: z.number().int(),
  offset: z.number().int(),
});

export const revisionRecordSchema = z.object({
  revision: revisionNumber,
  name: z.string(),
  checksum: z.string().describe('SHA-256 (hex) of the scenario as canonical JSON (keys sorted)'),
  createdAt: z.string(),
});

export const scenarioDocumentSchema = scenarioRecordSchema.extend({
  checksum: z.string(),
  scenario: z.unknown().describe('the scenario as saved'),
});

export const validationSchema = z.object({
  valid: z.boolean(),
  issues: z.array(z.object({ field: z.string(), value: z.unknown().optional(), allowed: z.string() })),
  grid: z
    .object({ nx: z.number(), ny: z.number(), nz: z.number(), spacing_m: z.number(), cells: z.number(), estimatedMemory_bytes: z.number(), domainDerived: z.boolean() })
    .nullable()
    .describe('the grid a run would use (null when not valid)'),
  warnings: z
    .array(z.object({ field: z.string(), value: z.unknown().optional(), message: z.string() }))
    .describe(
      "plausibility warnings, not errors (the scenario can still run): the ones plumeplan validate prints and a run records in summary.json's inputWarnings; empty when the scenario has issues",
    ),
});

export const resultFileSchema = z.object({
  name: z.string(),
  contentType: z.string(),
  bytes: z.number().int(),
  sha256: z.string(),
  url: z.string(),
});

export const runSchema = z.object({
  id: idSchema,
  scenarioId: idSchema,
  revision: revisionNumber,
  checksum: z.string().describe("the revision's checksum"),
  kind: z.enum(RUN_KINDS),
  mode: z.enum(['grid', 'gaussian']),
  options: z.record(z.string(), z.unknown()).describe("the run's options as checked and stored: mode and the kind's own (a comparison's a and b with scenarioId, revision, mode, runId)"),
  status: z.enum(RUN_STATUSES),
  progress: z.number().min(0).max(1),
  message: z.string(),
  error: errorSchema.nullable(),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  results: z.array(resultFileSchema),
});

export const runAcceptedSchema = z.object({
  id: idSchema,
  status: z.enum(RUN_STATUSES),
  reused: z.boolean().describe('true when an identical earlier run (same scenario content, kind and options) answers'),
  url: z.string(),
});

/**
 * Check a request part against a schema.
 * @param where how the field paths start: "" for the body, "query." ...
 * @throws ApiError 400 naming the first field at fault
 */
export function parseRequest<T extends z.ZodType>(schema: T, value: unknown, where = ''): z.output<T> {
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const path = issue.path.map((segment) => (typeof segment === 'number' ? `[${segment}]` : String(segment)));
  const base = `${where}${path.join('.').replaceAll('.[', '[')}`;
  if (issue.code === 'unrecognized_keys') {
    const field = `${base === '' ? '' : `${base}.`}${issue.keys[0]}`;
    const allowedKeys = schema instanceof z.ZodObject ? Object.keys(schema.shape).join(', ') : 'the documented fields';
    throw badRequest(field, undefined, `only the fields ${allowedKeys}`, `${field}: unknown field; allowed fields: ${allowedKeys}`);
  }
  const field = base === '' ? '(body)' : base;
  const found = path.reduce<unknown>((current, segment) => {
    if (current === null || typeof current !== 'object') return undefined;
    const key = segment.startsWith('[') ? Number(segment.slice(1, -1)) : segment;
    return (current as Record<string | number, unknown>)[key];
  }, value);
  throw badRequest(field, found, describeAllowed(issue));
}

function describeAllowed(issue: z.core.$ZodIssue): string {
  switch (issue.code) {
    case 'invalid_type':
      return `a ${issue.expected}`;
    case 'too_small':
      if (issue.origin === 'array') return `a list of at least ${String(issue.minimum)} ${issue.minimum === 1 ? 'entry' : 'entries'}`;
      return `${issue.origin === 'string' ? 'a text of length' : 'a number'} ${issue.inclusive === false ? '>' : '>='} ${String(issue.minimum)}`;
    case 'too_big':
      if (issue.origin === 'array') return `a list of at most ${String(issue.maximum)} entries`;
      return `${issue.origin === 'string' ? 'a text of length' : 'a number'} ${issue.inclusive === false ? '<' : '<='} ${String(issue.maximum)}`;
    case 'invalid_value':
      return `one of ${issue.values.map((value) => JSON.stringify(value)).join(', ')}`;
    case 'invalid_format':
      return issue.format === 'regex' ? 'an id the server made (a lower-case version-4 UUID)' : `text in the format ${issue.format}`;
    default:
      return issue.message;
  }
}

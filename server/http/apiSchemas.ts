/**
 * The zod schemas of the API's requests and responses: routes check requests with them, and
 * `openapi.ts` turns the same schemas into the OpenAPI document, so the two cannot drift apart.
 * (The scenario itself is checked by `parseScenario`, scenarios/format/schema.ts.)
 */
import { z } from 'zod';
import { ID_PATTERN } from '../storage/ids.ts';
import { RUN_STATUSES } from '../storage/runStore.ts';
import { RUN_KINDS } from '../jobs/runExecutor.ts';
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

/** Body of POST /api/runs. */
export const runRequestSchema = z.strictObject({
  scenarioId: idSchema,
  revision: revisionNumber.optional().describe('default: the latest'),
  mode: z.enum(['grid', 'gaussian']).optional().describe("default: the scenario's solver.mode"),
  kind: z.enum(RUN_KINDS).optional().describe('default: "scenario" (one run of the scenario)'),
});

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
      return `${issue.origin === 'string' ? 'a text of length' : 'a number'} ${issue.inclusive === false ? '>' : '>='} ${String(issue.minimum)}`;
    case 'too_big':
      return `${issue.origin === 'string' ? 'a text of length' : 'a number'} ${issue.inclusive === false ? '<' : '<='} ${String(issue.maximum)}`;
    case 'invalid_value':
      return `one of ${issue.values.map((value) => JSON.stringify(value)).join(', ')}`;
    case 'invalid_format':
      return issue.format === 'regex' ? 'an id the server made (a lower-case version-4 UUID)' : `text in the format ${issue.format}`;
    default:
      return issue.message;
  }
}

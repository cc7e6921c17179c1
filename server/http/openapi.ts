/**
 * The OpenAPI 3.1 document of the API, served at /api/openapi.json, generated from the same zod
 * schemas the routes check requests with (zod 4's toJSONSchema) and the scenario schema itself.
 */
import { z } from 'zod';
import { scenarioSchema } from '../../scenarios/format/schema.ts';
import { SCREENING_CAUTION } from '../writers/caution.ts';
import {
  errorSchema,
  revisionRecordSchema,
  runAcceptedSchema,
  compareRequestSchema,
  runRequestSchema,
  runSchema,
  siteRequestSchema,
  stackHeightRequestSchema,
  sweepRequestSchema,
  scenarioDocumentSchema,
  scenarioPageSchema,
  scenarioRecordSchema,
  scenarioUpdateSchema,
  validationSchema,
} from './apiSchemas.ts';

type JsonObject = Record<string, unknown>;

function schemaOf(schema: z.ZodType, io: 'input' | 'output' = 'output'): JsonObject {
  const { $schema: _dialect, ...rest } = z.toJSONSchema(schema, { io, target: 'draft-2020-12', unrepresentable: 'any' }) as JsonObject;
  return rest;
}

const ref = (name: string): JsonObject => ({ $ref: `#/components/schemas/${name}` });
const json = (schema: JsonObject): JsonObject => ({ 'application/json': { schema } });
const errorResponse = (description: string): JsonObject => ({ description, content: json(ref('Error')) });
const idParameter = (name = 'id'): JsonObject => ({ name, in: 'path', required: true, schema: { type: 'string', pattern: '^[0-9a-f-]{36}$' } });
const pageParameters: JsonObject[] = [
  { name: 'limit', in: 'query', schema: { type: 'integer', minimum: 1, maximum: 100, default: 20 } },
  { name: 'offset', in: 'query', schema: { type: 'integer', minimum: 0, default: 0 } },
];
const COMMON_ERRORS = {
  '400': errorResponse('malformed request: JSON syntax, a wrong type, an unknown field, an id that is not one'),
  '413': errorResponse('request body too large'),
  '415': errorResponse('the body is not application/json'),
};

let cached: JsonObject | null = null;

/** The OpenAPI 3.1 document (built once). */
export function openApiDocument(): JsonObject {
  if (cached !== null) return cached;
  const scenarioBody = { type: 'object', required: ['scenario'], additionalProperties: false, properties: { scenario: ref('Scenario') } };
  const updateBody = schemaOf(scenarioUpdateSchema, 'input');
  (updateBody.properties as JsonObject).scenario = ref('Scenario');
  cached = {
    openapi: '3.1.0',
    info: {
      title: 'plumeplan server API',
      version: '1',
      description: `Scenarios kept with their revisions, runs computed in the background, and their results. ${SCREENING_CAUTION}`,
    },
    servers: [{ url: '/' }],
    security: [{}, { token: [] }],
    components: {
      schemas: {
        Scenario: schemaOf(scenarioSchema, 'input'),
        Error: schemaOf(errorSchema),
        ScenarioRecord: schemaOf(scenarioRecordSchema),
        ScenarioDocument: schemaOf(scenarioDocumentSchema),
        ScenarioPage: schemaOf(scenarioPageSchema),
        Revision: schemaOf(revisionRecordSchema),
        Validation: schemaOf(validationSchema),
        RunRequest: { oneOf: [ref('ScenarioRunRequest'), ref('CompareRequest'), ref('SweepRequest'), ref('StackHeightRequest'), ref('SiteRequest')] },
        ScenarioRunRequest: schemaOf(runRequestSchema, 'input'),
        CompareRequest: schemaOf(compareRequestSchema, 'input'),
        SweepRequest: schemaOf(sweepRequestSchema, 'input'),
        StackHeightRequest: schemaOf(stackHeightRequestSchema, 'input'),
        SiteRequest: schemaOf(siteRequestSchema, 'input'),
        RunAccepted: schemaOf(runAcceptedSchema),
        Run: schemaOf(runSchema),
      },
      securitySchemes: { token: { type: 'http', scheme: 'bearer', description: 'only when the server was started with PLUMEPLAN_TOKEN' } },
    },
    paths: {
      '/api/scenarios': {
        post: {
          summary: 'Save a new scenario (revision 1)',
          requestBody: { required: true, content: json(scenarioBody) },
          responses: { '201': { description: 'saved', content: json(ref('ScenarioRecord')) }, '422': errorResponse('the scenario does not pass the format; every issue listed'), ...COMMON_ERRORS },
        },
        get: {
          summary: 'List scenarios, most recently changed first',
          parameters: [...pageParameters, { name: 'deleted', in: 'query', schema: { type: 'string', enum: ['true', 'false'] } }],
          responses: { '200': { description: 'a page', content: json(ref('ScenarioPage')) }, '400': COMMON_ERRORS['400'] },
        },
      },
      '/api/scenarios/{id}': {
        parameters: [idParameter()],
        get: { summary: 'The latest revision of a scenario', responses: { '200': { description: 'the scenario (ETag: "revision")', content: json(ref('ScenarioDocument')) }, '404': errorResponse('no such scenario, or deleted') } },
        put: {
          summary: 'Save a new revision; give the revision you edited (body "revision" or If-Match)',
          parameters: [{ name: 'If-Match', in: 'header', schema: { type: 'string' } }],
          requestBody: { required: true, content: json(updateBody) },
          responses: {
            '200': { description: 'saved as a new revision', content: json(ref('ScenarioRecord')) },
            '404': errorResponse('no such scenario, or deleted'),
            '409': errorResponse('stale revision: someone saved since'),
            '422': errorResponse('the scenario does not pass the format'),
            '428': errorResponse('no revision given'),
            ...COMMON_ERRORS,
          },
        },
        delete: { summary: 'Delete (recoverable with restore)', responses: { '200': { description: 'deleted', content: json(ref('ScenarioRecord')) }, '404': errorResponse('no such scenario') } },
      },
      '/api/scenarios/{id}/restore': {
        parameters: [idParameter()],
        post: { summary: 'Undo a delete', responses: { '200': { description: 'restored', content: json(ref('ScenarioRecord')) }, '404': errorResponse('no such scenario') } },
      },
      '/api/scenarios/{id}/revisions': {
        parameters: [idParameter()],
        get: { summary: 'Every revision, newest first', responses: { '200': { description: 'revisions', content: json({ type: 'object', properties: { id: { type: 'string' }, items: { type: 'array', items: ref('Revision') } } }) }, '404': errorResponse('no such scenario') } },
      },
      '/api/scenarios/{id}/revisions/{revision}': {
        parameters: [idParameter(), { name: 'revision', in: 'path', required: true, schema: { type: 'integer', minimum: 1 } }],
        get: { summary: 'One revision with its content', responses: { '200': { description: 'the revision', content: json(ref('ScenarioDocument')) }, '404': errorResponse('no such revision') } },
      },
      '/api/validate': {
        post: {
          summary: 'Check a scenario without saving or running it',
          requestBody: { required: true, content: json(scenarioBody) },
          responses: { '200': { description: 'the check (valid or not, every issue, the grid)', content: json(ref('Validation')) }, ...COMMON_ERRORS },
        },
      },
      '/api/runs': {
        post: {
          summary: 'Queue a run: of a saved scenario revision (kind "scenario", the default), or a compare, sweep, stack-height or site run (see docs/http-api.md)',
          requestBody: { required: true, content: json(ref('RunRequest')) },
          responses: {
            '202': { description: 'queued (or an identical run is already under way)', content: json(ref('RunAccepted')) },
            '200': { description: 'an identical run is already done', content: json(ref('RunAccepted')) },
            '404': errorResponse('no such scenario, revision or (compare) run'),
            '409': errorResponse('compare: a side given as a run that is not done'),
            '422': errorResponse('the scenario cannot run as stored (grid too large, a source outside the domain...), or an option does not fit it (unknown source, a value out of range...)'),
            '429': errorResponse('too many queued or running runs for this client'),
            ...COMMON_ERRORS,
          },
        },
        get: {
          summary: 'List runs, newest first',
          parameters: [...pageParameters, { name: 'scenarioId', in: 'query', schema: { type: 'string' } }],
          responses: { '200': { description: 'a page of runs', content: json({ type: 'object', properties: { items: { type: 'array', items: ref('Run') }, total: { type: 'integer' } } }) } },
        },
      },
      '/api/runs/{id}': {
        parameters: [idParameter()],
        get: { summary: 'A run: status, progress, error, result files', responses: { '200': { description: 'the run', content: json(ref('Run')) }, '404': errorResponse('no such run') } },
      },
      '/api/runs/{id}/events': {
        parameters: [
          idParameter(),
          {
            name: 'access_token',
            in: 'query',
            required: false,
            schema: { type: 'string' },
            description: "the server's token, for a browser's EventSource (which cannot send headers); this route only",
          },
        ],
        get: {
          summary: 'Progress as server-sent events: "status" and "progress" events, data {id, status, progress, message, error}; ends after the final status',
          responses: { '200': { description: 'an event stream', content: { 'text/event-stream': { schema: { type: 'string' } } } }, '404': errorResponse('no such run') },
        },
      },
      '/api/runs/{id}/cancel': {
        parameters: [idParameter()],
        post: { summary: 'Cancel a queued or running run', responses: { '200': { description: 'cancelled', content: json(ref('Run')) }, '404': errorResponse('no such run'), '409': errorResponse('the run has already finished') } },
      },
      '/api/runs/{id}/assessment': {
        parameters: [idParameter()],
        get: {
          summary: "The assessment figures of a finished run (summary.json's assessment, screening verdicts, footprint level areas and peak, with the caution)",
          responses: {
            '200': { description: 'the figures', content: json({ type: 'object', properties: { id: { type: 'string' }, revision: { type: 'integer' }, assessment: {}, verdicts: {}, areas: {}, peak: {}, caution: { type: 'string' } } }) },
            '404': errorResponse('no such run'),
            '409': errorResponse('the run is not done'),
          },
        },
      },
      '/api/runs/{id}/results/{name}': {
        parameters: [idParameter(), { name: 'name', in: 'path', required: true, schema: { type: 'string', pattern: '^[a-z0-9][a-z0-9._-]{0,63}$', examples: ['summary.json', 'receptors.csv', 'footprint.geojson', 'windrose.svg', 'ground-field.bin', 'ground.tif', 'map.png', 'report.pdf', 'plumeplan-run.zip', 'comparison.json', 'sweep.csv', 'stack-height.json', 'siting.json', 'siting-map.tif'] } }],
        get: {
          summary: "One result file of a finished run, as listed in the run's results (names by kind, and ground-field.bin: see docs/http-api.md)",
          responses: {
            '200': {
              description: 'the file',
              content: {
                'application/json': { schema: { type: 'object' } },
                'text/csv': { schema: { type: 'string' } },
                'application/geo+json': { schema: { type: 'object' } },
                'image/svg+xml': { schema: { type: 'string' } },
                'application/vnd.plumeplan.groundfield': { schema: { type: 'string', contentEncoding: 'binary' } },
                'image/tiff': { schema: { type: 'string', contentEncoding: 'binary' } },
                'image/png': { schema: { type: 'string', contentEncoding: 'binary' } },
                'application/pdf': { schema: { type: 'string', contentEncoding: 'binary' } },
                'application/zip': { schema: { type: 'string', contentEncoding: 'binary' } },
                'text/html': { schema: { type: 'string' } },
              },
            },
            '404': errorResponse('no such run or file'),
            '409': errorResponse('the run is not done'),
          },
        },
      },
      '/api/health': { get: { summary: 'Liveness and the run queue', responses: { '200': { description: 'ok' } } } },
      '/api/openapi.json': { get: { summary: 'This document', responses: { '200': { description: 'OpenAPI 3.1' } } } },
    },
  };
  return cached;
}

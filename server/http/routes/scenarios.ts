/**
 * Scenarios: create, list (paged), read, revisions, save a new revision (optimistic concurrency:
 * `revision` in the body or `If-Match: "N"`; a stale one gets 409), delete (recoverable) and restore.
 */
import { Router, type Request } from 'express';
import { z } from 'zod';
import type { ScenarioStore } from '../../storage/scenarioStore.ts';
import { pageQuerySchema, parseRequest, scenarioEnvelopeSchema, scenarioUpdateSchema } from '../apiSchemas.ts';
import { ApiError, badRequest } from '../errors.ts';
import { requireJson, scenarioIdParam } from '../requestChecks.ts';
import { acceptScenario } from '../scenarioInput.ts';

export function scenarioRoutes(scenarios: ScenarioStore): Router {
  const router = Router();

  router.post('/', requireJson, (request, response) => {
    const body = parseRequest(scenarioEnvelopeSchema, request.body);
    const accepted = acceptScenario(body.scenario);
    const record = scenarios.create(accepted.stored, accepted.scenario.name);
    response.status(201).location(`/api/scenarios/${record.id}`).set('ETag', etag(record.revision)).json(record);
  });

  router.get('/', (request, response) => {
    const query = parseRequest(pageQuerySchema.extend({ deleted: booleanQuery }), request.query, 'query.');
    const page = scenarios.list({ limit: query.limit, offset: query.offset, deleted: query.deleted });
    response.json({ ...page, limit: query.limit, offset: query.offset });
  });

  router.get('/:id', (request, response) => {
    const id = scenarioIdParam(request);
    const record = scenarios.get(id);
    const revision = scenarios.revision(id);
    response.set('ETag', etag(record.revision)).json({ ...record, checksum: revision.checksum, scenario: revision.scenario });
  });

  router.get('/:id/revisions', (request, response) => {
    const id = scenarioIdParam(request);
    const items = scenarios.revisions(id).map(({ scenarioId: _id, ...revision }) => revision);
    response.json({ id, items });
  });

  router.get('/:id/revisions/:revision', (request, response) => {
    const id = scenarioIdParam(request);
    const revision = revisionParam(request.params.revision);
    const found = scenarios.revision(id, revision);
    response.set('ETag', etag(found.revision)).json({
      id,
      revision: found.revision,
      name: found.name,
      checksum: found.checksum,
      createdAt: found.createdAt,
      scenario: found.scenario,
    });
  });

  router.put('/:id', requireJson, (request, response) => {
    const id = scenarioIdParam(request);
    const body = parseRequest(scenarioUpdateSchema, request.body);
    const basedOn = body.revision ?? ifMatchRevision(request);
    if (basedOn === undefined) {
      throw new ApiError(428, {
        error: 'revision: missing; say which revision you edited, as "revision" in the body or an If-Match: "N" header',
        field: 'revision',
        allowed: 'the latest revision number (GET /api/scenarios/:id gives it)',
      });
    }
    scenarios.get(id);
    const accepted = acceptScenario(body.scenario);
    const record = scenarios.save(id, accepted.stored, accepted.scenario.name, basedOn);
    response.set('ETag', etag(record.revision)).json(record);
  });

  router.delete('/:id', (request, response) => {
    const record = scenarios.delete(scenarioIdParam(request));
    response.json(record);
  });

  router.post('/:id/restore', (request, response) => {
    const record = scenarios.restore(scenarioIdParam(request));
    response.json(record);
  });

  return router;
}

/** ?deleted=true lists the deleted scenarios (to restore one). */
const booleanQuery = z
  .enum(['true', 'false'])
  .optional()
  .transform((text) => text === 'true');

function etag(revision: number): string {
  return `"${revision}"`;
}

function revisionParam(text: string): number {
  if (!/^[1-9][0-9]{0,8}$/.test(text)) throw badRequest('revision', text, 'a revision number, an integer >= 1');
  return Number(text);
}

/** The revision named by an If-Match header ("3" or W/"3"), if any. */
function ifMatchRevision(request: Request): number | undefined {
  const header = request.get('If-Match');
  if (header === undefined) return undefined;
  const match = /^\s*(?:W\/)?"([1-9][0-9]{0,8})"\s*$/.exec(header);
  if (match === null) throw badRequest('If-Match', header, 'an entity tag holding a revision number, e.g. "3"');
  return Number(match[1]);
}

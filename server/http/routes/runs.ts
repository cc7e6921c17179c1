/**
 * Runs: submit (202 at once; an identical earlier run answers instead of a second solve), read the
 * status, follow progress as server-sent events, cancel, list, and download the result files.
 */
import { readFile } from 'node:fs/promises';
import { Router, type Response } from 'express';
import { SUMMARY_FILE } from '../../writers/writeResultFolder.ts';
import { z } from 'zod';
import type { RunManager, RunUpdate } from '../../jobs/runManager.ts';
import { RESULT_NAME_PATTERN, type ResultFileStore } from '../../storage/resultFiles.ts';
import { FINAL_STATUSES, type RunRecord } from '../../storage/runStore.ts';
import { compareRequestSchema, idSchema, pageQuerySchema, parseRequest, RUN_REQUEST_SCHEMAS, runRequestSchema } from '../apiSchemas.ts';
import { RUN_KINDS, type RunKind } from '../../jobs/runExecutor.ts';
import type { ResolvedSide, SubmitRequest } from '../../jobs/runManager.ts';
import type { SolverMode } from '../../../scenarios/format/types.ts';
import { ApiError, badRequest } from '../errors.ts';
import { idParam, requireJson } from '../requestChecks.ts';
import type { RunStore } from '../../storage/runStore.ts';

/** Seconds between keep-alive comments on an idle progress stream. */
const KEEP_ALIVE_s = 15;

export interface RunRouteDependencies {
  manager: RunManager;
  runs: RunStore;
  files: ResultFileStore;
  /** who is asking, for the per-client limit */
  clientOf: (request: import('express').Request) => string;
}

export function runRoutes(deps: RunRouteDependencies): Router {
  const { manager, runs, files } = deps;
  const router = Router();

  router.post('/', requireJson, (request, response) => {
    const { run, reused } = manager.submit(submitRequestOf(request.body, manager, deps.clientOf(request)));
    const url = `/api/runs/${run.id}`;
    response
      .status(reused && run.status === 'done' ? 200 : 202)
      .location(url)
      .json({ id: run.id, status: run.status, reused, url });
  });

  router.get('/', (request, response) => {
    const query = parseRequest(pageQuerySchema.extend({ scenarioId: idSchema.optional() }), request.query, 'query.');
    const page = runs.list({ scenarioId: query.scenarioId, limit: query.limit, offset: query.offset });
    response.json({ items: page.items.map(runJson), total: page.total, limit: query.limit, offset: query.offset });
  });

  router.get('/:id', (request, response) => {
    response.json(runJson(manager.get(idParam(request, 'id'))));
  });

  router.post('/:id/cancel', (request, response) => {
    response.json(runJson(manager.cancel(idParam(request, 'id'))));
  });

  router.get('/:id/events', (request, response) => {
    const id = idParam(request, 'id');
    const run = manager.get(id);
    response.writeHead(200, {
      'Content-Type': 'text/event-stream; charset=utf-8',
      'Cache-Control': 'no-cache, no-transform',
      Connection: 'keep-alive',
      'X-Accel-Buffering': 'no',
    });
    response.write('retry: 2000\n\n');
    sendEvent(response, 'status', updateOf(run));
    if (FINAL_STATUSES.includes(run.status)) {
      response.end();
      return;
    }
    const keepAlive = setInterval(() => response.write(': keep-alive\n\n'), KEEP_ALIVE_s * 1000);
    keepAlive.unref();
    const stop = (): void => {
      clearInterval(keepAlive);
      unsubscribe();
    };
    const unsubscribe = manager.subscribe(id, (update) => {
      const final = FINAL_STATUSES.includes(update.status);
      sendEvent(response, final || update.status !== 'running' || update.progress === 0 ? 'status' : 'progress', update);
      if (final) {
        stop();
        response.end();
      }
    });
    // A status change between reading the row and subscribing would be missed: look once more.
    const latest = manager.get(id);
    if (latest.status !== run.status) {
      sendEvent(response, 'status', updateOf(latest));
      if (FINAL_STATUSES.includes(latest.status)) {
        stop();
        response.end();
        return;
      }
    }
    request.on('close', stop);
  });

  router.get('/:id/assessment', async (request, response) => {
    const id = idParam(request, 'id');
    const run = doneRun(manager, id);
    const summary = JSON.parse(await readFile(files.pathOf(id, SUMMARY_FILE), 'utf8')) as Record<string, unknown>;
    const footprint = summary.footprint as { areas?: unknown } | undefined;
    response.json({
      id,
      assessment: summary.assessment ?? null,
      verdicts: summary.verdicts ?? null,
      areas: footprint?.areas ?? null,
      peak: summary.peak ?? null,
      caution: summary.caution,
      revision: run.revision,
    });
  });

  router.get('/:id/results/:name', (request, response, next) => {
    const id = idParam(request, 'id');
    const name = request.params.name;
    if (!RESULT_NAME_PATTERN.test(name)) throw badRequest('name', name, 'the name of one of the run\'s result files (see "results" in GET /api/runs/:id)');
    const run = doneRun(manager, id);
    const file = run.results.find((result) => result.name === name);
    if (file === undefined) {
      throw new ApiError(404, {
        error: `run ${id} has no result file ${JSON.stringify(name)}; it has ${run.results.map((result) => result.name).join(', ')}`,
        field: 'name',
        value: name,
        allowed: run.results.map((result) => result.name).join(', '),
      });
    }
    response.set({
      'Content-Type': file.contentType,
      'Content-Length': String(file.bytes),
      ETag: `"${file.sha256}"`,
      'Cache-Control': 'private, max-age=31536000, immutable',
      // A download when opened as a page; a fetch, an <img> or the map's reader ignore it.
      'Content-Disposition': `attachment; filename="${name}"`,
    });
    if (request.fresh) {
      response.status(304).end();
      return;
    }
    const stream = files.read(id, name);
    stream.on('error', next);
    stream.pipe(response);
  });

  return router;
}

/** A run as the API shows it. */
export function runJson(run: RunRecord): z.input<typeof import('../apiSchemas.ts').runSchema> {
  return {
    id: run.id,
    scenarioId: run.scenarioId,
    revision: run.revision,
    checksum: run.checksum,
    kind: run.kind as RunKind,
    mode: run.options.mode as 'grid' | 'gaussian',
    options: run.options,
    status: run.status,
    progress: run.progress,
    message: run.message,
    error: run.error,
    createdAt: run.createdAt,
    startedAt: run.startedAt,
    finishedAt: run.finishedAt,
    results: run.results.map((file) => ({ ...file, url: `/api/runs/${run.id}/results/${file.name}` })),
  };
}

/**
 * Read a POST /api/runs body: its kind (default "scenario") picks the schema; a comparison's sides
 * given as runs are resolved to the scenario revisions they ran.
 * @throws ApiError 400 naming the field; NotFoundError, RunRefusedError for a side's run
 */
export function submitRequestOf(body: unknown, manager: RunManager, client: string): SubmitRequest {
  const kindValue = body !== null && typeof body === 'object' && !Array.isArray(body) ? (body as { kind?: unknown }).kind : undefined;
  const kind = kindValue === undefined ? 'scenario' : kindValue;
  if (typeof kind !== 'string' || !(RUN_KINDS as readonly string[]).includes(kind)) {
    throw badRequest('kind', kind, `one of ${RUN_KINDS.map((name) => JSON.stringify(name)).join(', ')}`);
  }
  switch (kind as RunKind) {
    case 'scenario': {
      const parsed = parseRequest(runRequestSchema, body);
      const { kind: _kind, scenarioId, revision, mode, ...options } = parsed;
      checkLevels(options.levels_ug_m3, 'levels_ug_m3');
      return { kind: 'scenario', scenarioId, revision, mode, options, client };
    }
    case 'compare': {
      const parsed = parseRequest(compareRequestSchema, body);
      checkLevels(parsed.levels_ug_m3, 'levels_ug_m3');
      const side = (given: z.output<typeof compareRequestSchema>['a'], name: 'a' | 'b'): ResolvedSide => {
        if ((given.scenarioId === undefined) === (given.runId === undefined)) {
          throw badRequest(name, given, '{scenarioId, revision?} or {runId}', `${name}: give either scenarioId (with an optional revision) or runId`);
        }
        if (given.runId !== undefined) {
          if (given.revision !== undefined) throw badRequest(`${name}.revision`, given.revision, 'no revision with runId (the run names its revision)');
          return manager.resolveRunSide(given.runId, name);
        }
        return { scenarioId: given.scenarioId as string, revision: given.revision, mode: parsed.mode };
      };
      const a = side(parsed.a, 'a');
      const b = side(parsed.b, 'b');
      return {
        kind: 'compare',
        scenarioId: a.scenarioId,
        revision: a.revision,
        mode: a.mode,
        firstRunId: a.runId,
        second: b,
        options: parsed.levels_ug_m3 !== undefined ? { levels_ug_m3: parsed.levels_ug_m3 } : {},
        client,
      };
    }
    case 'sweep':
    case 'stack-height':
    case 'site': {
      const parsed = parseRequest(RUN_REQUEST_SCHEMAS[kind as 'sweep' | 'stack-height' | 'site'], body) as Record<string, unknown> & { scenarioId: string; revision?: number; mode?: SolverMode };
      const { kind: _kind, scenarioId, revision, mode, ...options } = parsed;
      if (kind === 'site') checkLevels(options.levels_ug_m3 as number[] | undefined, 'levels_ug_m3');
      return { kind: kind as RunKind, scenarioId, revision, mode, options, client };
    }
  }
}

function checkLevels(levels: number[] | undefined, field: string): void {
  levels?.forEach((level, index) => {
    if (index > 0 && !(level > levels[index - 1])) throw badRequest(`${field}[${index}]`, level, `a level above ${levels[index - 1]} (levels increase)`);
  });
}

/** The run, which must be done (409 otherwise). */
function doneRun(manager: RunManager, id: string): RunRecord {
  const run = manager.get(id);
  if (run.status !== 'done') {
    throw new ApiError(409, {
      error: `run ${id} is ${run.status}; its results exist once it is done`,
      field: 'id',
      value: id,
      allowed: 'a run whose status is done',
    });
  }
  return run;
}

function updateOf(run: RunRecord): RunUpdate {
  return { id: run.id, status: run.status, progress: run.progress, message: run.message, error: run.error };
}

function sendEvent(response: Response, event: string, data: RunUpdate): void {
  response.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
}

/**
 * The HTTP app (Express 5), built from its dependencies and never listening by itself: `main.ts`
 * listens, tests hand it to supertest. Every request passes the security headers (helmet, a strict
 * content security policy: no inline script, no other origin), the request log, the body limit and
 * checks, then its route; anything thrown ends in the one error middleware as JSON
 * `{ error, field, value, allowed }`.
 */
import express, { type Request } from 'express';
import helmet from 'helmet';
import type { Logger } from 'pino';
import type { RunManager } from '../jobs/runManager.ts';
import type { ResultFileStore } from '../storage/resultFiles.ts';
import type { RunStore } from '../storage/runStore.ts';
import type { ScenarioStore } from '../storage/scenarioStore.ts';
import { ApiError, errorMiddleware } from './errors.ts';
import { openApiDocument } from './openapi.ts';
import { requestLog } from './requestLog.ts';
import { limitJsonDepth, requireToken } from './requestChecks.ts';
import { pageRoutes } from './routes/pages.ts';
import { runRoutes } from './routes/runs.ts';
import { scenarioRoutes } from './routes/scenarios.ts';
import { validateRoutes } from './routes/validate.ts';

/** Largest request body [bytes]: a year of hourly weather inline is about 1.5 MB. */
export const DEFAULT_BODY_LIMIT_bytes = 8 * 1024 * 1024;

export const DEFAULT_WEB_ROOT = new URL('../../web/dist/', import.meta.url).pathname;

export interface AppDependencies {
  scenarios: ScenarioStore;
  runs: RunStore;
  files: ResultFileStore;
  manager: RunManager;
  logger: Logger;
  /** the built map page (default web/dist) */
  webRoot?: string;
  /** when set, every /api request needs `Authorization: Bearer TOKEN` */
  token?: string;
  /** largest request body [bytes] (default 8 MiB) */
  bodyLimit_bytes?: number;
}

/**
 * @example const app = createApp(services); app.listen(8765, '127.0.0.1');
 */
export function createApp(deps: AppDependencies): express.Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('etag', false);
  app.set('query parser', 'simple');

  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          workerSrc: ["'self'", 'blob:'],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
        },
      },
      strictTransportSecurity: false,
    }),
  );
  app.use(requestLog(deps.logger));

  const api = express.Router();
  if (deps.token !== undefined) api.use(requireToken(deps.token));
  api.use(express.json({ limit: deps.bodyLimit_bytes ?? DEFAULT_BODY_LIMIT_bytes, strict: true }));
  api.use(limitJsonDepth);
  api.get('/health', (_request, response) => {
    response.json({ ok: true, runs: deps.manager.activity() });
  });
  api.get('/openapi.json', (_request, response) => {
    response.json(openApiDocument());
  });
  api.use('/scenarios', scenarioRoutes(deps.scenarios));
  api.use('/validate', validateRoutes(deps.manager.limits.maxCellsPerRun));
  api.use('/runs', runRoutes({ manager: deps.manager, runs: deps.runs, files: deps.files, clientOf }));
  api.use((request, _response) => {
    throw new ApiError(404, { error: `no API route ${request.method} ${request.path}`, field: 'path', value: request.path, allowed: 'a route listed in /api/openapi.json' });
  });
  app.use('/api', api);

  app.use(pageRoutes(deps.webRoot ?? DEFAULT_WEB_ROOT, deps.scenarios));
  app.use((request, response) => {
    response.status(404).type('text/plain').send(`not found: ${request.path}\n`);
  });
  app.use(errorMiddleware(deps.logger));
  return app;
}

/** Who a request comes from, for the per-client run limit: its address. */
function clientOf(request: Request): string {
  return request.ip ?? request.socket.remoteAddress ?? 'unknown';
}

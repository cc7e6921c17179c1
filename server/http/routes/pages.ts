/**
 * The map page: `web/dist/` served as static files at `/` when it has been built; otherwise a small
 * page (EJS, every user string escaped) that says it is not built and lists the saved scenarios.
 */
import { existsSync } from 'node:fs';
import path from 'node:path';
import ejs from 'ejs';
import express, { Router } from 'express';
import type { ScenarioStore } from '../../storage/scenarioStore.ts';
import { SCREENING_CAUTION } from '../../writers/caution.ts';

const NOT_BUILT_VIEW = new URL('../views/notBuilt.ejs', import.meta.url).pathname;

const NOT_BUILT_CSS = 'body{font-family:system-ui,sans-serif;max-width:46rem;margin:2rem auto;padding:0 1rem;line-height:1.5}.caution{border-left:4px solid #b45309;padding-left:.75rem}';

/**
 * @param webRoot the built page's folder (web/dist)
 * @param scenarios for the not-built page's list
 */
export function pageRoutes(webRoot: string, scenarios: ScenarioStore): Router {
  const router = Router();
  if (existsSync(path.join(webRoot, 'index.html'))) {
    router.use(express.static(webRoot, { index: 'index.html', fallthrough: true }));
    return router;
  }
  router.get('/server-page.css', (_request, response) => {
    response.type('text/css').send(NOT_BUILT_CSS);
  });
  router.get(['/', '/index.html'], async (_request, response) => {
    const page = scenarios.list({ limit: 50, offset: 0 });
    const html = await ejs.renderFile(NOT_BUILT_VIEW, { scenarios: page.items, total: page.total, caution: SCREENING_CAUTION });
    response.type('html').send(html);
  });
  return router;
}

/**
 * The server's parts wired together over one data folder: the SQLite database
 * (`DATA/plumeplan.sqlite`), the result files beside it (`DATA/results/`), the stores, a run executor
 * and the run manager. `main.ts` and the tests both start from here.
 */
import path from 'node:path';
import { readdir } from 'node:fs/promises';
import type { Logger } from 'pino';
import type { RunExecutor } from './jobs/runExecutor.ts';
import { RunManager, type RunLimits } from './jobs/runManager.ts';
import { WorkerPoolExecutor } from './jobs/workerPoolExecutor.ts';
import { openDatabase, type SqliteDatabase } from './storage/database.ts';
import { ResultFileStore } from './storage/resultFiles.ts';
import { RunStore } from './storage/runStore.ts';
import { ScenarioStore } from './storage/scenarioStore.ts';
import { inlineScenarioFile } from './scenarioFiles/inlineScenario.ts';
import { parseScenario } from '../scenarios/format/schema.ts';

export const DATABASE_FILE = 'plumeplan.sqlite';
export const RESULTS_FOLDER = 'results';

export interface ServicesOptions {
  /** the data folder */
  dataDir: string;
  logger: Logger;
  /** default: a pool of worker threads, one per core */
  executor?: RunExecutor;
  limits?: Partial<RunLimits>;
}

export interface Services {
  db: SqliteDatabase;
  scenarios: ScenarioStore;
  runs: RunStore;
  files: ResultFileStore;
  manager: RunManager;
  logger: Logger;
  /** runs a restart had interrupted, marked so at opening */
  interruptedAtStart: string[];
  /** stop the runs (marking them interrupted) and close the database */
  close(): Promise<void>;
}

/**
 * Open the data folder: migrate the database, mark runs a restart interrupted, remove result folders
 * no finished run names.
 */
export async function openServices(options: ServicesOptions): Promise<Services> {
  const db = openDatabase(path.join(options.dataDir, DATABASE_FILE));
  const scenarios = new ScenarioStore(db);
  const runs = new RunStore(db);
  const files = new ResultFileStore(path.join(options.dataDir, RESULTS_FOLDER));
  const executor = options.executor ?? new WorkerPoolExecutor();
  const manager = new RunManager({ scenarios, runs, files, executor, logger: options.logger, limits: options.limits });
  const { interrupted } = await manager.recover();
  let closed = false;
  return {
    db,
    scenarios,
    runs,
    files,
    manager,
    logger: options.logger,
    interruptedAtStart: interrupted,
    async close() {
      if (closed) return;
      closed = true;
      await manager.shutdown();
      db.close();
    },
  };
}

export const DEMO_SCENARIOS_FOLDER = new URL('../scenarios/', import.meta.url).pathname;

/**
 * Load the demo scenarios (`scenarios/* /scenario.json`) when the database holds no scenario at all.
 * @returns the names loaded (none when the database already had scenarios)
 */
export async function loadDemoScenarios(scenarios: ScenarioStore, folder = DEMO_SCENARIOS_FOLDER): Promise<string[]> {
  if (scenarios.count() > 0) return [];
  const entries = (await readdir(folder, { withFileTypes: true })).filter((entry) => entry.isDirectory() && entry.name !== 'format');
  const loaded: string[] = [];
  for (const entry of entries.sort((a, b) => a.name.localeCompare(b.name))) {
    const file = path.join(folder, entry.name, 'scenario.json');
    const stored = await inlineScenarioFile(file).catch(() => null);
    if (stored === null) continue;
    const parsed = parseScenario(stored);
    if (!parsed.ok) continue;
    scenarios.create(stored, parsed.scenario.name);
    loaded.push(parsed.scenario.name);
  }
  return loaded;
}

/**
 * The runs' life, between the routes, the storage and a `RunExecutor`: a submission is checked,
 * recorded as queued and handed to the executor; its events move the row through running to done,
 * failed or cancelled and reach whoever listens (the progress stream); its result files are written
 * durably before the row that names them commits. An identical submission (same scenario, same
 * content, same kind and options) is answered with the run already done or under way.
 */
import { EventEmitter } from 'node:events';
import type { Logger } from 'pino';
import type { SolverMode } from '../../scenarios/format/types.ts';
import { canonicalJson, sha256Hex } from '../storage/ids.ts';
import type { ResultFileStore } from '../storage/resultFiles.ts';
import { FINAL_STATUSES, type RunError, type RunRecord, type RunStatus, type RunStore } from '../storage/runStore.ts';
import { NotFoundError, type RevisionWithBody, type ScenarioRecord, type ScenarioStore } from '../storage/scenarioStore.ts';
import { admitScenarioPack, admitSite, admitStackHeight, admitSweep, largerPacks, withoutPack, type ScenarioPackInput, type SiteOptionsInput, type StackHeightOptionsInput, type SweepOptionsInput } from './analysisAdmission.ts';
import { planRun, RunRefusedError } from './admission.ts';
import type { RunEvent, RunExecutor, RunKind } from './runExecutor.ts';

/** What listeners of a run hear: its status, progress and message (and its error once failed). */
export interface RunUpdate {
  id: string;
  status: RunStatus;
  progress: number;
  message: string;
  error: RunError | null;
}

export interface RunLimits {
  /** most cells a run may have */
  maxCellsPerRun: number;
  /** most queued or running runs one client may have */
  maxActiveRunsPerClient: number;
}

export const DEFAULT_RUN_LIMITS: RunLimits = {
  // The demo's grid is 200 x 200 x 25 = 1 M cells (about 128 MB by the solver's estimate); four times
  // that keeps two runs at once well inside an ordinary laptop's memory.
  maxCellsPerRun: 4_000_000,
  maxActiveRunsPerClient: 4,
};

/** Shortest time between two progress writes of one run to the database [ms]; listeners hear every one. */
const PROGRESS_WRITE_INTERVAL_ms = 500;

export interface SubmitRequest {
  scenarioId: string;
  /** default: the latest */
  revision?: number;
  kind: RunKind;
  mode?: SolverMode;
  /** the kind's own options as the request gave them (shape checked; checked against the scenario here) */
  options?: Record<string, unknown>;
  /** a comparison's side B (side A is scenarioId, revision, mode) */
  second?: ComparedSideRequest;
  /** a comparison's side A when it was given as a finished run */
  firstRunId?: string;
  /** who asked (an address or a token), for the per-client limit */
  client: string;
}

/** One side of a comparison: a stored scenario revision, or a finished scenario run. */
export interface ComparedSideRequest {
  scenarioId?: string;
  revision?: number;
  runId?: string;
}

/** A side resolved to the scenario revision and mode it runs. */
export interface ResolvedSide {
  scenarioId: string;
  revision?: number;
  mode?: SolverMode;
  runId?: string;
}

export interface RunManagerDependencies {
  scenarios: ScenarioStore;
  runs: RunStore;
  files: ResultFileStore;
  executor: RunExecutor;
  logger: Logger;
  limits?: Partial<RunLimits>;
}

export class RunManager {
  readonly limits: RunLimits;
  private readonly updates = new EventEmitter();
  private readonly lastProgressWrite = new Map<string, number>();
  /** writes of result files under way, so shutdown can wait for them */
  private readonly pendingWrites = new Set<Promise<void>>();

  constructor(private readonly deps: RunManagerDependencies) {
    this.limits = { ...DEFAULT_RUN_LIMITS, ...deps.limits };
    this.updates.setMaxListeners(0);
  }

  /**
   * Mark runs a restart stopped as interrupted and remove result folders no finished run names.
   * Call once at start-up, before serving.
   */
  async recover(): Promise<{ interrupted: string[]; removedFolders: number }> {
    const interrupted = this.deps.runs.interruptUnfinished();
    for (const id of interrupted) this.deps.logger.info({ run: id, status: 'interrupted' }, 'run interrupted by a restart');
    const removedFolders = await this.deps.files.removeAllBut(this.deps.runs.doneIds());
    return { interrupted, removedFolders };
  }

  /**
   * Submit a run.
   * @returns the run and whether it is an earlier identical one
   * @throws NotFoundError (no such scenario or revision), RunRefusedError (422 the scenario cannot
   *   run; 429 too many runs of this client)
   */
  submit(request: SubmitRequest): { run: RunRecord; reused: boolean } {
    const { runs, executor, logger } = this.deps;
    const compare = request.kind === 'compare';
    const first = this.scenarioSide(request.scenarioId, request.revision, compare ? 'a' : '');
    const plan = planRun(first.revision.scenario, request.mode, this.limits.maxCellsPerRun, compare ? 'a.' : '');
    let options: Record<string, unknown> = { mode: plan.mode };
    let second: { revision: RevisionWithBody; mode: SolverMode } | undefined;
    switch (request.kind) {
      case 'scenario':
        options = { mode: plan.mode, ...admitScenarioPack(plan.scenario, (request.options ?? {}) as ScenarioPackInput) };
        break;
      case 'compare': {
        const side = request.second as ResolvedSide;
        const found = this.scenarioSide(side.scenarioId, side.revision, 'b');
        const secondPlan = planRun(found.revision.scenario, side.mode, this.limits.maxCellsPerRun, 'b.');
        second = { revision: found.revision, mode: secondPlan.mode };
        const describe = (revision: RevisionWithBody, mode: SolverMode, runId?: string) => ({
          scenarioId: revision.scenarioId,
          revision: revision.revision,
          mode,
          ...(runId !== undefined ? { runId } : {}),
        });
        options = {
          mode: plan.mode,
          a: describe(first.revision, plan.mode, request.firstRunId),
          b: describe(found.revision, secondPlan.mode, side.runId),
          ...(request.options?.levels_ug_m3 !== undefined ? { levels_ug_m3: request.options.levels_ug_m3 } : {}),
        };
        break;
      }
      case 'sweep':
        options = { mode: plan.mode, ...admitSweep(plan.scenario, request.options as unknown as SweepOptionsInput) };
        break;
      case 'stack-height':
        options = { mode: plan.mode, ...admitStackHeight(plan.scenario, request.options as unknown as StackHeightOptionsInput) };
        break;
      case 'site':
        options = { mode: plan.mode, ...admitSite(plan.scenario, (request.options ?? {}) as SiteOptionsInput) };
        break;
    }
    const scenario = first.scenario;
    const revision = first.revision;
    const keyOf = (keyOptions: Record<string, unknown>): string =>
      sha256Hex(
        canonicalJson({ scenarioId: scenario.id, checksum: revision.checksum, kind: request.kind, options: keyOptions, ...(second !== undefined ? { secondChecksum: second.revision.checksum } : {}) }),
      );
    const dedupeKey = keyOf(options);
    // A run that made a larger pack (same CRS and layers) answers a request for a smaller one too, and
    // any run of the same mode answers a request without a pack (its core files are the same).
    const larger = request.kind === 'scenario' ? largerPacks(options).map(keyOf) : [];
    const earlier =
      [dedupeKey, ...larger].map((key) => runs.findReusable(key)).find((run) => run !== undefined) ??
      (request.kind === 'scenario' && options.pack === undefined
        ? runs.findReusableOf(scenario.id, revision.checksum, 'scenario').find((run) => canonicalJson(withoutPack(run.options)) === canonicalJson(options))
        : undefined);
    if (earlier !== undefined) {
      logger.info({ run: earlier.id, status: earlier.status, reused: true }, 'identical submission served from an earlier run');
      return { run: earlier, reused: true };
    }
    const active = runs.countActive(request.client);
    if (active >= this.limits.maxActiveRunsPerClient) {
      throw new RunRefusedError(429, {
        error: `this client has ${active} runs queued or running; at most ${this.limits.maxActiveRunsPerClient} at once. Wait for one to finish or cancel one`,
        field: 'scenarioId',
        value: request.scenarioId,
        allowed: `at most ${this.limits.maxActiveRunsPerClient} queued or running runs per client`,
      });
    }
    const run = runs.insert({
      scenarioId: scenario.id,
      revision: revision.revision,
      checksum: revision.checksum,
      kind: request.kind,
      options,
      dedupeKey,
      client: request.client,
    });
    logger.info({ run: run.id, scenario: scenario.id, revision: revision.revision, kind: run.kind, mode: plan.mode, cells: plan.cells, status: 'queued' }, 'run queued');
    executor.submit(
      { id: run.id, kind: request.kind, scenario: revision.scenario, ...(second !== undefined ? { secondScenario: second.revision.scenario } : {}), options },
      (event) => this.onEvent(run.id, event),
    );
    return { run: runs.get(run.id) as RunRecord, reused: false };
  }

  /**
   * A comparison side given as a finished run: the scenario revision and mode that run used.
   * @param field how the side is named in errors ("a" or "b")
   * @throws NotFoundError (no such run); RunRefusedError (409 not done, 422 not a scenario run)
   */
  resolveRunSide(runId: string, field: string): ResolvedSide {
    const run = this.deps.runs.get(runId);
    if (run === undefined) throw new NotFoundError(`${field}.runId`, runId, `${field}.runId: no run with id ${runId}`);
    if (run.status !== 'done') {
      throw new RunRefusedError(409, {
        error: `${field}.runId: run ${runId} is ${run.status}; a comparison takes finished runs`,
        field: `${field}.runId`,
        value: runId,
        allowed: 'a run whose status is done',
      });
    }
    if (run.kind !== 'scenario') {
      throw new RunRefusedError(422, {
        error: `${field}.runId: run ${runId} is a ${run.kind} run; a comparison takes runs of a scenario`,
        field: `${field}.runId`,
        value: runId,
        allowed: 'a run of kind "scenario"',
      });
    }
    return { scenarioId: run.scenarioId, revision: run.revision, mode: run.options.mode as SolverMode, runId };
  }

  /** The stored scenario and revision, with errors naming the side's fields ("a.scenarioId"...). */
  private scenarioSide(scenarioId: string, revisionNumber: number | undefined, side: string): { scenario: ScenarioRecord; revision: RevisionWithBody } {
    const { scenarios } = this.deps;
    try {
      const scenario = scenarios.get(scenarioId);
      return { scenario, revision: scenarios.revision(scenario.id, revisionNumber) };
    } catch (error) {
      if (side === '' || !(error instanceof NotFoundError)) throw error;
      throw new NotFoundError(`${side}.${error.field === 'id' ? 'scenarioId' : error.field}`, error.value, `${side}: ${error.message}`);
    }
  }

  /**
   * Cancel a queued or running run.
   * @throws NotFoundError; RunRefusedError (409) when it has already finished
   */
  cancel(id: string): RunRecord {
    const run = this.get(id);
    if (FINAL_STATUSES.includes(run.status)) {
      throw new RunRefusedError(409, {
        error: `run ${id} has already finished (${run.status}); only a queued or running run can be cancelled`,
        field: 'id',
        value: id,
        allowed: 'a queued or running run',
      });
    }
    if (!this.deps.executor.cancel(id)) {
      // Known to the database but not to the executor (its files are being written): cancel the row.
      if (this.deps.runs.markCancelled(id)) this.announce(id);
    }
    return this.get(id);
  }

  /** What the executor is doing: runs computing, waiting, and its capacity. */
  activity(): ReturnType<RunExecutor['activity']> {
    return this.deps.executor.activity();
  }

  /** @throws NotFoundError */
  get(id: string): RunRecord {
    const run = this.deps.runs.get(id);
    if (run === undefined) throw new NotFoundError('id', id, `no run with id ${id}`);
    return run;
  }

  /** Listen to a run's updates; returns the function that stops listening. */
  subscribe(id: string, listener: (update: RunUpdate) => void): () => void {
    this.updates.on(id, listener);
    return () => this.updates.off(id, listener);
  }

  /** Stop computing (the executor's threads end), wait for result writes, mark unfinished runs interrupted. */
  async shutdown(): Promise<string[]> {
    await this.deps.executor.close();
    await Promise.allSettled([...this.pendingWrites]);
    const interrupted = this.deps.runs.interruptUnfinished();
    for (const id of interrupted) {
      this.deps.logger.info({ run: id, status: 'interrupted' }, 'run interrupted by shutdown');
      this.announce(id);
    }
    return interrupted;
  }

  private onEvent(id: string, event: RunEvent): void {
    const { runs, logger } = this.deps;
    switch (event.type) {
      case 'started':
        if (runs.markRunning(id)) {
          logger.info({ run: id, status: 'running' }, 'run started');
          this.announce(id);
        }
        return;
      case 'progress': {
        const now = Date.now();
        if (now - (this.lastProgressWrite.get(id) ?? 0) >= PROGRESS_WRITE_INTERVAL_ms) {
          runs.updateProgress(id, event.fraction, event.message);
          this.lastProgressWrite.set(id, now);
        }
        this.updates.emit(id, { id, status: 'running', progress: event.fraction, message: event.message, error: null } satisfies RunUpdate);
        return;
      }
      case 'done': {
        const write = this.storeResults(id, event.files);
        this.pendingWrites.add(write);
        void write.finally(() => this.pendingWrites.delete(write));
        return;
      }
      case 'failed':
        if (runs.markFailed(id, event.error)) {
          logger.info({ run: id, status: 'failed', field: event.error.field }, 'run failed');
          this.finish(id);
        }
        return;
      case 'cancelled':
        if (runs.markCancelled(id)) {
          logger.info({ run: id, status: 'cancelled' }, 'run cancelled');
          this.finish(id);
        }
        return;
    }
  }

  /** Files first (synced and renamed), then the row: a crash in between leaves a folder, never a dangling row. */
  private async storeResults(id: string, files: Parameters<ResultFileStore['writeAll']>[1]): Promise<void> {
    const { runs, logger } = this.deps;
    try {
      const records = await this.deps.files.writeAll(id, files);
      if (runs.markDone(id, records)) {
        logger.info({ run: id, status: 'done', files: records.length }, 'run done');
      } else {
        await this.deps.files.remove(id);
      }
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      if (runs.markFailed(id, { error: `internal failure while storing the results: ${message}`, field: null })) {
        logger.error({ run: id, status: 'failed' }, 'storing the results failed');
      }
    }
    this.finish(id);
  }

  private finish(id: string): void {
    this.lastProgressWrite.delete(id);
    this.announce(id);
  }

  private announce(id: string): void {
    const run = this.deps.runs.get(id);
    if (run === undefined) return;
    this.updates.emit(id, { id, status: run.status, progress: run.progress, message: run.message, error: run.error } satisfies RunUpdate);
  }
}

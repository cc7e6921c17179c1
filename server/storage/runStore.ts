/**
 * Runs: one row per run, from queued to done, failed, cancelled or interrupted, with its progress,
 * timings, the scenario revision it ran and that revision's checksum, the error when it failed, and
 * the result files it produced. Status changes are guarded (`... WHERE status IN (...)`), so a late
 * message from a worker cannot bring a cancelled run back to life.
 */
import type { SqliteDatabase } from './database.ts';
import { newId } from './ids.ts';

export const RUN_STATUSES = ['queued', 'running', 'done', 'failed', 'cancelled', 'interrupted'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];

/** Statuses a run does not leave. */
export const FINAL_STATUSES: readonly RunStatus[] = ['done', 'failed', 'cancelled', 'interrupted'];

/** What went wrong, in the API's error shape. */
export interface RunError {
  error: string;
  field: string | null;
  value?: unknown;
  allowed?: string;
}

export interface ResultFileRecord {
  name: string;
  contentType: string;
  bytes: number;
  sha256: string;
}

export interface RunRecord {
  id: string;
  scenarioId: string;
  revision: number;
  checksum: string;
  kind: string;
  options: Record<string, unknown>;
  status: RunStatus;
  /** fraction done, 0 to 1 */
  progress: number;
  message: string;
  error: RunError | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  results: ResultFileRecord[];
}

export interface NewRun {
  scenarioId: string;
  revision: number;
  checksum: string;
  kind: string;
  options: Record<string, unknown>;
  dedupeKey: string;
  client: string;
}

interface RunRow {
  id: string;
  scenario_id: string;
  revision: number;
  checksum: string;
  kind: string;
  options: string;
  status: RunStatus;
  progress: number;
  message: string;
  error: string | null;
  created_at: string;
  started_at: string | null;
  finished_at: string | null;
}

const RUN_COLUMNS =
  'id, scenario_id, revision, checksum, kind, options, status, progress, message, error, created_at, started_at, finished_at';

export class RunStore {
  constructor(
    private readonly db: SqliteDatabase,
    private readonly now: () => Date = () => new Date(),
  ) {}

  /** Record a new run, queued. */
  insert(run: NewRun): RunRecord {
    const id = newId();
    this.db
      .prepare(
        `INSERT INTO runs (id, scenario_id, revision, checksum, kind, options, dedupe_key, client, status, created_at)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, 'queued', ?)`,
      )
      .run(id, run.scenarioId, run.revision, run.checksum, run.kind, JSON.stringify(run.options), run.dedupeKey, run.client, this.time());
    return this.get(id) as RunRecord;
  }

  /** The run with this id, or undefined. */
  get(id: string): RunRecord | undefined {
    const row = this.db.prepare(`SELECT ${RUN_COLUMNS} FROM runs WHERE id = ?`).get(id) as RunRow | undefined;
    if (row === undefined) return undefined;
    const results = this.db
      .prepare('SELECT name, content_type, bytes, sha256 FROM run_results WHERE run_id = ? ORDER BY name')
      .all(id) as { name: string; content_type: string; bytes: number; sha256: string }[];
    return toRunRecord(row, results);
  }

  /** Runs, newest first, of one scenario or of all. */
  list(options: { scenarioId?: string; limit: number; offset: number }): { items: RunRecord[]; total: number } {
    const where = options.scenarioId === undefined ? '' : 'WHERE scenario_id = ?';
    const parameters = options.scenarioId === undefined ? [] : [options.scenarioId];
    const rows = this.db
      .prepare(`SELECT ${RUN_COLUMNS} FROM runs ${where} ORDER BY created_at DESC, id LIMIT ? OFFSET ?`)
      .all(...parameters, options.limit, options.offset) as RunRow[];
    const { total } = this.db.prepare(`SELECT count(*) AS total FROM runs ${where}`).get(...parameters) as { total: number };
    return { items: rows.map((row) => this.get(row.id) as RunRecord), total };
  }

  /** The newest run with this dedupe key that finished well or is still under way, if any. */
  findReusable(dedupeKey: string): RunRecord | undefined {
    const row = this.db
      .prepare(
        `SELECT id FROM runs WHERE dedupe_key = ? AND status IN ('done', 'queued', 'running') ORDER BY created_at DESC LIMIT 1`,
      )
      .get(dedupeKey) as { id: string } | undefined;
    return row === undefined ? undefined : this.get(row.id);
  }

  /**
   * Runs of one scenario revision content and kind that finished well or are under way, newest first,
   * whatever their options: for a caller that decides itself which options answer (a run with a
   * consultation pack answers a request without one).
   */
  findReusableOf(scenarioId: string, checksum: string, kind: string): RunRecord[] {
    const rows = this.db
      .prepare(
        `SELECT id FROM runs WHERE scenario_id = ? AND checksum = ? AND kind = ? AND status IN ('done', 'queued', 'running') ORDER BY created_at DESC LIMIT 50`,
      )
      .all(scenarioId, checksum, kind) as { id: string }[];
    return rows.map((row) => this.get(row.id) as RunRecord);
  }

  /** Runs of a client that are queued or running. */
  countActive(client: string): number {
    return (
      this.db.prepare(`SELECT count(*) AS n FROM runs WHERE client = ? AND status IN ('queued', 'running')`).get(client) as { n: number }
    ).n;
  }

  /** queued -> running. @returns whether the run was queued */
  markRunning(id: string): boolean {
    return this.transition(id, ['queued'], "status = 'running', started_at = ?", [this.time()]);
  }

  /** Progress of a running run. */
  updateProgress(id: string, fraction: number, message: string): void {
    this.db.prepare(`UPDATE runs SET progress = ?, message = ? WHERE id = ? AND status = 'running'`).run(fraction, message, id);
  }

  /**
   * running -> done, recording its result files in the same transaction (the files must already be
   * on disk). @returns whether the run was running
   */
  markDone(id: string, results: readonly ResultFileRecord[]): boolean {
    return this.db.transaction(() => {
      const changed = this.transition(id, ['running'], "status = 'done', progress = 1, message = 'done', finished_at = ?", [this.time()]);
      if (!changed) return false;
      const insert = this.db.prepare('INSERT INTO run_results (run_id, name, content_type, bytes, sha256) VALUES (?, ?, ?, ?, ?)');
      for (const file of results) insert.run(id, file.name, file.contentType, file.bytes, file.sha256);
      return true;
    })();
  }

  /** queued or running -> failed. */
  markFailed(id: string, error: RunError): boolean {
    return this.transition(id, ['queued', 'running'], "status = 'failed', error = ?, finished_at = ?", [JSON.stringify(error), this.time()]);
  }

  /** queued or running -> cancelled. */
  markCancelled(id: string): boolean {
    return this.transition(id, ['queued', 'running'], "status = 'cancelled', message = 'cancelled', finished_at = ?", [this.time()]);
  }

  /**
   * Every queued or running run -> interrupted: at start-up (a restart stopped them) and at shutdown.
   * @returns the ids marked
   */
  interruptUnfinished(): string[] {
    const time = this.time();
    return this.db.transaction(() => {
      const ids = (this.db.prepare(`SELECT id FROM runs WHERE status IN ('queued', 'running')`).all() as { id: string }[]).map((row) => row.id);
      this.db
        .prepare(
          `UPDATE runs SET status = 'interrupted', message = 'interrupted by a server restart; submit the run again', finished_at = ?
           WHERE status IN ('queued', 'running')`,
        )
        .run(time);
      return ids;
    })();
  }

  /** Ids of every run that finished with result files. */
  doneIds(): Set<string> {
    return new Set((this.db.prepare(`SELECT id FROM runs WHERE status = 'done'`).all() as { id: string }[]).map((row) => row.id));
  }

  private transition(id: string, from: readonly RunStatus[], set: string, parameters: unknown[]): boolean {
    const placeholders = from.map(() => '?').join(', ');
    const info = this.db.prepare(`UPDATE runs SET ${set} WHERE id = ? AND status IN (${placeholders})`).run(...parameters, id, ...from);
    return info.changes === 1;
  }

  private time(): string {
    return this.now().toISOString();
  }
}

function toRunRecord(row: RunRow, results: { name: string; content_type: string; bytes: number; sha256: string }[]): RunRecord {
  return {
    id: row.id,
    scenarioId: row.scenario_id,
    revision: row.revision,
    checksum: row.checksum,
    kind: row.kind,
    options: JSON.parse(row.options) as Record<string, unknown>,
    status: row.status,
    progress: row.progress,
    message: row.message,
    error: row.error === null ? null : (JSON.parse(row.error) as RunError),
    createdAt: row.created_at,
    startedAt: row.started_at,
    finishedAt: row.finished_at,
    results: results.map((file) => ({ name: file.name, contentType: file.content_type, bytes: file.bytes, sha256: file.sha256 })),
  };
}

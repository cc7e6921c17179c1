/**
 * Scenarios and their revisions. Every save adds a revision; nothing is overwritten. A delete only
 * marks the scenario deleted (its revisions stay, and `restore` undoes it). A save names the revision
 * it was based on: when another save came first, it is refused (`StaleRevisionError`) instead of
 * silently replacing the other's work.
 */
import type { SqliteDatabase } from './database.ts';
import { canonicalJson, newId, sha256Hex } from './ids.ts';

export interface ScenarioRecord {
  id: string;
  /** the latest revision's number */
  revision: number;
  name: string;
  createdAt: string;
  updatedAt: string;
  /** when it was deleted, or null */
  deletedAt: string | null;
}

export interface RevisionRecord {
  scenarioId: string;
  revision: number;
  name: string;
  /** SHA-256 of the scenario's canonical JSON (keys sorted) */
  checksum: string;
  createdAt: string;
}

export interface RevisionWithBody extends RevisionRecord {
  /** the scenario as submitted */
  scenario: unknown;
}

/** A save based on a revision that is no longer the latest. */
export class StaleRevisionError extends Error {
  override name = 'StaleRevisionError';
  constructor(
    readonly given: number,
    readonly latest: number,
  ) {
    super(`revision ${given} is not the latest (${latest}); reload the scenario and save again`);
  }
}

/** A scenario id that names no scenario (or a deleted one, where that matters). */
export class NotFoundError extends Error {
  override name = 'NotFoundError';
  constructor(
    readonly field: string,
    readonly value: unknown,
    message: string,
  ) {
    super(message);
  }
}

export interface ScenarioPage {
  items: ScenarioRecord[];
  total: number;
}

interface ScenarioRow {
  id: string;
  current_revision: number;
  name: string;
  created_at: string;
  updated_at: string;
  deleted_at: string | null;
}

interface RevisionRow {
  scenario_id: string;
  revision: number;
  name: string;
  checksum: string;
  created_at: string;
  body?: string;
}

/** The store of scenarios, over one database. */
export class ScenarioStore {
  constructor(
    private readonly db: SqliteDatabase,
    private readonly now: () => Date = () => new Date(),
  ) {}

  /**
   * Save a new scenario as its revision 1.
   * @param scenario the scenario as submitted (already checked against the format)
   * @param name its name, for lists
   */
  create(scenario: unknown, name: string): ScenarioRecord {
    const id = newId();
    const time = this.now().toISOString();
    this.db.transaction(() => {
      this.db
        .prepare('INSERT INTO scenarios (id, created_at, updated_at, deleted_at, current_revision) VALUES (?, ?, ?, NULL, 1)')
        .run(id, time, time);
      this.insertRevision(id, 1, scenario, name, time);
    })();
    return this.get(id, { includeDeleted: true });
  }

  /**
   * Save a new revision of a scenario.
   * @param basedOn the revision the edit started from; must be the latest
   * @throws NotFoundError when there is no such scenario or it is deleted; StaleRevisionError when
   *   `basedOn` is not the latest revision
   */
  save(id: string, scenario: unknown, name: string, basedOn: number): ScenarioRecord {
    const time = this.now().toISOString();
    this.db.transaction(() => {
      const row = this.row(id);
      if (row === undefined || row.deleted_at !== null) throw notFound(id, row !== undefined);
      if (basedOn !== row.current_revision) throw new StaleRevisionError(basedOn, row.current_revision);
      const revision = row.current_revision + 1;
      this.insertRevision(id, revision, scenario, name, time);
      this.db.prepare('UPDATE scenarios SET current_revision = ?, updated_at = ? WHERE id = ?').run(revision, time, id);
    })();
    return this.get(id);
  }

  /**
   * The scenario's record.
   * @throws NotFoundError when there is none (or it is deleted, unless `includeDeleted`)
   */
  get(id: string, options: { includeDeleted?: boolean } = {}): ScenarioRecord {
    const row = this.row(id);
    if (row === undefined || (row.deleted_at !== null && options.includeDeleted !== true)) throw notFound(id, row !== undefined);
    return toScenarioRecord(row);
  }

  /** One revision with its content (the latest when `revision` is undefined). */
  revision(id: string, revision?: number): RevisionWithBody {
    const record = this.get(id, { includeDeleted: true });
    const wanted = revision ?? record.revision;
    const row = this.db
      .prepare('SELECT scenario_id, revision, name, checksum, created_at, body FROM scenario_revisions WHERE scenario_id = ? AND revision = ?')
      .get(id, wanted) as RevisionRow | undefined;
    if (row === undefined) {
      throw new NotFoundError('revision', wanted, `scenario ${id} has no revision ${wanted}; it has revisions 1 to ${record.revision}`);
    }
    return { ...toRevisionRecord(row), scenario: JSON.parse(row.body as string) as unknown };
  }

  /** Every revision of a scenario, newest first (without their content). */
  revisions(id: string): RevisionRecord[] {
    this.get(id, { includeDeleted: true });
    const rows = this.db
      .prepare('SELECT scenario_id, revision, name, checksum, created_at FROM scenario_revisions WHERE scenario_id = ? ORDER BY revision DESC')
      .all(id) as RevisionRow[];
    return rows.map(toRevisionRecord);
  }

  /** A page of scenarios, most recently changed first. */
  list(options: { limit: number; offset: number; deleted?: boolean }): ScenarioPage {
    const where = options.deleted === true ? 's.deleted_at IS NOT NULL' : 's.deleted_at IS NULL';
    const rows = this.db
      .prepare(
        `SELECT s.id, s.current_revision, r.name, s.created_at, s.updated_at, s.deleted_at
         FROM scenarios s JOIN scenario_revisions r ON r.scenario_id = s.id AND r.revision = s.current_revision
         WHERE ${where} ORDER BY s.updated_at DESC, s.id LIMIT ? OFFSET ?`,
      )
      .all(options.limit, options.offset) as ScenarioRow[];
    const { total } = this.db.prepare(`SELECT count(*) AS total FROM scenarios s WHERE ${where}`).get() as { total: number };
    return { items: rows.map(toScenarioRecord), total };
  }

  /** Mark a scenario deleted (recoverable with `restore`). */
  delete(id: string): ScenarioRecord {
    const time = this.now().toISOString();
    const row = this.row(id);
    if (row === undefined || row.deleted_at !== null) throw notFound(id, row !== undefined);
    this.db.prepare('UPDATE scenarios SET deleted_at = ? WHERE id = ?').run(time, id);
    return this.get(id, { includeDeleted: true });
  }

  /** Undo a delete. */
  restore(id: string): ScenarioRecord {
    const row = this.row(id);
    if (row === undefined) throw notFound(id, false);
    this.db.prepare('UPDATE scenarios SET deleted_at = NULL WHERE id = ?').run(id);
    return this.get(id);
  }

  /** How many scenarios there are, deleted ones included. */
  count(): number {
    return (this.db.prepare('SELECT count(*) AS n FROM scenarios').get() as { n: number }).n;
  }

  private row(id: string): ScenarioRow | undefined {
    return this.db
      .prepare(
        `SELECT s.id, s.current_revision, r.name, s.created_at, s.updated_at, s.deleted_at
         FROM scenarios s JOIN scenario_revisions r ON r.scenario_id = s.id AND r.revision = s.current_revision
         WHERE s.id = ?`,
      )
      .get(id) as ScenarioRow | undefined;
  }

  private insertRevision(id: string, revision: number, scenario: unknown, name: string, time: string): void {
    this.db
      .prepare('INSERT INTO scenario_revisions (scenario_id, revision, name, body, checksum, created_at) VALUES (?, ?, ?, ?, ?, ?)')
      .run(id, revision, name, JSON.stringify(scenario), sha256Hex(canonicalJson(scenario)), time);
  }
}

function notFound(id: string, deleted: boolean): NotFoundError {
  return new NotFoundError(
    'id',
    id,
    deleted ? `scenario ${id} is deleted; restore it first (POST /api/scenarios/${id}/restore)` : `no scenario with id ${id}`,
  );
}

function toScenarioRecord(row: ScenarioRow): ScenarioRecord {
  return {
    id: row.id,
    revision: row.current_revision,
    name: row.name,
    createdAt: row.created_at,
    updatedAt: row.updated_at,
    deletedAt: row.deleted_at,
  };
}

function toRevisionRecord(row: RevisionRow): RevisionRecord {
  return { scenarioId: row.scenario_id, revision: row.revision, name: row.name, checksum: row.checksum, createdAt: row.created_at };
}

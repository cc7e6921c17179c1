/**
 * The server's SQLite database (better-sqlite3): opened in WAL mode with foreign keys on and every
 * commit synced (`synchronous = FULL`), so a save the server has acknowledged survives a crash of the
 * process or the machine. The schema is a list of migrations in code; `PRAGMA user_version` records
 * how many have been applied, and each new one runs in its own transaction.
 */
import Database from 'better-sqlite3';
import { mkdirSync } from 'node:fs';
import path from 'node:path';

export type SqliteDatabase = Database.Database;

/**
 * The migrations, oldest first. Never edit one that has shipped: append a new one.
 * Times are ISO 8601 UTC text; JSON columns hold text written by JSON.stringify.
 */
export const MIGRATIONS: readonly string[] = [
  // 1: scenarios with their revision history, runs and the result files of a run.
  `
  CREATE TABLE scenarios (
    id TEXT PRIMARY KEY,
    created_at TEXT NOT NULL,
    updated_at TEXT NOT NULL,
    -- set when deleted; the scenario and its revisions stay, so a delete can be undone
    deleted_at TEXT,
    current_revision INTEGER NOT NULL
  );
  CREATE TABLE scenario_revisions (
    scenario_id TEXT NOT NULL REFERENCES scenarios(id),
    revision INTEGER NOT NULL CHECK (revision >= 1),
    name TEXT NOT NULL,
    -- the scenario as submitted (JSON text) and the SHA-256 of its canonical form
    body TEXT NOT NULL,
    checksum TEXT NOT NULL,
    created_at TEXT NOT NULL,
    PRIMARY KEY (scenario_id, revision)
  );
  CREATE TABLE runs (
    id TEXT PRIMARY KEY,
    scenario_id TEXT NOT NULL REFERENCES scenarios(id),
    revision INTEGER NOT NULL,
    checksum TEXT NOT NULL,
    kind TEXT NOT NULL,
    -- the run's options (mode, and the options of an assessment run) as JSON text
    options TEXT NOT NULL,
    -- what makes two submissions identical: scenario, checksum, kind and options
    dedupe_key TEXT NOT NULL,
    client TEXT NOT NULL,
    status TEXT NOT NULL CHECK (status IN ('queued', 'running', 'done', 'failed', 'cancelled', 'interrupted')),
    progress REAL NOT NULL DEFAULT 0,
    message TEXT NOT NULL DEFAULT '',
    error TEXT,
    created_at TEXT NOT NULL,
    started_at TEXT,
    finished_at TEXT,
    FOREIGN KEY (scenario_id, revision) REFERENCES scenario_revisions(scenario_id, revision)
  );
  CREATE INDEX runs_by_scenario ON runs(scenario_id, created_at);
  CREATE INDEX runs_by_dedupe_key ON runs(dedupe_key, status);
  CREATE INDEX runs_by_status ON runs(status);
  CREATE TABLE run_results (
    run_id TEXT NOT NULL REFERENCES runs(id),
    name TEXT NOT NULL,
    content_type TEXT NOT NULL,
    bytes INTEGER NOT NULL,
    sha256 TEXT NOT NULL,
    PRIMARY KEY (run_id, name)
  );
  `,
];

/**
 * Open (creating if needed) the database at `file` and bring its schema up to date.
 * @param file path of the database file; its folder is created if missing
 * @returns the open database
 * @throws Error when the file's schema is newer than this build knows
 * @example const db = openDatabase('data/plumeplan.sqlite');
 */
export function openDatabase(file: string): SqliteDatabase {
  mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const db = new Database(file);
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = FULL');
  db.pragma('foreign_keys = ON');
  db.pragma('busy_timeout = 5000');
  migrate(db);
  return db;
}

/** Apply the migrations the database has not had yet, each in its own transaction. */
export function migrate(db: SqliteDatabase): void {
  const applied = db.pragma('user_version', { simple: true }) as number;
  if (applied > MIGRATIONS.length) {
    throw new Error(
      `database schema version ${applied} is newer than this plumeplan knows (${MIGRATIONS.length}); use a newer plumeplan`,
    );
  }
  for (let index = applied; index < MIGRATIONS.length; index++) {
    db.transaction(() => {
      db.exec(MIGRATIONS[index]);
      db.pragma(`user_version = ${index + 1}`);
    })();
  }
}

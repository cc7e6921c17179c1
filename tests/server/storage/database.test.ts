/**
 * The database: migrations counted by user_version (applied once, refused when newer), WAL and foreign
 * keys on, and what a store commits is there after closing and opening again.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { MIGRATIONS, openDatabase } from '../../../server/storage/database.ts';
import { ScenarioStore } from '../../../server/storage/scenarioStore.ts';

let folder: string;
beforeEach(() => {
  folder = mkdtempSync(path.join(tmpdir(), 'plumeplan-db-'));
});
afterEach(() => {
  rmSync(folder, { recursive: true, force: true });
});

describe('openDatabase', () => {
  it('applies every migration once, in WAL mode with foreign keys on', () => {
    const file = path.join(folder, 'nested', 'p.sqlite');
    const db = openDatabase(file);
    expect(db.pragma('user_version', { simple: true })).toBe(MIGRATIONS.length);
    expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(db.pragma('synchronous', { simple: true })).toBe(2);
    db.close();
    const again = openDatabase(file);
    expect(again.pragma('user_version', { simple: true })).toBe(MIGRATIONS.length);
    again.close();
  });

  it('refuses a database from a newer plumeplan', () => {
    const file = path.join(folder, 'p.sqlite');
    const raw = new Database(file);
    raw.pragma(`user_version = ${MIGRATIONS.length + 1}`);
    raw.close();
    expect(() => openDatabase(file)).toThrow(/newer than this plumeplan knows/);
  });

  it('enforces foreign keys: a revision of no scenario is refused', () => {
    const db = openDatabase(path.join(folder, 'p.sqlite'));
    expect(() =>
      db.prepare("INSERT INTO scenario_revisions (scenario_id, revision, name, body, checksum, created_at) VALUES ('x', 1, 'n', '{}', 'c', 't')").run(),
    ).toThrow(/FOREIGN KEY/);
    db.close();
  });

  it('keeps what was committed across close and open', () => {
    const file = path.join(folder, 'p.sqlite');
    const db = openDatabase(file);
    const created = new ScenarioStore(db).create({ name: 'kept (invented)' }, 'kept (invented)');
    db.close();
    const reopened = openDatabase(file);
    expect(new ScenarioStore(reopened).revision(created.id).scenario).toEqual({ name: 'kept (invented)' });
    reopened.close();
  });
});

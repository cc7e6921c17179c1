/**
 * The scenario being edited, as the plain JSON a save sends: every edit replaces it with a new object
 * (the old one goes on the undo list), every change is checked by the scenario schema and kept in the
 * browser's storage so that a closed tab loses nothing.
 *
 * Pure of the DOM: the storage is passed in (window.localStorage on the page, a Map-backed stand-in in
 * the tests).
 */
import { parseScenario, type ParseOutcome } from '../../scenarios/format/schema.ts';

/** Most edits that can be undone. */
export const UNDO_DEPTH = 100;

/** Key of the unsaved draft in the browser's storage. */
export const DRAFT_STORAGE_KEY = 'plumeplan.draft.v1';

/** What a raw scenario looks like to the editor: JSON, unchecked. */
export type RawScenario = Record<string, unknown>;

/** Where the draft came from on the server, so a save becomes a new revision of it. */
export interface SavedReference {
  id: string;
  revision: number;
}

export interface DraftRecord {
  scenario: RawScenario;
  saved: SavedReference | null;
  /** true when the draft differs from the saved revision */
  dirty: boolean;
  /** ISO 8601 time of the last edit */
  editedAt: string;
}

export interface KeyValueStorage {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
  removeItem(key: string): void;
}

export type DocumentListener = (document: ScenarioDocument, reason: string) => void;

/** Deep copy of JSON data. */
export function cloneJson<T>(value: T): T {
  return JSON.parse(JSON.stringify(value)) as T;
}

export class ScenarioDocument {
  private current: RawScenario;
  private readonly undoList: { scenario: RawScenario; label: string }[] = [];
  private readonly redoList: { scenario: RawScenario; label: string }[] = [];
  private readonly listeners = new Set<DocumentListener>();
  private outcome: ParseOutcome;
  saved: SavedReference | null;
  dirty: boolean;

  constructor(
    scenario: RawScenario,
    private readonly storage: KeyValueStorage | null = null,
    saved: SavedReference | null = null,
    dirty = false,
  ) {
    this.current = cloneJson(scenario);
    this.outcome = parseScenario(this.current);
    this.saved = saved;
    this.dirty = dirty;
  }

  /** The unsaved draft kept in storage, if any and readable. */
  static readDraft(storage: KeyValueStorage): DraftRecord | null {
    const text = storage.getItem(DRAFT_STORAGE_KEY);
    if (text === null) return null;
    try {
      const record = JSON.parse(text) as DraftRecord;
      if (record === null || typeof record !== 'object' || typeof record.scenario !== 'object') return null;
      return record;
    } catch {
      return null;
    }
  }

  /** The scenario as JSON (a copy: change it through edit()). */
  get scenario(): RawScenario {
    return cloneJson(this.current);
  }

  /** Read-only view without copying, for rendering. */
  get view(): Readonly<RawScenario> {
    return this.current;
  }

  /** The schema's verdict on the current scenario (defaults filled when ok). */
  get validation(): ParseOutcome {
    return this.outcome;
  }

  get canUndo(): boolean {
    return this.undoList.length > 0;
  }

  get canRedo(): boolean {
    return this.redoList.length > 0;
  }

  /** What the next undo would take back, in words. */
  get undoLabel(): string | null {
    return this.undoList.at(-1)?.label ?? null;
  }

  subscribe(listener: DocumentListener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /**
   * Change the scenario. The function gets a copy to change in place (or returns a replacement).
   *
   * @param label what the edit did, for the undo button ("move stack boiler-stack")
   * @param change mutates the copy, or returns a new object
   */
  edit(label: string, change: (draft: RawScenario) => RawScenario | void): void {
    const draft = cloneJson(this.current);
    const replaced = change(draft) ?? draft;
    if (JSON.stringify(replaced) === JSON.stringify(this.current)) return;
    this.undoList.push({ scenario: this.current, label });
    if (this.undoList.length > UNDO_DEPTH) this.undoList.shift();
    this.redoList.length = 0;
    this.apply(replaced, true, label);
  }

  /** Take back the last edit. */
  undo(): void {
    const entry = this.undoList.pop();
    if (entry === undefined) return;
    this.redoList.push({ scenario: this.current, label: entry.label });
    this.apply(entry.scenario, true, `undo ${entry.label}`);
  }

  /** Do again what undo took back. */
  redo(): void {
    const entry = this.redoList.pop();
    if (entry === undefined) return;
    this.undoList.push({ scenario: this.current, label: entry.label });
    this.apply(entry.scenario, true, `redo ${entry.label}`);
  }

  /**
   * Replace the whole scenario (opening a saved one): clears undo, records where it came from.
   * `dirty` says whether it differs from that saved revision (an older revision reopened, a copy).
   */
  load(scenario: RawScenario, saved: SavedReference | null, reason = 'open', dirty = false): void {
    this.undoList.length = 0;
    this.redoList.length = 0;
    this.saved = saved;
    this.apply(cloneJson(scenario), dirty, reason);
  }

  /** The server acknowledged a save of the current scenario as this revision. */
  markSaved(saved: SavedReference): void {
    this.saved = saved;
    this.dirty = false;
    this.persist();
    this.emit('saved');
  }

  private apply(scenario: RawScenario, dirty: boolean, reason: string): void {
    this.current = scenario;
    this.outcome = parseScenario(scenario);
    this.dirty = dirty;
    this.persist();
    this.emit(reason);
  }

  private persist(): void {
    if (this.storage === null) return;
    const record: DraftRecord = { scenario: this.current, saved: this.saved, dirty: this.dirty, editedAt: new Date().toISOString() };
    try {
      this.storage.setItem(DRAFT_STORAGE_KEY, JSON.stringify(record));
    } catch {
      // Storage full or disabled: the edit still stands in the page; nothing else to do.
    }
  }

  private emit(reason: string): void {
    for (const listener of this.listeners) listener(this, reason);
  }
}

/** A storage kept in memory (tests, and pages where the browser's storage is switched off). */
export class MemoryStorage implements KeyValueStorage {
  private readonly values = new Map<string, string>();
  getItem(key: string): string | null {
    return this.values.get(key) ?? null;
  }
  setItem(key: string, value: string): void {
    this.values.set(key, value);
  }
  removeItem(key: string): void {
    this.values.delete(key);
  }
}

/**
 * The edited scenario: undo and redo, the draft kept in storage across a reload, validation by the
 * scenario schema.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DRAFT_STORAGE_KEY, MemoryStorage, ScenarioDocument, UNDO_DEPTH, type RawScenario } from '../../../web/state/scenarioDocument.ts';

const demo = JSON.parse(readFileSync(new URL('../../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url), 'utf8')) as RawScenario;

describe('ScenarioDocument', () => {
  it('undoes and redoes edits in order', () => {
    const doc = new ScenarioDocument(demo);
    doc.edit('rename', (d) => void (d.name = 'A'));
    doc.edit('rename again', (d) => void (d.name = 'B'));
    expect(doc.view.name).toBe('B');
    expect(doc.undoLabel).toBe('rename again');
    doc.undo();
    expect(doc.view.name).toBe('A');
    doc.undo();
    expect(doc.view.name).toBe(demo.name);
    expect(doc.canUndo).toBe(false);
    doc.redo();
    expect(doc.view.name).toBe('A');
    doc.edit('other', (d) => void (d.name = 'C'));
    expect(doc.canRedo).toBe(false);
  });

  it('ignores an edit that changes nothing, and keeps at most UNDO_DEPTH edits', () => {
    const doc = new ScenarioDocument(demo);
    doc.edit('nothing', () => undefined);
    expect(doc.canUndo).toBe(false);
    for (let n = 0; n < UNDO_DEPTH + 5; n++) doc.edit(`n${n}`, (d) => void (d.name = `name ${n}`));
    let undone = 0;
    while (doc.canUndo) {
      doc.undo();
      undone++;
    }
    expect(undone).toBe(UNDO_DEPTH);
  });

  it('keeps the draft in storage, marked unsaved, so a reload restores it', () => {
    const storage = new MemoryStorage();
    const doc = new ScenarioDocument(demo, storage, { id: 'x', revision: 3 });
    doc.edit('move', (d) => void ((d.sources as { lat: number }[])[0].lat = 54.0615));
    const draft = ScenarioDocument.readDraft(storage);
    expect(draft?.dirty).toBe(true);
    expect(draft?.saved).toEqual({ id: 'x', revision: 3 });
    expect((draft?.scenario.sources as { lat: number }[])[0].lat).toBe(54.0615);
    doc.markSaved({ id: 'x', revision: 4 });
    expect(ScenarioDocument.readDraft(storage)?.dirty).toBe(false);
    storage.setItem(DRAFT_STORAGE_KEY, '{not json');
    expect(ScenarioDocument.readDraft(storage)).toBeNull();
  });

  it('validates every change with the scenario schema, naming the field', () => {
    const doc = new ScenarioDocument(demo);
    expect(doc.validation.ok).toBe(true);
    doc.edit('bad', (d) => void ((d.sources as { emission_g_s: number }[])[0].emission_g_s = -1));
    const outcome = doc.validation;
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.issues.map((i) => i.path)).toContain('sources[0].emission_g_s');
    doc.undo();
    expect(doc.validation.ok).toBe(true);
  });

  it('load replaces the scenario and clears undo', () => {
    const doc = new ScenarioDocument(demo);
    doc.edit('rename', (d) => void (d.name = 'A'));
    doc.load({ ...demo, name: 'opened' }, { id: 'y', revision: 1 });
    expect(doc.canUndo).toBe(false);
    expect(doc.dirty).toBe(false);
    expect(doc.view.name).toBe('opened');
  });
});

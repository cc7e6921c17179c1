/**
 * Result files: written whole under their names (no temporary files left), read back byte for byte,
 * names that could leave the folder refused, folders of unfinished runs removed.
 */
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { newId, sha256Hex } from '../../../server/storage/ids.ts';
import { ResultFileStore } from '../../../server/storage/resultFiles.ts';

let root: string;
beforeEach(() => {
  root = mkdtempSync(path.join(tmpdir(), 'plumeplan-results-'));
});
afterEach(() => {
  rmSync(root, { recursive: true, force: true });
});

describe('ResultFileStore', () => {
  it('writes each file whole, leaves no temporary file, and records size and SHA-256', async () => {
    const store = new ResultFileStore(root);
    const id = newId();
    const content = new TextEncoder().encode('{"a":1}\n');
    const records = await store.writeAll(id, [{ name: 'summary.json', contentType: 'application/json', content }]);
    expect(records).toEqual([{ name: 'summary.json', contentType: 'application/json', bytes: content.byteLength, sha256: sha256Hex(content) }]);
    expect(readdirSync(path.join(root, id))).toEqual(['summary.json']);
    expect(readFileSync(store.pathOf(id, 'summary.json'), 'utf8')).toBe('{"a":1}\n');
  });

  it('refuses names and ids that could leave the folder', async () => {
    const store = new ResultFileStore(root);
    await expect(store.writeAll(newId(), [{ name: '../escape', contentType: 'text/plain', content: new Uint8Array(1) }])).rejects.toThrow(RangeError);
    expect(() => store.pathOf('../../etc', 'passwd')).toThrow(RangeError);
    expect(() => store.pathOf(newId(), '.hidden')).toThrow(RangeError);
  });

  it('removes the folders of runs that are not kept', async () => {
    const store = new ResultFileStore(root);
    const kept = newId();
    const orphan = newId();
    for (const id of [kept, orphan]) await store.writeAll(id, [{ name: 'a.csv', contentType: 'text/csv', content: new Uint8Array(2) }]);
    expect(await store.removeAllBut(new Set([kept]))).toBe(1);
    expect(existsSync(path.join(root, kept))).toBe(true);
    expect(existsSync(path.join(root, orphan))).toBe(false);
  });
});

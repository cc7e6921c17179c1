/**
 * Behaviour check of the page's bundle: starting from the page's entry and the preview worker, every
 * module reached through relative imports is browser-safe: no `node:` module and nothing from
 * solver/parallel (worker threads), which would break the build or the page.
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const repoRoot = fileURLToPath(new URL('../..', import.meta.url));
const ENTRIES = ['web/main.ts', 'web/preview/preview.worker.ts'];
/** Packages a browser bundle cannot take. */
const NODE_ONLY = /^(node:|fs$|path$|os$|worker_threads$|child_process$|better-sqlite3$|express$)/;

function specifiers(text: string): string[] {
  const found: string[] = [];
  for (const pattern of [/(?:^|\s)(?:import|export)\s[^'"`;]*?from\s*['"]([^'"]+)['"]/gm, /(?:^|\s)import\s*['"]([^'"]+)['"]/gm, /import\(\s*['"]([^'"]+)['"]\s*\)/g, /new URL\(\s*['"]([^'"]+)['"]\s*,\s*import\.meta\.url/g]) {
    for (const match of text.matchAll(pattern)) found.push(match[1]);
  }
  return found;
}

/** Every repository file reachable from the entries, and every bare package it names. */
function reachable(): { files: Set<string>; packages: Set<string> } {
  const files = new Set<string>();
  const packages = new Set<string>();
  const queue = [...ENTRIES];
  while (queue.length > 0) {
    const file = queue.pop() as string;
    if (files.has(file)) continue;
    files.add(file);
    if (!/\.(ts|mjs|js)$/.test(file)) continue;
    for (const specifier of specifiers(readFileSync(path.join(repoRoot, file), 'utf8'))) {
      if (!specifier.startsWith('.')) {
        packages.add(specifier);
        continue;
      }
      const target = path.posix.normalize(path.posix.join(path.posix.dirname(file), specifier));
      if (existsSync(path.join(repoRoot, target))) queue.push(target);
    }
  }
  return { files, packages };
}

describe('the page bundle', () => {
  const { files, packages } = reachable();

  it('reaches the solver\'s Gaussian reference (so the walk itself works)', () => {
    expect(files.has('solver/drivers/gaussianSteady.ts')).toBe(true);
    expect(files.has('web/preview/previewField.ts')).toBe(true);
  });

  it('takes nothing from solver/parallel and no Node-only module', () => {
    expect([...files].filter((file) => file.startsWith('solver/parallel/'))).toEqual([]);
    expect([...packages].filter((name) => NODE_ONLY.test(name))).toEqual([]);
  });
});

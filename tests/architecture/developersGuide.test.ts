/**
 * Behaviour check of the contributor's guide: every repository path DEVELOPERS.md and the README's layout
 * name exists, so the guide cannot drift from the tree unnoticed.
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const repoRoot = fileURLToPath(new URL('../..', import.meta.url));

/** Inline code spans outside fenced blocks that look like a repository path (a folder or a file). */
export function namedPaths(markdown: string): string[] {
  const prose = markdown.replace(/```[\s\S]*?```/g, '');
  const paths = new Set<string>();
  for (const match of prose.matchAll(/`([^`\s]+)`/g)) {
    const candidate = match[1];
    if (/^(\.?[\w.-]+\/)+[\w.-]*$/.test(candidate) || /^[\w.-]+\.(md|json|ts|mjs)$/.test(candidate)) paths.add(candidate);
  }
  return [...paths];
}

/** The indented layout block of the README: the first word of each line, nested by indentation. */
export function readmeLayoutPaths(readme: string): string[] {
  const section = readme.split('## Layout')[1]?.split('\n## ')[0] ?? '';
  const paths: string[] = [];
  let parent = '';
  for (const line of section.split('\n')) {
    const match = /^( {4,})(\S+)/.exec(line);
    if (!match) continue;
    const nested = match[1].length > 4;
    for (const name of match[2].split(/,\s*/)) {
      if (!name.includes('/') && !name.includes('.')) continue;
      const full = nested ? parent + name : name;
      paths.push(full.replace(/,$/, ''));
    }
    if (!nested) parent = match[2];
  }
  return paths;
}

describe("the contributor's guide", () => {
  const guide = readFileSync(path.join(repoRoot, 'DEVELOPERS.md'), 'utf8');

  it('recognises paths and ignores commands and plain words (so the check below can fail)', () => {
    expect(namedPaths('see `solver/grid/` and `server/cli/run.ts`, run `npm test`, unit `emission_g_s`')).toEqual([
      'solver/grid/',
      'server/cli/run.ts',
    ]);
  });

  it('names only paths that exist', () => {
    const named = namedPaths(guide);
    expect(named.length).toBeGreaterThan(30);
    expect(named.filter((p) => !existsSync(path.join(repoRoot, p)))).toEqual([]);
  });

  it("the README's layout names only folders and files that exist", () => {
    const readme = readFileSync(path.join(repoRoot, 'README.md'), 'utf8');
    const layout = readmeLayoutPaths(readme);
    expect(layout).toContain('server/writers/');
    expect(layout.filter((p) => !existsSync(path.join(repoRoot, p)))).toEqual([]);
  });
});

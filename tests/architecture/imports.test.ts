/**
 * Behaviour check of the layout (DEVELOPERS.md, "Direction of imports"): the solver is pure numerics and
 * imports nothing outside `solver/` but the scenario's plain types; the scenario's types import nothing;
 * nothing under `solver/` or `scenarios/format/` reaches up into `server/` or `web/`.
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const repoRoot = fileURLToPath(new URL('../..', import.meta.url));
const PLAIN_TYPES = 'scenarios/format/types.ts';
/** Modules a pure solver must never load: files, network, HTTP, templates, the map. */
const FORBIDDEN_PACKAGES = ['node:fs', 'fs', 'node:fs/promises', 'fs/promises', 'node:http', 'http', 'node:https', 'node:net', 'express', 'ejs', 'leaflet'];

function sourceFiles(folder: string): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(path.join(repoRoot, folder), { withFileTypes: true })) {
    const relative = path.posix.join(folder, entry.name);
    if (entry.isDirectory()) out.push(...sourceFiles(relative));
    else if (/\.(ts|mjs|js)$/.test(entry.name)) out.push(relative);
  }
  return out;
}

/** Every module specifier a file imports: static imports, re-exports, dynamic import() and worker URLs. */
export function importSpecifiers(text: string): string[] {
  const specifiers: string[] = [];
  const patterns = [
    /(?:^|\s)(?:import|export)\s[^'"`;]*?from\s*['"]([^'"]+)['"]/gm,
    /(?:^|\s)import\s*['"]([^'"]+)['"]/gm,
    /import\(\s*['"]([^'"]+)['"]\s*\)/g,
    /new URL\(\s*['"]([^'"]+)['"]\s*,\s*import\.meta\.url/g,
    /require\(\s*['"]([^'"]+)['"]\s*\)/g,
  ];
  for (const pattern of patterns) for (const match of text.matchAll(pattern)) specifiers.push(match[1]);
  return specifiers;
}

/** Where a relative specifier points, as a repository path; bare package names are returned as they are. */
function resolveSpecifier(file: string, specifier: string): string {
  if (!specifier.startsWith('.')) return specifier;
  return path.posix.normalize(path.posix.join(path.posix.dirname(file), specifier));
}

describe('direction of imports', () => {
  it('finds every kind of import in a sample (so the checks below can fail)', () => {
    const sample = `import { a } from '../x.ts';\nimport type { B } from "node:fs";\nexport { c } from './c.ts';\nawait import('../../server/y.ts');\nnew URL('./w.ts', import.meta.url);\nimport 'leaflet';`;
    expect(importSpecifiers(sample)).toEqual(['../x.ts', 'node:fs', './c.ts', 'leaflet', '../../server/y.ts', './w.ts']);
  });

  it('solver/ imports only solver/ and the scenario plain types, and no file, network, HTTP, template or map module', () => {
    const offences: string[] = [];
    for (const file of sourceFiles('solver')) {
      for (const specifier of importSpecifiers(readFileSync(path.join(repoRoot, file), 'utf8'))) {
        const target = resolveSpecifier(file, specifier);
        if (specifier.startsWith('.')) {
          if (!target.startsWith('solver/') && target !== PLAIN_TYPES) offences.push(`${file} -> ${target}`);
        } else if (FORBIDDEN_PACKAGES.includes(specifier)) {
          offences.push(`${file} -> ${specifier}`);
        }
      }
    }
    expect(offences).toEqual([]);
  });

  it('the scenario plain types import nothing', () => {
    expect(importSpecifiers(readFileSync(path.join(repoRoot, PLAIN_TYPES), 'utf8'))).toEqual([]);
  });

  it('scenarios/ (the format and the demo tools) never import the server or the page', () => {
    const offences: string[] = [];
    for (const file of sourceFiles('scenarios')) {
      for (const specifier of importSpecifiers(readFileSync(path.join(repoRoot, file), 'utf8'))) {
        const target = resolveSpecifier(file, specifier);
        if (target.startsWith('server/') || target.startsWith('web/')) offences.push(`${file} -> ${target}`);
      }
    }
    expect(offences).toEqual([]);
  });
});

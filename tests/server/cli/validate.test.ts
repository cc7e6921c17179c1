// Behaviour checks of `plumeplan validate` through validateCommand in-process: every kind of invalid
// scenario in tests/fixtures/invalid exits 2 with a message naming the field path, valid ones exit 0
// naming the grid. validateCli.test.ts runs the same fixtures through bin/plumeplan.mjs.
import { readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { validateCommand, VALIDATE_USAGE } from '../../../server/cli/validate.ts';
import { INVALID_FIXTURES, invalidDir, issuePaths, repoRoot, VALID_FIXTURES, validDir } from './fixtureTable.ts';

async function captured(argv: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const code = await validateCommand(argv, { stdout: (text) => (stdout += text), stderr: (text) => (stderr += text) });
  return { code, stdout, stderr };
}

describe('validateCommand', () => {
  it('has a fixture for every kind listed, and every fixture is listed', () => {
    const files = readdirSync(`${repoRoot}${invalidDir}`).filter((name) => name.endsWith('.json')).sort();
    expect(files).toEqual(Object.keys(INVALID_FIXTURES).sort());
    expect(files.length).toBeGreaterThanOrEqual(15);
  });

  it.each(Object.entries(INVALID_FIXTURES))('%s exits 2 naming %j', async (file, paths) => {
    const { code, stdout, stderr } = await captured([`${invalidDir}${file}`]);
    expect(code).toBe(2);
    expect(stdout).toBe('');
    expect(stderr.split('\n')[0]).toBe(`${invalidDir}${file}: invalid, ${paths.length} ${paths.length === 1 ? 'issue' : 'issues'}:`);
    expect(issuePaths(stderr)).toEqual(paths);
  });

  it.each(Object.entries(VALID_FIXTURES))('%s exits 0 and names the grid', async (file, summary) => {
    const { code, stdout, stderr } = await captured([`${validDir}${file}`]);
    expect(stderr).toBe('');
    expect(code).toBe(0);
    expect(stdout).toMatch(new RegExp(`^${validDir}${file}: valid \\(${summary.replace(/[()]/g, '\\$&')}( \\d+ x \\d+ x \\d+)?\\)\\n$`));
  });

  it('checks several files in one go and exits 2 when any is invalid', async () => {
    const { code, stdout, stderr } = await captured([`${validDir}minimal.scenario.json`, `${invalidDir}zero-diameter.scenario.json`]);
    expect(code).toBe(2);
    expect(stdout).toContain('minimal.scenario.json: valid');
    expect(stderr).toContain('zero-diameter.scenario.json: invalid');
  });

  it('prints its usage for --help (exit 0) and for a missing FILE or unknown option (exit 2)', async () => {
    expect(await captured(['--help'])).toEqual({ code: 0, stdout: VALIDATE_USAGE, stderr: '' });
    const missing = await captured([]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toBe(`plumeplan validate: validate needs a scenario FILE\n\n${VALIDATE_USAGE}`);
    const unknown = await captured(['--strict', 'a.json']);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toContain('unknown option --strict');
  });
});

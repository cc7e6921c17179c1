// The same fixtures as validate.test.ts through the real command line, `node bin/plumeplan.mjs
// validate ...`, as a user runs it: exit codes and the field paths on stderr.
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { VALIDATE_USAGE } from '../../../server/cli/validate.ts';
import { INVALID_FIXTURES, invalidDir, issuePaths, repoRoot, VALID_FIXTURES, validDir } from './fixtureTable.ts';

describe('plumeplan validate (the real command line)', () => {
  const cli = (...args: string[]) => spawnSync(process.execPath, ['bin/plumeplan.mjs', 'validate', ...args], { cwd: repoRoot, encoding: 'utf8' });

  it('exits 2 on every invalid fixture and names each one\'s fields', () => {
    // One process for all fixtures keeps the test quick; validate reports each file in turn.
    const files = Object.keys(INVALID_FIXTURES).map((file) => `${invalidDir}${file}`);
    const result = cli(...files);
    expect(result.status).toBe(2);
    expect(result.stdout).toBe('');
    const reports = result.stderr.split(/^(?=\S)/m);
    expect(reports).toHaveLength(files.length);
    reports.forEach((report, index) => {
      expect(report.startsWith(`${files[index]}: invalid`)).toBe(true);
      expect(issuePaths(report)).toEqual(Object.values(INVALID_FIXTURES)[index]);
    });
  });

  it('exits 0 on the valid fixtures and for --help; 2 without a FILE', () => {
    const valid = cli(...Object.keys(VALID_FIXTURES).map((file) => `${validDir}${file}`));
    expect(valid.stderr).toBe('');
    expect(valid.status).toBe(0);
    expect(valid.stdout.trimEnd().split('\n')).toHaveLength(4);
    expect(cli('--help')).toMatchObject({ status: 0, stdout: VALIDATE_USAGE });
    expect(cli().status).toBe(2);
  });
});

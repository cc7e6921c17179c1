/**
 * Behaviour check of the repository itself: node_modules is never tracked. Each worktree links
 * node_modules to the main checkout's folder; `git add -A` picks that link up unless it is ignored (the
 * pattern `node_modules/` matches folders, not links), and landing a tracked link replaces the main
 * checkout's installed packages with a link to itself (it happened once: every worktree lost its
 * packages until `npm ci` restored them).
 */
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const repoRoot = fileURLToPath(new URL('../..', import.meta.url));

describe('the repository', () => {
  it('tracks nothing under node_modules (if this fails: git rm --cached node_modules, then commit)', () => {
    const tracked = execFileSync('git', ['ls-files', '--', 'node_modules'], { cwd: repoRoot, encoding: 'utf8' }).trim();
    expect(tracked, 'node_modules is tracked: run `git rm --cached node_modules` and commit before landing').toBe('');
  });
});

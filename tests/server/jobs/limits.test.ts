/**
 * The server's run limit and the solver's derived-domain rule agree: a derived domain is coarsened so
 * that it stays within DERIVED_DOMAIN_MAX_CELLS (solver/grid/domainDefaults.ts), and the server must
 * admit every such domain, or a scenario without a domain would be refused where the command line runs it.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_RUN_LIMITS } from '../../../server/jobs/runManager.ts';
import { DERIVED_DOMAIN_MAX_CELLS } from '../../../solver/grid/domainDefaults.ts';

describe('run limits', () => {
  it('admit every derived domain by default', () => {
    expect(DEFAULT_RUN_LIMITS.maxCellsPerRun).toBeGreaterThanOrEqual(DERIVED_DOMAIN_MAX_CELLS);
  });
});

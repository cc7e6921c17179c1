/**
 * What `plumeplan sweep` and `plumeplan stack-height` share: their member runs on worker threads with
 * progress on stderr and Ctrl-C stopping the member in flight, and writing the files they built.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import type { RunControl } from '../../solver/drivers/types.ts';
import type { MemberLanes } from '../analyses/sweep.ts';
import { createWorkerMemberRunner } from '../jobs/memberRunner.ts';
import type { ProgressReporter } from './progress.ts';

/**
 * Run `work` with members on worker threads (one lane a core), progress reported, Ctrl-C aborting.
 * The threads end when `work` settles.
 */
export async function onMemberThreads<T>(
  scenario: Scenario,
  mode: SolverMode,
  progress: ProgressReporter,
  work: (runner: MemberLanes, control: RunControl) => Promise<T>,
): Promise<T> {
  const runner = createWorkerMemberRunner(scenario, mode);
  const interrupt = new AbortController();
  const onInterrupt = (): void => interrupt.abort();
  process.once('SIGINT', onInterrupt);
  try {
    return await work(runner, { signal: interrupt.signal, onProgress: (fraction, message) => progress.update(fraction, message) });
  } finally {
    process.off('SIGINT', onInterrupt);
    await runner.close();
  }
}

/** Write built files into a folder (created if missing). */
export async function writeBuiltFiles(directory: string, files: readonly [string, string | Uint8Array][]): Promise<void> {
  await mkdir(directory, { recursive: true });
  for (const [name, content] of files) await writeFile(path.join(directory, name), content);
}

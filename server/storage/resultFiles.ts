/**
 * Result files of runs, kept beside the database in `results/RUN_ID/NAME`. Each file is written under
 * a temporary name, synced to disk and renamed into place, and the folder is synced, all before the
 * database row that points to the files commits: after a crash a row never names a missing or
 * half-written file.
 */
import { randomBytes } from 'node:crypto';
import { createReadStream, type ReadStream } from 'node:fs';
import { mkdir, open, readdir, rename, rm } from 'node:fs/promises';
import path from 'node:path';
import { isId, sha256Hex } from './ids.ts';
import type { ResultFileRecord } from './runStore.ts';

/** Result file names: lower-case letters, digits, dots, dashes; no path separators, no leading dot. */
export const RESULT_NAME_PATTERN = /^[a-z0-9][a-z0-9._-]{0,63}$/;

export interface ResultFileContent {
  name: string;
  contentType: string;
  content: Uint8Array;
}

export class ResultFileStore {
  /** @param root the folder that holds one folder per run */
  constructor(readonly root: string) {}

  /**
   * Write a run's files durably (temporary name, fsync, rename, fsync of the folder).
   * @returns what to record for each file
   */
  async writeAll(runId: string, files: readonly ResultFileContent[]): Promise<ResultFileRecord[]> {
    const directory = this.directoryOf(runId);
    await mkdir(directory, { recursive: true });
    const records: ResultFileRecord[] = [];
    for (const file of files) {
      checkName(file.name);
      const finalPath = path.join(directory, file.name);
      const temporaryPath = path.join(directory, `.${file.name}.${randomBytes(6).toString('hex')}.tmp`);
      const handle = await open(temporaryPath, 'w');
      try {
        await handle.writeFile(file.content);
        await handle.sync();
      } finally {
        await handle.close();
      }
      await rename(temporaryPath, finalPath);
      records.push({ name: file.name, contentType: file.contentType, bytes: file.content.byteLength, sha256: sha256Hex(file.content) });
    }
    await syncDirectory(directory);
    await syncDirectory(this.root);
    return records;
  }

  /** A stream of one result file. */
  read(runId: string, name: string): ReadStream {
    checkName(name);
    return createReadStream(path.join(this.directoryOf(runId), name));
  }

  /** The path of one result file. */
  pathOf(runId: string, name: string): string {
    checkName(name);
    return path.join(this.directoryOf(runId), name);
  }

  /** Remove one run's folder (a run whose row did not commit). */
  async remove(runId: string): Promise<void> {
    await rm(this.directoryOf(runId), { recursive: true, force: true });
  }

  /**
   * Remove the folders of runs that are not done (left by a crash between writing files and the
   * commit, or by a run that failed while writing). @returns how many were removed
   */
  async removeAllBut(keep: ReadonlySet<string>): Promise<number> {
    const entries = await readdir(this.root).catch(() => [] as string[]);
    let removed = 0;
    for (const entry of entries) {
      if (!isId(entry) || keep.has(entry)) continue;
      await rm(path.join(this.root, entry), { recursive: true, force: true });
      removed++;
    }
    return removed;
  }

  private directoryOf(runId: string): string {
    if (!isId(runId)) throw new RangeError(`run id: got ${JSON.stringify(runId)}; allowed: an id this server made`);
    return path.join(this.root, runId);
  }
}

function checkName(name: string): void {
  if (!RESULT_NAME_PATTERN.test(name)) {
    throw new RangeError(`result file name: got ${JSON.stringify(name)}; allowed: lower-case letters, digits, ".", "-", "_"`);
  }
}

/** fsync a folder, so a rename inside it is on disk. */
async function syncDirectory(directory: string): Promise<void> {
  const handle = await open(directory, 'r');
  try {
    await handle.sync();
  } finally {
    await handle.close();
  }
}

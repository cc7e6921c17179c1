/**
 * Where a command writes and what it reads from its surroundings. The process's own streams in real
 * use; in-memory ones in tests, so the commands can be checked without spawning a process.
 */

export interface OutputStream {
  write(text: string): unknown;
  /** true when the stream is a terminal (progress then rewrites one line) */
  isTTY?: boolean;
}

export interface CommandIO {
  stdout: OutputStream;
  stderr: OutputStream;
  /** environment variables, e.g. PLUMEPLAN_DEBUG=1 to print stacks of internal failures */
  env: Record<string, string | undefined>;
  /** milliseconds on a monotonic clock; injectable so progress timing can be tested */
  now: () => number;
}

/** The running process's streams, environment and clock. */
export function processIO(): CommandIO {
  return {
    stdout: process.stdout,
    stderr: process.stderr,
    env: process.env,
    now: () => performance.now(),
  };
}

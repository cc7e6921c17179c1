/**
 * Progress on stderr for anything that takes more than a second: nothing at all for quick runs, then
 * one line rewritten in place on a terminal, or plain lines (a few, not a flood) when stderr is a file
 * or a pipe, so logs stay readable.
 */
import type { OutputStream } from './io.ts';

export interface ProgressOptions {
  /** quiet period before anything is shown [ms]; default 1000 */
  delay_ms?: number;
  /** shortest interval between rewrites on a terminal [ms]; default 100 */
  terminalInterval_ms?: number;
  /** shortest interval between plain lines [ms]; default 2000 */
  plainInterval_ms?: number;
}

export interface ProgressReporter {
  /** fraction done in [0, 1] and a short message, e.g. (0.4, "hour 3504 of 8760") */
  update(fractionDone: number, message: string): void;
  /** end the progress display (clears a terminal line); call once, when the work is over */
  finish(): void;
}

/**
 * Create a progress reporter writing to `stream`.
 *
 * @param stream where to write (stderr); `stream.isTTY` selects line rewriting
 * @param now monotonic clock [ms]
 * @param options timing (see ProgressOptions)
 * @example
 *   const progress = createProgressReporter(process.stderr, () => performance.now());
 *   progress.update(0.5, 'solving'); progress.finish();
 */
export function createProgressReporter(
  stream: OutputStream,
  now: () => number,
  options: ProgressOptions = {},
): ProgressReporter {
  const delay_ms = options.delay_ms ?? 1000;
  const interval_ms = stream.isTTY === true ? (options.terminalInterval_ms ?? 100) : (options.plainInterval_ms ?? 2000);
  const started_ms = now();
  let lastShown_ms = -Infinity;
  let lineShown = false;
  let lastText = '';
  let finished = false;

  return {
    update(fractionDone: number, message: string): void {
      if (finished) return;
      const time_ms = now();
      if (time_ms - started_ms < delay_ms) return;
      if (time_ms - lastShown_ms < interval_ms) return;
      const percent = Math.round(Math.min(1, Math.max(0, fractionDone)) * 100);
      const text = `${String(percent).padStart(3)}%  ${message}`;
      if (text === lastText) return;
      lastShown_ms = time_ms;
      lastText = text;
      if (stream.isTTY === true) {
        // Carriage return, the text, then erase whatever was left of a longer line before.
        stream.write(`\r${text}\x1b[K`);
        lineShown = true;
      } else {
        stream.write(`${text}\n`);
      }
    },
    finish(): void {
      if (finished) return;
      finished = true;
      if (lineShown) stream.write('\r\x1b[K');
    },
  };
}

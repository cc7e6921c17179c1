/** Behaviour checks of the progress display: silent for a second, then one rewritten line or a few plain lines. */
import { describe, expect, it } from 'vitest';
import { createProgressReporter } from '../../../server/cli/progress.ts';

function recorder(isTTY: boolean) {
  const writes: string[] = [];
  return { stream: { isTTY, write: (text: string) => writes.push(text) }, writes };
}

describe('createProgressReporter', () => {
  it('shows nothing during the first second', () => {
    const { stream, writes } = recorder(true);
    let time_ms = 0;
    const progress = createProgressReporter(stream, () => time_ms);
    for (time_ms = 0; time_ms < 1000; time_ms += 50) progress.update(time_ms / 2000, 'solving');
    progress.finish();
    expect(writes).toEqual([]);
  });

  it('on a terminal rewrites one line in place and clears it at the end', () => {
    const { stream, writes } = recorder(true);
    let time_ms = 0;
    const progress = createProgressReporter(stream, () => time_ms);
    time_ms = 1200;
    progress.update(0.25, 'hour 2190 of 8760');
    time_ms = 1250; // within 100 ms of the last rewrite: skipped
    progress.update(0.26, 'hour 2277 of 8760');
    time_ms = 1400;
    progress.update(0.5, 'hour 4380 of 8760');
    progress.finish();
    expect(writes).toEqual([' 25%  hour 2190 of 8760', ' 50%  hour 4380 of 8760', ''].map((text, index, all) =>
      index === all.length - 1 ? '\r\x1b[K' : `\r${text}\x1b[K`,
    ));
  });

  it('into a file or pipe writes plain lines, at most one every two seconds', () => {
    const { stream, writes } = recorder(false);
    let time_ms = 0;
    const progress = createProgressReporter(stream, () => time_ms);
    for (time_ms = 0; time_ms <= 6000; time_ms += 100) progress.update(time_ms / 6000, 'solving');
    progress.finish();
    // First line at 1.0 s, then 3.0 s and 5.0 s.
    expect(writes).toEqual([' 17%  solving\n', ' 50%  solving\n', ' 83%  solving\n']);
    expect(writes.join('')).not.toContain('\r');
  });
});

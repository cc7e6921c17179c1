/**
 * Map page benchmark (part of `npm run bench`; run alone with `node --import tsx tests/bench/mapPage.ts`):
 * the real server on a free port with a temporary data folder and the built page in Debian's Chromium.
 *
 * - `map-page-run-to-overlay`: from pressing "Run the scenario" on the demo (grid mode) to its overlay
 *   drawn on the map, as the page measures it: the first run is solved; the second is the same
 *   submission, answered from the finished run.
 * - `map-page-preview-drag`: a stack dragged across the map in small steps; for every preview the page
 *   received, the time from the request to the answer (the worker's compute time inside it), with the
 *   number of previews shown (a drag sends only the newest position while one is being computed).
 *
 * Figures are what this machine measured in this run; other work on the machine changes them.
 */
import { buildPage, launchBrowser, startServer } from '../e2e/mapPageHarness.ts';

interface PreviewTiming {
  roundTrip_ms: number;
  compute_ms: number;
}

interface PageGlobals {
  plumeplan: {
    results: { lastRunToOverlay_ms: number | null };
    map: { latLngToContainerPoint(p: [number, number]): { x: number; y: number } };
  };
  plumeplanPreviewTimes?: PreviewTiming[];
  document: { querySelector(selector: string): { textContent: string | null } | null };
}

function print(record: Record<string, unknown>): void {
  process.stdout.write(`${JSON.stringify(record)}\n`);
}

function quantile(values: number[], q: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];
}

const round = (value: number) => Math.round(value * 10) / 10;

async function main(): Promise<void> {
  await buildPage();
  const [server, browser] = await Promise.all([startServer(), launchBrowser()]);
  try {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
    await page.goto(server.url + '/');
    await page.waitForSelector('[data-testid="legend"] .legend-bar', { timeout: 60_000 });

    // Preview while dragging the demo's stack 300 px east in 60 steps.
    await page.evaluate(() => void ((globalThis as unknown as PageGlobals).plumeplanPreviewTimes = []));
    const box = (await page.locator('#map').boundingBox())!;
    const stack = await page.locator('[data-testid="source-marker-boiler-stack"]').boundingBox();
    if (stack === null) throw new Error('bench: the demo stack is not on the map');
    const startX = stack.x + stack.width / 2;
    const startY = stack.y + stack.height - 4;
    await page.mouse.move(startX, startY);
    await page.mouse.down();
    for (let step = 1; step <= 60; step++) {
      await page.mouse.move(startX + 5 * step, startY - step, { steps: 1 });
      await page.waitForTimeout(25);
    }
    await page.mouse.up();
    await page.waitForTimeout(1500);
    const timings = await page.evaluate(() => (globalThis as unknown as PageGlobals).plumeplanPreviewTimes ?? []);
    const roundTrips = timings.map((t) => t.roundTrip_ms);
    const computes = timings.map((t) => t.compute_ms);
    print({
      name: 'map-page-preview-drag',
      scenario: 'merrowdene-heat-plant',
      grid: '200x200 at 50 m (Gaussian preview)',
      pointerMoves: 60,
      previewsShown: timings.length,
      roundTrip_ms_median: timings.length ? round(quantile(roundTrips, 0.5)) : null,
      roundTrip_ms_p90: timings.length ? round(quantile(roundTrips, 0.9)) : null,
      compute_ms_median: timings.length ? round(quantile(computes, 0.5)) : null,
      compute_ms_best: timings.length ? round(Math.min(...computes)) : null,
      note: 'round trip = request to answer on the page; compute = the worker inside it',
    });
    await page.click('#undo-button');
    void box;

    // Run to overlay: solved, then the same submission again (answered from the finished run).
    for (const attempt of ['solved', 'reused']) {
      await page.click('[data-testid="run-button"]');
      await page.waitForFunction(() => /^Done: /.test((globalThis as unknown as PageGlobals).document.querySelector('[data-testid="run-status"]')?.textContent ?? ''), undefined, { timeout: 300_000 });
      const elapsed = await page.evaluate(() => (globalThis as unknown as PageGlobals).plumeplan.results.lastRunToOverlay_ms);
      print({ name: 'map-page-run-to-overlay', scenario: 'merrowdene-heat-plant', mode: 'grid', run: attempt, runToOverlay_ms: elapsed === null ? null : Math.round(elapsed) });
    }
  } finally {
    await browser.close();
    await server.stop();
  }
}

await main();

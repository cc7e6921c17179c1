/**
 * End to end, the map page's studies in Debian's Chromium against the real server: a stack-height search
 * and a siting study run through the Studies tab (Gaussian mode, to keep them quick); the siting map
 * shows on the map with its legend, the best position and the ranked candidates, the value under the
 * pointer, the layer switch, and "move the stack here" as an undoable edit; then a run with the full
 * pack offers the report PDF among its downloads. Screenshots go to out/screenshots/ (1280 x 800 and
 * 820 px wide). Behaviour checks only; the waits are generous (a shared two-core machine).
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { AxeBuilder } from '@axe-core/playwright';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../server/writers/caution.ts';
import { buildPage, launchBrowser, ROOT, startServer, type RunningServer } from './mapPageHarness.ts';

const SCREENSHOTS = path.join(ROOT, 'out', 'screenshots');
const WAIT_ms = 90_000;
/** a study or a Gaussian run with the full pack, with the machine loaded [ms] */
const STUDY_WAIT_ms = 300_000;
const POLL = { timeout: WAIT_ms, interval: 200 };

let server: RunningServer;
let browser: Browser;

beforeAll(async () => {
  mkdirSync(SCREENSHOTS, { recursive: true });
  await buildPage();
  [server, browser] = await Promise.all([startServer(), launchBrowser()]);
}, 300_000);

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

/** The page's globals as these tests use them (reached through globalThis: no DOM library on the Node side). */
interface PageGlobals {
  plumeplan: {
    doc: {
      view: { sources: { id: string; lat?: number; lon?: number }[]; solver: { mode: string } };
      edit(label: string, change: (draft: { solver: { mode: string } }) => void): void;
    };
    map: { latLngToContainerPoint(p: [number, number]): { x: number; y: number } };
  };
  document: { querySelector(selector: string): { textContent: string | null } | null };
}

async function openPage(width: number, height: number): Promise<{ page: Page; problems: string[]; close(): Promise<void> }> {
  const context = await browser.newContext({ viewport: { width, height }, acceptDownloads: true });
  context.setDefaultTimeout(WAIT_ms);
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('console', (message) => {
    if (message.type() === 'error') problems.push(message.text());
  });
  page.on('pageerror', (error) => problems.push(error.message));
  await page.goto(server.url + '/', { timeout: WAIT_ms });
  await page.waitForSelector('[data-testid="legend"] .legend-bar', { timeout: WAIT_ms });
  return { page, problems, close: () => context.close() };
}

const boilerStack = (page: Page) => page.evaluate(() => (globalThis as unknown as PageGlobals).plumeplan.doc.view.sources.find((s) => s.id === 'boiler-stack')!);

describe('the map page studies', () => {
  it('finds a stack height, maps the siting study on the map, moves the stack there and back, and offers the full pack', async () => {
    const { page, problems, close } = await openPage(1280, 800);

    // A stack-height search, Gaussian: the answer, its table and the caution.
    await page.click('#tab-studies');
    await page.click('[data-testid="stack-height-button"]');
    await page.waitForSelector('[data-testid="stack-height-answer"]', { timeout: STUDY_WAIT_ms });
    expect(await page.locator('[data-testid="stack-height-answer"]').textContent()).toMatch(/Lowest height meeting the target: (\d+(\.\d+)? m|no height)/);
    expect(await page.locator('[data-testid="stack-height-table"] tbody tr').count()).toBeGreaterThan(0);
    expect(await page.locator('[data-testid="stack-height-result"] [data-testid="study-caution"]').textContent()).toBe(SCREENING_CAUTION);

    // The siting study, Gaussian: the table, then the map on the map.
    const resultsTop = () => page.locator('#legend-heading').evaluate((element) => (element as unknown as { getBoundingClientRect(): { top: number } }).getBoundingClientRect().top);
    const topBefore = await resultsTop();
    await page.click('[data-testid="site-button"]');
    await page.waitForSelector('[data-testid="siting-answer"]', { timeout: STUDY_WAIT_ms });
    await page.waitForSelector('[data-testid="siting-best-marker"]', { timeout: WAIT_ms });
    expect(await page.locator('[data-testid="siting-best-marker"]').count()).toBe(1);
    // the demo's site boundary on a 50 m lattice holds 14 candidate positions, each with its rank
    const candidates = await page.locator('[data-testid^="siting-candidate-"]').count();
    expect(candidates).toBeGreaterThan(1);
    expect(await page.locator('[data-testid="siting-candidate-1"]').textContent()).toBe('1');
    expect(await page.locator('[data-testid="siting-toggle"]').isChecked()).toBe(true);
    const legend = await page.locator('[data-testid="siting-legend"]').textContent();
    expect(legend).toMatch(/PC at the sensitive receptors if the stack stood here/);
    expect(legend).toContain('µg/m³');
    expect(legend).toContain('one steady weather state');
    expect(legend).toContain('Screening estimate only.');
    // bands drawn: filled paths in the siting pane
    expect(await page.locator('.leaflet-siting-pane path').count()).toBeGreaterThan(2);
    expect(await page.locator('[data-testid="caution"]').isVisible()).toBe(true);
    // nothing in the results column moved
    expect(Math.abs((await resultsTop()) - topBefore)).toBeLessThanOrEqual(2);

    // The value under the pointer, read from siting-map.tif: a point of the site where the raster holds a
    // value (found through the page's own read-out, on a 10 m lattice about the best position).
    const onSite = await page.evaluate(() => {
      const g = globalThis as unknown as { plumeplan: { siting: { readoutAt(lat: number, lon: number): string | null }; map: PageGlobals['plumeplan']['map'] }; document: PageGlobals['document'] };
      const text = g.document.querySelector('[data-testid="siting-answer"]')?.textContent ?? '';
      const match = /lon (-?[\d.]+), lat (-?[\d.]+)/.exec(text)!;
      const [lon, lat] = [Number(match[1]), Number(match[2])];
      for (let dy = -8; dy <= 8; dy++) {
        for (let dx = -8; dx <= 8; dx++) {
          const at: [number, number] = [lat + dy * 9e-5, lon + dx * 1.5e-4];
          if (/µg\/m³ if the stack stood here/.test(g.plumeplan.siting.readoutAt(at[0], at[1]) ?? '')) return g.plumeplan.map.latLngToContainerPoint(at);
        }
      }
      return null;
    });
    expect(onSite).not.toBeNull();
    const mapBox = (await page.locator('#map').boundingBox())!;
    await page.mouse.move(mapBox.x + onSite!.x, mapBox.y + onSite!.y);
    await expect.poll(() => page.locator('[data-testid="pointer-siting"]').textContent(), POLL).toMatch(/^Siting map: [\d.e-]+ µg\/m³ if the stack stood here/);
    // the best position's own figure on hover
    await page.hover('[data-testid="siting-best-marker"]');
    await expect.poll(() => page.locator('.leaflet-tooltip').allTextContents(), POLL).toContainEqual(expect.stringMatching(/^Best position: [\d.]+ µg\/m³/));
    await page.screenshot({ path: path.join(SCREENSHOTS, 'page-siting-1280x800.png') });

    // axe-core on the page with the siting map, its markers and legend on show.
    const axe = await new AxeBuilder({ page }).analyze();
    const serious = axe.violations.filter((violation) => violation.impact === 'serious' || violation.impact === 'critical');
    expect(serious.map((violation) => `${violation.id}: ${violation.nodes.map((node) => node.target.join(' ')).join('; ')}`)).toEqual([]);

    // The switch takes the map off and puts it back.
    await page.click('[data-testid="siting-toggle"]');
    await expect.poll(() => page.locator('[data-testid="siting-best-marker"]').count(), POLL).toBe(0);
    await page.click('[data-testid="siting-toggle"]');
    await expect.poll(() => page.locator('[data-testid="siting-best-marker"]').count(), POLL).toBe(1);

    // "Move the stack here" from the best position's popup: an edit, undone by Undo.
    const before = await boilerStack(page);
    await page.click('[data-testid="siting-best-marker"]');
    await page.click('[data-testid="siting-move-stack-popup"]');
    const best = await page.evaluate(() => {
      const text = (globalThis as unknown as PageGlobals).document.querySelector('[data-testid="siting-answer"]')?.textContent ?? '';
      const match = /lon (-?[\d.]+), lat (-?[\d.]+)/.exec(text);
      return match ? { lon: Number(match[1]), lat: Number(match[2]) } : null;
    });
    expect(best).not.toBeNull();
    await expect.poll(() => boilerStack(page), POLL).toMatchObject({ lon: best!.lon, lat: best!.lat });
    expect(await page.locator('#undo-button').getAttribute('title')).toMatch(/best siting position/);
    await page.click('#undo-button');
    await expect.poll(() => boilerStack(page), POLL).toMatchObject({ lon: before.lon, lat: before.lat });
    // the same from the Studies tab's button
    await page.click('[data-testid="siting-move-stack"]');
    await expect.poll(() => boilerStack(page), POLL).toMatchObject({ lon: best!.lon, lat: best!.lat });
    await page.click('#undo-button');
    await expect.poll(() => boilerStack(page), POLL).toMatchObject({ lon: before.lon, lat: before.lat });

    // A Gaussian run with the full pack offers the report PDF among its downloads.
    await page.evaluate(() => (globalThis as unknown as PageGlobals).plumeplan.doc.edit('use the Gaussian solver', (draft) => void (draft.solver.mode = 'gaussian')));
    await page.selectOption('[data-testid="pack-choice"]', 'full');
    await page.click('[data-testid="run-button"]');
    await page.waitForFunction(() => /^Done: /.test((globalThis as unknown as PageGlobals).document.querySelector('[data-testid="run-status"]')?.textContent ?? ''), undefined, { timeout: STUDY_WAIT_ms });
    const pdf = page.locator('[data-testid="downloads"] [data-testid="download-report.pdf"]');
    expect(await pdf.count()).toBe(1);
    expect(await pdf.getAttribute('href')).toMatch(/report\.pdf$/);
    const response = await page.request.get(server.url + (await pdf.getAttribute('href')));
    expect(response.status()).toBe(200);
    expect((await response.body()).subarray(0, 5).toString('latin1')).toBe('%PDF-');

    expect(problems).toEqual([]);
    await close();
  }, 900_000);

  it('shows the siting map at tablet width without sideways overflow', async () => {
    const { page, problems, close } = await openPage(820, 1180);
    await page.click('#tab-studies');
    await page.click('[data-testid="site-button"]');
    await page.waitForSelector('[data-testid="siting-best-marker"]', { timeout: STUDY_WAIT_ms });
    const overflow = await page.evaluate(() => {
      const root = (globalThis as unknown as { document: { documentElement: { scrollWidth: number; clientWidth: number } } }).document.documentElement;
      return root.scrollWidth - root.clientWidth;
    });
    expect(overflow).toBeLessThanOrEqual(0);
    expect(await page.locator('[data-testid="siting-legend"]').isVisible()).toBe(true);
    await page.locator('#map').scrollIntoViewIfNeeded();
    await page.evaluate(() => (globalThis as unknown as { scrollTo(x: number, y: number): void }).scrollTo(0, 0));
    await page.screenshot({ path: path.join(SCREENSHOTS, 'page-siting-tablet-820.png') });
    // The siting map answered a question about this scenario: opening another one takes it away.
    await page.click('#tab-library');
    page.once('dialog', (dialog) => void dialog.accept()); // "discard unsaved changes?" when the page asks
    await page.click('button[data-act="new"]');
    await expect.poll(() => page.locator('[data-testid="siting-best-marker"]').count(), POLL).toBe(0);
    expect(await page.locator('[data-layer="siting"]').isDisabled()).toBe(true);
    expect(problems).toEqual([]);
    await close();
  }, 600_000);
});

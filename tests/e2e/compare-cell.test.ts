/**
 * The demo notebook's compare cell in a real browser: it tests the ordering line of the
 * dose–response model, and a statistician reads its Bayes factor with the interval, the plain-words
 * reading and the caution that Bayes factors depend on the priors, without running anything (the
 * comparison was computed when the demo was seeded, by the compare job's code). The numbers on the
 * page are the stored result's (whose statistics are checked in tests/unit/evidence/compare.test.ts
 * and tests/integration/notebook/compare.test.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { and, eq } from 'drizzle-orm';
import { cells, runSummaries, runs } from '../../server/db/schema';
import { DEMO_NOTEBOOK, DEMO_USER, seedDemo } from '../../server/seed/demo';
import { DEMO_ORDER_LINE, seedDemoNotebook } from '../../server/seed/notebook';
import { compareResultSchema, type CompareResult } from '../../shared/api/compare';
import { startTestServer, type TestServer } from '../helpers/server';
import { launchBrowser, openWatchedPage, screenshotPath, type Browser } from './browser';

let server: TestServer;
let browser: Browser;
let page: Page;
let pageErrors: string[] = [];
let stored: CompareResult;

beforeAll(async () => {
  server = await startTestServer();
  const demo = await seedDemo(server.db.db);
  await seedDemoNotebook(server.db.db, demo);
  const [cell] = await server.db.db.select().from(cells).where(and(eq(cells.notebookId, demo.notebookId), eq(cells.kind, 'compare')));
  const [run] = await server.db.db.select().from(runs).where(eq(runs.cellId, cell.id));
  const [sum] = await server.db.db.select().from(runSummaries).where(eq(runSummaries.runId, run.id));
  stored = compareResultSchema.parse(sum.summary);
  browser = await launchBrowser();
  ({ page, errors: pageErrors } = await openWatchedPage(browser, 20_000));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe('compare cell of the demo notebook', () => {
  it('shows the ordering hypothesis with its Bayes factor, interval, reading and the prior caution', async () => {
    try {
      await page.goto(`${server.url}/sign-in`);
      await page.getByLabel('E-mail').fill(DEMO_USER.email);
      await page.getByLabel('Password').fill(DEMO_USER.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      await page.getByRole('link', { name: /Alder Creek/ }).first().click();
      await page.getByRole('link', { name: DEMO_NOTEBOOK }).click();
      const cell = page.locator('section[data-kind="compare"]');
      await cell.getByTestId('compare-results').waitFor({ timeout: 30_000 });
      await cell.scrollIntoViewIfNeeded();

      // The tested line, as written in the model.
      const hyp = cell.getByTestId('compare-hypothesis');
      expect(await hyp.innerText()).toContain(`line ${DEMO_ORDER_LINE}`);
      expect(await hyp.innerText()).toContain('load[1] <= load[2] <= load[3] <= load[4] <= load[5]');
      // Its log Bayes factor with the standard error, and the Bayes factor's 95 % interval.
      const h = stored.hypotheses[0];
      expect(await cell.getByTestId('hypothesis-logbf').innerText()).toBe(`${h.logBF.toFixed(2)} ± ${h.se.toFixed(2)}`);
      expect(h.logBF).toBeGreaterThan(0); // the demo data favour the ordering
      const interval = await cell.getByTestId('hypothesis-interval').innerText();
      const m = interval.match(/\(([\d.e-]+) to ([\d.e-]+)\)/);
      expect(m).not.toBeNull();
      expect(Number(m![1])).toBeCloseTo(Math.exp(h.interval[0]), 0);
      expect(Number(m![2])).toBeCloseTo(Math.exp(h.interval[1]), 0);
      // The plain reading and the caution with its sensitivity button.
      expect(await cell.getByTestId('compare-reading').innerText()).toMatch(/favour .*Sediment load rising with rain class.* by a factor of about/);
      expect(await cell.getByTestId('compare-caution').innerText()).toMatch(/Bayes factors depend on the priors/);
      expect(await cell.getByRole('button', { name: 'Rerun with prior scales ×0.5 and ×2' }).count()).toBe(1);
      // The leave-one-out difference of the one-mean model sits beside the Bayes factors.
      expect(await cell.getByTestId('compare-row').filter({ hasText: 'One mean for every rain class' }).innerText()).toMatch(/-\d+\.\d ± \d+\.\d/);
      await page.screenshot({ path: await screenshotPath('compare-cell.png'), fullPage: false });
      expect(pageErrors).toEqual([]);
    } catch (e) {
      await page.screenshot({ path: await screenshotPath('compare-cell-failure.png'), fullPage: true });
      throw e;
    }
  });
});

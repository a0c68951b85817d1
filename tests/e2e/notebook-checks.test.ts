/**
 * Checks against the data in a real browser, on the demo notebook: the dose–response fit shows
 * its checks (distribution, statistics with p-values, per rain class, leave-one-out); its
 * deliberately misspecified twin (scatter fixed at 0.25 t/km² where the storms scatter by about a
 * tonne) shows failing statistics marked extreme and names the rows leave-one-out cannot account
 * for; a run of the twin "before the data" is labelled as a prior run in its results and in the
 * runs list, and shows prior predictive checks.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_NOTEBOOK, DEMO_USER, seedDemo } from '../../server/seed/demo';
import { seedDemoNotebook } from '../../server/seed/notebook';
import { RunWorker } from '../../server/runs/worker';
import { startTestServer, type TestServer } from '../helpers/server';
import { launchBrowser, openWatchedPage, screenshotPath, type Browser } from './browser';

let server: TestServer;
let browser: Browser;
let page: Page;
let worker: RunWorker | null = null;
let pageErrors: string[] = [];

beforeAll(async () => {
  server = await startTestServer();
  const demo = await seedDemo(server.db.db);
  await seedDemoNotebook(server.db.db, demo);
  browser = await launchBrowser();
  ({ page, errors: pageErrors } = await openWatchedPage(browser, 20_000));
});

afterAll(async () => {
  await worker?.stop(true);
  await browser?.close();
  await server?.close();
});

describe('checks against the data in the demo notebook', () => {
  it('the dose–response fit shows its checks, its twin a failing statistic, and a prior run is labelled', async () => {
    try {
      await flow();
    } catch (e) {
      await page.screenshot({ path: await screenshotPath('checks-failure.png'), fullPage: true });
      throw e;
    }
  });
});

async function flow() {
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(DEMO_USER.email);
  await page.getByLabel('Password').fill(DEMO_USER.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  await page.getByRole('link', { name: /Alder Creek/ }).first().click();
  await page.getByRole('link', { name: DEMO_NOTEBOOK }).click();
  await page.getByRole('heading', { name: DEMO_NOTEBOOK }).first().waitFor();

  const fits = page.locator('section[data-kind="fit"]');
  await expect.poll(() => fits.count(), { timeout: 15_000 }).toBe(4); // the three fits of the checks, and the one-mean fit of the comparison

  // The dose–response fit: its checks, six statistics (the five built in and the demo's iqr).
  const dose = fits.nth(1);
  const doseChecks = dose.getByTestId('checks-view');
  await doseChecks.waitFor({ timeout: 30_000 });
  expect(await doseChecks.getAttribute('data-kind')).toBe('posterior');
  expect(await doseChecks.getByTestId('stat-row').count()).toBe(6);
  const doseItem = doseChecks.getByTestId('checks-item');
  // No statistic of all rows is extreme for the model whose scatter is learnt from the data.
  expect(await doseItem.getByTestId('checks-failing').count()).toBe(0);
  await doseChecks.getByTestId('checks-groups').waitFor();
  await doseChecks.getByTestId('checks-loo').waitFor();
  await doseChecks.getByTestId('plot').first().locator('svg').first().waitFor({ timeout: 30_000 });
  await doseChecks.screenshot({ path: await screenshotPath('checks-dose-response.png') });

  // The twin: failing statistics marked extreme, in words, and leave-one-out names rows.
  const twin = fits.nth(2);
  const twinChecks = twin.getByTestId('checks-view');
  await twinChecks.waitFor({ timeout: 30_000 });
  const failing = twinChecks.getByTestId('checks-failing');
  await failing.waitFor();
  expect(await failing.textContent()).toMatch(/extreme: .*standard deviation/);
  const sdRow = twinChecks.locator('[data-testid="stat-row"][data-stat="sd"]');
  expect(await sdRow.getAttribute('data-extreme')).toBe('true');
  expect(await sdRow.textContent()).toContain('EXTREME');
  expect(await twinChecks.getByTestId('loo-high-k').textContent()).toMatch(/storms row \d+/);
  await twinChecks.getByTestId('plot').first().locator('svg').first().waitFor({ timeout: 30_000 });
  await twinChecks.screenshot({ path: await screenshotPath('checks-twin.png') });

  // Before the data: the twin's fit with its likelihood left out, labelled as a prior run.
  await twin.getByLabel(/Before the data: priors and constraints only/).check();
  await twin.getByLabel('Draws', { exact: true }).fill('200');
  await twin.getByLabel('Warm-up iterations', { exact: true }).fill('200');
  await twin.getByRole('button', { name: 'Run fit' }).click();
  await twin.getByTestId('chain-progress').waitFor();
  worker = new RunWorker({ db: server.db.db, progressMs: 100, pollMs: 200, log: () => {} });
  worker.start();
  await twin.getByTestId('prior-run-heading').waitFor({ timeout: 120_000 });
  const priorChecks = twin.getByTestId('checks-view');
  await expect.poll(() => priorChecks.getAttribute('data-kind'), { timeout: 30_000 }).toBe('prior');
  expect(await priorChecks.getByRole('heading').first().textContent()).toMatch(/before the data/);
  await twin.getByTestId('runs-list').locator('summary').click();
  expect(await twin.getByTestId('runs-list').getByTestId('prior-run-label').count()).toBe(1);
  await twin.screenshot({ path: await screenshotPath('checks-prior-run.png') });
  expect(pageErrors).toEqual([]);
}

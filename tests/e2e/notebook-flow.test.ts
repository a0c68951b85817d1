/**
 * The notebook in a real browser: sign in as the demo user → open the demo notebook → upload a
 * CSV → write a small constrained model → run a fit → see progress, then the summary table and a
 * plot → export the draws CSV and check its header and row count → a reviewer adds a comment →
 * a share-link visitor reads the notebook read-only and cannot edit.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import Papa from 'papaparse';
import { memberships } from '../../server/db/schema';
import { DEMO_NOTEBOOK, DEMO_USER, seedDemo } from '../../server/seed/demo';
import { seedDemoNotebook } from '../../server/seed/notebook';
import { RunWorker } from '../../server/runs/worker';
import { startTestServer, type TestServer } from '../helpers/server';
import { TestClient, signIn, signUp, TEST_PASSWORD } from '../helpers/http';
import { launchBrowser, openWatchedPage, screenshotPath, scrollUntilVisible, type Browser } from './browser';

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

async function signInAs(email: string, password: string) {
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
}

/** The last "add" line of the column (after the last cell). */
const lastAddLine = () => page.getByRole('group', { name: /^Add a cell at position/ }).last();

/** Add a cell of a kind at the end and wait until it is on the page; returns its section. */
async function addCellAtEnd(kind: 'data' | 'model' | 'fit') {
  const sections = page.locator(`section[data-kind="${kind}"]`);
  const before = await sections.count();
  await lastAddLine().hover();
  await lastAddLine().getByRole('button', { name: `Add ${kind} cell here` }).click();
  await expect.poll(() => sections.count(), { timeout: 15_000 }).toBe(before + 1);
  return sections.nth(before);
}

describe('the notebook', () => {
  it('runs a constrained fit from an uploaded table and shares the result read-only', async () => {
    try {
      await flow();
    } catch (e) {
      await page.screenshot({ path: await screenshotPath('notebook-failure.png'), fullPage: true });
      throw e;
    }
  });
});

async function flow() {
  {
    await signInAs(DEMO_USER.email, DEMO_USER.password);
    await page.getByRole('link', { name: /Alder Creek/ }).first().click();
    await page.getByRole('link', { name: DEMO_NOTEBOOK }).click();
    await page.getByRole('heading', { name: DEMO_NOTEBOOK }).first().waitFor();
    const notebookUrl = page.url();
    const [, workspaceId, notebookId] = new URL(notebookUrl).pathname.match(/^\/w\/([a-z0-9]+)\/n\/([a-z0-9]+)$/)!;
    // The demo arrives with finished fits: a verdict and a summary table without typing anything.
    await page.getByTestId('summary-table').first().waitFor();

    // ---- upload a CSV into a new data cell ----
    const dataCell = await addCellAtEnd('data');
    await dataCell.getByTestId('csv-file').setInputFiles({
      name: 'roast.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from('batch,bitterness\n1,4.1\n2,5.3\n3,4.8\n4,6.0\n5,5.1\n6,4.4\n7,5.7\n8,5.0\n'),
    });
    await dataCell.getByLabel('Table name').fill('roast');
    await dataCell.getByRole('button', { name: 'Upload' }).click();
    await dataCell.getByTestId('row-count').waitFor();
    expect(await dataCell.getByTestId('row-count').textContent()).toBe('8');

    // ---- write a small constrained model ----
    const modelCell = await addCellAtEnd('model');
    await modelCell.locator('.cm-content').click();
    const program = [
      '# Bitterness of the house roast',
      'table roast',
      'unknown level, spread',
      'term ld_normal(bitterness, level, spread)',
      'term ld_normal(level, 5, 3) + ld_halfnormal(spread, 2)',
      'constrain 4 <= level <= 6',
      'constrain spread >= 0.05',
    ];
    for (const line of program) {
      await page.keyboard.type(line, { delay: 2 });
      await page.keyboard.press('Escape'); // close the completion list so Enter starts a new line
      await page.keyboard.press('Enter');
    }
    await modelCell.getByTestId('region-status').filter({ hasText: 'interior found' }).waitFor();
    await modelCell.getByTestId('save-state').filter({ hasText: 'saved' }).waitFor();

    // ---- a fit cell: settings, run, progress, results ----
    const fitCell = await addCellAtEnd('fit');
    await fitCell.getByLabel('Chains').fill('2');
    await fitCell.getByLabel('Warm-up iterations').fill('300');
    await fitCell.getByLabel('Draws').fill('400');
    await fitCell.getByRole('button', { name: 'Run fit' }).click();
    // Queued: the per-chain progress view appears before any worker runs.
    await fitCell.getByTestId('chain-progress').waitFor();
    expect(await fitCell.getByRole('progressbar').count()).toBe(2);
    worker = new RunWorker({ db: server.db.db, progressMs: 100, pollMs: 200, log: () => {} });
    worker.start();
    await fitCell.getByTestId('summary-table').waitFor({ timeout: 120_000 });
    await fitCell.getByTestId('verdict').waitFor();
    expect(await fitCell.getByTestId('summary-table').textContent()).toContain('level');
    await fitCell.getByTestId('plot').locator('svg').first().waitFor({ timeout: 30_000 });
    await fitCell.screenshot({ path: await screenshotPath('notebook-fit-results.png') });
    await page.screenshot({ path: await screenshotPath('notebook-page.png'), fullPage: true });

    // ---- export the draws CSV: header and row count ----
    const href = await fitCell.getByRole('link', { name: 'Draws CSV' }).getAttribute('href');
    const csv = await page.request.get(`${server.url}${href}`);
    expect(csv.status()).toBe(200);
    const rows = Papa.parse<string[]>((await csv.text()).trim()).data;
    expect(rows[0]).toEqual(['chain', 'iteration', 'level', 'spread']);
    expect(rows.length - 1).toBe(2 * 400);
    expect(rows.slice(1).every((r) => Number(r[2]) >= 4 && Number(r[2]) <= 6)).toBe(true);

    // ---- a reviewer comments ----
    const reviewer = server.client();
    const rv = await signUp(reviewer, { name: 'Mara Reviewer' });
    await server.db.db.insert(memberships).values({ workspaceId, userId: rv.id, role: 'reviewer', createdAt: server.clock.now() });
    await page.context().clearCookies();
    await signInAs(rv.email, TEST_PASSWORD);
    await page.goto(notebookUrl);
    await page.getByTestId('read-only-banner').waitFor();
    // Plots load as their fit cells come into view: bring each into view and let its plot finish
    // drawing before pointing at anything below them.
    const fits = page.locator('section[data-kind="fit"]');
    for (let k = 0; k < (await fits.count()); k++) {
      // Cells above may still grow as their own plots arrive: bring this one into view again until its figure is there.
      await scrollUntilVisible(fits.nth(k), fits.nth(k).locator('[data-testid="fit-plots"] [data-testid="plot"] svg').first());
    }
    // One results figure per finished fit, with the one-mean fit of the demo comparison.
    await expect.poll(() => page.locator('[data-testid="fit-plots"] [data-testid="plot"] svg').count(), { timeout: 30_000 }).toBe(5);
    const reviewedFit = page.locator('section[data-kind="fit"]').last();
    await reviewedFit.getByRole('button', { name: /^Comments on this fit cell/ }).click();
    await page.getByLabel('Comment on this cell…').fill('Is a spread prior of 2 too wide for this panel?');
    await page.getByRole('button', { name: 'Post' }).click();
    await page.getByTestId('comment-thread').filter({ hasText: 'spread prior of 2' }).waitFor();
    expect(await reviewedFit.getByRole('button', { name: 'Run fit' }).count()).toBe(0);

    // ---- a share-link visitor reads it, read-only ----
    const owner = new TestClient(server.url);
    await signIn(owner, DEMO_USER.email, DEMO_USER.password);
    const link = await owner.post(`/api/workspaces/${workspaceId}/notebooks/${notebookId}/share-links`, {});
    expect(link.status).toBe(201);
    await page.context().clearCookies();
    await page.goto(`${server.url}${link.body.path}`);
    await page.getByRole('status').filter({ hasText: 'Read-only view' }).waitFor();
    await page.getByTestId('summary-table').first().waitFor();
    expect(await page.getByRole('button', { name: 'Run fit' }).count()).toBe(0);
    expect(await page.getByRole('group', { name: /^Add a cell/ }).count()).toBe(0);
    expect(await page.locator('.cm-content[contenteditable="true"]').count()).toBe(0);
    expect(await page.getByText('spread prior of 2').count()).toBe(0); // comments are for members
    // The API refuses a write with the share token alone.
    const write = await page.request.patch(`${server.url}/api/workspaces/${workspaceId}/notebooks/${notebookId}/cells/x`, { data: { baseVersion: 1, source: 'x' } });
    expect([401, 403, 404]).toContain(write.status());
    await page.screenshot({ path: await screenshotPath('notebook-shared.png'), fullPage: true });
    expect(pageErrors).toEqual([]);
  }
}

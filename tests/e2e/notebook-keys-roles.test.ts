/**
 * The notebook's keyboard, each role's view of a model cell and its comments, and the pages on a
 * phone-sized screen (390 px wide: the notebook as owner, reviewer and share-link visitor, the
 * notebook list, the members and activity pages), in a real browser against the demo notebook.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { memberships } from '../../server/db/schema';
import { DEMO_NOTEBOOK, DEMO_USER, seedDemo } from '../../server/seed/demo';
import { seedDemoNotebook } from '../../server/seed/notebook';
import { startTestServer, type TestServer } from '../helpers/server';
import { TestClient, signIn, signUp, TEST_PASSWORD } from '../helpers/http';
import { launchBrowser, openWatchedPage, screenshotPath, scrollUntilVisible, type Browser } from './browser';

let server: TestServer;
let browser: Browser;
let page: Page;
let pageErrors: string[] = [];
let notebookUrl = '';
let workspaceId = '';
let notebookId = '';

beforeAll(async () => {
  server = await startTestServer();
  const demo = await seedDemo(server.db.db);
  await seedDemoNotebook(server.db.db, demo);
  browser = await launchBrowser();
  ({ page, errors: pageErrors } = await openWatchedPage(browser, 20_000));
  await signInAs(DEMO_USER.email, DEMO_USER.password);
  await page.getByRole('link', { name: /Alder Creek/ }).first().click();
  await page.getByRole('link', { name: DEMO_NOTEBOOK }).click();
  await page.getByRole('heading', { name: DEMO_NOTEBOOK }).first().waitFor();
  notebookUrl = page.url();
  [, workspaceId, notebookId] = new URL(notebookUrl).pathname.match(/^\/w\/([a-z0-9]+)\/n\/([a-z0-9]+)$/)!;
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

async function signInAs(email: string, password: string) {
  await page.context().clearCookies();
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
}

/** Runs `body`; on failure keeps a full-page screenshot under test-results/. */
async function withShot(name: string, body: () => Promise<void>) {
  try {
    await body();
  } catch (e) {
    await page.screenshot({ path: await screenshotPath(`${name}-failure.png`), fullPage: true });
    throw e;
  }
}

const activeCellKind = () => page.locator('section[data-cell-id][data-active="true"]').getAttribute('data-kind');

describe('keyboard', () => {
  it('Ctrl-Enter in the model editor runs the fit below instead of inserting a line and saving a version', () =>
    withShot('keys-model', async () => {
      await page.goto(notebookUrl);
      const model = page.locator('section[data-kind="model"]').first();
      const fit = page.locator('section[data-kind="fit"]').first();
      await fit.getByTestId('fit-results').waitFor();
      const before = await model.locator('.cm-content').innerText();
      const version = await model.getByTestId('save-state').innerText();
      await model.locator('.cm-line').last().click();
      await page.keyboard.press('End');
      await page.keyboard.press('Control+Enter');
      // The fit cell below queues a run (no worker runs here, so it stays queued with its chains listed).
      await fit.getByTestId('chain-progress').waitFor();
      await page.waitForTimeout(1500); // longer than the autosave pause: a stray edit would have saved by now
      expect(await model.locator('.cm-content').innerText()).toBe(before);
      expect(await model.getByTestId('save-state').innerText()).toBe(version);
      // Cancel it so the other tests see the finished fit.
      const cancel = fit.getByRole('button', { name: /^Cancel/ });
      if (await cancel.count()) await cancel.first().click();
    }));

  it('after Ctrl-Enter closes a notes editor, Alt-↑/↓ still move between cells', () =>
    withShot('keys-notes', async () => {
      await page.goto(notebookUrl);
      const notes = page.locator('section[data-kind="notes"]').first();
      await notes.getByRole('button', { name: 'edit' }).click();
      const text = notes.getByLabel('Notes text (markdown)');
      await text.waitFor();
      await text.press('End');
      await page.keyboard.press('Control+Enter');
      await expect.poll(() => notes.getByLabel('Notes text (markdown)').count()).toBe(0);
      expect(await activeCellKind()).toBe('notes');
      await page.keyboard.press('Alt+ArrowDown');
      await expect.poll(activeCellKind).toBe('data');
      await page.keyboard.press('Alt+ArrowDown');
      await expect.poll(activeCellKind).toBe('model');
      await page.keyboard.press('Alt+ArrowUp');
      await expect.poll(activeCellKind).toBe('data');
      // Escape closes it as well, with the same result.
      await notes.getByRole('button', { name: 'edit' }).click();
      await notes.getByLabel('Notes text (markdown)').press('Escape');
      await expect.poll(() => notes.getByLabel('Notes text (markdown)').count()).toBe(0);
      await page.keyboard.press('Alt+ArrowDown');
      await expect.poll(activeCellKind).toBe('data');
    }));
});

describe("each role's view of a model cell and its comments", () => {
  let reviewer: { email: string };
  let viewer: { email: string };
  let shareUrl = '';

  beforeAll(async () => {
    const owner = new TestClient(server.url);
    await signIn(owner, DEMO_USER.email, DEMO_USER.password);
    const cells = (await owner.get(`/api/workspaces/${workspaceId}/notebooks/${notebookId}`)).body.cells as { id: string; kind: string; position: number }[];
    const model = cells.filter((c) => c.kind === 'model').sort((a, b) => a.position - b.position)[0];
    const posted = await owner.post(`/api/workspaces/${workspaceId}/notebooks/${notebookId}/cells/${model.id}/comments`, { body: 'Are the three source signatures from the same lab?' });
    expect(posted.status).toBe(201);
    for (const [role, name] of [['reviewer', 'Rhea Reviewer'], ['viewer', 'Vic Viewer']] as const) {
      const c = server.client();
      const person = await signUp(c, { name });
      await server.db.db.insert(memberships).values({ workspaceId, userId: person.id, role, createdAt: server.clock.now() });
      if (role === 'reviewer') reviewer = person;
      else viewer = person;
    }
    const link = await owner.post(`/api/workspaces/${workspaceId}/notebooks/${notebookId}/share-links`, {});
    expect(link.status).toBe(201);
    shareUrl = `${server.url}${link.body.path}`;
  });

  /** The first model cell shows its side panel, read-only, with the unknowns and the region check. */
  async function expectReadOnlyModelPanel() {
    const model = page.locator('section[data-kind="model"]').first();
    const panel = model.getByTestId('model-side-panel');
    await panel.waitFor();
    expect(await panel.getAttribute('data-read-only')).toBe('true');
    expect(await panel.innerText()).toContain('share');
    await panel.getByTestId('region-status').filter({ hasText: 'interior found' }).waitFor();
    expect(await model.locator('.cm-content[contenteditable="true"]').count()).toBe(0);
    // The fit settings read as text, not as fields waiting for input.
    const fit = page.locator('section[data-kind="fit"]').first();
    const chains = fit.getByLabel('Chains', { exact: true });
    expect(await chains.isDisabled()).toBe(true);
    const style = await chains.evaluate((el) => {
      const s = getComputedStyle(el);
      return { background: s.backgroundColor, borderTop: s.borderTopColor };
    });
    expect(style.background).toBe('rgba(0, 0, 0, 0)');
    expect(style.borderTop).toBe('rgba(0, 0, 0, 0)');
  }

  it('a reviewer sees the side panel read-only and writes comments', () =>
    withShot('role-reviewer', async () => {
      await signInAs(reviewer.email, TEST_PASSWORD);
      await page.goto(notebookUrl);
      await expectReadOnlyModelPanel();
      const model = page.locator('section[data-kind="model"]').first();
      await model.getByRole('button', { name: /^Comments on this model cell/ }).click();
      await page.getByTestId('comment-thread').filter({ hasText: 'same lab' }).waitFor();
      await page.getByLabel('Comment on this cell…').fill('Yes: one lab, one protocol.');
      await page.getByRole('button', { name: 'Post' }).click();
      await page.getByTestId('comment-thread').filter({ hasText: 'one protocol' }).waitFor();
    }));

  it('a viewer sees the side panel read-only and reads the comments without a way to write', () =>
    withShot('role-viewer', async () => {
      await signInAs(viewer.email, TEST_PASSWORD);
      await page.goto(notebookUrl);
      await expectReadOnlyModelPanel();
      const model = page.locator('section[data-kind="model"]').first();
      await model.getByRole('button', { name: /^Comments on this model cell/ }).click();
      await page.getByTestId('comment-thread').filter({ hasText: 'same lab' }).waitFor();
      await page.getByTestId('comments-read-only').waitFor();
      expect(await page.getByLabel('Comment on this cell…').count()).toBe(0);
      expect(await page.getByRole('button', { name: 'resolve' }).count()).toBe(0);
      expect(await page.getByRole('button', { name: 'reply' }).count()).toBe(0);
      await page.screenshot({ path: await screenshotPath('role-viewer.png'), fullPage: false });
    }));

  it('a share-link visitor sees the side panel read-only and no comments', () =>
    withShot('role-share', async () => {
      await page.context().clearCookies();
      await page.goto(shareUrl);
      await page.getByRole('status').filter({ hasText: 'Read-only view' }).waitFor();
      await expectReadOnlyModelPanel();
      expect(await page.getByRole('button', { name: /^Comments on this/ }).count()).toBe(0);
      expect(await page.getByText('same lab').count()).toBe(0);
      expect(pageErrors).toEqual([]);
    }));
});

describe('on a phone (390 px wide)', () => {
  it('the notebook does not scroll sideways, the model editor keeps at least 30 characters, the header actions fit', () =>
    withShot('phone', async () => {
      await signInAs(DEMO_USER.email, DEMO_USER.password);
      await page.setViewportSize({ width: 390, height: 844 });
      try {
        await page.goto(notebookUrl);
        const fit = page.locator('section[data-kind="fit"]').first();
        await fit.getByTestId('fit-results').waitFor();
        // Plots load as their fit cell comes into view.
        await fit.scrollIntoViewIfNeeded();
        await fit.getByTestId('plot').first().waitFor();
        await page.waitForTimeout(500);
        // No horizontal scroll of the page itself.
        const widths = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
        expect(widths.scroll).toBeLessThanOrEqual(widths.client);
        // The model editor's text area holds at least 30 characters of its monospace font.
        const chars = await page.locator('section[data-kind="model"] .cm-content').first().evaluate((el) => {
          const probe = document.createElement('span');
          probe.textContent = 'x'.repeat(40);
          probe.style.visibility = 'hidden';
          probe.style.position = 'absolute';
          el.appendChild(probe);
          const w = probe.getBoundingClientRect().width / 40;
          probe.remove();
          const scroller = el.closest('.cm-scroller') as HTMLElement;
          const gutters = scroller.querySelector('.cm-gutters') as HTMLElement | null;
          return (scroller.clientWidth - (gutters?.offsetWidth ?? 0)) / w;
        });
        expect(chars).toBeGreaterThanOrEqual(30);
        // Rename and Delete are wholly on screen.
        for (const name of ['Rename', 'Delete']) {
          const box = await page.getByRole('button', { name, exact: true }).first().boundingBox();
          expect(box).not.toBeNull();
          expect(box!.x).toBeGreaterThanOrEqual(0);
          expect(box!.x + box!.width).toBeLessThanOrEqual(390);
        }
        // Every row of the results stays within its cell (nothing cut off at the right edge).
        const cutoff = await fit.evaluate((cell) => {
          const right = cell.getBoundingClientRect().right + 0.5;
          return [...cell.querySelectorAll<HTMLElement>('[data-testid="quantity-row"]')].filter((r) => r.getBoundingClientRect().right > right).length;
        });
        expect(cutoff).toBe(0);
        expect(await fit.getByTestId('quantity-row').count()).toBeGreaterThan(0);
        // No quantity name is cut short (roads_minus_fields wraps instead of ending in an ellipsis).
        const cutNames = await fit.evaluate((cell) =>
          [...cell.querySelectorAll<HTMLElement>('[data-testid="quantity-name"]')].filter((n) => n.scrollWidth > n.clientWidth + 0.5).map((n) => n.textContent),
        );
        expect(cutNames).toEqual([]);
        await fit.getByTestId('mixing-figures').locator('summary').click();
        // The mixing figures behind the fold are all on screen: no column cut off or scrolled away.
        const mixing = await fit.getByTestId('mixing-table').evaluate((t) => ({
          scroll: t.parentElement!.scrollWidth,
          client: t.parentElement!.clientWidth,
          cells: t.querySelectorAll('tbody td').length,
          offscreen: [...t.querySelectorAll('tbody td, tbody th')].filter((c) => c.getBoundingClientRect().right > 390 || c.getBoundingClientRect().width === 0).length,
        }));
        expect(mixing.scroll).toBeLessThanOrEqual(mixing.client);
        expect(mixing.cells).toBeGreaterThan(0);
        expect(mixing.offscreen).toBe(0);
        await fit.getByTestId('mixing-figures').screenshot({ path: await screenshotPath('phone-mixing-figures.png') });
        await page.screenshot({ path: await screenshotPath('phone-notebook.png'), fullPage: true });
        await page.evaluate(() => window.scrollTo(0, 0));
        await page.screenshot({ path: await screenshotPath('phone-top.png') });
        await page.locator('section[data-kind="model"]').first().scrollIntoViewIfNeeded();
        await page.screenshot({ path: await screenshotPath('phone-model.png') });
        await fit.screenshot({ path: await screenshotPath('phone-fit-cell.png') });
      } finally {
        await page.setViewportSize({ width: 1280, height: 860 });
      }
    }));
});

describe('the other pages on a phone (390 px wide)', () => {
  /** The page's own width does not exceed the screen: nothing scrolls sideways. */
  async function expectNoSidewaysScroll(what: string) {
    await page.waitForTimeout(300);
    const w = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
    expect(w.scroll, `${what}: page width ${w.scroll} on a ${w.client} px screen`).toBeLessThanOrEqual(w.client);
  }

  it('the notebook list, the members page and the activity page do not scroll sideways', () =>
    withShot('phone-pages', async () => {
      await signInAs(DEMO_USER.email, DEMO_USER.password);
      await page.setViewportSize({ width: 390, height: 844 });
      try {
        await page.goto(`${server.url}/w/${workspaceId}`);
        await page.getByRole('link', { name: DEMO_NOTEBOOK }).waitFor();
        await expectNoSidewaysScroll('notebook list');
        // The list's own table does not hide its actions behind a sideways scroll either.
        const table = page.getByRole('table', { name: 'Notebooks' });
        const inner = await table.evaluate((t) => ({ scroll: t.parentElement!.scrollWidth, client: t.parentElement!.clientWidth }));
        expect(inner.scroll).toBeLessThanOrEqual(inner.client);
        for (const name of [`Rename ${DEMO_NOTEBOOK}`, `Delete ${DEMO_NOTEBOOK}`]) {
          const box = await page.getByRole('button', { name, exact: true }).boundingBox();
          expect(box).not.toBeNull();
          expect(box!.x + box!.width, name).toBeLessThanOrEqual(390);
        }
        await page.screenshot({ path: await screenshotPath('phone-list.png'), fullPage: true });
        await page.goto(`${server.url}/w/${workspaceId}/members`);
        await page.getByRole('heading', { name: /Members/ }).first().waitFor();
        await expectNoSidewaysScroll('members page');
        // Every member's role picker and Remove, and every share link's Revoke, are on screen, not
        // behind a table's own sideways scroll (the link made above is listed, so both tables are here).
        await page.getByRole('table', { name: 'Share links' }).waitFor();
        for (const name of ['Members', 'Share links']) {
          const table = page.getByRole('table', { name });
          const own = await table.evaluate((t) => ({ scroll: t.parentElement!.scrollWidth, client: t.parentElement!.clientWidth }));
          expect(own.scroll, `${name} table`).toBeLessThanOrEqual(own.client);
          for (const control of await table.locator('select, button').all()) {
            const box = await control.boundingBox();
            expect(box).not.toBeNull();
            expect(box!.x + box!.width, `${name} table control`).toBeLessThanOrEqual(390);
          }
        }
        await page.screenshot({ path: await screenshotPath('phone-members.png'), fullPage: true });
        await page.goto(`${server.url}/w/${workspaceId}/activity`);
        await page.getByRole('heading').first().waitFor();
        await expectNoSidewaysScroll('activity page');
        await page.goto(`${server.url}/`);
        await page.getByRole('link', { name: /Alder Creek/ }).first().waitFor();
        await expectNoSidewaysScroll('workspaces page');
      } finally {
        await page.setViewportSize({ width: 1280, height: 860 });
      }
    }));

  it('a reviewer on a phone reads the model with its region, the results and the comments', () =>
    withShot('phone-reviewer', async () => {
      const c = server.client();
      const person = await signUp(c, { name: 'Pia Phone' });
      await server.db.db.insert(memberships).values({ workspaceId, userId: person.id, role: 'reviewer', createdAt: server.clock.now() });
      await signInAs(person.email, TEST_PASSWORD);
      await page.setViewportSize({ width: 390, height: 844 });
      try {
        await page.goto(notebookUrl);
        const model = page.locator('section[data-kind="model"]').first();
        const panel = model.getByTestId('model-side-panel');
        await panel.getByTestId('region-status').filter({ hasText: 'interior found' }).waitFor();
        expect(await panel.innerText()).toContain('share');
        const fit = page.locator('section[data-kind="fit"]').first();
        await fit.getByTestId('quantity-row').first().waitFor();
        await scrollUntilVisible(fit, fit.getByTestId('triangle-figure'));
        await model.getByRole('button', { name: /^Comments on this model cell/ }).click();
        await page.getByTestId('comment-thread').filter({ hasText: 'same lab' }).waitFor();
        await expectNoSidewaysScroll('notebook with the comments open, as a reviewer');
        // The side panel, the results and the comment box are on screen horizontally.
        for (const el of [panel, fit.getByTestId('quantity-row').first(), page.getByLabel('Comment on this cell…')]) {
          const box = await el.boundingBox();
          expect(box).not.toBeNull();
          expect(box!.x).toBeGreaterThanOrEqual(0);
          expect(box!.x + box!.width).toBeLessThanOrEqual(390);
        }
        await page.screenshot({ path: await screenshotPath('phone-reviewer-comments.png') });

        // A share-link visitor on the same phone: the read-only side panel and the results, nothing sideways.
        const owner = new TestClient(server.url);
        await signIn(owner, DEMO_USER.email, DEMO_USER.password);
        const link = await owner.post(`/api/workspaces/${workspaceId}/notebooks/${notebookId}/share-links`, {});
        expect(link.status).toBe(201);
        await page.context().clearCookies();
        await page.goto(`${server.url}${link.body.path}`);
        const sharedPanel = page.locator('section[data-kind="model"]').first().getByTestId('model-side-panel');
        await sharedPanel.getByTestId('region-status').filter({ hasText: 'interior found' }).waitFor();
        await page.locator('section[data-kind="fit"]').first().getByTestId('quantity-row').first().waitFor();
        await expectNoSidewaysScroll('shared notebook');
        await page.locator('section[data-kind="fit"]').first().screenshot({ path: await screenshotPath('phone-shared-fit.png') });
      } finally {
        await page.setViewportSize({ width: 1280, height: 860 });
      }
    }));
});

describe('the results in our own figures (desktop)', () => {
  it('rows with inline intervals, the triangle, the chain agreement and the ladder; screenshots', () =>
    withShot('results', async () => {
      await signInAs(DEMO_USER.email, DEMO_USER.password);
      await page.goto(notebookUrl);
      const mix = page.locator('section[data-kind="fit"]').first();
      await mix.getByTestId('quantity-row').first().waitFor();
      // Three shares summing to one open in their triangle, with every draw inside the tinted region.
      await scrollUntilVisible(mix, mix.getByTestId('triangle-figure'));
      await mix.screenshot({ path: await screenshotPath('desktop-mixing-fit.png') });
      await mix.getByRole('tab', { name: 'Chain agreement' }).click();
      await mix.getByTestId('mixing-view').waitFor();
      await mix.screenshot({ path: await screenshotPath('desktop-chain-agreement.png') });
      const dose = page.locator('section[data-kind="fit"]').nth(1);
      await scrollUntilVisible(dose, dose.getByRole('tab', { name: 'Order' }));
      await dose.getByRole('tab', { name: 'Order' }).click();
      await dose.getByTestId('ladder-view').waitFor();
      expect(await dose.getByTestId('ladder-rung').count()).toBeGreaterThanOrEqual(3);
      await dose.screenshot({ path: await screenshotPath('desktop-ladder.png') });
      await dose.getByRole('tab', { name: 'Feasible region' }).click();
      await dose.getByTestId('region-figure').waitFor();
      await dose.screenshot({ path: await screenshotPath('desktop-region.png') });
      await page.screenshot({ path: await screenshotPath('desktop-notebook.png'), fullPage: true });
      expect(pageErrors).toEqual([]);
    }));
});

/**
 * Read-only share links in a real browser: an editor creates a link for a notebook, an anonymous
 * visitor reads the notebook through it (with the read-only banner and nothing to edit), and after
 * the link is revoked it opens nothing. Also checks the 404 page and that signed-out visitors of a
 * workspace page are sent to sign in.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { startTestServer, type TestServer } from '../helpers/server';
import { launchBrowser, openWatchedPage, screenshotPath, type Browser } from './browser';
import { confirmSignUpInPage } from './sign-up';

let server: TestServer;
let browser: Browser;
let page: Page;
let pageErrors: string[] = [];

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  await browser.context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: server.url });
  ({ page, errors: pageErrors } = await openWatchedPage(browser));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe('share links', () => {
  it('an anonymous holder reads the notebook read-only until the link is revoked', async () => {
    await page.goto(`${server.url}/sign-up`);
    await page.getByLabel('Your name').fill('Rui Tanaka');
    await page.getByLabel('E-mail').fill('rui@roastery.test');
    await page.getByLabel('Password').fill('arabica robusta liberica');
    await page.getByRole('button', { name: 'Create account' }).click();
    await confirmSignUpInPage(page, server, 'rui@roastery.test');
    await page.getByLabel('New workspace name').fill('Coffee blend study');
    await page.getByRole('button', { name: 'Create workspace' }).click();
    await page.getByRole('heading', { name: 'Coffee blend study' }).waitFor();
    const workspacePath = new URL(page.url()).pathname;

    // field error from the shared schema: an empty title
    await page.getByRole('button', { name: 'Create notebook' }).click();
    await page.getByText('Required', { exact: true }).waitFor();
    await page.getByLabel('New notebook title').fill('Blend shares on the simplex');
    await page.getByRole('button', { name: 'Create notebook' }).click();
    // creating a notebook opens it
    await page.getByRole('heading', { name: 'Blend shares on the simplex' }).waitFor();
    await page.getByText('This notebook has no cells yet').waitFor();
    expect(await page.getByText('0 cells').count()).toBe(1);
    const notebookPath = new URL(page.url()).pathname;
    expect(notebookPath).toMatch(new RegExp(`^${workspacePath}/n/[a-z0-9]+$`));

    await page.getByRole('button', { name: 'Share links' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByText('No links yet').waitFor();
    await dialog.getByLabel('Lifetime').selectOption('30d');
    await dialog.getByRole('button', { name: 'Create link' }).click();
    const linkField = dialog.getByLabel('Read-only link');
    await linkField.waitFor();
    const shareUrl = await linkField.inputValue();
    expect(shareUrl.startsWith(`${server.url}/s/`)).toBe(true);
    await dialog.getByRole('button', { name: 'Copy link' }).click();
    await dialog.getByText('The link is on your clipboard.').waitFor();
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(shareUrl);
    await dialog.getByText('Active', { exact: true }).waitFor();
    await page.screenshot({ path: await screenshotPath('share-links.png') });
    await dialog.getByRole('button', { name: 'Done' }).click();

    // the owner sees every link of the workspace, with notebook and creator, on the Members page
    await page.goto(`${server.url}${workspacePath}/members`);
    const table = page.getByRole('table', { name: 'Share links of this workspace' });
    await table.waitFor();
    const row = table.getByRole('row').filter({ hasText: 'Blend shares on the simplex' });
    expect(await row.textContent()).toContain('Rui Tanaka');
    expect(await row.getByText('Active', { exact: true }).count()).toBe(1);
    await page.screenshot({ path: await screenshotPath('workspace-share-links.png') });

    // ---- an anonymous visitor ----
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(/\/sign-in$/);
    await page.goto(shareUrl);
    await page.getByRole('heading', { name: 'Blend shares on the simplex' }).waitFor();
    const banner = page.getByRole('status').filter({ hasText: 'Read-only view' });
    expect(await banner.textContent()).toContain('Coffee blend study');
    expect(await page.getByRole('button').count()).toBe(0); // nothing to press, nothing to change
    await page.screenshot({ path: await screenshotPath('shared-reader.png') });

    // the link opens that notebook and nothing else: the workspace itself asks for sign-in
    await page.goto(`${server.url}${workspacePath}`);
    await page.waitForURL(/\/sign-in\?next=/);

    // ---- the editor revokes the link ----
    await page.getByLabel('E-mail').fill('rui@roastery.test');
    await page.getByLabel('Password').fill('arabica robusta liberica');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(`**${workspacePath}`);
    await page.goto(`${server.url}${notebookPath}`);
    await page.getByRole('button', { name: 'Share links' }).click();
    await page.getByRole('dialog').getByRole('button', { name: 'Revoke' }).click();
    await page.getByRole('dialog').getByText('Revoked', { exact: true }).waitFor();

    await page.goto(shareUrl);
    await page.getByRole('heading', { name: 'This link does not open anything' }).waitFor();

    await page.goto(`${server.url}/no/such/page`);
    await page.getByRole('heading', { name: 'Nothing at this address' }).waitFor();
    await page.screenshot({ path: await screenshotPath('not-found.png') });
    expect(pageErrors).toEqual([]);
  });
});

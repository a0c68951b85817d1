/**
 * Starting notebooks from the notebook list in a real browser: creating one opens it; "Import a
 * notebook file" sits on the list (not inside a notebook), creates a new notebook from the file and
 * opens it; a malformed file is refused with its reason and nothing is created.
 */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { startTestServer, type TestServer } from '../helpers/server';
import { launchBrowser, openWatchedPage, screenshotPath, type Browser } from './browser';
import { confirmSignUpInPage } from './sign-up';

let server: TestServer;
let browser: Browser;
let page: Page;
let pageErrors: string[] = [];
let dir = '';

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  ({ page, errors: pageErrors } = await openWatchedPage(browser));
  dir = await mkdtemp(path.join(os.tmpdir(), 'slackline-import-'));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (dir) await rm(dir, { recursive: true, force: true });
});

const NOTEBOOK_PATH = /^\/w\/([a-z0-9]+)\/n\/([a-z0-9]+)$/;

describe('creating and importing notebooks from the list', () => {
  it('create opens the new notebook; import on the list creates a notebook from the file and opens it', async () => {
    try {
      await flow();
    } catch (e) {
      await page.screenshot({ path: await screenshotPath('create-import-failure.png'), fullPage: true });
      throw e;
    }
  });
});

async function flow() {
  await page.goto(`${server.url}/sign-up`);
  await page.getByLabel('Your name').fill('Ines Varga');
  await page.getByLabel('E-mail').fill('ines@hedgerow.test');
  await page.getByLabel('Password').fill('hawthorn berries in october');
  await page.getByRole('button', { name: 'Create account' }).click();
  await confirmSignUpInPage(page, server, 'ines@hedgerow.test');
  await page.getByLabel('New workspace name').fill('Hedgerow survey');
  await page.getByRole('button', { name: 'Create workspace' }).click();
  await page.getByRole('heading', { name: 'Hedgerow survey' }).waitFor();
  const workspacePath = new URL(page.url()).pathname;

  // ---- create: the new notebook opens ----
  await page.getByLabel('New notebook title').fill('Berry counts by verge width');
  await page.getByRole('button', { name: 'Create notebook' }).click();
  await page.waitForURL((u) => NOTEBOOK_PATH.test(u.pathname));
  await page.getByRole('heading', { name: 'Berry counts by verge width' }).first().waitFor();
  const [, workspaceId, firstId] = new URL(page.url()).pathname.match(NOTEBOOK_PATH)!;
  // import lives on the list now, not inside a notebook; export stays here
  await page.getByRole('link', { name: 'Export notebook file' }).waitFor();
  expect(await page.getByRole('button', { name: 'Import a notebook file' }).count()).toBe(0);

  // the file to import: this notebook's own export (the import makes a new notebook of it)
  const client = server.client();
  const signIn = await client.post('/api/auth/sign-in', { email: 'ines@hedgerow.test', password: 'hawthorn berries in october' });
  expect(signIn.status).toBe(200);
  const exported = await client.get(`/api/workspaces/${workspaceId}/notebooks/${firstId}/export`);
  expect(exported.status).toBe(200);
  const file = path.join(dir, 'berries.slackline.json');
  await writeFile(file, exported.text);
  const bad = path.join(dir, 'broken.json');
  await writeFile(bad, '{"slackline_notebook": 2, "title": "x"}');

  // ---- back on the list: import ----
  await page.getByRole('link', { name: /notebooks/ }).first().click();
  await page.waitForURL(`**${workspacePath}`);
  const importButton = page.getByRole('button', { name: 'Import a notebook file' });
  await importButton.waitFor();
  await page.screenshot({ path: await screenshotPath('notebook-list-import.png'), fullPage: true });

  // a malformed file: a reason, and no new notebook
  await page.getByLabel('Notebook file to import').setInputFiles(bad);
  await page.getByText(/Not a valid Slackline notebook file/).waitFor();
  expect(new URL(page.url()).pathname).toBe(workspacePath);
  const listed = await client.get(`/api/workspaces/${workspaceId}/notebooks`);
  expect(listed.body.notebooks).toHaveLength(1);

  await page.getByLabel('Notebook file to import').setInputFiles(file);
  await page.waitForURL((u) => NOTEBOOK_PATH.test(u.pathname) && !u.pathname.endsWith(`/n/${firstId}`));
  await page.getByRole('heading', { name: 'Berry counts by verge width' }).first().waitFor();
  const importedId = new URL(page.url()).pathname.match(NOTEBOOK_PATH)![2];
  expect(importedId).not.toBe(firstId);
  const after = await client.get(`/api/workspaces/${workspaceId}/notebooks`);
  expect(after.body.notebooks.map((n: { id: string }) => n.id).sort()).toEqual([firstId, importedId].sort());
  await page.screenshot({ path: await screenshotPath('notebook-imported.png'), fullPage: true });
  expect(pageErrors).toEqual([]);
}

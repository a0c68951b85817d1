/**
 * The main collaboration flow in a real browser: an owner signs up, creates a workspace and
 * invites a colleague by e-mail; the colleague signs up from the link in the captured mail
 * (confirming the address from a second mail, which brings them back to the invitation), accepts, and sees the workspace with the role the owner chose.
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
  ({ page, errors: pageErrors } = await openWatchedPage(browser));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

async function signUp(name: string, email: string, password: string) {
  await page.getByLabel('Your name').fill(name);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Create account' }).click();
  // the account exists once the address is confirmed from the mailed link
  await confirmSignUpInPage(page, server, email);
}

describe('invitation flow', () => {
  it('owner invites by e-mail; the member accepts from the mail and sees the workspace with the right role', async () => {
    // ---- the owner ----
    await page.goto(`${server.url}/`);
    // not signed in: sent to sign in, and from there to sign up
    await page.waitForURL(/\/sign-in\?next=%2F$/);
    await page.screenshot({ path: await screenshotPath('sign-in.png') });
    await page.getByRole('link', { name: 'Create an account' }).click();
    await page.waitForURL(/\/sign-up/);

    // a bad address is refused with a field message before anything is sent
    await page.getByLabel('E-mail').fill('ana-at-orchard');
    await page.getByRole('button', { name: 'Create account' }).click();
    await expect(page.getByText('Not a valid e-mail address').isVisible()).resolves.toBe(true);

    await signUp('Ana Okafor', 'ana@orchard.test', 'drip lines every third row');
    await page.getByRole('heading', { name: 'Good to see you, Ana' }).waitFor();
    await page.getByText('No workspaces yet').waitFor();

    await page.getByLabel('New workspace name').fill('Orchard irrigation trial');
    await page.getByRole('button', { name: 'Create workspace' }).click();
    await page.getByRole('heading', { name: 'Orchard irrigation trial' }).waitFor();
    const workspacePath = new URL(page.url()).pathname;
    expect(workspacePath).toMatch(/^\/w\/[a-z0-9]+$/);

    await page.getByLabel('New notebook title').fill('Yield by drip rate, ordered');
    await page.getByRole('button', { name: 'Create notebook' }).click();
    // creating a notebook opens it; its header leads back to the workspace's list
    await page.getByRole('heading', { name: 'Yield by drip rate, ordered' }).first().waitFor();
    await page.getByRole('link', { name: /notebooks/ }).first().click();
    await page.waitForURL(`**${workspacePath}`);
    await page.getByRole('link', { name: 'Yield by drip rate, ordered' }).waitFor();

    await page.getByRole('link', { name: 'Members' }).click();
    await page.waitForURL(`**${workspacePath}/members`);
    await page.getByLabel('E-mail address').fill('bo@orchard.test');
    await page.getByLabel('Role', { exact: true }).selectOption('reviewer');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText('Invitation sent to').waitFor();
    const pending = page.getByRole('table', { name: 'Pending invitations' });
    await pending.getByRole('cell', { name: 'bo@orchard.test', exact: true }).waitFor();
    expect(await pending.getByText('Reviewer').count()).toBe(1);
    await page.screenshot({ path: await screenshotPath('members-owner.png'), fullPage: true });

    // the owner is the only owner: the page says so instead of offering a demotion
    await page.getByText('Only owner — cannot step down').waitFor();

    // the invitation is on the workspace's activity record
    await page.getByRole('link', { name: 'Activity' }).click();
    await page.getByText('invited bo@orchard.test as Reviewer').waitFor();

    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(/\/sign-in$/);

    // ---- the invitation arrives ----
    const mail = await server.mail.waitFor('bo@orchard.test', { subject: /invited/ });
    expect(mail.text).toContain('Orchard irrigation trial');
    const link = server.mail.linkIn(mail, '/invite/');

    // the captured-mail page lists it with a clickable link
    await page.goto(`${server.url}/dev/mail?key=${server.config.devMailKey}`);
    await page.getByRole('heading', { name: 'Captured mail' }).waitFor();
    const message = page.getByRole('article').filter({ hasText: 'bo@orchard.test' }).first();
    const mailLink = message.getByRole('link', { name: link });
    await mailLink.waitFor();
    expect(await mailLink.getAttribute('href')).toBe(new URL(link).pathname);

    // ---- the member ----
    await page.goto(link);
    await page.getByRole('heading', { name: 'You are invited' }).waitFor();
    await page.getByRole('link', { name: 'Create an account' }).click();
    await page.waitForURL(/\/sign-up\?next=/);
    await signUp('Bo Lindqvist', 'bo@orchard.test', 'soil moisture at 30 cm');

    // back on the invitation, now signed in: it names the workspace and the role
    await page.waitForURL((u) => u.pathname.startsWith('/invite/'));
    await page.getByText('Orchard irrigation trial').first().waitFor();
    await page.getByText('Reviewer', { exact: true }).waitFor();
    await page.getByText('Ana Okafor').waitFor();
    await page.screenshot({ path: await screenshotPath('invitation-accept.png') });
    await page.getByRole('button', { name: 'Join Orchard irrigation trial' }).click();

    await page.waitForURL(`**${workspacePath}`);
    await page.getByRole('heading', { name: 'Orchard irrigation trial' }).waitFor();
    const header = page.locator('main, body').first();
    expect(await header.getByText('Your role').count()).toBe(1);
    // the role badge beside "Your role"
    const roleLine = page.getByText('Your role').locator('..');
    expect((await roleLine.textContent())?.includes('Reviewer')).toBe(true);
    // a reviewer reads notebooks but cannot create, rename or delete them
    await page.getByRole('link', { name: 'Yield by drip rate, ordered' }).waitFor();
    expect(await page.getByLabel('New notebook title').count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Delete workspace' }).count()).toBe(0);
    await page.screenshot({ path: await screenshotPath('workspace-member.png'), fullPage: true });

    // the workspace list agrees, and so does the members page (no role pickers for a reviewer)
    await page.getByRole('link', { name: 'Workspaces', exact: true }).click();
    const card = page.getByRole('link', { name: /Orchard irrigation trial/ });
    await card.waitFor();
    expect(await card.textContent()).toContain('Reviewer');
    await page.goto(`${server.url}${workspacePath}/members`);
    const boRow = page.getByTestId('member-bo@orchard.test');
    await boRow.waitFor();
    expect(await boRow.textContent()).toContain('Reviewer');
    expect(await page.getByRole('combobox').count()).toBe(0);
    const anaRow = page.getByTestId('member-ana@orchard.test');
    expect(await anaRow.textContent()).toContain('Owner');
    expect(pageErrors).toEqual([]);
  });
});

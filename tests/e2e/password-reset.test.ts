/**
 * Forgotten password in a real browser: request a link, read it from the captured mail, set a new
 * password, sign in with it; the used link then refuses a second use and the old password fails.
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

async function signIn(email: string, password: string) {
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

describe('password reset', () => {
  it('sets a new password from the mailed link, once', async () => {
    await page.goto(`${server.url}/sign-up`);
    await page.getByLabel('Your name').fill('Mina Sato');
    await page.getByLabel('E-mail').fill('mina@sediment.test');
    await page.getByLabel('Password').fill('silt and clay fractions');
    await page.getByRole('button', { name: 'Create account' }).click();
    await confirmSignUpInPage(page, server, 'mina@sediment.test');
    await page.getByRole('heading', { name: 'Good to see you, Mina' }).waitFor();
    await page.screenshot({ path: await screenshotPath('workspaces-empty.png') });
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(/\/sign-in$/);

    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    // the sign-in form has an E-mail field too: fill only once the new page is there
    await page.getByRole('heading', { name: 'Forgot your password?' }).waitFor();
    await page.getByLabel('E-mail').fill('mina@sediment.test');
    await page.getByRole('button', { name: 'Send reset link' }).click();
    await page.getByText('Check your inbox').waitFor();

    const mail = await server.mail.waitFor('mina@sediment.test', { subject: /reset/i });
    const link = server.mail.linkIn(mail, '/reset-password');

    // Signed out and without this start's key the captured mail (and its reset link) stays closed.
    await page.goto(`${server.url}/dev/mail`);
    await page.getByText('This page needs the key of this start').waitFor();
    expect(await page.getByRole('article').count()).toBe(0);
    await page.goto(`${server.url}/dev/mail?key=${server.config.devMailKey}`);
    await page.waitForURL(`${server.url}/dev/mail`); // the key leaves the address bar
    await page.getByRole('article').first().waitFor();
    await page.screenshot({ path: await screenshotPath('dev-mail.png') });

    await page.goto(link);
    await page.getByRole('heading', { name: 'Set a new password' }).waitFor();
    await page.getByLabel('New password', { exact: true }).fill('short');
    await page.getByLabel('Repeat new password').fill('short');
    await page.getByRole('button', { name: 'Set new password' }).click();
    await page.getByText('At least 10 characters').last().waitFor();
    await page.getByLabel('New password', { exact: true }).fill('bedload under high flow');
    await page.getByLabel('Repeat new password').fill('bedload under high flow');
    await page.getByRole('button', { name: 'Set new password' }).click();
    await page.getByText('Password changed').waitFor();

    // the same link a second time is refused
    await page.goto(link);
    await page.getByLabel('New password', { exact: true }).fill('another long password');
    await page.getByLabel('Repeat new password').fill('another long password');
    await page.getByRole('button', { name: 'Set new password' }).click();
    await page.getByText('This reset link no longer works').waitFor();

    await page.goto(`${server.url}/sign-in`);
    await signIn('mina@sediment.test', 'silt and clay fractions');
    await page.getByRole('alert').waitFor();
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    await signIn('mina@sediment.test', 'bedload under high flow');
    await page.getByRole('heading', { name: 'Good to see you, Mina' }).waitFor();
    expect(pageErrors).toEqual([]);
  });
});

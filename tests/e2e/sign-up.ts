/**
 * Finishing a sign-up in the browser: after "Create account" the page says to check the mail;
 * the confirmation link from the captured mail opens the confirm page, whose button creates the
 * account, signs in and goes on to where the sign-up was heading.
 */
import type { Page } from 'playwright-core';
import type { TestServer } from '../helpers/server';
import { CONFIRM_SUBJECT } from '../helpers/http';

export async function confirmSignUpInPage(page: Page, server: TestServer, email: string): Promise<void> {
  await page.getByText('Check your mail').waitFor();
  const mail = await server.mail.waitFor(email, { subject: CONFIRM_SUBJECT });
  await page.goto(server.mail.linkIn(mail, '/confirm-sign-up'));
  await page.getByRole('heading', { name: 'Confirm your address' }).waitFor();
  await page.getByRole('button', { name: 'Create my account' }).click();
  await page.waitForURL((u) => u.pathname !== '/confirm-sign-up');
}

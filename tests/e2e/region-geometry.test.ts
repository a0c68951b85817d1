/**
 * The feasible-region view in a real browser: for a simplex, an ordered model and a random polytope,
 * every draw the figure shows lies inside the region outline it draws, for every pair of unknowns
 * (and, for shares summing to one, in the triangle of their own coordinates). The check is pure
 * geometry on the drawn SVG: a point is inside a convex polygon when it is on the inner side of
 * every edge (common-practice fact: the sign of the 2-D cross product of edge and point vectors).
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { runs } from '../../server/db/schema';
import { DEMO_USER, seedDemo } from '../../server/seed/demo';
import { notebookWriter } from '../../server/seed/notebook';
import { runFit } from '../../server/engine/fit';
import { finishRun } from '../../server/runs/queue';
import { newId } from '../../server/lib/ids';
import type { FitSettings } from '../../shared/fit';
import { startTestServer, type TestServer } from '../helpers/server';
import { launchBrowser, openWatchedPage, screenshotPath, scrollUntilVisible, type Browser } from './browser';

let server: TestServer;
let browser: Browser;
let page: Page;
let pageErrors: string[] = [];
let notebookUrl = '';

const SETTINGS: FitSettings = { chains: 2, warmup: 300, draws: 400, seed: 7301, sampler: 'hitrun' };

/** Shares on the simplex: three non-negative shares summing to one. */
const SIMPLEX_MODEL = `# Three shares
unknown w[3]
term ld_normal(w[1], 0.5, 0.3) + ld_normal(w[2], 0.3, 0.3)
constrain w >= 0
constrain sum(w) == 1
`;

/** Four ordered means between 0 and 10. */
const ORDERED_MODEL = `# Ordered means
unknown m[4]
term ld_normal(m, 5, 4)
constrain 0 <= m[1] <= m[2] <= m[3] <= m[4] <= 10
`;

/**
 * A random polytope in three unknowns: eight half-spaces a·x ≤ b with random directions and
 * offsets b in [0.6, 1.6] (so the origin is inside), within the box −2 ≤ x ≤ 2. Fixed seed.
 */
function randomPolytopeModel(seed: number): string {
  let s = seed;
  const rand = () => ((s = (s * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
  const lines = ['# A random polytope', 'unknown x[3]', 'term ld_normal(x, 0, 1.5)', 'constrain -2 <= x <= 2'];
  for (let r = 0; r < 8; r++) {
    const a = [rand() * 2 - 1, rand() * 2 - 1, rand() * 2 - 1].map((v) => Number(v.toFixed(3)));
    const b = Number((0.6 + rand()).toFixed(3));
    const lhs = a.map((v, k) => `${v < 0 ? '- ' : k ? '+ ' : ''}${Math.abs(v)} * x[${k + 1}]`).join(' ');
    lines.push(`constrain ${lhs} <= ${b}`);
  }
  return lines.join('\n') + '\n';
}

beforeAll(async () => {
  server = await startTestServer();
  const demo = await seedDemo(server.db.db);
  const now = new Date();
  const { addCell } = notebookWriter(server.db.db, demo, 1, now);
  for (const source of [SIMPLEX_MODEL, ORDERED_MODEL, randomPolytopeModel(20261203)]) {
    const model = await addCell('model', source, null);
    const fit = await addCell('fit', '', { modelCellId: model, settings: SETTINGS });
    // A finished run computed by the real engine, stored as the worker stores it.
    const runId = newId();
    const modelHash = createHash('sha256').update(JSON.stringify({ source, tables: [] })).digest('hex');
    await server.db.db.insert(runs).values({
      id: runId, workspaceId: demo.workspaceId, notebookId: demo.notebookId, cellId: fit, status: 'running', settings: SETTINGS, seed: SETTINGS.seed,
      modelHash, spec: { source, tables: {} }, progress: [], attempts: 1, leaseOwner: 'geometry-test', leaseExpiresAt: new Date(now.getTime() + 3_600_000),
      requestedBy: demo.userId, createdAt: now, startedAt: now,
    });
    const result = await runFit({ kind: 'program', source, tables: {} }, SETTINGS, {});
    await finishRun(server.db.db, { workspaceId: demo.workspaceId, id: runId }, 'geometry-test', result, now, { fit: 1 });
  }
  notebookUrl = `${server.url}/w/${demo.workspaceId}/n/${demo.notebookId}`;
  browser = await launchBrowser();
  ({ page, errors: pageErrors } = await openWatchedPage(browser, 20_000));
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(DEMO_USER.email);
  await page.getByLabel('Password').fill(DEMO_USER.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

interface Drawn {
  polygon: [number, number][];
  draws: [number, number][];
}

/** The outline and the draw dots of the figure shown in a fit cell, in SVG user units. */
async function drawnRegion(fit: Locator, testId: 'region-figure' | 'triangle-figure'): Promise<Drawn> {
  const svg = fit.getByTestId(testId);
  await svg.waitFor();
  return svg.evaluate((el) => {
    const d = el.querySelector('[data-testid="region-polygon"]')?.getAttribute('d') ?? '';
    const polygon = [...d.matchAll(/[ML]\s*(-?[\d.]+),(-?[\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])] as [number, number]);
    const draws = [...el.querySelectorAll('circle')].map((c) => [Number(c.getAttribute('cx')), Number(c.getAttribute('cy'))] as [number, number]);
    return { polygon, draws };
  });
}

/**
 * Draws outside the convex polygon by more than `tol` SVG units (the outline's vertices are written
 * with two decimals, so half a hundredth of a unit is rounding; 0.05 leaves room for it).
 */
function outside({ polygon, draws }: Drawn, tol = 0.05): [number, number][] {
  // Orientation of the outline (the SVG y axis points down, so compute it rather than assume it).
  let area2 = 0;
  for (let k = 0; k < polygon.length; k++) {
    const [x1, y1] = polygon[k];
    const [x2, y2] = polygon[(k + 1) % polygon.length];
    area2 += x1 * y2 - x2 * y1;
  }
  const sign = Math.sign(area2);
  return draws.filter(([px, py]) =>
    polygon.some(([x1, y1], k) => {
      const [x2, y2] = polygon[(k + 1) % polygon.length];
      const len = Math.hypot(x2 - x1, y2 - y1);
      if (len === 0) return false;
      // Signed distance of the point from the edge's line, positive on the inner side.
      const cross = ((x2 - x1) * (py - y1) - (y2 - y1) * (px - x1)) / len;
      return sign * cross < -tol;
    }),
  );
}

async function openRegionTab(fit: Locator) {
  const tab = fit.getByRole('tab', { name: 'Feasible region' });
  await scrollUntilVisible(fit, tab);
  await tab.click();
}

/** Every pair (i < j) of the first `n` unknowns through the "across"/"up" choices. */
async function checkEveryPair(fit: Locator, n: number, name: string) {
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      await fit.getByLabel('Horizontal quantity').selectOption(String(i));
      await fit.getByLabel('Vertical quantity').selectOption(String(j));
      const drawn = await drawnRegion(fit, 'region-figure');
      expect(drawn.polygon.length, `${name} (${i}, ${j}) outline`).toBeGreaterThanOrEqual(3);
      expect(drawn.draws.length, `${name} (${i}, ${j}) draws`).toBeGreaterThan(100);
      expect(outside(drawn), `${name} (${i}, ${j}) draws outside`).toEqual([]);
      // The check can fail: a point far beyond the outline is caught, the outline's centroid is not.
      const c = drawn.polygon.reduce(([sx, sy], [x, y]) => [sx + x / drawn.polygon.length, sy + y / drawn.polygon.length], [0, 0]);
      expect(outside({ polygon: drawn.polygon, draws: [[-1e4, -1e4], c as [number, number]] })).toEqual([[-1e4, -1e4]]);
    }
  }
  // The screenshot waits for the cell to hold still; on a busy machine cells above it can still be
  // growing as their plots arrive, so wait first until its box stays put for a moment.
  await expect
    .poll(async () => {
      await fit.scrollIntoViewIfNeeded();
      const a = await fit.boundingBox();
      await page.waitForTimeout(250);
      const b = await fit.boundingBox();
      return JSON.stringify(a) === JSON.stringify(b);
    }, { timeout: 30_000 })
    .toBe(true);
  await fit.screenshot({ path: await screenshotPath(`region-${name}.png`), timeout: 30_000 });
}

describe('every draw lies inside the drawn region', () => {
  it('three shares on the simplex: in their triangle and for every pair of shares', async () => {
    await page.goto(notebookUrl);
    const fit = page.locator('section[data-kind="fit"]').nth(0);
    await openRegionTab(fit);
    const tri = await drawnRegion(fit, 'triangle-figure');
    expect(tri.polygon.length).toBeGreaterThanOrEqual(3);
    expect(tri.draws.length).toBeGreaterThan(100);
    expect(outside(tri)).toEqual([]);
    await fit.getByLabel('Region view').selectOption('-1');
    await checkEveryPair(fit, 3, 'simplex');
    expect(pageErrors).toEqual([]);
  });

  it('four ordered means: every pair', async () => {
    await page.goto(notebookUrl);
    const fit = page.locator('section[data-kind="fit"]').nth(1);
    await openRegionTab(fit);
    await checkEveryPair(fit, 4, 'ordered');
    // The same means as one monotone curve: the median line and every single-draw line never fall
    // (the SVG's y axis points down, so y never grows from left to right).
    await fit.getByRole('tab', { name: 'Curve' }).click();
    const band = fit.getByTestId('band-view');
    await band.waitFor();
    const paths = await band.evaluate((el) =>
      [...el.querySelectorAll('[data-testid="band-draw"], [data-testid="band-median"]')].map((p) =>
        [...(p.getAttribute('d') ?? '').matchAll(/[ML]\s*(-?[\d.]+),(-?[\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]),
      ),
    );
    expect(paths.length).toBeGreaterThan(2);
    for (const pts of paths) {
      expect(pts).toHaveLength(4);
      for (let k = 1; k < pts.length; k++) {
        expect(pts[k][0]).toBeGreaterThan(pts[k - 1][0]);
        expect(pts[k][1]).toBeLessThanOrEqual(pts[k - 1][1] + 0.05); // coordinates are written with one decimal
      }
    }
    await fit.screenshot({ path: await screenshotPath('band-ordered.png') });
  });

  it('a random polytope in three unknowns: every pair', async () => {
    await page.goto(notebookUrl);
    const fit = page.locator('section[data-kind="fit"]').nth(2);
    await openRegionTab(fit);
    await checkEveryPair(fit, 3, 'polytope');
    expect(pageErrors).toEqual([]);
  });
});

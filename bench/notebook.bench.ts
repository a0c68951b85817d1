/**
 * The notebook page in a real browser: how long a notebook of 50 cells takes to open, and how long
 * the plots of a finished run with 4 chains × 1,000 draws × 20 quantities take to draw.
 *
 * Brings up everything itself and removes it afterwards: a throwaway MariaDB (scripts/lib/common.sh)
 * on a free port in a temporary folder, the app serving the built client (dist/client, rebuilt with
 * `vite build` when missing or older than the sources), and Debian's Chromium through
 * playwright-core. The notebook is the demo notebook (its two fits computed by the engine) grown to
 * 50 cells with notes, data, model and fit cells of an invented orchard / coffee-blend scenario, and
 * one more fit — 20 ordered sediment loads by rainfall bin, 4 chains × 1,000 draws — run by the
 * engine and stored through the run storage used by the job worker.
 *
 * Times are taken inside the page with performance.now() (0 = navigation start) on animation
 * frames, so they include the frame in which the elements first exist.
 *
 *   npx tsx bench/notebook.bench.ts          # alone
 *   npm run bench -- notebook                # recorded in bench/results/
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { appendFileSync, existsSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { and, eq, max } from 'drizzle-orm';
import type { Db } from '../server/db/client';
import { cells, runs } from '../server/db/schema';
import { DEMO_USER, seedDemo } from '../server/seed/demo';
import { notebookWriter, seedDemoNotebook } from '../server/seed/notebook';
import { closeFitWorkers, runFit } from '../server/engine/fit';
import { Rng } from '../server/engine/rng';
import { finishRun, type RunSpec } from '../server/runs/queue';
import { newId } from '../server/lib/ids';
import { runMigrations } from '../server/db/migrate';
import { parseCsv } from '../shared/data';
import type { FitSettings } from '../shared/fit';
import { startThrowawayMariaDb } from './lib/throwaway-db';

const REPO = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const CELLS = 50;
const LOADS = 7; // the first is reported apart (cold browser cache); the median is over the rest
const PLOT_ROUNDS = 5;
/** After all cell content is visible: wait this long for the first screen's remaining requests. */
const SETTLE_MS = 1_500;
const BIG_SETTINGS: FitSettings = { chains: 4, warmup: 500, draws: 1000, seed: 20261202, sampler: 'auto' };
const PLOT_TABS = ['Trace', 'Density', 'Ranks', 'Pair', 'Feasible region'] as const;

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};
const round1 = (x: number) => Math.round(x * 10) / 10;

/* ------------------------------------------------------------------------------------------ */
/* The client build                                                                            */
/* ------------------------------------------------------------------------------------------ */

function newestMtime(p: string): number {
  const st = statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let m = 0;
  for (const f of readdirSync(p)) m = Math.max(m, newestMtime(path.join(p, f)));
  return m;
}

/** Build dist/client when it is missing or older than anything it is built from. */
function ensureClientBuilt(): string {
  const index = path.join(REPO, 'dist/client/index.html');
  const sources = ['src', 'shared', 'index.html', 'vite.config.ts', 'package-lock.json'].map((p) => path.join(REPO, p)).filter(existsSync);
  const newest = Math.max(...sources.map(newestMtime));
  if (existsSync(index) && statSync(index).mtimeMs >= newest) return 'up to date';
  process.stderr.write('notebook bench: building the client (vite build) …\n');
  execFileSync('npx', ['vite', 'build', '--logLevel', 'warn'], { cwd: REPO, stdio: ['ignore', 'inherit', 'inherit'] });
  return 'rebuilt';
}

/* ------------------------------------------------------------------------------------------ */
/* Seeding: 50 cells and a 20-quantity run                                                     */
/* ------------------------------------------------------------------------------------------ */

/** Invented storms: 19 rainfall bins, five storms each; the load rises with the bin, with scatter. */
function binsCsv(): string {
  const rng = new Rng(7301);
  const lines = ['storm,bin,load_t'];
  let storm = 1;
  for (let bin = 1; bin <= 19; bin++) {
    for (let k = 0; k < 5; k++) {
      const load = 1.2 + 0.25 * bin + 0.6 * rng.normal();
      lines.push(`${storm++},${bin},${load.toFixed(2)}`);
    }
  }
  return lines.join('\n') + '\n';
}

const BIG_MODEL = `# Sediment load across nineteen rainfall bins
table bins
unknown load[19], sd
term ld_normal(load_t, load[bin], sd)
term ld_normal(load, 4, 5) + ld_halfnormal(sd, 3)
constrain ${Array.from({ length: 19 }, (_, k) => `load[${k + 1}]`).join(' <= ')}
constrain sd >= 0.01
`;

const BIG_NOTES = `## Load by rainfall bin

Ninety-five storms in nineteen bins of rainfall depth. A deeper storm never carries less sediment on
average, so the nineteen bin means are ordered. The fit below has twenty unknowns.
`;

/** Invented orchard blocks: yield (kg per tree) under four irrigation levels. */
function orchardCsv(seed: number): string {
  const rng = new Rng(seed);
  const lines = ['tree,block,yield_kg'];
  for (let t = 1; t <= 32; t++) {
    const block = ((t - 1) % 4) + 1;
    lines.push(`${t},${block},${(18 + 2.5 * block + 3 * rng.normal()).toFixed(1)}`);
  }
  return lines.join('\n') + '\n';
}

/** Invented coffee blends: two marker compounds per cup from a blend of three origins. */
function blendCsv(seed: number): string {
  const rng = new Rng(seed);
  const lines = ['cup,marker_a,marker_b'];
  for (let c = 1; c <= 16; c++) {
    lines.push(`${c},${(27 + 1.5 * rng.normal()).toFixed(2)},${(3.6 + 0.2 * rng.normal()).toFixed(2)}`);
  }
  return lines.join('\n') + '\n';
}

const orchardModel = (k: number) => `# Orchard ${k}: yield by irrigation level
table orchard${k}
unknown level[4], sd
term ld_normal(yield_kg, level[block], sd)
term ld_normal(level, 20, 10) + ld_halfnormal(sd, 5)
constrain level[1] <= level[2] <= level[3] <= level[4]
constrain sd >= 0.01
derive top_minus_bottom = level[4] - level[1]
`;

const blendModel = (k: number) => `# Blend ${k}: shares of three origins
table blend${k}
const sig_a = [35, 18, 26]
const sig_b = [2.5, 6.0, 3.0]
unknown share[3], sd_a, sd_b
term ld_normal(marker_a, dot(share, sig_a), sd_a)
term ld_normal(marker_b, dot(share, sig_b), sd_b)
term ld_halfnormal(sd_a, 5) + ld_halfnormal(sd_b, 1)
constrain share >= 0
constrain sum(share) == 1
constrain sd_a >= 0.01
constrain sd_b >= 0.01
`;

const groupNotes = (k: number, orchard: boolean) =>
  orchard
    ? `### Orchard ${k}\n\nThirty-two trees in four irrigation blocks. More water should not lower the yield, so the\nblock means are ordered. Check the verdict before reading the levels.\n`
    : `### Blend ${k}\n\nSixteen cups of the house blend, two marker compounds each. The three origin shares are\nnon-negative and sum to one.\n`;

interface Seeded {
  workspaceId: string;
  notebookId: string;
  bigFitCellId: string;
  bigRunId: string;
  doneRuns: number;
  cellCount: number;
  dataCells: number;
  modelCells: number;
  bigFitSeconds: number;
}

async function seedNotebook(db: Db): Promise<Seeded> {
  const now = new Date();
  const demo = await seedDemo(db, now);
  await seedDemoNotebook(db, demo, now); // 15 more cells, four finished fits and a comparison, computed by the engine
  const t = { userId: demo.userId, workspaceId: demo.workspaceId, notebookId: demo.notebookId };
  const where = and(eq(cells.workspaceId, t.workspaceId), eq(cells.notebookId, t.notebookId));
  const [{ last }] = await db.select({ last: max(cells.position) }).from(cells).where(where);
  const writer = notebookWriter(db, t, (last ?? -1) + 1, now);
  const { addDataset, addCell } = writer;

  // The 20-quantity fit, stored as the job worker stores one: a claimed run row, the engine's
  // result, then finishRun (chains, summary, status) in one transaction.
  await addCell('notes', BIG_NOTES, null);
  const csv = binsCsv();
  const binsId = await addDataset('bins', csv);
  await addCell('data', '', { datasetId: binsId });
  const bigModel = await addCell('model', BIG_MODEL, null);
  const bigFitCellId = await addCell('fit', '', { modelCellId: bigModel, settings: BIG_SETTINGS });
  const spec: RunSpec = { source: BIG_MODEL, tables: { bins: binsId } };
  const bigRunId = newId();
  const modelHash = createHash('sha256').update(JSON.stringify({ source: BIG_MODEL, tables: Object.entries(spec.tables).sort() })).digest('hex');
  await db.insert(runs).values({
    id: bigRunId, workspaceId: t.workspaceId, notebookId: t.notebookId, cellId: bigFitCellId, status: 'running', settings: BIG_SETTINGS, seed: BIG_SETTINGS.seed,
    modelHash, spec, progress: [], attempts: 1, leaseOwner: 'bench-seed', leaseExpiresAt: new Date(now.getTime() + 3_600_000), requestedBy: t.userId, createdAt: now, startedAt: now,
  });
  process.stderr.write('notebook bench: fitting the 20-quantity model (4 chains × 1,000 draws) …\n');
  const t0 = performance.now();
  const result = await runFit({ kind: 'program', source: BIG_MODEL, tables: { bins: parseCsv(csv).table! } }, BIG_SETTINGS, {});
  const bigFitSeconds = (performance.now() - t0) / 1000;
  const quantities = result.unknownNames.length + result.derivedNames.length;
  if (quantities !== 20) throw new Error(`the big fit has ${quantities} quantities, not 20`);
  if (!(await finishRun(db, { workspaceId: t.workspaceId, id: bigRunId }, 'bench-seed', result, now, { fit: Math.round(bigFitSeconds * 1000) }))) {
    throw new Error('could not store the 20-quantity run');
  }

  // Groups of notes, data, model and a fit cell (settings only, not yet run) up to 49 cells,
  // then closing notes.
  for (let k = 1; writer.position < CELLS - 1; k++) {
    const orchard = k % 2 === 1;
    await addCell('notes', groupNotes(k, orchard), null);
    if (writer.position >= CELLS - 1) break;
    const ds = await addDataset(orchard ? `orchard${k}` : `blend${k}`, orchard ? orchardCsv(100 + k) : blendCsv(200 + k));
    await addCell('data', '', { datasetId: ds });
    if (writer.position >= CELLS - 1) break;
    const model = await addCell('model', orchard ? orchardModel(k) : blendModel(k), null);
    if (writer.position >= CELLS - 1) break;
    await addCell('fit', '', { modelCellId: model, settings: { chains: 4, warmup: 1000, draws: 1000, seed: 1000 + k, sampler: 'auto' } });
  }
  await addCell('notes', '## Next\n\nCompare the orchard models once their fits have run, and write up the blend shares.\n', null);

  const all = await db.select({ kind: cells.kind }).from(cells).where(where);
  // Fit cells with a finished run (each shows one summary table and one plot panel); a finished
  // comparison is a run too, of a compare cell, which has neither.
  const done = await db
    .selectDistinct({ cellId: runs.cellId })
    .from(runs)
    .innerJoin(cells, eq(cells.id, runs.cellId))
    .where(and(eq(runs.notebookId, t.notebookId), eq(runs.status, 'done'), eq(cells.kind, 'fit')));
  if (all.length !== CELLS) throw new Error(`seeded ${all.length} cells, not ${CELLS}`);
  return {
    ...t,
    bigFitCellId,
    bigRunId,
    doneRuns: done.length,
    cellCount: all.length,
    dataCells: all.filter((c) => c.kind === 'data').length,
    modelCells: all.filter((c) => c.kind === 'model').length,
    bigFitSeconds,
  };
}

/* ------------------------------------------------------------------------------------------ */
/* In the page                                                                                 */
/* ------------------------------------------------------------------------------------------ */

interface Marks {
  cells?: number;
  content?: number;
  bigPlot?: number;
  plots?: number;
}

/**
 * Installed before any page script: on every animation frame, note the first time (ms since
 * navigation start) at which all cells exist, their content is in (tables, editors, summaries),
 * the 20-quantity run's plot exists, and every finished run's plot exists.
 */
function installMarks(arg: { cells: number; dataCells: number; modelCells: number; doneRuns: number; bigCell: string }) {
  if (!/\/n\/[^/]+$/.test(location.pathname)) return;
  const marks: Record<string, number> = {};
  (window as unknown as { __benchMarks: Record<string, number> }).__benchMarks = marks;
  const set = (k: string, t: number) => {
    marks[k] = t;
    performance.mark(`bench:${k}`);
  };
  const check = () => {
    const t = performance.now();
    const q = (s: string) => document.querySelectorAll(s).length;
    if (marks.cells === undefined && q('section[data-cell-id]') >= arg.cells) set('cells', t);
    if (
      marks.cells !== undefined &&
      marks.content === undefined &&
      q('section[data-kind="data"] [data-testid="row-count"]') >= arg.dataCells &&
      q('section[data-kind="model"] .cm-content') >= arg.modelCells &&
      q('section[data-kind="fit"] [data-testid="summary-table"]') >= arg.doneRuns
    ) {
      set('content', t);
    }
    if (marks.bigPlot === undefined && document.querySelector(`section[data-cell-id="${arg.bigCell}"] [data-testid="plot"] svg .role-mark`)) set('bigPlot', t);
    if (marks.plots === undefined && q('[data-testid="plot"] svg .role-mark') >= arg.doneRuns) set('plots', t);
    if (marks.content === undefined || marks.plots === undefined || marks.bigPlot === undefined) requestAnimationFrame(check);
  };
  requestAnimationFrame(check);
}

/** Click a plot tab of the big fit cell (or choose a quantity) and time until the new chart is drawn. */
async function timeSwitch(arg: { bigCell: string; tab?: string; quantity?: number }): Promise<number> {
  const sec = document.querySelector(`section[data-cell-id="${arg.bigCell}"]`)!;
  const fig = () => sec.querySelector('[data-testid="plot"]');
  const old = fig()?.querySelector('svg');
  if (old) old.setAttribute('data-bench-old', '1');
  const t0 = performance.now();
  if (arg.tab !== undefined) {
    const tab = [...sec.querySelectorAll<HTMLButtonElement>('[role="tab"]')].find((b) => b.textContent?.trim() === arg.tab);
    if (!tab) throw new Error(`no tab ${arg.tab}`);
    tab.click();
  } else {
    const select = sec.querySelector<HTMLSelectElement>('select[aria-label="Quantity"]')!;
    select.value = String(arg.quantity);
    select.dispatchEvent(new Event('change', { bubbles: true }));
  }
  await new Promise<void>((resolve, reject) => {
    const tick = () => {
      const svg = fig()?.querySelector('svg');
      // A new chart: a fresh SVG in the figure (Vega views draw .role-mark elements; the ladder and
      // chain-agreement views are SVG of their own).
      if (svg && !svg.hasAttribute('data-bench-old') && svg.querySelector('.role-mark, path, rect, circle, line')) return resolve();
      if (performance.now() - t0 > 30_000) return reject(new Error('the chart did not appear within 30 s'));
      requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
  });
  // One more frame: the chart has been painted once.
  await new Promise((r) => requestAnimationFrame(r));
  return performance.now() - t0;
}

/* ------------------------------------------------------------------------------------------ */

export async function run(): Promise<Record<string, number | string>> {
  const build = ensureClientBuilt();
  const mariadb = await startThrowawayMariaDb();
  const cleanups: (() => Promise<void> | void)[] = [() => mariadb.stop()];
  try {
    process.env.DATABASE_URL = mariadb.url;
    await runMigrations(mariadb.url);
    // Imported after DATABASE_URL is set (the helpers read it when called, but keep it obvious).
    const { startTestServer } = await import('../tests/helpers/server');
    const { launchBrowser } = await import('../tests/e2e/browser');
    // Production-like: no response checking against the schemas (a test-only cost).
    const server = await startTestServer({ config: { checkResponses: false, logErrors: true } });
    cleanups.unshift(() => server.close());
    const seeded = await seedNotebook(server.db.db);
    await closeFitWorkers();

    const browser = await launchBrowser();
    cleanups.unshift(() => browser.close());
    const page = await browser.context.newPage();
    page.setDefaultTimeout(60_000);
    const pageErrors: string[] = [];
    page.on('pageerror', (e) => pageErrors.push(e.message));
    // tsx keeps function names with a __name() helper that functions sent to the page refer to.
    await page.addInitScript({ content: 'window.__name = (f) => f;' });
    await page.addInitScript(installMarks, {
      cells: CELLS,
      dataCells: seeded.dataCells,
      modelCells: seeded.modelCells,
      doneRuns: seeded.doneRuns,
      bigCell: seeded.bigFitCellId,
    });

    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill(DEMO_USER.email);
    await page.getByLabel('Password').fill(DEMO_USER.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
    const nbUrl = `${server.url}/w/${seeded.workspaceId}/n/${seeded.notebookId}`;

    // ---- opening the notebook ----
    const loads: Required<Marks>[] = [];
    const apiLoads: { count: number; beforeContent: number; firstStart: number; lastEnd: number; byKind: [string, number][] }[] = [];
    let drawsMs = NaN;
    let drawsKiB = NaN;
    let bigPlotAfterDrawsMs: number[] = [];
    for (let i = 0; i < LOADS; i++) {
      await page.goto(nbUrl, { waitUntil: 'commit' });
      await page.waitForFunction(() => {
        const m = (window as unknown as { __benchMarks?: Marks }).__benchMarks;
        return !!m && m.content !== undefined;
      }, null, { polling: 100 });
      // Let what the first screen asks for after its content (plots of fit cells in view) arrive,
      // without scrolling: the requests counted are those of opening the notebook.
      await page.waitForTimeout(SETTLE_MS);
      const { marks, draws, api } = await page.evaluate((runId) => {
        const e = performance.getEntriesByType('resource').find((r) => r.name.includes(`/runs/${runId}/draws`)) as PerformanceResourceTiming | undefined;
        const api = performance.getEntriesByType('resource').filter((r) => r.name.includes('/api/')) as PerformanceResourceTiming[];
        return {
          marks: (window as unknown as { __benchMarks: Required<Marks> }).__benchMarks,
          draws: e ? { start: e.startTime, end: e.responseEnd, bytes: e.encodedBodySize } : null,
          api: {
            count: api.length,
            beforeContent: api.filter((r) => r.startTime <= (window as unknown as { __benchMarks: Required<Marks> }).__benchMarks.content).length,
            firstStart: Math.min(...api.map((r) => r.startTime)),
            lastEnd: Math.max(...api.map((r) => r.responseEnd)),
            // Per kind of request: the time from request start to the end of the answer.
            byKind: api.map((r) => {
              const u = new URL(r.name).pathname;
              const kind = u.endsWith('/page') ? 'page' : u.endsWith('/events') ? 'events' : u.endsWith('/compile') ? 'compile' : u.includes('/datasets/') ? 'dataset' : u.endsWith('/draws') ? 'draws' : u.endsWith('/runs') ? 'cell_runs' : u.endsWith('/comments') ? 'comments' : /\/notebooks\/[^/]+$/.test(u) ? 'notebook' : u.endsWith('/auth/me') ? 'me' : 'other';
              return [kind, r.responseEnd - r.startTime] as [string, number];
            }),
          },
        };
      }, seeded.bigRunId);
      loads.push(marks);
      apiLoads.push(api);
      if (draws && marks.bigPlot !== undefined) {
        bigPlotAfterDrawsMs.push(marks.bigPlot - draws.end);
        drawsMs = draws.end - draws.start;
        drawsKiB = draws.bytes / 1024;
      }
    }
    const warm = loads.slice(1);
    bigPlotAfterDrawsMs = bigPlotAfterDrawsMs.slice(1);

    // ---- the plot panel of the 20-quantity run: its draws load when the cell comes into view ----
    const bigSection = page.locator(`section[data-cell-id="${seeded.bigFitCellId}"]`);
    const scrollStart = Date.now();
    await bigSection.scrollIntoViewIfNeeded();
    await bigSection.getByTestId('plot').locator('svg').first().waitFor({ timeout: 60_000 });
    const scrolledPlotMs = Date.now() - scrollStart;
    await page.locator(`section[data-cell-id="${seeded.bigFitCellId}"]`).scrollIntoViewIfNeeded();
    // The plot views the fit cell offers now (the tabs it shows; the list above names the usual ones).
    const offered = await page.evaluate(
      (bigCell) => [...document.querySelectorAll(`section[data-cell-id="${bigCell}"] [role="tab"]`)].map((b) => b.textContent?.trim() ?? '').filter(Boolean),
      seeded.bigFitCellId,
    );
    const tabs = offered.length ? offered : [...PLOT_TABS];
    const perTab: Record<string, number[]> = Object.fromEntries(tabs.map((k) => [k, []]));
    if (offered.length) {
      for (let r = 0; r < PLOT_ROUNDS; r++) {
        for (const tab of tabs) {
          // A view that never draws a new chart counts as missing (NaN), not as a failed bench.
          perTab[tab].push(await page.evaluate(timeSwitch, { bigCell: seeded.bigFitCellId, tab }).catch(() => NaN));
        }
      }
    }
    // Trace of every quantity in turn (the 20 quantities of the run), when the cell has a trace view.
    const traceEach: number[] = [];
    const hasQuantityChoice = await page.evaluate((bigCell) => !!document.querySelector(`section[data-cell-id="${bigCell}"] select[aria-label="Quantity"]`), seeded.bigFitCellId);
    if (tabs.includes('Trace') && hasQuantityChoice) {
      await page.evaluate(timeSwitch, { bigCell: seeded.bigFitCellId, tab: 'Trace' });
      for (let q = 1; q < 20; q++) traceEach.push(await page.evaluate(timeSwitch, { bigCell: seeded.bigFitCellId, quantity: q }));
      traceEach.push(await page.evaluate(timeSwitch, { bigCell: seeded.bigFitCellId, quantity: 0 }));
    }
    const svgMarks = await page.evaluate((bigCell) => document.querySelector(`section[data-cell-id="${bigCell}"] [data-testid="plot"] svg`)?.querySelectorAll('path, circle').length ?? 0, seeded.bigFitCellId);
    const browserCores = await page.evaluate(() => navigator.hardwareConcurrency);

    const tabMedian = Object.fromEntries(tabs.filter((k) => perTab[k].some(Number.isFinite)).map((k) => [k, median(perTab[k].filter(Number.isFinite))]));
    const slowestView = Object.keys(tabMedian).length ? Math.max(...Object.values(tabMedian)) : NaN;
    const openMs = median(warm.map((m) => m.content));
    const plotInitial = median(bigPlotAfterDrawsMs);

    const out: Record<string, number | string> = {
      'setup.client_build': build,
      'setup.cells': seeded.cellCount,
      'setup.finished_runs': seeded.doneRuns,
      'setup.big_run': '4 chains x 1000 draws x 20 quantities (engine fit)',
      'setup.big_fit_s': round1(seeded.bigFitSeconds),
      'setup.browser_cores': browserCores,
      'open.loads': `${LOADS} (first apart, median of the other ${warm.length})`,
      'open.first_all_cells_ms': round1(loads[0].cells),
      'open.first_content_ms': round1(loads[0].content),
      'open.all_cells_ms': round1(median(warm.map((m) => m.cells))),
      'open.content_ms': round1(openMs),
      'open.api_requests': median(apiLoads.slice(1).map((a) => a.count)),
      'open.api_requests_until_content': median(apiLoads.slice(1).map((a) => a.beforeContent)),
      'open.first_api_request_ms': round1(median(apiLoads.slice(1).map((a) => a.firstStart))),
      'open.last_api_response_ms': round1(median(apiLoads.slice(1).map((a) => a.lastEnd))),
      'open.api_counts': (() => {
        const c: Record<string, number> = {};
        for (const [k] of apiLoads[apiLoads.length - 1].byKind) c[k] = (c[k] ?? 0) + 1;
        return Object.entries(c).map(([k, n]) => `${k} ${n}`).join(', ');
      })(),
      'open.api_median_ms_by_kind': (() => {
        const d: Record<string, number[]> = {};
        for (const a of apiLoads.slice(1)) for (const [k, ms] of a.byKind) (d[k] ??= []).push(ms);
        return Object.entries(d).map(([k, xs]) => `${k} ${Math.round(median(xs))}`).join(', ');
      })(),
      'plots.big_plot_after_scroll_ms': round1(scrolledPlotMs),
      'plots.draws_request_ms': round1(drawsMs),
      'plots.draws_response_kib': Math.round(drawsKiB),
      'plots.panel_after_draws_ms': round1(plotInitial),
    };
    for (const k of Object.keys(tabMedian)) out[`plots.view_${k.toLowerCase().replace(/\s+/g, '_')}_ms`] = round1(tabMedian[k]);
    out['plots.slowest_view_ms'] = round1(slowestView);
    out['plots.five_views_total_ms'] = round1(Object.values(tabMedian).reduce((s, x) => s + x, 0));
    out['plots.trace_per_quantity_median_ms'] = round1(median(traceEach));
    out['plots.trace_all_20_quantities_ms'] = round1(traceEach.reduce((s, x) => s + x, 0));
    out['plots.last_chart_svg_elements'] = svgMarks;
    out['page_errors'] = pageErrors.length ? pageErrors.join(' | ').slice(0, 300) : 'none';
    const requests = median(apiLoads.slice(1).map((a) => a.count));
    out['goal.open'] = '50 cells open in < 1000 ms (open.content_ms) with <= 5 API requests (open.api_requests; the run event stream is one more, open until the page closes)';
    out['goal.open_met'] = openMs < 1000 && requests <= 5 ? 'yes' : `NO (${Math.round(openMs)} ms, ${requests} requests)`;
    out['goal.plots'] = '4x1000x20 run: each plot view in < 500 ms (plots.slowest_view_ms, plots.panel_after_draws_ms)';
    out['goal.plots_met'] = Math.max(slowestView, plotInitial) < 500 ? 'yes' : `NO (${Math.round(Math.max(slowestView, plotInitial) - 500)} ms over)`;
    appendNotebookMd(out);
    return out;
  } finally {
    for (const c of cleanups) {
      try {
        await c();
      } catch (e) {
        process.stderr.write(`notebook bench: cleanup failed: ${(e as Error).message}\n`);
      }
    }
    await closeFitWorkers();
  }
}

const MD_HEAD = `# Notebook benchmark history

Appended by \`npm run bench -- notebook\` (newest last): a 50-cell notebook with 3 finished runs opened
in Chromium. Times in ms from navigation start (median of the warm loads); requests are the page's
API calls while opening (the run event stream, open until the page closes, is not counted).
Compare rows from the same machine.

| date (UTC) | all cells | all content | API requests (until content) | by kind | big plot after scroll | slowest plot view | goal < 1 s, ≤ 5 requests |
|---|---|---|---|---|---|---|---|
`;

function appendNotebookMd(out: Record<string, number | string>): void {
  const md = path.join(REPO, 'bench', 'results', 'notebook.md');
  if (!existsSync(md)) writeFileSync(md, MD_HEAD);
  const date = new Date().toISOString().slice(0, 16).replace('T', ' ');
  appendFileSync(
    md,
    `| ${date} | ${out['open.all_cells_ms']} | ${out['open.content_ms']} | ${out['open.api_requests']} (${out['open.api_requests_until_content']}) | ${out['open.api_counts']} | ${out['plots.big_plot_after_scroll_ms']} | ${out['plots.slowest_view_ms']} | ${out['goal.open_met']} |\n`,
  );
}

const invokedDirectly = process.argv[1] !== undefined && /notebook\.bench\.ts$/.test(process.argv[1]);
if (invokedDirectly) {
  run().then((r) => {
    for (const [k, v] of Object.entries(r)) console.log(`${k}: ${v}`);
  });
}

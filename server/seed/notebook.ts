/**
 * The demo notebook's content, in the invented Alder Creek sediment survey: a mixing-proportions
 * model (shares of three sediment sources on a simplex) and a monotone dose–response (sediment
 * load per storm rising with rain class), each with notes, data, a model and a finished fit; a
 * deliberately misspecified twin of the dose–response model whose model checks fail; then a model
 * with one mean for every class and a compare cell that tests the ordering (its Bayes factor,
 * masses and leave-one-out differences). The fits and the comparison are computed by the real
 * engine when the demo is seeded (the comparison by the compare job's own code), and stored like
 * any run.
 * Idempotent: it only fills a demo notebook that has no model cell yet.
 */
import { createHash } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { cells, datasets, runs } from '../db/schema';
import type { CellContent } from '../../shared/api/notebook';
import { newId } from '../lib/ids';
import { readUpload } from '../notebook/datasets';
import { encodeTableColumns } from '../notebook/table-columns';
import { runFit } from '../engine/fit';
import { finishRun, type RunSpec } from '../runs/queue';
import { compareRunValues, compareSpecOf, compareThreadInput, computeOnThread, finishCompare } from '../runs/compare-job';
import { compareContentSchema, type CompareResult } from '../../shared/api/compare';
import { computeRunChecks } from '../runs/checks';
import { parseCsv } from '../../shared/data';
import type { FitSettings } from '../../shared/fit';

/** Invented outlet samples: two tracer concentrations per sample (units are made up). */
export const DEMO_OUTLET_CSV = `sample,site,tracer_a,tracer_b
1,footbridge,29.02,3.32
2,culvert,29.70,3.48
3,north_gauge,31.67,3.20
4,footbridge,32.32,3.40
5,culvert,32.84,3.61
6,north_gauge,29.93,3.39
7,footbridge,30.92,3.31
8,culvert,29.94,3.24
9,north_gauge,30.10,3.05
10,footbridge,31.29,3.25
11,culvert,34.50,3.35
12,north_gauge,31.01,3.90
13,footbridge,31.92,3.11
14,culvert,30.37,3.16
`;

/** Invented storms: rain class 1–5 (from light to very heavy), rainfall and sediment load (t/km²). */
export const DEMO_STORMS_CSV = `storm,rain_class,rain_mm,load_t
1,1,7,1.66
2,1,10,3.14
3,1,10,1.97
4,1,4,1.35
5,1,10,1.19
6,1,12,2.84
7,2,20,3.35
8,2,22,3.09
9,2,15,3.11
10,2,26,3.34
11,2,25,4.02
12,2,19,3.34
13,3,33,2.17
14,3,33,3.16
15,3,37,2.84
16,3,36,2.43
17,3,38,2.90
18,3,42,3.21
19,4,47,3.49
20,4,52,6.09
21,4,57,5.52
22,4,54,4.07
23,4,49,4.52
24,4,47,3.33
25,5,64,5.32
26,5,70,5.44
27,5,68,5.21
28,5,64,6.91
29,5,75,6.66
30,5,72,5.24
`;

export const DEMO_MIXING_MODEL = `# Sediment shares of roads, banks and fields
# Source signatures (tracer means of each source, from the source samples):
#   roads 40 / 2.0, banks 15 / 6.5, fields 25 / 3.5
table outlet
const sig_a = [40, 15, 25]
const sig_b = [2.0, 6.5, 3.5]
unknown share[3], sd_a, sd_b
term ld_normal(tracer_a, dot(share, sig_a), sd_a)
term ld_normal(tracer_b, dot(share, sig_b), sd_b)
term ld_halfnormal(sd_a, 5) + ld_halfnormal(sd_b, 1)
constrain share >= 0
constrain sum(share) == 1
constrain sd_a >= 0.01
constrain sd_b >= 0.01
derive roads_minus_fields = share[1] - share[3]
`;

export const DEMO_MONOTONE_MODEL = `# Sediment load rising with rain class
table storms
unknown load[5], sd
term ld_normal(load_t, load[rain_class], sd)
term ld_normal(load, 3, 5) + ld_halfnormal(sd, 3)
constrain load[1] <= load[2] <= load[3] <= load[4] <= load[5]
constrain sd >= 0.01
derive heavy_minus_light = load[5] - load[1]
replicate load_new = ld_normal(load_t, load[rain_class], sd)
`;

/** The same storms with the scatter fixed far too small: a deliberately wrong model whose checks fail. */
export const DEMO_TWIN_MODEL = `# Twin: the same storms, scatter fixed at 0.25 t/km² (deliberately wrong)
table storms
const sd_fixed = 0.25
unknown load[5]
term ld_normal(load_t, load[rain_class], sd_fixed)
term ld_normal(load, 3, 5)
constrain load[1] <= load[2] <= load[3] <= load[4] <= load[5]
replicate load_new = ld_normal(load_t, load[rain_class], sd_fixed)
`;

export const DEMO_MIXING_NOTES = `## Reading the shares

The model treats each outlet sample's two tracers as a share-weighted mix of the three source
signatures. The shares are unknowns on the simplex (**share ≥ 0**, **sum(share) == 1**): the
sampler never leaves it, so no share is ever negative and they always add up to one.

Open the fit below: the verdict comes first; read the shares only when it says the run can be
trusted. The *Feasible region* plot shows the simplex slice for any two shares with the draws
inside it.
`;

export const DEMO_MONOTONE_NOTES = `# Does the sediment load rise with storm size?

Thirty storms, grouped into five rain classes from light (1) to very heavy (5). Field
experience says a heavier storm never carries *less* sediment on average, so the five class
means are ordered: **load[1] ≤ … ≤ load[5]**. The raw class averages are not ordered
(class 3 looks lower than class 2); the constrained model pools them honestly instead of
reporting a dip that is most likely noise.

Conclusions depend on the model's assumptions (normal scatter with one spread for all classes,
ordered means). Decisions with regulatory or safety consequences need a qualified statistician.

The model's last line, \`replicate load_new = …\`, asks the fit for *checks against the data*:
it simulates new storm loads from the fitted model, many times over, and the fit shows whether
the real loads look like those simulated ones (their spread, extremes and class by class).
`;

export const DEMO_TWIN_NOTES = `## A twin that is wrong on purpose

The model below fits the same storms but pretends to know that a storm's load strays only
**0.25 t/km²** from its class mean — as if every storm of a class carried almost the same load.
The data say otherwise: within a class, loads differ by a tonne or more.

The fit itself runs fine (its settings use the sampler on transformed coordinates, which handles
this sharply peaked posterior well), and its class means look reasonable. The mistake shows only when the
model is asked to reproduce the data: open its *Checks against the data*. Data simulated from
this model are far too tidy, so the observed spread, smallest and largest loads fall outside
what the model produces, and those statistics are marked **extreme**. Leave-one-out names the
storms the model cannot account for. Compare with the checks of the fit above, where the spread
is an unknown learnt from the data.
`;

export const DEMO_FLAT_MODEL = `# One mean for every rain class
table storms
unknown level, sd
term ld_normal(load_t, level, sd)
term ld_normal(level, 3, 5) + ld_halfnormal(sd, 3)
constrain sd >= 0.01
`;

/** The ordering line of DEMO_MONOTONE_MODEL (1-based), the hypothesis the demo's compare cell tests. */
export const DEMO_ORDER_LINE = 6;

export const DEMO_COMPARE_NOTES = `## Is the ordering supported by the data?

The compare cell below tests the ordering line of the dose–response model: the Bayes factor of
the model *with* the ordering against the same model *without* it is the posterior mass of the
ordered region divided by its prior mass. A model with one mean for every class is compared too,
with leave-one-out predictive accuracy from its fit beside the Bayes factors.
`;

const DEMO_SETTINGS: FitSettings = { chains: 4, warmup: 500, draws: 500, seed: 20261201, sampler: 'auto', replicates: 200, checkStat: 'iqr' };

export interface DemoNotebookTarget {
  userId: string;
  workspaceId: string;
  notebookId: string;
}

/**
 * Appends datasets and cells to a notebook, as the seeding code and the benchmark build them:
 * cells get consecutive positions from `startPosition`.
 */
export function notebookWriter(db: Db, t: DemoNotebookTarget, startPosition: number, now: Date) {
  let position = startPosition;
  return {
    /** The position the next cell will take. */
    get position() {
      return position;
    },
    async addDataset(name: string, csv: string): Promise<string> {
      const bytes = Buffer.from(csv, 'utf8');
      const { result, columns, rows } = readUpload(bytes);
      const id = newId();
      const tableColumns = Buffer.from(encodeTableColumns(result.table!));
      await db.insert(datasets).values({ id, workspaceId: t.workspaceId, notebookId: t.notebookId, cellId: null, name, columns, rowCount: rows, bytes: bytes.length, content: bytes, tableColumns, createdBy: t.userId, createdAt: now });
      return id;
    },
    async addCell(kind: 'notes' | 'data' | 'model' | 'fit' | 'compare', source: string, content: CellContent): Promise<string> {
      const id = newId();
      await db.insert(cells).values({ id, workspaceId: t.workspaceId, notebookId: t.notebookId, kind, position: position++, source, content, version: 1, collapsed: false, createdBy: t.userId, updatedBy: t.userId, createdAt: now, updatedAt: now });
      return id;
    },
  };
}

/** Fill the demo notebook (after its first notes cell) and compute both fits. */
export async function seedDemoNotebook(db: Db, t: DemoNotebookTarget, now: Date = new Date(), settings: FitSettings = DEMO_SETTINGS): Promise<string[]> {
  const defaultSettings = settings;
  const existing = await db.select().from(cells).where(and(eq(cells.workspaceId, t.workspaceId), eq(cells.notebookId, t.notebookId)));
  if (existing.some((c) => c.kind === 'model')) return [];
  const created: string[] = [];
  const { addDataset, addCell } = notebookWriter(db, t, existing.length, now);
  const addFinishedFit = async (fitCellId: string, source: string, tables: Record<string, { id: string; csv: string }>, settings: FitSettings = defaultSettings) => {
    const spec: RunSpec = { source, tables: Object.fromEntries(Object.entries(tables).map(([k, v]) => [k, v.id])) };
    const parsed = Object.fromEntries(Object.entries(tables).map(([k, v]) => [k, parseCsv(v.csv).table!]));
    const runId = newId();
    const modelHash = createHash('sha256').update(JSON.stringify({ source, tables: Object.entries(spec.tables).sort() })).digest('hex');
    await db.insert(runs).values({
      id: runId, workspaceId: t.workspaceId, notebookId: t.notebookId, cellId: fitCellId, status: 'running', settings, seed: settings.seed,
      modelHash, spec, progress: [], attempts: 1, leaseOwner: 'demo-seed', leaseExpiresAt: new Date(now.getTime() + 3_600_000), requestedBy: t.userId, createdAt: now, startedAt: now,
    });
    const started = performance.now();
    const result = await runFit({ kind: 'program', source, tables: parsed }, settings, {});
    const tFit = performance.now();
    const checks = await computeRunChecks(source, parsed, result, settings);
    const summary = { ...result.summary, checks };
    await finishRun(db, { workspaceId: t.workspaceId, id: runId }, 'demo-seed', { ...result, summary }, now, {
      fit: Math.round(tFit - started),
      checks: Math.round(performance.now() - tFit),
    });
    return result.summary.verdict.level;
  };

  // Part 1: mixing proportions (the foundation's first notes cell introduces it).
  const outlet = await addDataset('outlet', DEMO_OUTLET_CSV);
  await addCell('data', '', { datasetId: outlet });
  const mixModel = await addCell('model', DEMO_MIXING_MODEL, null);
  const mixFit = await addCell('fit', '', { modelCellId: mixModel, settings });
  await addCell('notes', DEMO_MIXING_NOTES, null);
  created.push(`mixing fit (${await addFinishedFit(mixFit, DEMO_MIXING_MODEL, { outlet: { id: outlet, csv: DEMO_OUTLET_CSV } })})`);

  // Part 2: a monotone dose–response.
  await addCell('notes', DEMO_MONOTONE_NOTES, null);
  const storms = await addDataset('storms', DEMO_STORMS_CSV);
  await addCell('data', '', { datasetId: storms });
  const monoModel = await addCell('model', DEMO_MONOTONE_MODEL, null);
  const monoFit = await addCell('fit', '', { modelCellId: monoModel, settings });
  created.push(`dose–response fit (${await addFinishedFit(monoFit, DEMO_MONOTONE_MODEL, { storms: { id: storms, csv: DEMO_STORMS_CSV } })})`);

  // Part 3: the dose–response model's deliberately misspecified twin, on the same table.
  await addCell('notes', DEMO_TWIN_NOTES, null);
  const twinModel = await addCell('model', DEMO_TWIN_MODEL, null);
  // Its posterior is sharply peaked against the ordering: the sampler on transformed coordinates
  // mixes it well where the automatic choice would ask to run longer.
  const twinSettings: FitSettings = { ...settings, sampler: 'transform-hmc' };
  const twinFit = await addCell('fit', '', { modelCellId: twinModel, settings: twinSettings });
  created.push(`misspecified twin fit (${await addFinishedFit(twinFit, DEMO_TWIN_MODEL, { storms: { id: storms, csv: DEMO_STORMS_CSV } }, twinSettings)})`);

  // Part 4: the ordering tested, and a model without any effect of rain class.
  await addCell('notes', DEMO_COMPARE_NOTES, null);
  const flatModel = await addCell('model', DEMO_FLAT_MODEL, null);
  const flatFit = await addCell('fit', '', { modelCellId: flatModel, settings });
  created.push(`one-mean fit (${await addFinishedFit(flatFit, DEMO_FLAT_MODEL, { storms: { id: storms, csv: DEMO_STORMS_CSV } })})`);
  const compareContent = compareContentSchema.parse({
    modelCellIds: [monoModel, flatModel],
    hypotheses: [{ modelCellId: monoModel, lines: [DEMO_ORDER_LINE] }],
    reference: { modelCellId: monoModel, without: [DEMO_ORDER_LINE] },
  });
  const compareCell = await addCell('compare', '', compareContent);
  await addFinishedComparison(db, t, compareCell, now);
  created.push('comparison');
  return created;
}

/**
 * Queue-free run of a compare cell at seed time: the job's own reading (compareSpecOf,
 * compareThreadInput), computation (computeOnThread) and storing (finishCompare), under a lease
 * held by the seed.
 */
export async function addFinishedComparison(db: Db, t: DemoNotebookTarget, cellId: string, now: Date): Promise<CompareResult> {
  const [cell] = await db.select().from(cells).where(and(eq(cells.workspaceId, t.workspaceId), eq(cells.id, cellId)));
  const { spec, settings } = await compareSpecOf(db, t.workspaceId, t.notebookId, cell.content, false);
  const runId = newId();
  const row = {
    id: runId, workspaceId: t.workspaceId, notebookId: t.notebookId, cellId, status: 'running' as const, settings, seed: settings.seed,
    modelHash: createHash('sha256').update(JSON.stringify({ spec, settings })).digest('hex'), spec, progress: null, attempts: 1,
    leaseOwner: 'demo-seed', leaseExpiresAt: new Date(now.getTime() + 3_600_000), requestedBy: t.userId, createdAt: now, startedAt: now,
  };
  await db.insert(runs).values(compareRunValues(row));
  const started = performance.now();
  const result = await computeOnThread(await compareThreadInput(db, row));
  await finishCompare(db, { id: runId, workspaceId: t.workspaceId }, 'demo-seed', result, now, { compute: Math.round(performance.now() - started) });
  return result;
}

/**
 * The notebook's API contract: cells and their content per kind, versioned saves with conflicts,
 * move/collapse, datasets, the model check, runs (fits as jobs), comments, exports, and the
 * notebook file format of our own. Server and client validate with these same zod objects.
 */
import { z } from 'zod';
import { fitProgressSchema, fitSettingsSchema, fitSummarySchema } from '../fit';
import { idSchema, isoDateSchema, issuesToFields } from './common';
import { CELL_KINDS, cellKindSchema, cellSchema } from './notebooks';
import { ACTIVE_RUN_STATUSES, RUN_STATUSES } from '../terms';
import { compareContentSchema, type CompareContent } from './compare';

/** Identifiers, dates, cell kinds and cells are the foundation's own schemas (one definition each). */
export const nbIdSchema = idSchema;
const isoDate = isoDateSchema;

/* ------------------------------------------------------------------------------------------ */
/* Cells                                                                                       */
/* ------------------------------------------------------------------------------------------ */

export const NB_CELL_KINDS = CELL_KINDS;
export const nbCellKindSchema = cellKindSchema;
export type NbCellKind = z.infer<typeof nbCellKindSchema>;

/** How each kind is named on screen (cells are labelled by kind in words, never numbered). */
export const CELL_KIND_LABELS: Record<NbCellKind, string> = {
  notes: 'Notes',
  data: 'Data',
  model: 'Model',
  fit: 'Fit',
  compare: 'Compare',
};

/** Largest text a cell may hold (model programs and notes). */
export const CELL_SOURCE_MAX = 50_000;
export const cellSourceSchema = z.string().max(CELL_SOURCE_MAX, `At most ${CELL_SOURCE_MAX} characters`);

/**
 * Structured content per kind, next to the free text `source`:
 * - notes:   source is markdown; content null.
 * - data:    source unused (''); content names the dataset the cell shows.
 * - model:   source is the model program; content null.
 * - fit:     source unused; content names the model cell it fits and the settings.
 * - compare: source unused; content lists the model cells to compare, the constraint lines to
 *            test, the reference row, prior odds and replicates (shared/api/compare.ts).
 */
export const notesContentSchema = z.null();
export const dataContentSchema = z.strictObject({ datasetId: nbIdSchema.nullable() });
export const modelContentSchema = z.null();
export const fitContentSchema = z.strictObject({
  modelCellId: nbIdSchema.nullable(),
  settings: fitSettingsSchema,
});
export { compareContentSchema };
export type DataContent = z.infer<typeof dataContentSchema>;
export type FitContent = z.infer<typeof fitContentSchema>;
export type { CompareContent };
/** A cell's content, whatever its kind (notes and model cells have none). */
export type CellContent = DataContent | FitContent | CompareContent | null;

/** The dataset a data cell shows; null for any other content. */
export const datasetIdOf = (content: CellContent): string | null => (content && 'datasetId' in content ? content.datasetId : null);

export const cellContentSchemas = {
  notes: notesContentSchema,
  data: dataContentSchema,
  model: modelContentSchema,
  fit: fitContentSchema,
  compare: compareContentSchema,
} as const;

/** The content a new cell of this kind starts with. */
export function defaultCellContent(kind: NbCellKind): CellContent {
  switch (kind) {
    case 'data':
      return { datasetId: null };
    case 'fit':
      return { modelCellId: null, settings: fitSettingsSchema.parse({}) };
    case 'compare':
      return compareContentSchema.parse({ modelCellIds: [] });
    default:
      return null;
  }
}

/** Validate content for a kind; returns field messages keyed `content.<path>` on failure. */
export function checkCellContent(
  kind: NbCellKind,
  content: unknown,
): { ok: true; content: CellContent } | { ok: false; fields: Record<string, string> } {
  const r = cellContentSchemas[kind].safeParse(content);
  if (r.success) return { ok: true, content: r.data };
  return { ok: false, fields: issuesToFields(r.error.issues.map((issue) => ({ ...issue, path: ['content', ...issue.path] }))) };
}

/** A cell as the notebook page sees it. */
export const nbCellSchema = cellSchema;
export type NbCell = z.infer<typeof nbCellSchema>;
export const nbCellResponse = z.object({ cell: nbCellSchema });
export const nbCellListResponse = z.object({ cells: z.array(nbCellSchema) });

export const cellParams = z.strictObject({
  workspaceId: nbIdSchema,
  notebookId: nbIdSchema,
  cellId: nbIdSchema,
});

/** Add a cell; without `position` it goes last. Content defaults per kind. */
export const createCellBody = z
  .strictObject({
    kind: nbCellKindSchema,
    position: z.number().int().min(0).optional(),
    source: cellSourceSchema.optional(),
    content: z.unknown().optional(),
  })
  .superRefine((v, ctx) => {
    if (v.content === undefined) return;
    const r = checkCellContent(v.kind, v.content);
    if (!r.ok) for (const [path, message] of Object.entries(r.fields)) ctx.addIssue({ code: 'custom', path: path.split('.'), message });
  });
export type CreateCellBody = z.input<typeof createCellBody>;

/**
 * Save a cell. `baseVersion` is the version the edit started from; if the stored version differs
 * the save is refused with 409 and both texts (see cellConflictResponse). At least one of source
 * and content must be given. Content is checked against the cell's kind by the server.
 */
export const saveCellBody = z
  .strictObject({
    baseVersion: z.number().int().min(0),
    source: cellSourceSchema.optional(),
    content: z.unknown().optional(),
  })
  .refine((v) => v.source !== undefined || v.content !== undefined, {
    message: 'Nothing to save: give source or content',
    path: ['source'],
  });
export type SaveCellBody = z.input<typeof saveCellBody>;

/** 409 answer to a stale save: the stored cell as it is now, and what the caller tried to save. */
export const cellConflictResponse = z.object({
  error: z.object({
    code: z.literal('conflict'),
    message: z.string(),
  }),
  conflict: z.object({
    current: nbCellSchema,
    yours: z.object({
      baseVersion: z.number().int(),
      source: z.string().optional(),
      content: z.unknown().optional(),
    }),
  }),
});
export type CellConflictResponse = z.infer<typeof cellConflictResponse>;

/** Move a cell one place up or down, or to an absolute 0-based position. */
export const moveCellBody = z.union([
  z.strictObject({ direction: z.enum(['up', 'down']) }),
  z.strictObject({ position: z.number().int().min(0) }),
]);
export type MoveCellBody = z.input<typeof moveCellBody>;
/** The whole order after a move, so the client can reconcile in one step. */
export const cellOrderResponse = z.object({
  order: z.array(z.object({ id: nbIdSchema, position: z.number().int() })),
});
export type CellOrderResponse = z.infer<typeof cellOrderResponse>;

/** Collapse state is layout, not content: it does not bump the version. */
export const collapseCellBody = z.strictObject({ collapsed: z.boolean() });

/* ------------------------------------------------------------------------------------------ */
/* Datasets                                                                                    */
/* ------------------------------------------------------------------------------------------ */

/** Upload limit for one CSV file. */
export const DATASET_MAX_BYTES = 5 * 1024 * 1024;
/** Rows returned in a preview. */
export const DATASET_PREVIEW_ROWS = 500;

/** The name a model binds with `table <name>`. */
export const tableNameSchema = z
  .string()
  .trim()
  .min(1, 'Required')
  .max(40, 'At most 40 characters')
  .regex(/^[A-Za-z][A-Za-z0-9_]*$/, 'Letters, digits and _ only, starting with a letter');

export const columnTypeSchema = z.enum(['numeric', 'integer', 'category']);
export type ColumnType = z.infer<typeof columnTypeSchema>;

export const datasetColumnSchema = z.object({
  name: z.string(),
  type: columnTypeSchema,
  /** Empty cells in this column. */
  missing: z.number().int().min(0),
  /** Category levels in code order (code k is levels[k-1]). */
  levels: z.array(z.string()).optional(),
});
export type DatasetColumn = z.infer<typeof datasetColumnSchema>;

export const datasetSchema = z.object({
  id: nbIdSchema,
  workspaceId: nbIdSchema,
  name: z.string(),
  rows: z.number().int(),
  bytes: z.number().int(),
  columns: z.array(datasetColumnSchema),
  createdAt: isoDate,
});
export type Dataset = z.infer<typeof datasetSchema>;

/** A preview cell: a number, a category label, or null when missing. */
export const previewValueSchema = z.union([z.number(), z.string(), z.null()]);
export type PreviewValue = z.infer<typeof previewValueSchema>;

export const datasetResponse = z.object({ dataset: datasetSchema });
export const datasetListResponse = z.object({ datasets: z.array(datasetSchema) });
export const datasetPreviewResponse = z.object({
  dataset: datasetSchema,
  /** First DATASET_PREVIEW_ROWS rows, one array per row in column order. */
  rows: z.array(z.array(previewValueSchema)),
});
export type DatasetPreviewResponse = z.infer<typeof datasetPreviewResponse>;
/** What a share-link holder sees of a dataset: no internal workspace id (as for the notebook). */
export const sharedDatasetPreviewResponse = datasetPreviewResponse.extend({ dataset: datasetSchema.omit({ workspaceId: true }) });

export const datasetParams = z.strictObject({ workspaceId: nbIdSchema, datasetId: nbIdSchema });
/** A page of a dataset's rows for the preview. */
export const datasetRowsQuery = z.strictObject({
  offset: z.coerce.number().int().min(0).default(0),
  limit: z.coerce.number().int().min(1).max(DATASET_PREVIEW_ROWS).default(DATASET_PREVIEW_ROWS),
});
export const datasetRowsResponse = z.object({
  /** Index (0-based) of the first row of `rows`. */
  offset: z.number().int(),
  /** Rows in the whole dataset. */
  total: z.number().int(),
  rows: z.array(z.array(previewValueSchema)),
});
export type DatasetRowsResponse = z.infer<typeof datasetRowsResponse>;
/** Multipart fields accompanying the uploaded `file`. */
export const uploadDatasetFields = z.strictObject({ name: tableNameSchema });

/* ------------------------------------------------------------------------------------------ */
/* Model check                                                                                 */
/* ------------------------------------------------------------------------------------------ */

export const compileBody = z.strictObject({
  source: cellSourceSchema,
  /** Bind tables from this notebook's data cells (otherwise the workspace's newest table of each name). */
  notebookId: nbIdSchema.optional(),
  /** Check the constraint region as well (may take a moment on large models). */
  region: z.boolean().optional(),
});

export const checkMessageSchema = z.object({
  severity: z.enum(['error', 'warning']),
  message: z.string(),
  line: z.number().int(),
  column: z.number().int(),
});
export type CheckMessage = z.infer<typeof checkMessageSchema>;

export const regionCheckSchema = z.object({
  /** interior: a strictly interior point was found; empty: no point satisfies all constraints;
   *  flat: points exist but none strictly inside; unchecked: not asked or model has errors. */
  status: z.enum(['interior', 'empty', 'flat', 'unchecked']),
  message: z.string(),
});
export type RegionCheck = z.infer<typeof regionCheckSchema>;

export const compileResponse = z.object({
  ok: z.boolean(),
  unknowns: z.array(z.object({ name: z.string(), shape: z.array(z.number().int()) })),
  derived: z.array(z.string()),
  tables: z.array(z.string()),
  constraints: z.object({ inequalities: z.number().int(), equalities: z.number().int() }),
  messages: z.array(checkMessageSchema),
  region: regionCheckSchema,
});
export type CompileResponse = z.infer<typeof compileResponse>;

/* ------------------------------------------------------------------------------------------ */
/* Runs                                                                                        */
/* ------------------------------------------------------------------------------------------ */

export { RUN_STATUSES, ACTIVE_RUN_STATUSES };
export const runStatusSchema = z.enum(RUN_STATUSES);
export type RunStatus = z.infer<typeof runStatusSchema>;

/** Most runs queued or running at once in one workspace. */
export const WORKSPACE_CONCURRENT_RUNS = 2;

/**
 * Limits of one run beyond FIT_LIMITS (chains, warm-up, draws, dimension in shared/fit.ts):
 * wall time, and stored numbers (chains × draws × (unknowns + derived)) so draws stay exportable.
 */
export const RUN_LIMITS = {
  wallSeconds: 900,
  storedNumbers: 4_000_000,
  /** A run whose worker vanished this many times is marked failed instead of queued again. */
  maxAttempts: 3,
} as const;

/**
 * A worker beats this often while it holds a run; a running run whose last beat is older than
 * `staleMs` (or whose lease has expired) is shown as "worker lost, resuming".
 */
export const RUN_HEARTBEAT = { intervalMs: 5_000, staleMs: 15_000, leaseMs: 30_000 } as const;

export const createRunBody = z.strictObject({
  /** Settings to run with; when omitted the fit cell's saved settings are used. */
  settings: fitSettingsSchema.optional(),
  /** The model cell to fit; when omitted the one the fit cell names. */
  modelCellId: nbIdSchema.optional(),
});

export const runSchema = z.object({
  id: nbIdSchema,
  /** The fit cell that queued it (null once that cell is deleted). */
  cellId: nbIdSchema.nullable(),
  notebookId: nbIdSchema,
  status: runStatusSchema,
  settings: fitSettingsSchema,
  /** Hash of the model program and data the run used. */
  modelHash: z.string(),
  createdBy: z.object({ id: nbIdSchema, name: z.string() }).nullable(),
  createdAt: isoDate,
  startedAt: isoDate.nullable(),
  finishedAt: isoDate.nullable(),
  error: z.string().nullable(),
  /** One entry per chain (absent chains have not reported yet). */
  progress: z.array(fitProgressSchema),
  summary: fitSummarySchema.nullable(),
  /**
   * Running runs only: 'lost' when the worker holding the run stopped beating (its lease expired
   * or its heartbeat is stale); another worker will resume it from its stored chains.
   * Absent in answers of older servers.
   */
  worker: z.enum(['active', 'lost']).nullable().optional(),
  /** Time of the holding worker's last heartbeat (null when not running). */
  lastHeartbeatAt: isoDate.nullable().optional(),
  /** Queued runs only: 1 = the next run a free fit slot takes (fair between workspaces). */
  queuePosition: z.number().int().min(1).nullable().optional(),
  /**
   * Done runs: true when the fit reached the time limit and only some chains finished; the summary
   * and draws cover those chains.
   */
  partial: z.boolean().optional(),
});
export type Run = z.infer<typeof runSchema>;
export const runResponse = z.object({ run: runSchema });
export const runListResponse = z.object({ runs: z.array(runSchema) });
export type RunListResponse = z.infer<typeof runListResponse>;

export const runParams = z.strictObject({ workspaceId: nbIdSchema, runId: nbIdSchema });

/** A linear system as the feasible-region view draws it. */
export const regionSystemSchema = z.object({
  names: z.array(z.string()),
  /** Inequalities A θ ≤ b, one row per array entry (coefficients per flat coordinate). */
  A: z.array(z.array(z.number())),
  b: z.array(z.number()),
  labels: z.array(z.string()),
  /** Equalities E θ = e. */
  E: z.array(z.array(z.number())),
  e: z.array(z.number()),
  eLabels: z.array(z.string()),
});
export type RegionSystem = z.infer<typeof regionSystemSchema>;

/**
 * The constraint region projected onto unknowns i and j (0-based, i < j): a convex polygon,
 * counter-clockwise, clipped to a box well around the draws (`clipped` when the box cut it).
 * Every draw's (θᵢ, θⱼ) lies inside it.
 */
export const regionProjectionSchema = z.object({
  i: z.number().int(),
  j: z.number().int(),
  vertices: z.array(z.tuple([z.number(), z.number()])),
  clipped: z.boolean(),
});
export type RegionProjection = z.infer<typeof regionProjectionSchema>;

/**
 * Draws for plotting as plain arrays: per chain, per quantity, the kept draws (possibly thinned).
 * The draws routes send the same content in binary (shared/draws-binary.ts); the plots accept
 * either (PlotDraws), and the region types here are shared by both.
 */
export const runDrawsResponse = z.object({
  names: z.array(z.string()),
  /** Number of unknown coordinates; names after these are derived quantities. */
  unknownCount: z.number().int(),
  /** Keep every `thin`-th draw. */
  thin: z.number().int().min(1),
  chains: z.array(
    z.object({
      chain: z.number().int(),
      /** values[q][t]: quantity q at kept iteration t. */
      values: z.array(z.array(z.number())),
      /** 1 at iterations whose transition diverged. */
      divergent: z.array(z.number().int()),
    }),
  ),
  region: regionSystemSchema.nullable(),
  /** Projections of the region onto pairs of the first unknowns (absent from older servers). */
  projections: z.array(regionProjectionSchema).optional(),
});
export type RunDraws = z.infer<typeof runDrawsResponse>;
export const runDrawsQuery = z.strictObject({
  /** At most this many draws per chain (evenly thinned). */
  max: z.coerce.number().int().min(10).max(20_000).optional(),
});

/* ------------------------------------------------------------------------------------------ */
/* Comments                                                                                    */
/* ------------------------------------------------------------------------------------------ */

export const commentBodySchema = z
  .string()
  .trim()
  .min(1, 'Required')
  .max(4000, 'At most 4000 characters');

export const commentSchema = z.object({
  id: nbIdSchema,
  cellId: nbIdSchema,
  author: z.object({ id: nbIdSchema, name: z.string() }).nullable(),
  body: z.string(),
  /** The comment this one answers, or null for a thread's first comment. */
  replyTo: nbIdSchema.nullable(),
  resolved: z.boolean(),
  createdAt: isoDate,
  updatedAt: isoDate,
});
export type Comment = z.infer<typeof commentSchema>;
export const createCommentBody = z.strictObject({
  body: commentBodySchema,
  replyTo: nbIdSchema.nullable().optional(),
});
export type CreateCommentBody = z.input<typeof createCommentBody>;
/** Resolve or reopen a thread (applies to its first comment). */
export const resolveCommentBody = z.strictObject({ resolved: z.boolean() });
export const commentParams = z.strictObject({
  workspaceId: nbIdSchema,
  notebookId: nbIdSchema,
  commentId: nbIdSchema,
});
export const commentResponse = z.object({ comment: commentSchema });
export const commentListResponse = z.object({ comments: z.array(commentSchema) });
/** Open (unresolved) thread counts and total comments per cell. */
export const commentCountsResponse = z.object({
  counts: z.record(nbIdSchema, z.object({ open: z.number().int(), total: z.number().int() })),
});
export type CommentCounts = z.infer<typeof commentCountsResponse>['counts'];

/* ------------------------------------------------------------------------------------------ */
/* Notebook file (our own format)                                                              */
/* ------------------------------------------------------------------------------------------ */

/**
 * The format version written by this build (the layout is in shared/notebook-file.ts). Import
 * accepts this version and version 1, whose layout is `notebookFileSchema` below.
 */
export const NOTEBOOK_FILE_VERSION = 2;
/** The first layout's version number. */
export const NOTEBOOK_FILE_V1 = 1;
/** Largest notebook file accepted for import. */
export const NOTEBOOK_FILE_MAX_BYTES = 12 * 1024 * 1024;

/**
 * A notebook file of version 1 (still accepted on import; export writes version 2, see
 * shared/notebook-file.ts): `{"slackline": 1, "notebook": {...}, "cells": [...], "datasets": [...]}`.
 * Cells and datasets carry file-local keys; references inside content (datasetId, modelCellId,
 * modelCellIds) hold those keys and are re-pointed at new ids on import. Datasets travel as CSV
 * text and are parsed again on import, exactly like an upload. Runs are not part of the file:
 * fits are re-run from their settings (seed included, so the same draws come back).
 */
const fileKey = z.string().min(1).max(64).regex(/^[A-Za-z0-9_-]+$/, 'Keys use letters, digits, _ and -');

export const notebookFileCellSchema = z.discriminatedUnion('kind', [
  z.strictObject({ key: fileKey, kind: z.literal('notes'), collapsed: z.boolean().default(false), source: cellSourceSchema, content: notesContentSchema.default(null) }),
  z.strictObject({ key: fileKey, kind: z.literal('data'), collapsed: z.boolean().default(false), source: cellSourceSchema.default(''), content: z.strictObject({ datasetId: fileKey.nullable() }) }),
  z.strictObject({ key: fileKey, kind: z.literal('model'), collapsed: z.boolean().default(false), source: cellSourceSchema, content: modelContentSchema.default(null) }),
  z.strictObject({ key: fileKey, kind: z.literal('fit'), collapsed: z.boolean().default(false), source: cellSourceSchema.default(''), content: z.strictObject({ modelCellId: fileKey.nullable(), settings: fitSettingsSchema }) }),
  z.strictObject({ key: fileKey, kind: z.literal('compare'), collapsed: z.boolean().default(false), source: cellSourceSchema.default(''), content: z.strictObject({ modelCellIds: z.array(fileKey).max(8) }) }),
]);
export type NotebookFileCell = z.infer<typeof notebookFileCellSchema>;

export const notebookFileDatasetSchema = z.strictObject({
  key: fileKey,
  name: tableNameSchema,
  csv: z.string().max(DATASET_MAX_BYTES, 'Dataset larger than the upload limit'),
});

export const notebookFileSchema = z
  .strictObject({
    slackline: z
      .number({ error: 'Not a Slackline notebook file (no "slackline" version field)' })
      .int()
      .min(1)
      .max(NOTEBOOK_FILE_V1, `This file was written by a newer Slackline (format version above ${NOTEBOOK_FILE_VERSION})`),
    notebook: z.strictObject({
      title: z.string().trim().min(1, 'Required').max(160, 'At most 160 characters'),
      exportedAt: isoDate.optional(),
    }),
    cells: z.array(notebookFileCellSchema).max(500, 'At most 500 cells'),
    datasets: z.array(notebookFileDatasetSchema).max(50, 'At most 50 datasets'),
  })
  .superRefine((file, ctx) => {
    const cellKeys = new Map<string, string>();
    file.cells.forEach((c, i) => {
      if (cellKeys.has(c.key)) ctx.addIssue({ code: 'custom', path: ['cells', i, 'key'], message: `Duplicate cell key "${c.key}"` });
      cellKeys.set(c.key, c.kind);
    });
    const dataKeys = new Set<string>();
    const dataNames = new Set<string>();
    file.datasets.forEach((d, i) => {
      if (dataKeys.has(d.key)) ctx.addIssue({ code: 'custom', path: ['datasets', i, 'key'], message: `Duplicate dataset key "${d.key}"` });
      if (dataNames.has(d.name)) ctx.addIssue({ code: 'custom', path: ['datasets', i, 'name'], message: `Duplicate table name "${d.name}"` });
      dataKeys.add(d.key);
      dataNames.add(d.name);
    });
    const modelRef = (key: string, path: (string | number)[]) => {
      const kind = cellKeys.get(key);
      if (kind !== 'model') ctx.addIssue({ code: 'custom', path, message: kind ? `Cell "${key}" is a ${kind} cell, not a model cell` : `No cell with key "${key}"` });
    };
    file.cells.forEach((c, i) => {
      if (c.kind === 'data' && c.content.datasetId !== null && !dataKeys.has(c.content.datasetId))
        ctx.addIssue({ code: 'custom', path: ['cells', i, 'content', 'datasetId'], message: `No dataset with key "${c.content.datasetId}"` });
      if (c.kind === 'fit' && c.content.modelCellId !== null) modelRef(c.content.modelCellId, ['cells', i, 'content', 'modelCellId']);
      if (c.kind === 'compare') c.content.modelCellIds.forEach((k, j) => modelRef(k, ['cells', i, 'content', 'modelCellIds', j]));
    });
  });
export type NotebookFile = z.infer<typeof notebookFileSchema>;

/** Turn a zod failure on a notebook file into one readable sentence naming the place. */
export function describeNotebookFileError(error: z.ZodError): string {
  const first = error.issues[0];
  if (!first) return 'Not a valid Slackline notebook file';
  const where = first.path.length ? first.path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('').replace(/^\./, '') : 'file';
  return `Not a valid Slackline notebook file: ${where}: ${first.message}`;
}

export const importNotebookResponse = z.object({
  notebook: z.object({ id: nbIdSchema, title: z.string() }),
  cells: z.number().int(),
  datasets: z.number().int(),
});

/**
 * The Slackline notebook file: building one from stored cells and datasets (export), and reading
 * one back (import) — the current layout, version 2, and the first layout, version 1
 * (`notebookFileSchema` in shared/api/notebook.ts).
 *
 * Version 2:
 *
 *   {
 *     "slackline_notebook": 2,
 *     "title": "Orchard trial",
 *     "saved_at": "2026-12-01T12:00:00.000Z",
 *     "blocks": [
 *       { "ref": "b1", "role": "notes",   "folded": false, "text": "# Irrigation" },
 *       { "ref": "b2", "role": "data",    "folded": false, "text": "", "table_ref": "t1" },
 *       { "ref": "b3", "role": "model",   "folded": false, "text": "table plots\n…" },
 *       { "ref": "b4", "role": "fit",     "folded": false, "text": "", "model_ref": "b3", "settings": { … } },
 *       { "ref": "b5", "role": "compare", "folded": false, "text": "", "model_refs": ["b3"],
 *         "tests": [{ "model_ref": "b3", "lines": [6] }], "reference": { "model_ref": "b3", "without_lines": [6] },
 *         "prior_odds": [], "replicates": 4, "seed": 20261201 }
 *     ],
 *     "tables": [ { "ref": "t1", "name": "plots", "csv": "water,set\n…" } ]
 *   }
 *
 * Blocks are the notebook's cells in order; `role` is the cell's kind and `text` its source. Refs
 * are local to the file (letters, digits, _ and -); `table_ref`, `model_ref` and `model_refs`
 * point at them and are re-pointed at new ids on import. A compare block's `tests` (constraint
 * lines tested per model), `reference`, `prior_odds`, `replicates` and `seed` may be absent (files
 * written before they existed): they default to none, the first model, equal odds, 4 and 20261201. Tables travel as CSV text and are parsed
 * again on import, exactly like an upload. Runs are not part of the file: fits are re-run from their
 * settings (seed included, so the same draws come back).
 */
import { z } from 'zod';
import {
  cellSourceSchema,
  DATASET_MAX_BYTES,
  describeNotebookFileError,
  NOTEBOOK_FILE_VERSION,
  notebookFileSchema,
  tableNameSchema,
  type CellContent,
  type NbCellKind,
} from './api/notebook';
import { fitSettingsSchema, type FitSettings } from './fit';
import { COMPARE_DEFAULTS, compareContentSchema } from './api/compare';

export interface ExportCell {
  id: string;
  kind: NbCellKind;
  source: string;
  content: unknown;
  collapsed: boolean;
}

export interface ExportDataset {
  id: string;
  name: string;
  /** The dataset as CSV text, header first. */
  csv: string;
}

/**
 * Re-point the references inside a cell's content with the given maps. References that the maps
 * do not know (a deleted model cell, a dataset outside the file) become null or are dropped.
 */
export function remapContent(
  kind: NbCellKind,
  content: unknown,
  cellRef: (id: string) => string | undefined,
  datasetRef: (id: string) => string | undefined,
): CellContent {
  const c = (content ?? {}) as Record<string, unknown>;
  switch (kind) {
    case 'data': {
      const id = typeof c.datasetId === 'string' ? datasetRef(c.datasetId) : undefined;
      return { datasetId: id ?? null };
    }
    case 'fit': {
      const id = typeof c.modelCellId === 'string' ? cellRef(c.modelCellId) : undefined;
      return { modelCellId: id ?? null, settings: c.settings as FitSettings };
    }
    case 'compare': {
      const ids = Array.isArray(c.modelCellIds) ? c.modelCellIds : [];
      const ref = (x: unknown) => (typeof x === 'string' ? cellRef(x) : undefined);
      const key = (k: unknown) => {
        const o = (k ?? {}) as { modelCellId?: unknown; without?: unknown };
        const id = ref(o.modelCellId);
        return id ? { modelCellId: id, without: Array.isArray(o.without) ? (o.without as number[]) : [] } : null;
      };
      const hyps = (Array.isArray(c.hypotheses) ? c.hypotheses : []) as { modelCellId?: unknown; lines?: unknown }[];
      const odds = (Array.isArray(c.priorOdds) ? c.priorOdds : []) as { key?: unknown; odds?: unknown }[];
      return {
        modelCellIds: ids.map(ref).filter((x): x is string => !!x),
        hypotheses: hyps.flatMap((h) => {
          const id = ref(h.modelCellId);
          return id && Array.isArray(h.lines) ? [{ modelCellId: id, lines: h.lines as number[] }] : [];
        }),
        reference: key(c.reference),
        priorOdds: odds.flatMap((o) => {
          const k = key(o.key);
          return k && typeof o.odds === 'number' ? [{ key: k, odds: o.odds }] : [];
        }),
        replicates: (c.replicates as number | undefined) ?? COMPARE_DEFAULTS.replicates,
        seed: (c.seed as number | undefined) ?? COMPARE_DEFAULTS.seed,
      };
    }
    default:
      return null;
  }
}

/* ------------------------------------------------------------------------------------------ */
/* Version 2                                                                                    */
/* ------------------------------------------------------------------------------------------ */

const fileRef = z.string().min(1).max(64).regex(/^[A-Za-z0-9_-]+$/, 'Refs use letters, digits, _ and -');
const folded = z.boolean().default(false);
const lineNo = z.number().int().min(1).max(100_000);

export const notebookBlockSchema = z.discriminatedUnion('role', [
  z.strictObject({ ref: fileRef, role: z.literal('notes'), folded, text: cellSourceSchema }),
  z.strictObject({ ref: fileRef, role: z.literal('data'), folded, text: cellSourceSchema.default(''), table_ref: fileRef.nullable() }),
  z.strictObject({ ref: fileRef, role: z.literal('model'), folded, text: cellSourceSchema }),
  z.strictObject({ ref: fileRef, role: z.literal('fit'), folded, text: cellSourceSchema.default(''), model_ref: fileRef.nullable(), settings: fitSettingsSchema }),
  z.strictObject({
    ref: fileRef,
    role: z.literal('compare'),
    folded,
    text: cellSourceSchema.default(''),
    model_refs: z.array(fileRef).max(8, 'At most 8 models'),
    tests: z.array(z.strictObject({ model_ref: fileRef, lines: z.array(lineNo).min(1).max(20) })).max(8).default([]),
    reference: z.strictObject({ model_ref: fileRef, without_lines: z.array(lineNo).max(20).default([]) }).nullable().default(null),
    prior_odds: z.array(z.strictObject({ model_ref: fileRef, without_lines: z.array(lineNo).max(20).default([]), odds: z.number().positive().max(1e12) })).max(64).default([]),
    replicates: z.number().int().min(2).max(16).default(COMPARE_DEFAULTS.replicates),
    seed: z.number().int().min(0).max(2_147_483_647).default(COMPARE_DEFAULTS.seed),
  }),
]);
export type NotebookBlock = z.infer<typeof notebookBlockSchema>;

export const notebookTableSchema = z.strictObject({
  ref: fileRef,
  name: tableNameSchema,
  csv: z.string().max(DATASET_MAX_BYTES, 'Table larger than the upload limit'),
});

export const notebookFileV2Schema = z
  .strictObject({
    slackline_notebook: z.literal(NOTEBOOK_FILE_VERSION),
    title: z.string().trim().min(1, 'Required').max(160, 'At most 160 characters'),
    saved_at: z.iso.datetime({ offset: true }).optional(),
    blocks: z.array(notebookBlockSchema).max(500, 'At most 500 blocks'),
    tables: z.array(notebookTableSchema).max(50, 'At most 50 tables'),
  })
  .superRefine((file, ctx) => {
    const roles = new Map<string, string>();
    file.blocks.forEach((b, i) => {
      if (roles.has(b.ref)) ctx.addIssue({ code: 'custom', path: ['blocks', i, 'ref'], message: `Duplicate block ref "${b.ref}"` });
      roles.set(b.ref, b.role);
    });
    const tableRefs = new Set<string>();
    const tableNames = new Set<string>();
    file.tables.forEach((t, i) => {
      if (tableRefs.has(t.ref)) ctx.addIssue({ code: 'custom', path: ['tables', i, 'ref'], message: `Duplicate table ref "${t.ref}"` });
      if (tableNames.has(t.name)) ctx.addIssue({ code: 'custom', path: ['tables', i, 'name'], message: `Duplicate table name "${t.name}"` });
      tableRefs.add(t.ref);
      tableNames.add(t.name);
    });
    const modelRef = (ref: string, path: (string | number)[]) => {
      const role = roles.get(ref);
      if (role !== 'model') ctx.addIssue({ code: 'custom', path, message: role ? `Block "${ref}" is a ${role} block, not a model block` : `No block with ref "${ref}"` });
    };
    file.blocks.forEach((b, i) => {
      if (b.role === 'data' && b.table_ref !== null && !tableRefs.has(b.table_ref))
        ctx.addIssue({ code: 'custom', path: ['blocks', i, 'table_ref'], message: `No table with ref "${b.table_ref}"` });
      if (b.role === 'fit' && b.model_ref !== null) modelRef(b.model_ref, ['blocks', i, 'model_ref']);
      if (b.role === 'compare') {
        b.model_refs.forEach((r, j) => modelRef(r, ['blocks', i, 'model_refs', j]));
        b.tests.forEach((t, j) => modelRef(t.model_ref, ['blocks', i, 'tests', j, 'model_ref']));
        if (b.reference) modelRef(b.reference.model_ref, ['blocks', i, 'reference', 'model_ref']);
        b.prior_odds.forEach((o, j) => modelRef(o.model_ref, ['blocks', i, 'prior_odds', j, 'model_ref']));
      }
    });
  });
export type NotebookFileV2 = z.infer<typeof notebookFileV2Schema>;

/** Build a notebook file (version 2): cells in order, the datasets the data cells use, file refs. */
export function buildNotebookFile(
  title: string,
  cells: readonly ExportCell[],
  datasets: readonly ExportDataset[],
  exportedAt: Date,
): NotebookFileV2 {
  const blockRef = new Map(cells.map((c, i) => [c.id, `b${i + 1}`]));
  const modelRefs = new Map(cells.filter((c) => c.kind === 'model').map((c) => [c.id, blockRef.get(c.id)!]));
  const tableRef = new Map(datasets.map((d, i) => [d.id, `t${i + 1}`]));
  const blocks = cells.map((c): NotebookBlock => {
    const head = { ref: blockRef.get(c.id)!, folded: c.collapsed, text: c.source };
    const content = remapContent(c.kind, c.content, (id) => modelRefs.get(id), (id) => tableRef.get(id)) as Record<string, unknown> | null;
    switch (c.kind) {
      case 'notes':
      case 'model':
        return { ...head, role: c.kind };
      case 'data':
        return { ...head, role: 'data', table_ref: (content?.datasetId as string | null) ?? null };
      case 'fit':
        return { ...head, role: 'fit', model_ref: (content?.modelCellId as string | null) ?? null, settings: content?.settings as FitSettings };
      case 'compare': {
        const cc = compareContentSchema.safeParse(content ?? {});
        const k = cc.success ? cc.data : compareContentSchema.parse({ modelCellIds: [] });
        return {
          ...head,
          role: 'compare',
          model_refs: k.modelCellIds,
          tests: k.hypotheses.map((h) => ({ model_ref: h.modelCellId, lines: h.lines })),
          reference: k.reference ? { model_ref: k.reference.modelCellId, without_lines: k.reference.without } : null,
          prior_odds: k.priorOdds.map((o) => ({ model_ref: o.key.modelCellId, without_lines: o.key.without, odds: o.odds })),
          replicates: k.replicates,
          seed: k.seed,
        };
      }
    }
  });
  return {
    slackline_notebook: NOTEBOOK_FILE_VERSION,
    title,
    saved_at: exportedAt.toISOString(),
    blocks,
    tables: datasets.map((d) => ({ ref: tableRef.get(d.id)!, name: d.name, csv: d.csv })),
  };
}

/* ------------------------------------------------------------------------------------------ */
/* Reading either version                                                                       */
/* ------------------------------------------------------------------------------------------ */

/** A notebook file's contents, whichever version it was written in; references hold file refs. */
export interface NotebookFileContents {
  version: 1 | 2;
  title: string;
  cells: { key: string; kind: NbCellKind; source: string; collapsed: boolean; content: unknown }[];
  datasets: { key: string; name: string; csv: string }[];
}

export type ReadNotebookFile = { ok: true; file: NotebookFileContents } | { ok: false; message: string };

const newer = (v: number) => `This file was written by a newer Slackline (format version ${v}; this one reads versions 1 to ${NOTEBOOK_FILE_VERSION})`;
const NOT_A_FILE = `Not a Slackline notebook file (no "slackline_notebook" version field)`;

/**
 * Validate parsed JSON as a notebook file of version 2 or 1 and return its contents, or one
 * readable sentence naming the first problem and where it is.
 */
export function readNotebookFile(json: unknown): ReadNotebookFile {
  if (typeof json !== 'object' || json === null || Array.isArray(json)) return { ok: false, message: NOT_A_FILE };
  const o = json as Record<string, unknown>;
  if ('slackline_notebook' in o) {
    const v = o.slackline_notebook;
    if (typeof v !== 'number' || !Number.isInteger(v) || v < 2)
      return { ok: false, message: `Not a valid Slackline notebook file: slackline_notebook: expected the format version ${NOTEBOOK_FILE_VERSION}` };
    if (v > NOTEBOOK_FILE_VERSION) return { ok: false, message: newer(v) };
    const r = notebookFileV2Schema.safeParse(json);
    if (!r.success) return { ok: false, message: describeNotebookFileError(r.error) };
    const f = r.data;
    return {
      ok: true,
      file: {
        version: 2,
        title: f.title,
        cells: f.blocks.map((b) => ({ key: b.ref, kind: b.role, source: b.text, collapsed: b.folded, content: blockContent(b) })),
        datasets: f.tables.map((t) => ({ key: t.ref, name: t.name, csv: t.csv })),
      },
    };
  }
  if ('slackline' in o) {
    const v = o.slackline;
    if (typeof v === 'number' && Number.isInteger(v) && v > 1) return { ok: false, message: newer(v) };
    const r = notebookFileSchema.safeParse(json);
    if (!r.success) return { ok: false, message: describeNotebookFileError(r.error) };
    const f = r.data;
    return {
      ok: true,
      file: {
        version: 1,
        title: f.notebook.title,
        cells: f.cells.map((c) => ({ key: c.key, kind: c.kind, source: c.source, collapsed: c.collapsed, content: c.content })),
        datasets: f.datasets.map((d) => ({ key: d.key, name: d.name, csv: d.csv })),
      },
    };
  }
  return { ok: false, message: NOT_A_FILE };
}

/** A block's references in the shape of the stored cell content (still holding file refs). */
function blockContent(b: NotebookBlock): unknown {
  switch (b.role) {
    case 'data':
      return { datasetId: b.table_ref };
    case 'fit':
      return { modelCellId: b.model_ref, settings: b.settings };
    case 'compare':
      return {
        modelCellIds: b.model_refs,
        hypotheses: b.tests.map((t) => ({ modelCellId: t.model_ref, lines: t.lines })),
        reference: b.reference ? { modelCellId: b.reference.model_ref, without: b.reference.without_lines } : null,
        priorOdds: b.prior_odds.map((o) => ({ key: { modelCellId: o.model_ref, without: o.without_lines }, odds: o.odds })),
        replicates: b.replicates,
        seed: b.seed,
      };
    default:
      return null;
  }
}

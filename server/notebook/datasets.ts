/** Datasets: parse an upload with the shared CSV reader, map rows, build previews and data tables. */
import { and, eq, inArray } from 'drizzle-orm';
import { DATASET_PREVIEW_ROWS, type Dataset, type DatasetColumn, type PreviewValue } from '../../shared/api/notebook';
import { parseCsv, type CsvResult } from '../../shared/data';
import type { DataTables } from '../engine/types';
import { cells, datasets } from '../db/schema';
import type { Exec } from '../lib/audit';
import { badRequest, notFound } from '../http/errors';

export type DatasetRow = typeof datasets.$inferSelect;

export const toDataset = (d: DatasetRow): Dataset => ({
  id: d.id,
  workspaceId: d.workspaceId,
  name: d.name,
  rows: d.rowCount,
  bytes: d.bytes,
  columns: d.columns as DatasetColumn[],
  createdAt: d.createdAt.toISOString(),
});

/** One sentence per error; each message of the CSV reader names its own row and column. */
export function describeCsvErrors(result: CsvResult): string {
  const errors = result.issues.filter((i) => i.severity === 'error');
  const parts = errors.slice(0, 3).map((i) => i.message);
  const more = errors.length > 3 ? ` (and ${errors.length - 3} more problem${errors.length - 3 > 1 ? 's' : ''})` : '';
  return `The file was not stored. ${parts.join(' ')}${more}`;
}

/** Parse an uploaded CSV; throws a 400 naming rows and columns when it cannot be used. */
/** Parses CSV bytes (an upload or a stored dataset's content) without copying them. */
function parseBytes(bytes: Buffer): CsvResult {
  return parseCsv(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength));
}

export function readUpload(bytes: Buffer): { result: CsvResult; columns: DatasetColumn[]; rows: number } {
  const result = parseBytes(bytes);
  if (!result.table) throw badRequest(describeCsvErrors(result), { file: result.issues.find((i) => i.severity === 'error')?.message ?? 'Not a usable CSV file' });
  const columns: DatasetColumn[] = result.columns.map((c) => ({
    name: c.name,
    type: c.type,
    missing: c.missing,
    ...(c.levels ? { levels: c.levels } : {}),
  }));
  return { result, columns, rows: result.table.rows };
}

/** The first rows of a stored dataset for the preview table (numbers, labels, null when missing). */
export function previewRows(d: DatasetRow, limit = DATASET_PREVIEW_ROWS): PreviewValue[][] {
  const { table } = parseBytes(d.content);
  if (!table) return [];
  const names = (d.columns as DatasetColumn[]).map((c) => c.name);
  const n = Math.min(limit, table.rows);
  const out: PreviewValue[][] = [];
  for (let i = 0; i < n; i++) {
    out.push(
      names.map((name) => {
        const col = table.columns[name];
        if (!col) return null;
        const v = col.values[i];
        if (Number.isNaN(v)) return null;
        return col.type === 'category' ? (col.levels?.[v - 1] ?? null) : v;
      }),
    );
  }
  return out;
}

export async function findDataset(exec: Exec, workspaceId: string, datasetId: string): Promise<DatasetRow> {
  const [row] = await exec.select().from(datasets).where(and(eq(datasets.workspaceId, workspaceId), eq(datasets.id, datasetId))).limit(1);
  if (!row) throw notFound('Dataset not found');
  return row;
}

/** Datasets shown by the data cells of a notebook, by table name (a later cell wins a name clash). */
export async function notebookTables(exec: Exec, workspaceId: string, notebookId: string): Promise<Map<string, DatasetRow>> {
  const dataCells = await exec
    .select({ content: cells.content, position: cells.position })
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), eq(cells.kind, 'data')));
  const ids = dataCells
    .sort((a, b) => a.position - b.position)
    .map((c) => (c.content as { datasetId?: string | null } | null)?.datasetId)
    .filter((x): x is string => typeof x === 'string');
  if (ids.length === 0) return new Map();
  const rows = await exec.select().from(datasets).where(and(eq(datasets.workspaceId, workspaceId), inArray(datasets.id, ids)));
  const byId = new Map(rows.map((r) => [r.id, r]));
  const out = new Map<string, DatasetRow>();
  for (const id of ids) {
    const r = byId.get(id);
    if (r) out.set(r.name, r);
  }
  return out;
}

/** Parse stored datasets into the engine's data tables. */
export function toDataTables(rows: Iterable<DatasetRow>): DataTables {
  const out: DataTables = {};
  for (const d of rows) {
    const { table } = parseBytes(d.content);
    if (!table) throw badRequest(`The stored table "${d.name}" can no longer be read`);
    out[d.name] = table;
  }
  return out;
}

/** Is this dataset shown by a data cell of this notebook? (share-link visitors see only those) */
export async function datasetInNotebook(exec: Exec, workspaceId: string, notebookId: string, datasetId: string): Promise<boolean> {
  const dataCells = await exec
    .select({ content: cells.content })
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), eq(cells.kind, 'data')));
  return dataCells.some((c) => (c.content as { datasetId?: string | null } | null)?.datasetId === datasetId);
}

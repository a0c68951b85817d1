/**
 * Datasets: parse an upload with the shared CSV reader (on a compute thread) and store its typed
 * columns beside the CSV; read tables back from those columns; map rows, page previews, build data tables.
 */
import { and, eq, getTableColumns, inArray } from 'drizzle-orm';
import { DATASET_PREVIEW_ROWS, type Dataset, type DatasetColumn, type PreviewValue, datasetIdOf } from '../../shared/api/notebook';
import { parseCsv, type CsvResult, type ParsedTable } from '../../shared/data';
import { ComputeBusyError, ComputeTimeoutError, computePool } from '../compute/pool';
import { columnsOf, describeCsvErrors, previewOf } from './tables';
import { TableCache, tableCache } from './table-cache';
import { decodeTableColumns } from './table-columns';
import type { DataTables } from '../engine/types';
import { cells, datasets } from '../db/schema';
import type { Exec } from '../lib/audit';
import { badRequest, notFound } from '../http/errors';
import { DomainError } from '../lib/errors';

export type DatasetRow = typeof datasets.$inferSelect;

export const toDataset = (d: Omit<DatasetRow, 'content' | 'tableColumns'>): Dataset => ({
  id: d.id,
  workspaceId: d.workspaceId,
  name: d.name,
  rows: d.rowCount,
  bytes: d.bytes,
  columns: d.columns,
  createdAt: d.createdAt.toISOString(),
});

export { describeCsvErrors } from './tables';

/** Parses CSV bytes (an upload or a stored dataset's content) without copying them. */
function parseBytes(bytes: Buffer): CsvResult {
  return parseCsv(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength));
}

/**
 * Parse an uploaded CSV on the calling thread (seeding and scripts only; requests use
 * parseUpload); throws a 400 naming rows and columns when it cannot be used.
 */
export function readUpload(bytes: Buffer): { result: CsvResult; columns: DatasetColumn[]; rows: number } {
  const result = parseBytes(bytes);
  if (!result.table) throw badRequest(describeCsvErrors(result), { file: result.issues.find((i) => i.severity === 'error')?.message ?? 'Not a usable CSV file' });
  return { result, columns: columnsOf(result), rows: result.table.rows };
}

/** A pool task's failure in words: past its time limit, or the pool full; other errors as they are. */
export function computeFailure(e: unknown, what: string): unknown {
  if (e instanceof ComputeTimeoutError) return new DomainError('time_limit', `${what} took longer than its limit of ${e.ms < 1000 ? `${e.ms} ms` : `${Math.round(e.ms / 1000)} s`} and was stopped.`);
  if (e instanceof ComputeBusyError) return new DomainError('busy', e.message);
  return e;
}

/** How often stored tables were parsed from CSV or read from their typed columns (tests read it). */
export const tableReads = { parses: 0, decodes: 0 };

/**
 * Parse CSV bytes on a compute thread, which also encodes the typed columns to store beside them
 * (`stored`); throws a 400 naming rows and columns when unusable.
 */
export async function parseUpload(bytes: Buffer): Promise<{ table: ParsedTable; columns: DatasetColumn[]; rows: number; stored: Buffer }> {
  const copy = new Uint8Array(bytes);
  const out = await computePool()
    .run('parseTable', { bytes: copy }, { transfer: [copy.buffer] })
    .catch((e: unknown) => {
      throw computeFailure(e, 'Reading the file');
    });
  if (!out.ok) throw new DomainError('invalid', out.message, { file: out.field });
  return { table: out.table, columns: out.columns, rows: out.rows, stored: Buffer.from(out.stored.buffer, out.stored.byteOffset, out.stored.byteLength) };
}

/** A dataset row without its content or typed columns (read only when the table is needed). */
export type DatasetMeta = Omit<DatasetRow, 'content' | 'tableColumns'>;
const { content: _content, tableColumns: _tableColumns, ...metaColumns } = getTableColumns(datasets);
/** Columns to select for DatasetMeta. */
export const datasetMetaColumns = metaColumns;

/**
 * A stored dataset as a table: from the table cache (by id and version), else from its stored typed
 * columns (a copy of bytes, no parsing). A table stored before typed columns existed is parsed once
 * on a compute thread and its typed columns are written back, so that is the last time.
 */
export async function parsedTable(exec: Exec, d: DatasetMeta): Promise<ParsedTable> {
  return tableCache.getOrLoad(TableCache.key(d), async () => {
    const where = and(eq(datasets.workspaceId, d.workspaceId), eq(datasets.id, d.id));
    const [stored] = await exec.select({ tableColumns: datasets.tableColumns }).from(datasets).where(where).limit(1);
    if (!stored) throw new DomainError('not_found', `The table "${d.name}" no longer exists`);
    if (stored.tableColumns) {
      tableReads.decodes++;
      return decodeTableColumns(stored.tableColumns);
    }
    const [row] = await exec.select({ content: datasets.content }).from(datasets).where(where).limit(1);
    if (!row) throw new DomainError('not_found', `The table "${d.name}" no longer exists`);
    try {
      tableReads.parses++;
      const parsed = await parseUpload(row.content);
      await exec.update(datasets).set({ tableColumns: parsed.stored }).where(where);
      return parsed.table;
    } catch (e) {
      if (e instanceof DomainError && e.kind === 'invalid') throw new DomainError('invalid', `The stored table "${d.name}" can no longer be read`);
      throw e;
    }
  });
}

/** Keep the table parsed at upload, so the first preview or check does not parse it again. */
export function rememberTable(d: Pick<DatasetRow, 'id' | 'createdAt'>, table: ParsedTable): void {
  tableCache.set(TableCache.key(d), table);
}

/** Rows `offset` … `offset + limit − 1` of a stored dataset for the preview table. */
export async function datasetPreview(exec: Exec, d: DatasetMeta, limit = DATASET_PREVIEW_ROWS, offset = 0): Promise<PreviewValue[][]> {
  return previewOf(await parsedTable(exec, d), d.columns, limit, offset);
}

export async function findDataset(exec: Exec, workspaceId: string, datasetId: string): Promise<DatasetMeta> {
  const [row] = await exec.select(metaColumns).from(datasets).where(and(eq(datasets.workspaceId, workspaceId), eq(datasets.id, datasetId))).limit(1);
  if (!row) throw notFound('Dataset not found');
  return row;
}

/** Datasets of a workspace by id, in one read (ids not found are absent). */
export async function datasetMetas(exec: Exec, workspaceId: string, ids: string[]): Promise<Map<string, DatasetMeta>> {
  if (ids.length === 0) return new Map();
  const rows = await exec.select(metaColumns).from(datasets).where(and(eq(datasets.workspaceId, workspaceId), inArray(datasets.id, [...new Set(ids)])));
  return new Map(rows.map((r) => [r.id, r]));
}

/** Datasets shown by the data cells of a notebook, by table name (a later cell wins a name clash). */
export async function notebookTables(exec: Exec, workspaceId: string, notebookId: string): Promise<Map<string, DatasetMeta>> {
  const dataCells = await exec
    .select({ content: cells.content, position: cells.position })
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), eq(cells.kind, 'data')));
  const ids = dataCells.sort((a, b) => a.position - b.position).map((c) => datasetIdOf(c.content));
  return boundByName(ids, await datasetMetas(exec, workspaceId, ids.filter((x): x is string => typeof x === 'string')));
}

/**
 * The tables a notebook binds by name, from its data cells' dataset ids in cell order and those
 * datasets (a later cell wins a name clash; a missing dataset binds nothing).
 */
export function boundByName(ids: (string | null | undefined)[], metas: Map<string, DatasetMeta>): Map<string, DatasetMeta> {
  const out = new Map<string, DatasetMeta>();
  for (const id of ids) {
    const d = id ? metas.get(id) : undefined;
    if (d) out.set(d.name, d);
  }
  return out;
}

/** Stored datasets as the engine's data tables, each under the name given (cached, see parsedTable). */
export async function loadDataTables(exec: Exec, rows: Iterable<DatasetMeta>): Promise<DataTables> {
  const list = [...rows];
  const tables = await Promise.all(list.map((d) => parsedTable(exec, d)));
  return Object.fromEntries(list.map((d, i) => [d.name, tables[i]]));
}

/** Is this dataset shown by a data cell of this notebook? (share-link visitors see only those) */
export async function datasetInNotebook(exec: Exec, workspaceId: string, notebookId: string, datasetId: string): Promise<boolean> {
  const dataCells = await exec
    .select({ content: cells.content })
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), eq(cells.kind, 'data')));
  return dataCells.some((c) => datasetIdOf(c.content) === datasetId);
}

/**
 * Pure helpers over parsed CSV tables (no database, no HTTP): the upload's column list, the one
 * sentence naming an unusable file's problems, and preview rows. They run in compute threads and
 * on the main thread alike.
 */
import { DATASET_PREVIEW_ROWS, type DatasetColumn, type PreviewValue } from '../../shared/api/notebook';
import type { CsvResult, ParsedTable } from '../../shared/data';

/** One sentence per error, naming the row and the column where the reader knows them. */
export function describeCsvErrors(result: CsvResult): string {
  const errors = result.issues.filter((i) => i.severity === 'error');
  // Each message of the CSV reader names its own row and column.
  const parts = errors.slice(0, 3).map((i) => i.message);
  const more = errors.length > 3 ? ` (and ${errors.length - 3} more problem${errors.length - 3 > 1 ? 's' : ''})` : '';
  return `The file was not stored. ${parts.join(' ')}${more}`;
}

/** The column list stored with a dataset. */
export function columnsOf(result: CsvResult): DatasetColumn[] {
  return result.columns.map((c) => ({
    name: c.name,
    type: c.type,
    missing: c.missing,
    ...(c.levels ? { levels: c.levels } : {}),
  }));
}

/** Rows `offset` … `offset + limit − 1` of a parsed table for the preview (numbers, labels, null when missing). */
export function previewOf(table: ParsedTable, columns: readonly DatasetColumn[], limit = DATASET_PREVIEW_ROWS, offset = 0): PreviewValue[][] {
  const names = columns.map((c) => c.name);
  const n = Math.min(offset + limit, table.rows);
  const out: PreviewValue[][] = [];
  for (let i = Math.max(0, offset); i < n; i++) {
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

/** Approximate memory held by a parsed table (for the cache's byte bound). */
export function tableBytes(table: ParsedTable): number {
  let n = 64;
  for (const [name, c] of Object.entries(table.columns)) {
    n += c.values.byteLength + name.length * 2 + 64;
    if (c.levels) for (const l of c.levels) n += l.length * 2 + 32;
  }
  return n;
}

import type { DataSchema, DataSchemaColumn } from './ast';

/** A table as far as the checker cares: its rows, and each column's type and category levels. */
export interface SchemaSourceTable {
  rows: number;
  columns: Record<string, { type: DataSchemaColumn['type']; levels?: readonly string[] }>;
}

/**
 * The data schema the checker needs (column types, level counts, row counts), from parsed tables
 * (engine, server) or from datasets' column lists (client). A category column without its level
 * names has no level count, so its codes are not bounded.
 */
export function dataSchemaOf(tables: Record<string, SchemaSourceTable>): DataSchema {
  const schema = Object.create(null) as DataSchema;
  for (const name of Object.keys(tables ?? {})) {
    const t = tables[name];
    const cols = Object.create(null) as DataSchema[string]['columns'];
    for (const c of Object.keys(t.columns)) {
      const col = t.columns[c];
      cols[c] = col.type === 'category' ? { type: 'category', levels: col.levels?.length } : { type: col.type };
    }
    schema[name] = { rows: t.rows, columns: cols };
  }
  return schema;
}

/**
 * Data tables as parsed from CSV. Structurally the same as the engine's DataTable/DataColumn
 * (server/engine/types.ts), defined here because shared code does not import the server.
 * Category columns are coded 1..K (1-based); levels[k-1] is the name of code k. Missing cells are NaN.
 */
export interface TableColumn {
  type: 'numeric' | 'integer' | 'category';
  values: Float64Array;
  levels?: string[];
}

export interface ParsedTable {
  rows: number;
  columns: Record<string, TableColumn>;
}

/**
 * The notebook file of our own format (see shared/api/notebook.ts, notebookFileSchema):
 * building one from stored cells and datasets, and re-pointing its references on import.
 */
import type { NbCellKind, NotebookFile } from './api/notebook';
import { NOTEBOOK_FILE_VERSION } from './api/notebook';

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
): unknown {
  const c = (content ?? {}) as Record<string, unknown>;
  switch (kind) {
    case 'data': {
      const id = typeof c.datasetId === 'string' ? datasetRef(c.datasetId) : undefined;
      return { datasetId: id ?? null };
    }
    case 'fit': {
      const id = typeof c.modelCellId === 'string' ? cellRef(c.modelCellId) : undefined;
      return { modelCellId: id ?? null, settings: c.settings };
    }
    case 'compare': {
      const ids = Array.isArray(c.modelCellIds) ? c.modelCellIds : [];
      return { modelCellIds: ids.map((x) => (typeof x === 'string' ? cellRef(x) : undefined)).filter((x): x is string => !!x) };
    }
    default:
      return null;
  }
}

/** Build a notebook file: cells in order, datasets the data cells use, file-local keys. */
export function buildNotebookFile(
  title: string,
  cells: readonly ExportCell[],
  datasets: readonly ExportDataset[],
  exportedAt: Date,
): NotebookFile {
  const cellKey = new Map(cells.map((c, i) => [c.id, `c${i + 1}`]));
  const modelKeys = new Map(cells.filter((c) => c.kind === 'model').map((c) => [c.id, cellKey.get(c.id)!]));
  const dataKey = new Map(datasets.map((d, i) => [d.id, `d${i + 1}`]));
  return {
    slackline: NOTEBOOK_FILE_VERSION,
    notebook: { title, exportedAt: exportedAt.toISOString() },
    cells: cells.map((c) => ({
      key: cellKey.get(c.id)!,
      kind: c.kind,
      collapsed: c.collapsed,
      source: c.source,
      content: remapContent(c.kind, c.content, (id) => modelKeys.get(id), (id) => dataKey.get(id)),
    })) as NotebookFile['cells'],
    datasets: datasets.map((d) => ({ key: dataKey.get(d.id)!, name: d.name, csv: d.csv })),
  };
}

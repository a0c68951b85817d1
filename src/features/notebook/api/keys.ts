/** Query keys of the notebook screen, under the foundation's notebook key so deleting a notebook sweeps them. */
import { queryKeys } from '@/lib/query-keys';

export const nbKeys = {
  notebook: (ws: string, nb: string) => queryKeys.notebook(ws, nb),
  dataset: (ws: string, id: string) => ['workspace', ws, 'dataset', id] as const,
  compile: (ws: string, nb: string, source: string) => ['workspace', ws, 'notebook', nb, 'compile', source] as const,
  cellRuns: (ws: string, nb: string, cell: string) => ['workspace', ws, 'notebook', nb, 'cell-runs', cell] as const,
  run: (ws: string, run: string) => ['workspace', ws, 'run', run] as const,
  runDraws: (ws: string, run: string) => ['workspace', ws, 'run', run, 'draws'] as const,
  comments: (ws: string, nb: string) => ['workspace', ws, 'notebook', nb, 'comments'] as const,
  shared: {
    dataset: (token: string, id: string) => ['shared-notebook', token, 'dataset', id] as const,
    cellRuns: (token: string, cell: string) => ['shared-notebook', token, 'cell-runs', cell] as const,
    modelCheck: (token: string, cell: string, source: string) => ['shared-notebook', token, 'model-check', cell, source] as const,
    runDraws: (token: string, run: string) => ['shared-notebook', token, 'run', run, 'draws'] as const,
  },
};

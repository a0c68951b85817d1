import type { QueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

/**
 * The notebook screen's first paint in one request (getNotebookPage): the notebook and its cells
 * are returned; the table summaries, model checks, each fit cell's runs and the comments go into
 * the query cache under the keys their own calls use, so the cells find them there and ask the
 * server only for what is not in it (draws for plots, when a plot comes into view).
 */
export async function getNotebookPage(qc: QueryClient, workspaceId: string, notebookId: string) {
  const page = await callRoute('getNotebookPage', { params: { workspaceId, notebookId } });
  for (const d of page.datasets) qc.setQueryData(nbKeys.dataset(workspaceId, d.dataset.id), d);
  for (const m of page.modelChecks) qc.setQueryData(nbKeys.compile(workspaceId, notebookId, m.source), m.check);
  for (const r of page.cellRuns) qc.setQueryData(nbKeys.cellRuns(workspaceId, notebookId, r.cellId), { runs: r.runs });
  qc.setQueryData(nbKeys.comments(workspaceId, notebookId), { comments: page.comments });
  return page.detail;
}

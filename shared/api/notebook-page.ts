/**
 * The notebook screen's first paint in one answer: the notebook and its cells, each data cell's
 * table summary (columns, counts and the first rows — never the whole table), each model cell's
 * check, each fit cell's runs (with the latest summaries) and the comments. The client puts each
 * part where the single calls would (getNotebook, getDataset, compileModel, listCellRuns,
 * listComments) and fetches only what is not here, e.g. draws for plots.
 */
import { z } from 'zod';
import { notebookDetailResponse } from './notebooks';
import { commentSchema, compileResponse, datasetPreviewResponse, nbIdSchema, runSchema } from './notebook';

export const notebookPageResponse = z.object({
  detail: notebookDetailResponse,
  datasets: z.array(datasetPreviewResponse),
  /** The check of each model cell's stored source against the notebook's tables (with the region test). */
  modelChecks: z.array(z.object({ cellId: nbIdSchema, source: z.string(), check: compileResponse })),
  /** Each fit cell's runs, newest first, as listCellRuns answers them. */
  cellRuns: z.array(z.object({ cellId: nbIdSchema, runs: z.array(runSchema) })),
  comments: z.array(commentSchema),
});
export type NotebookPageResponse = z.infer<typeof notebookPageResponse>;

/**
 * Server-sent events of a notebook's runs (`…/events`, text/event-stream): an `event: runs` whose
 * data is `{ runs }` — every run of the notebook that is queued or running, or whose status,
 * progress, queue place or summary changed since the last event — as often as they change (about
 * once a second at most). Share-link readers get only finished runs. `?once=1` answers the current
 * state as one event and closes (for clients that cannot hold a stream, and for checks).
 */
export const runEventsData = z.object({ runs: z.array(runSchema) });
export type RunEventsData = z.infer<typeof runEventsData>;
export const runEventsQuery = z.strictObject({ once: z.enum(['1']).optional() });

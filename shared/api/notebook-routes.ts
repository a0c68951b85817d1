/**
 * Routes of the notebook: cells, datasets, the model check, runs, comments, exports. Merged into
 * the shared route table (routes.ts) so the one authorization middleware, the validation and the
 * role-matrix test cover them like every other route.
 *
 * Routes answering files (CSV, notebook JSON) have no response schema, nor do binary answers (they
 * name their content type in `produces`); multipart routes declare
 * the schema of their text fields as `body` (the file itself travels in the `file` field).
 */
import { z } from 'zod';
import type { RouteDef } from './routes';
import * as nb from './notebook';
import { notebookPageResponse, runEventsQuery } from './notebook-page';
import { DRAWS_CONTENT_TYPE } from '../draws-binary';
import * as cmp from './compare';

const ws = z.strictObject({ workspaceId: nb.nbIdSchema });
const nbParams = z.strictObject({ workspaceId: nb.nbIdSchema, notebookId: nb.nbIdSchema });
const shareToken = z
  .string()
  .min(16, 'Not a valid token')
  .max(128, 'Not a valid token')
  .regex(/^[A-Za-z0-9_-]+$/, 'Not a valid token');
const shareCell = z.strictObject({ token: shareToken, cellId: nb.nbIdSchema });
const shareRun = z.strictObject({ token: shareToken, runId: nb.nbIdSchema });
const shareDataset = z.strictObject({ token: shareToken, datasetId: nb.nbIdSchema });
const nbBase = '/api/workspaces/:workspaceId/notebooks/:notebookId';

export const notebookRoutes = {
  // ---- the screen's first paint ----
  getNotebookPage: {
    method: 'GET', path: `${nbBase}/page`, access: 'viewer', status: 200,
    purpose: 'The notebook screen in one answer: cells, table summaries, model checks, each fit cell\'s runs with their summaries, and comments',
    params: nbParams, response: notebookPageResponse,
  },

  notebookEvents: {
    method: 'GET', path: `${nbBase}/events`, access: 'viewer', status: 200,
    purpose: 'Server-sent events of the notebook\'s runs: status, queue place, per-chain progress, summaries (text/event-stream)',
    params: nbParams, query: runEventsQuery,
  },

  // ---- cells ----
  createCell: {
    method: 'POST', path: `${nbBase}/cells`, access: 'editor', status: 201,
    purpose: 'Add a cell of a kind at a position (default: last)',
    params: nbParams, body: nb.createCellBody, response: nb.nbCellResponse,
  },
  saveCell: {
    method: 'PATCH', path: `${nbBase}/cells/:cellId`, access: 'editor', status: 200,
    purpose: 'Save a cell\'s text and content based on a version; a stale version answers 409 with both texts',
    params: nb.cellParams, body: nb.saveCellBody, response: nb.nbCellResponse,
  },
  moveCell: {
    method: 'POST', path: `${nbBase}/cells/:cellId/move`, access: 'editor', status: 200,
    purpose: 'Move a cell up, down or to a position; answers the whole order',
    params: nb.cellParams, body: nb.moveCellBody, response: nb.cellOrderResponse,
  },
  collapseCell: {
    method: 'POST', path: `${nbBase}/cells/:cellId/collapse`, access: 'editor', status: 200,
    purpose: 'Collapse or expand a cell (layout only: the version does not change)',
    params: nb.cellParams, body: nb.collapseCellBody, response: nb.nbCellResponse,
  },
  deleteCell: {
    method: 'DELETE', path: `${nbBase}/cells/:cellId`, access: 'editor', status: 204,
    purpose: 'Delete a cell with its comments (its runs stay listed without the cell)',
    params: nb.cellParams,
  },

  // ---- datasets ----
  uploadDataset: {
    method: 'POST', path: '/api/workspaces/:workspaceId/datasets', access: 'editor', status: 201,
    purpose: 'Upload a CSV (multipart field `file`, size-limited); a bad file is refused with the row and column, nothing stored',
    params: ws, body: nb.uploadDatasetFields, response: nb.datasetPreviewResponse,
  },
  getDataset: {
    method: 'GET', path: '/api/workspaces/:workspaceId/datasets/:datasetId', access: 'viewer', status: 200,
    purpose: 'A dataset with its column types, missing counts and the first rows',
    params: nb.datasetParams, response: nb.datasetPreviewResponse,
  },
  getDatasetRows: {
    method: 'GET', path: '/api/workspaces/:workspaceId/datasets/:datasetId/rows', access: 'viewer', status: 200,
    purpose: 'A page of a dataset\'s rows (`offset`, `limit` up to 500) for the preview, read from its stored typed columns',
    params: nb.datasetParams, query: nb.datasetRowsQuery, response: nb.datasetRowsResponse,
  },

  // ---- model check ----
  compileModel: {
    method: 'POST', path: '/api/workspaces/:workspaceId/compile', access: 'viewer', status: 200,
    purpose: 'Check a model program: unknowns and shapes, constraint counts, messages, and the region check (changes nothing, so every member may; readers see the side panel too)',
    params: ws, body: nb.compileBody, response: nb.compileResponse,
  },

  // ---- runs ----
  createRun: {
    method: 'POST', path: `${nbBase}/cells/:cellId/runs`, access: 'editor', status: 201,
    purpose: 'Queue a fit of the model cell a fit cell names, with its settings',
    params: nb.cellParams, body: nb.createRunBody, response: nb.runResponse,
  },
  listCellRuns: {
    method: 'GET', path: `${nbBase}/cells/:cellId/runs`, access: 'viewer', status: 200,
    purpose: 'Runs of a fit cell, newest first',
    params: nb.cellParams, response: nb.runListResponse,
  },
  queueCompareRun: {
    method: 'POST', path: `${nbBase}/cells/:cellId/compare-runs`, access: 'editor', status: 201,
    purpose: 'Queue the comparison a compare cell describes (log Z, Bayes factors, leave-one-out), optionally with prior scales halved and doubled',
    params: nb.cellParams, body: cmp.queueCompareBody, response: cmp.compareRunResponse,
  },
  listCompareRuns: {
    method: 'GET', path: `${nbBase}/cells/:cellId/compare-runs`, access: 'viewer', status: 200,
    purpose: 'Comparison jobs of a compare cell, newest first, with progress and results',
    params: nb.cellParams, response: cmp.compareRunListResponse,
  },
  cancelCompareRun: {
    method: 'POST', path: '/api/workspaces/:workspaceId/compare-runs/:runId/cancel', access: 'editor', status: 200,
    purpose: 'Cancel a queued or running comparison',
    params: nb.runParams, body: z.strictObject({}), response: cmp.compareRunResponse,
  },
  getRun: {
    method: 'GET', path: '/api/workspaces/:workspaceId/runs/:runId', access: 'viewer', status: 200,
    purpose: 'A run\'s status, per-chain progress and, when done, its summary',
    params: nb.runParams, response: nb.runResponse,
  },
  cancelRun: {
    method: 'POST', path: '/api/workspaces/:workspaceId/runs/:runId/cancel', access: 'editor', status: 200,
    purpose: 'Cancel a queued or running fit',
    params: nb.runParams, body: z.strictObject({}), response: nb.runResponse,
  },
  getRunDraws: {
    method: 'GET', path: '/api/workspaces/:workspaceId/runs/:runId/draws', access: 'viewer', status: 200,
    purpose: 'Draws per chain for plotting (evenly thinned to `max`) as Float32 columns after a JSON header with the constraint system (shared/draws-binary.ts)',
    params: nb.runParams, query: nb.runDrawsQuery, produces: DRAWS_CONTENT_TYPE,
  },
  exportRunDraws: {
    method: 'GET', path: '/api/workspaces/:workspaceId/runs/:runId/draws.csv', access: 'viewer', status: 200,
    purpose: 'Every kept draw as CSV: chain, iteration, one column per quantity (streamed)',
    params: nb.runParams,
  },
  exportRunSummary: {
    method: 'GET', path: '/api/workspaces/:workspaceId/runs/:runId/summary.csv', access: 'viewer', status: 200,
    purpose: 'The summary table as CSV',
    params: nb.runParams,
  },

  // ---- comments ----
  listComments: {
    method: 'GET', path: `${nbBase}/comments`, access: 'viewer', status: 200,
    purpose: 'Every comment of a notebook, oldest first (viewers read, reviewers and above write)',
    params: nbParams, response: nb.commentListResponse,
  },
  commentCounts: {
    method: 'GET', path: `${nbBase}/comment-counts`, access: 'viewer', status: 200,
    purpose: 'Open threads and total comments per cell',
    params: nbParams, response: nb.commentCountsResponse,
  },
  createComment: {
    method: 'POST', path: `${nbBase}/cells/:cellId/comments`, access: 'reviewer', status: 201,
    purpose: 'Comment on a cell, or reply to a comment',
    params: nb.cellParams, body: nb.createCommentBody, response: nb.commentResponse,
  },
  resolveComment: {
    method: 'PATCH', path: `${nbBase}/comments/:commentId`, access: 'reviewer', status: 200,
    purpose: 'Resolve or reopen a comment thread',
    params: nb.commentParams, body: nb.resolveCommentBody, response: nb.commentResponse,
  },

  // ---- notebook file ----
  exportNotebook: {
    method: 'GET', path: `${nbBase}/export`, access: 'viewer', status: 200,
    purpose: 'The notebook as a Slackline notebook file (JSON) with its datasets',
    params: nbParams,
  },
  importNotebook: {
    method: 'POST', path: '/api/workspaces/:workspaceId/notebooks/import', access: 'editor', status: 201,
    purpose: 'Create a notebook from a Slackline notebook file (multipart field `file`), validated first',
    params: ws, body: z.strictObject({}), response: nb.importNotebookResponse,
  },

  // ---- read-only through a share link ----
  sharedModelCheck: {
    method: 'GET', path: '/api/share/:token/cells/:cellId/check', access: 'share-token', status: 200,
    purpose: 'The side panel of a model cell of the shared notebook: its stored program checked against the notebook\'s tables',
    params: shareCell, response: nb.compileResponse,
  },
  sharedNotebookEvents: {
    method: 'GET', path: '/api/share/:token/events', access: 'share-token', status: 200,
    purpose: 'Server-sent events of the shared notebook\'s finished runs (text/event-stream)',
    params: z.strictObject({ token: shareToken }), query: runEventsQuery,
  },
  sharedCellRuns: {
    method: 'GET', path: '/api/share/:token/cells/:cellId/runs', access: 'share-token', status: 200,
    purpose: 'Runs of a fit cell of the shared notebook',
    params: shareCell, response: nb.runListResponse,
  },
  sharedCompareRuns: {
    method: 'GET', path: '/api/share/:token/cells/:cellId/compare-runs', access: 'share-token', status: 200,
    purpose: 'Finished comparisons of a compare cell of the shared notebook',
    params: shareCell, response: cmp.compareRunListResponse,
  },
  sharedRunDraws: {
    method: 'GET', path: '/api/share/:token/runs/:runId/draws', access: 'share-token', status: 200,
    purpose: 'Draws for plotting of a run of the shared notebook (the same binary form as getRunDraws)',
    params: shareRun, query: nb.runDrawsQuery, produces: DRAWS_CONTENT_TYPE,
  },
  sharedDataset: {
    method: 'GET', path: '/api/share/:token/datasets/:datasetId', access: 'share-token', status: 200,
    purpose: 'Preview of a dataset shown by a data cell of the shared notebook',
    params: shareDataset, response: nb.sharedDatasetPreviewResponse,
  },
  sharedDatasetRows: {
    method: 'GET', path: '/api/share/:token/datasets/:datasetId/rows', access: 'share-token', status: 200,
    purpose: 'A page of the rows of a dataset shown by a data cell of the shared notebook',
    params: shareDataset, query: nb.datasetRowsQuery, response: nb.datasetRowsResponse,
  },
} as const satisfies Record<string, RouteDef>;

/**
 * Data access of the notebook screen. Members go through /api/workspaces/…; share-link visitors
 * through /api/share/:token/… (read-only). `NotebookAccess` says which.
 */
import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { FitSettings } from '@shared/fit';
import { cellConflictResponse, nbCellResponse, saveCellBody, type CellConflictResponse, type NbCellKind, type Run } from '@shared/api/notebook';
import { ApiError, callRoute, toApiError } from '@/lib/api-client';
import { nbKeys } from './keys';
import { ACTIVE_RUN_STATUSES } from '@shared/terms';

export type NotebookAccess =
  | { mode: 'member'; workspaceId: string; notebookId: string }
  | { mode: 'share'; token: string; notebookId: string };

// ---- datasets ----
export const datasetQuery = (access: NotebookAccess, datasetId: string) =>
  queryOptions({
    queryKey: access.mode === 'member' ? nbKeys.dataset(access.workspaceId, datasetId) : nbKeys.shared.dataset(access.token, datasetId),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('getDataset', { params: { workspaceId: access.workspaceId, datasetId } })
        : callRoute('sharedDataset', { params: { token: access.token, datasetId } }),
    staleTime: Infinity,
  });

/** Multipart upload; errors come back in the API's one error shape. */
export async function uploadDataset(workspaceId: string, file: File, name: string) {
  const form = new FormData();
  form.set('name', name);
  form.set('file', file);
  let res: Response;
  try {
    res = await fetch(`/api/workspaces/${encodeURIComponent(workspaceId)}/datasets`, { method: 'POST', body: form, credentials: 'same-origin' });
  } catch {
    throw new ApiError(0, 'network', 'Could not reach the server. Check your connection and try again.');
  }
  const body = await res.json().catch(() => undefined);
  if (!res.ok) throw toApiError(res.status, body);
  return body as Awaited<ReturnType<typeof callRoute<'getDataset'>>>;
}

export async function importNotebookFile(workspaceId: string, file: File) {
  const form = new FormData();
  form.set('file', file);
  const res = await fetch(`/api/workspaces/${encodeURIComponent(workspaceId)}/notebooks/import`, { method: 'POST', body: form, credentials: 'same-origin' });
  const body = await res.json().catch(() => undefined);
  if (!res.ok) throw toApiError(res.status, body);
  return body as { notebook: { id: string; title: string }; cells: number; datasets: number };
}

// ---- cells ----
export class CellConflictError extends Error {
  constructor(readonly conflict: CellConflictResponse['conflict']) {
    super('conflict');
  }
}

/** Save with a base version; a 409 becomes a CellConflictError carrying both texts. */
export async function saveCell(workspaceId: string, notebookId: string, cellId: string, body: { baseVersion: number; source?: string; content?: unknown }) {
  const checked = saveCellBody.safeParse(body);
  if (!checked.success) throw new ApiError(400, 'bad_request', checked.error.issues[0]?.message ?? 'Invalid save');
  const path = `/api/workspaces/${encodeURIComponent(workspaceId)}/notebooks/${encodeURIComponent(notebookId)}/cells/${encodeURIComponent(cellId)}`;
  let res: Response;
  try {
    res = await fetch(path, {
      method: 'PATCH',
      headers: { 'Content-Type': 'application/json', Accept: 'application/json' },
      credentials: 'same-origin',
      body: JSON.stringify(checked.data),
    });
  } catch {
    throw new ApiError(0, 'network', 'Could not reach the server; your text is kept here and saving will be retried.');
  }
  const data = await res.json().catch(() => undefined);
  if (res.status === 409) {
    const parsed = cellConflictResponse.safeParse(data);
    if (parsed.success) throw new CellConflictError(parsed.data.conflict);
  }
  if (!res.ok) throw toApiError(res.status, data);
  const ok = nbCellResponse.safeParse(data);
  if (!ok.success) throw new ApiError(200, 'bad_response', 'The server sent an answer this page does not understand.');
  return ok.data;
}

export function useCellMutations(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: nbKeys.notebook(workspaceId, notebookId), exact: true });
  const params = { workspaceId, notebookId };
  return {
    add: useMutation({
      mutationFn: (v: { kind: NbCellKind; position: number; content?: unknown }) => callRoute('createCell', { params, body: v }),
      onSuccess: invalidate,
    }),
    remove: useMutation({
      mutationFn: (cellId: string) => callRoute('deleteCell', { params: { ...params, cellId } }),
      onSuccess: invalidate,
    }),
    move: useMutation({
      mutationFn: (v: { cellId: string; direction: 'up' | 'down' }) => callRoute('moveCell', { params: { ...params, cellId: v.cellId }, body: { direction: v.direction } }),
      onSuccess: invalidate,
    }),
    collapse: useMutation({
      mutationFn: (v: { cellId: string; collapsed: boolean }) => callRoute('collapseCell', { params: { ...params, cellId: v.cellId }, body: { collapsed: v.collapsed } }),
      onSuccess: invalidate,
    }),
  };
}

// ---- model check ----
export function useModelCheck(workspaceId: string, notebookId: string, source: string, enabled: boolean) {
  return useQuery({
    queryKey: nbKeys.compile(workspaceId, notebookId, source),
    queryFn: ({ signal }) => callRoute('compileModel', { params: { workspaceId }, body: { source, notebookId, region: true }, signal }),
    enabled: enabled && source.trim().length > 0,
    placeholderData: keepPreviousData,
    staleTime: 60_000,
  });
}

/** A share-link reader's model check: the stored program of that model cell (`source` keys the cache). */
export function useSharedModelCheck(token: string, cellId: string, source: string, enabled: boolean) {
  return useQuery({
    queryKey: nbKeys.shared.modelCheck(token, cellId, source),
    queryFn: ({ signal }) => callRoute('sharedModelCheck', { params: { token, cellId }, signal }),
    enabled: enabled && source.trim().length > 0,
    staleTime: 60_000,
  });
}

// ---- runs ----
const ACTIVE: readonly Run['status'][] = ACTIVE_RUN_STATUSES;

export function useCellRuns(access: NotebookAccess, cellId: string) {
  return useQuery({
    queryKey: access.mode === 'member' ? nbKeys.cellRuns(access.workspaceId, access.notebookId, cellId) : nbKeys.shared.cellRuns(access.token, cellId),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('listCellRuns', { params: { workspaceId: access.workspaceId, notebookId: access.notebookId, cellId } })
        : callRoute('sharedCellRuns', { params: { token: access.token, cellId } }),
    // Poll while a run of this cell is queued or running: that is how progress arrives.
    refetchInterval: (q) => (access.mode === 'member' && q.state.data?.runs.some((r) => ACTIVE.includes(r.status)) ? 1000 : false),
  });
}

export function useRunDraws(access: NotebookAccess, runId: string | null) {
  return useQuery({
    queryKey: access.mode === 'member' ? nbKeys.runDraws(access.workspaceId, runId ?? '') : nbKeys.shared.runDraws(access.token, runId ?? ''),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('getRunDraws', { params: { workspaceId: access.workspaceId, runId: runId! }, query: { max: 1000 } })
        : callRoute('sharedRunDraws', { params: { token: access.token, runId: runId! }, query: { max: 1000 } }),
    enabled: runId !== null,
    staleTime: Infinity,
  });
}

export function useRunMutations(workspaceId: string, notebookId: string, cellId: string) {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: nbKeys.cellRuns(workspaceId, notebookId, cellId) });
  return {
    start: useMutation({
      mutationFn: (v: { settings: FitSettings; modelCellId: string }) => callRoute('createRun', { params: { workspaceId, notebookId, cellId }, body: v }),
      onSuccess: invalidate,
    }),
    cancel: useMutation({
      mutationFn: (runId: string) => callRoute('cancelRun', { params: { workspaceId, runId }, body: {} }),
      onSuccess: invalidate,
    }),
  };
}

export const runExportLinks = (workspaceId: string, runId: string) => ({
  draws: `/api/workspaces/${encodeURIComponent(workspaceId)}/runs/${encodeURIComponent(runId)}/draws.csv`,
  summary: `/api/workspaces/${encodeURIComponent(workspaceId)}/runs/${encodeURIComponent(runId)}/summary.csv`,
});

// ---- comments ----
export function useComments(workspaceId: string, notebookId: string, enabled: boolean) {
  return useQuery({
    queryKey: nbKeys.comments(workspaceId, notebookId),
    queryFn: () => callRoute('listComments', { params: { workspaceId, notebookId } }),
    enabled,
    refetchInterval: enabled ? 15_000 : false,
  });
}

export function useCommentMutations(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: nbKeys.comments(workspaceId, notebookId) });
  return {
    create: useMutation({
      mutationFn: (v: { cellId: string; body: string; replyTo: string | null }) =>
        callRoute('createComment', { params: { workspaceId, notebookId, cellId: v.cellId }, body: { body: v.body, replyTo: v.replyTo } }),
      onSuccess: invalidate,
    }),
    resolve: useMutation({
      mutationFn: (v: { commentId: string; resolved: boolean }) =>
        callRoute('resolveComment', { params: { workspaceId, notebookId, commentId: v.commentId }, body: { resolved: v.resolved } }),
      onSuccess: invalidate,
    }),
  };
}


import { routePath } from '@shared/api';

/** Links that download a run's draws and summary as CSV (plain links: the browser saves the file). */
export const runExportLinks = (workspaceId: string, runId: string) => ({
  draws: routePath('exportRunDraws', { workspaceId, runId }),
  summary: routePath('exportRunSummary', { workspaceId, runId }),
});

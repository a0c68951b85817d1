/**
 * Who reads the notebook: members go through /api/workspaces/…; share-link visitors through
 * /api/share/:token/… (read-only). The calls of this folder that serve both take one of these.
 */
export type NotebookAccess =
  | { mode: 'member'; workspaceId: string; notebookId: string }
  | { mode: 'share'; token: string; notebookId: string };

/**
 * Query keys in one place so a mutation in one feature can invalidate another feature's data.
 * Roots are distinct ('workspace-list' vs 'workspace') so invalidating a list never sweeps details.
 */
export const queryKeys = {
  me: ['me'] as const,
  workspaceList: ['workspace-list'] as const,
  workspace: (workspaceId: string) => ['workspace', workspaceId] as const,
  members: (workspaceId: string) => ['workspace', workspaceId, 'members'] as const,
  invitations: (workspaceId: string) => ['workspace', workspaceId, 'invitations'] as const,
  audit: (workspaceId: string) => ['workspace', workspaceId, 'audit'] as const,
  notebookList: (workspaceId: string) => ['workspace', workspaceId, 'notebook-list'] as const,
  notebook: (workspaceId: string, notebookId: string) => ['workspace', workspaceId, 'notebook', notebookId] as const,
  shareLinks: (workspaceId: string, notebookId: string) =>
    ['workspace', workspaceId, 'notebook', notebookId, 'share-links'] as const,
  // Under the members key on purpose: a role change or removal revokes links, and the members
  // mutations invalidate everything below ['workspace', id, 'members'].
  workspaceShareLinks: (workspaceId: string) => ['workspace', workspaceId, 'members', 'share-links'] as const,
  invitationPreview: (token: string) => ['invitation-preview', token] as const,
  sharedNotebook: (token: string) => ['shared-notebook', token] as const,
  devMail: (to: string) => ['dev-mail', to] as const,
};

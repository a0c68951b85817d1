/** Notebooks, their cells (read side), and read-only share links. */
import { z } from 'zod';
import { idSchema, isoDateSchema, nameSchema, roleSchema, tokenSchema } from './common';
import { CELL_KINDS } from '../terms';

export const notebookParams = z.strictObject({ workspaceId: idSchema, notebookId: idSchema });

export const notebookSchema = z.object({
  id: idSchema,
  workspaceId: idSchema,
  title: z.string(),
  createdAt: isoDateSchema,
  updatedAt: isoDateSchema,
});
export type Notebook = z.infer<typeof notebookSchema>;

export { CELL_KINDS };
export const cellKindSchema = z.enum(CELL_KINDS);
export type CellKind = z.infer<typeof cellKindSchema>;

export const cellSchema = z.object({
  id: idSchema,
  notebookId: idSchema,
  kind: cellKindSchema,
  /** 0-based order within the notebook. */
  position: z.number().int(),
  /** Text the user writes (markdown for notes, model language for model cells). */
  source: z.string(),
  /** Structured settings of the cell kind (fit settings, data binding, …) or null. */
  content: z.unknown().nullable(),
  /** Increments on every save; a stale save is refused with a conflict. */
  version: z.number().int(),
  /** Shown folded (layout only; does not change the version). */
  collapsed: z.boolean(),
  createdAt: isoDateSchema,
  updatedAt: isoDateSchema,
});
export type Cell = z.infer<typeof cellSchema>;

export const notebookListResponse = z.object({ notebooks: z.array(notebookSchema) });
export const notebookResponse = z.object({ notebook: notebookSchema });
export type NotebookListResponse = z.infer<typeof notebookListResponse>;
export type NotebookResponse = z.infer<typeof notebookResponse>;

/** One notebook with its cells, for members. `role` is the caller's role in the workspace. */
export const notebookDetailResponse = z.object({
  notebook: notebookSchema,
  cells: z.array(cellSchema),
  role: roleSchema,
  workspaceName: z.string(),
});
export type NotebookDetailResponse = z.infer<typeof notebookDetailResponse>;

export const createNotebookBody = z.strictObject({ title: nameSchema(160) });
export const renameNotebookBody = z.strictObject({ title: nameSchema(160) });
export type CreateNotebookBody = z.input<typeof createNotebookBody>;
export type RenameNotebookBody = z.input<typeof renameNotebookBody>;

// ---- share links ----
export const shareLinkParams = z.strictObject({
  workspaceId: idSchema,
  notebookId: idSchema,
  linkId: idSchema,
});

export const shareLinkSchema = z.object({
  id: idSchema,
  notebookId: idSchema,
  createdBy: z.object({ id: idSchema, name: z.string() }),
  createdAt: isoDateSchema,
  /** null: never expires. */
  expiresAt: isoDateSchema.nullable(),
  revokedAt: isoDateSchema.nullable(),
  /** Derived: not revoked and not expired at the time of the answer. */
  active: z.boolean(),
});
export type ShareLink = z.infer<typeof shareLinkSchema>;
export const shareLinkListResponse = z.object({ links: z.array(shareLinkSchema) });
export type ShareLinkListResponse = z.infer<typeof shareLinkListResponse>;

/** Every share link of a workspace, for its owners: each with its notebook's title. */
export const workspaceShareLinkSchema = shareLinkSchema.extend({ notebookTitle: z.string() });
export type WorkspaceShareLink = z.infer<typeof workspaceShareLinkSchema>;
export const workspaceShareLinkListResponse = z.object({ links: z.array(workspaceShareLinkSchema) });

/** Expiry as an ISO timestamp in the future, or omitted/null for no expiry. */
export const createShareLinkBody = z.strictObject({
  expiresAt: z.iso.datetime({ offset: true, error: 'Must be an ISO date-time' }).nullable().optional(),
});
export type CreateShareLinkBody = z.input<typeof createShareLinkBody>;

/**
 * The secret token is returned once, at creation; only its hash is stored.
 * `path` is the client route to open: `/share/<token>`.
 */
export const createShareLinkResponse = z.object({
  link: shareLinkSchema,
  token: tokenSchema,
  path: z.string(),
});
export type CreateShareLinkResponse = z.infer<typeof createShareLinkResponse>;

export const shareTokenParams = z.strictObject({ token: tokenSchema });

/** What an anonymous holder of a share link sees: the notebook and its cells, read-only. */
export const sharedNotebookResponse = z.object({
  notebook: notebookSchema.omit({ workspaceId: true }),
  cells: z.array(cellSchema),
  workspaceName: z.string(),
  expiresAt: isoDateSchema.nullable(),
});
export type SharedNotebookResponse = z.infer<typeof sharedNotebookResponse>;

/** Workspaces, members and invitations. */
import { z } from 'zod';
import { emailSchema, idSchema, isoDateSchema, nameSchema, roleSchema, tokenSchema } from './common';

export const workspaceParams = z.strictObject({ workspaceId: idSchema });

export const workspaceSchema = z.object({
  id: idSchema,
  name: z.string(),
  /** The caller's role in this workspace. */
  role: roleSchema,
  createdAt: isoDateSchema,
});
export type Workspace = z.infer<typeof workspaceSchema>;

export const workspaceListResponse = z.object({ workspaces: z.array(workspaceSchema) });
export const workspaceResponse = z.object({ workspace: workspaceSchema });
export type WorkspaceListResponse = z.infer<typeof workspaceListResponse>;
export type WorkspaceResponse = z.infer<typeof workspaceResponse>;

export const createWorkspaceBody = z.strictObject({ name: nameSchema(80) });
export const renameWorkspaceBody = z.strictObject({ name: nameSchema(80) });
export type CreateWorkspaceBody = z.input<typeof createWorkspaceBody>;
export type RenameWorkspaceBody = z.input<typeof renameWorkspaceBody>;

// ---- members ----
export const memberParams = z.strictObject({ workspaceId: idSchema, userId: idSchema });

export const memberSchema = z.object({
  userId: idSchema,
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  joinedAt: isoDateSchema,
});
export type Member = z.infer<typeof memberSchema>;
export const memberListResponse = z.object({ members: z.array(memberSchema) });
export const memberResponse = z.object({ member: memberSchema });
export type MemberListResponse = z.infer<typeof memberListResponse>;

export const changeRoleBody = z.strictObject({ role: roleSchema });
export type ChangeRoleBody = z.input<typeof changeRoleBody>;

// ---- invitations ----
export const invitationParams = z.strictObject({ workspaceId: idSchema, invitationId: idSchema });

/** An invitation as the workspace owner sees it (the token itself is only ever in the e-mail). */
export const invitationSchema = z.object({
  id: idSchema,
  email: z.string(),
  role: roleSchema,
  invitedBy: z.object({ id: idSchema, name: z.string() }),
  createdAt: isoDateSchema,
  expiresAt: isoDateSchema,
});
export type Invitation = z.infer<typeof invitationSchema>;
export const invitationListResponse = z.object({ invitations: z.array(invitationSchema) });
export const invitationResponse = z.object({ invitation: invitationSchema });
export type InvitationListResponse = z.infer<typeof invitationListResponse>;

/** Owners invite anyone but another owner can only be made by promotion after joining. */
export const createInvitationBody = z.strictObject({
  email: emailSchema,
  role: z.enum(['editor', 'reviewer', 'viewer']),
});
export type CreateInvitationBody = z.input<typeof createInvitationBody>;

/** The token from the invitation link (/invitations/accept?token=…). */
export const invitationTokenBody = z.strictObject({ token: tokenSchema });
export type InvitationTokenBody = z.input<typeof invitationTokenBody>;

/**
 * What a signed-in invitee sees before accepting. `emailMatches` says whether the signed-in
 * account's e-mail is the invited one; accepting requires a match (see accept route).
 */
export const invitationPreviewResponse = z.object({
  invitation: z.object({
    workspaceName: z.string(),
    role: roleSchema,
    email: z.string(),
    invitedByName: z.string(),
    expiresAt: isoDateSchema,
    emailMatches: z.boolean(),
  }),
});
export type InvitationPreviewResponse = z.infer<typeof invitationPreviewResponse>;

export const acceptInvitationResponse = z.object({ workspace: workspaceSchema });
export type AcceptInvitationResponse = z.infer<typeof acceptInvitationResponse>;

// ---- audit ----
export const auditEntrySchema = z.object({
  id: idSchema,
  action: z.string(),
  actor: z.object({ id: idSchema, name: z.string() }).nullable(),
  targetType: z.string(),
  targetId: z.string(),
  detail: z.record(z.string(), z.unknown()).nullable(),
  createdAt: isoDateSchema,
});
export type AuditEntry = z.infer<typeof auditEntrySchema>;
export const auditListResponse = z.object({ entries: z.array(auditEntrySchema) });
export type AuditListResponse = z.infer<typeof auditListResponse>;

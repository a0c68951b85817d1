/** Audit rows: who changed roles and links, who deleted what. */
import type { Db } from '../db/client';
import { auditLog } from '../db/schema';
import { newId } from './ids';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type Exec = Db | Tx;

export type AuditAction =
  | 'workspace.renamed'
  | 'workspace.deleted'
  | 'member.role_changed'
  | 'member.removed'
  | 'member.left'
  | 'member.joined'
  | 'invitation.created'
  | 'invitation.revoked'
  | 'notebook.deleted'
  | 'share_link.created'
  | 'share_link.revoked';

export async function audit(
  exec: Exec,
  entry: {
    workspaceId: string | null;
    actorId: string | null;
    action: AuditAction;
    targetType: 'workspace' | 'member' | 'invitation' | 'notebook' | 'share_link';
    targetId: string;
    detail?: Record<string, unknown>;
    at: Date;
  },
): Promise<void> {
  await exec.insert(auditLog).values({
    id: newId(),
    workspaceId: entry.workspaceId,
    actorId: entry.actorId,
    action: entry.action,
    targetType: entry.targetType,
    targetId: entry.targetId,
    detail: entry.detail ?? null,
    createdAt: entry.at,
  });
}

/** Rows changed by an UPDATE or DELETE through drizzle's mysql2 driver. */
export function affectedRows(result: unknown): number {
  const header = Array.isArray(result) ? result[0] : result;
  return (header as { affectedRows?: number })?.affectedRows ?? 0;
}

/** True for MariaDB's duplicate-key error. */
export function isDuplicateKey(err: unknown): boolean {
  let e = err as { errno?: number; cause?: unknown } | undefined;
  for (let i = 0; e && i < 4; i++) {
    if (e.errno === 1062) return true;
    e = e.cause as typeof e;
  }
  return false;
}

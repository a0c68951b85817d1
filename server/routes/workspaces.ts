/** Workspaces (list, create, get, rename, delete) and their audit log. */
import { Router } from 'express';
import { desc, eq } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import type { Workspace } from '../../shared/api/workspaces';
import type { Role } from '../../shared/api/common';
import type { AppContext } from '../context';
import { auditLog, memberships, users, workspaces } from '../db/schema';
import { mount } from '../http/route';
import { audit } from '../lib/audit';
import { newId } from '../lib/ids';
import type { WorkspaceGrant } from '../auth/authorize';

export const toWorkspace = (w: { id: string; name: string; createdAt: Date; role: Role }): Workspace => ({
  id: w.id,
  name: w.name,
  role: w.role,
  createdAt: w.createdAt.toISOString(),
});

export function workspacesRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;
  const grant = (req: { workspace?: WorkspaceGrant }) => req.workspace!;

  mount(r, ctx, routes.listWorkspaces, async (_v, req) => {
    const rows = await db
      .select({ id: workspaces.id, name: workspaces.name, createdAt: workspaces.createdAt, role: memberships.role })
      .from(memberships)
      .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
      .where(eq(memberships.userId, req.user!.id))
      .orderBy(workspaces.name, workspaces.id);
    return { workspaces: rows.map(toWorkspace) };
  });

  mount(r, ctx, routes.createWorkspace, async ({ body }, req) => {
    const now = clock.now();
    const ws = { id: newId(), name: body.name, createdBy: req.user!.id, createdAt: now, updatedAt: now };
    await db.transaction(async (tx) => {
      await tx.insert(workspaces).values(ws);
      await tx.insert(memberships).values({ workspaceId: ws.id, userId: req.user!.id, role: 'owner', createdAt: now });
    });
    return { workspace: toWorkspace({ ...ws, role: 'owner' }) };
  });

  mount(r, ctx, routes.getWorkspace, async (_v, req) => ({ workspace: toWorkspace(grant(req)) }));

  mount(r, ctx, routes.renameWorkspace, async ({ body }, req) => {
    const w = grant(req);
    const now = clock.now();
    await db.transaction(async (tx) => {
      await tx.update(workspaces).set({ name: body.name, updatedAt: now }).where(eq(workspaces.id, w.id));
      await audit(tx, {
        workspaceId: w.id, actorId: req.user!.id, action: 'workspace.renamed', targetType: 'workspace',
        targetId: w.id, detail: { from: w.name, to: body.name }, at: now,
      });
    });
    return { workspace: toWorkspace({ ...w, name: body.name }) };
  });

  mount(r, ctx, routes.deleteWorkspace, async (_v, req) => {
    const w = grant(req);
    await db.transaction(async (tx) => {
      // Everything owned by the workspace goes with it (foreign keys cascade); the audit row stays.
      await tx.delete(workspaces).where(eq(workspaces.id, w.id));
      await audit(tx, {
        workspaceId: w.id, actorId: req.user!.id, action: 'workspace.deleted', targetType: 'workspace',
        targetId: w.id, detail: { name: w.name }, at: clock.now(),
      });
    });
  });

  mount(r, ctx, routes.listAudit, async (_v, req) => {
    const rows = await db
      .select({ entry: auditLog, actorName: users.name })
      .from(auditLog)
      .leftJoin(users, eq(users.id, auditLog.actorId))
      .where(eq(auditLog.workspaceId, grant(req).id))
      .orderBy(desc(auditLog.createdAt), desc(auditLog.id))
      .limit(200);
    return {
      entries: rows.map(({ entry, actorName }) => ({
        id: entry.id,
        action: entry.action,
        actor: entry.actorId ? { id: entry.actorId, name: actorName ?? '(deleted account)' } : null,
        targetType: entry.targetType,
        targetId: entry.targetId,
        detail: entry.detail ?? null,
        createdAt: entry.createdAt.toISOString(),
      })),
    };
  });

  return r;
}

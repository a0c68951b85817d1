/**
 * Members: list, change role, remove, leave. The last owner of a workspace can neither leave,
 * be removed nor be demoted; the owner count is read under a row lock so two concurrent demotions
 * cannot both pass.
 */
import { Router } from 'express';
import { and, eq } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import { roleAtLeast, type Role } from '../../shared/api/common';
import type { AppContext } from '../context';
import { memberships, users } from '../db/schema';
import { mount } from '../http/route';
import { HttpError, notFound } from '../http/errors';
import { audit, type Tx } from '../lib/audit';
import { revokeLinksOfCreator } from './share-links';

const lastOwner = (what: string) =>
  new HttpError(409, 'last_owner', `The last owner cannot ${what}; make another member owner first`);

/** Lock the workspace's memberships and return them. */
async function lockMembers(tx: Tx, workspaceId: string) {
  return tx.select().from(memberships).where(eq(memberships.workspaceId, workspaceId)).for('update');
}

export function membersRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.listMembers, async (_v, req) => {
    const rows = await db
      .select({ userId: users.id, email: users.email, name: users.name, role: memberships.role, joinedAt: memberships.createdAt })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(memberships.workspaceId, req.workspace!.id))
      .orderBy(users.name, users.id);
    return { members: rows.map((m) => ({ ...m, joinedAt: m.joinedAt.toISOString() })) };
  });

  mount(r, ctx, routes.changeRole, async ({ params, body }, req) => {
    const workspaceId = req.workspace!.id;
    const now = clock.now();
    await db.transaction(async (tx) => {
      const members = await lockMembers(tx, workspaceId);
      const target = members.find((m) => m.userId === params.userId);
      if (!target) throw notFound('No such member');
      if (target.role === body.role) return;
      const owners = members.filter((m) => m.role === 'owner').length;
      if (target.role === 'owner' && owners <= 1) throw lastOwner('be demoted');
      await tx
        .update(memberships)
        .set({ role: body.role })
        .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, params.userId)));
      await audit(tx, {
        workspaceId, actorId: req.user!.id, action: 'member.role_changed', targetType: 'member',
        targetId: params.userId, detail: { from: target.role, to: body.role }, at: now,
      });
      // Below editor one cannot make share links, so the ones already made stop working too.
      if (!roleAtLeast(body.role, 'editor')) {
        await revokeLinksOfCreator(tx, { workspaceId, creatorId: params.userId, actorId: req.user!.id, reason: 'creator_demoted', at: now });
      }
    });
    const [m] = await db
      .select({ userId: users.id, email: users.email, name: users.name, role: memberships.role, joinedAt: memberships.createdAt })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, params.userId)));
    if (!m) throw notFound('No such member');
    return { member: { ...m, joinedAt: m.joinedAt.toISOString() } };
  });

  async function removeMembership(workspaceId: string, userId: string, actorId: string, self: boolean) {
    await db.transaction(async (tx) => {
      const members = await lockMembers(tx, workspaceId);
      const target = members.find((m) => m.userId === userId);
      if (!target) throw notFound('No such member');
      const owners = members.filter((m) => m.role === 'owner').length;
      if (target.role === 'owner' && owners <= 1) throw lastOwner(self ? 'leave' : 'be removed');
      await tx.delete(memberships).where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)));
      await audit(tx, {
        workspaceId, actorId, action: self ? 'member.left' : 'member.removed', targetType: 'member',
        targetId: userId, detail: { role: target.role as Role }, at: clock.now(),
      });
      await revokeLinksOfCreator(tx, { workspaceId, creatorId: userId, actorId, reason: self ? 'creator_left' : 'creator_removed', at: clock.now() });
    });
  }

  mount(r, ctx, routes.removeMember, async ({ params }, req) => {
    await removeMembership(req.workspace!.id, params.userId, req.user!.id, params.userId === req.user!.id);
  });

  mount(r, ctx, routes.leaveWorkspace, async (_v, req) => {
    await removeMembership(req.workspace!.id, req.user!.id, req.user!.id, true);
  });

  return r;
}

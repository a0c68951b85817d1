/**
 * Invitations. An owner invites an e-mail address with a role; the mail carries a secret link
 * (only its SHA-256 is stored) valid for 7 days. Accepting needs a signed-in account whose e-mail
 * is the invited address: a forwarded or leaked link alone does not let a different account in.
 * A pending invitation to the same address is replaced by a new one.
 */
import { Router } from 'express';
import { and, count, eq, gt, isNull } from 'drizzle-orm';
import { routes, clientPaths } from '../../shared/api/routes';
import type { Invitation } from '../../shared/api/workspaces';
import type { AppContext } from '../context';
import { invitations, memberships, users, workspaces } from '../db/schema';
import { mount } from '../http/route';
import { HttpError, conflict, notFound } from '../http/errors';
import { audit } from '../lib/audit';
import { hashToken, newId, newToken } from '../lib/ids';
import { invitationMail } from '../mail/templates';
import { toWorkspace } from './workspaces';
import { limiter } from './auth';

export const INVITATION_TTL_MS = 7 * 24 * 60 * 60_000;

const invalidInvitation = () =>
  new HttpError(404, 'invalid_token', 'This invitation is unknown, revoked, already used or expired', {
    token: 'Invalid or expired',
  });

export function invitationsRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  const pending = (workspaceId: string, now: Date) =>
    and(
      eq(invitations.workspaceId, workspaceId),
      isNull(invitations.acceptedAt),
      isNull(invitations.revokedAt),
      gt(invitations.expiresAt, now),
    );

  const toInvitation = (i: typeof invitations.$inferSelect, inviterName: string | null): Invitation => ({
    id: i.id,
    email: i.email,
    role: i.role,
    invitedBy: { id: i.invitedBy ?? '', name: inviterName ?? '(deleted account)' },
    createdAt: i.createdAt.toISOString(),
    expiresAt: i.expiresAt.toISOString(),
  });

  mount(r, ctx, routes.listInvitations, async (_v, req) => {
    const rows = await db
      .select({ inv: invitations, inviterName: users.name })
      .from(invitations)
      .leftJoin(users, eq(users.id, invitations.invitedBy))
      .where(pending(req.workspace!.id, clock.now()))
      .orderBy(invitations.createdAt);
    return { invitations: rows.map((x) => toInvitation(x.inv, x.inviterName)) };
  });

  // Invitations send mail to addresses the sender chooses: budgets per client address (here),
  // per workspace and per inviter (below, counted from the stored invitations).
  // (a middleware, not a second route on the path: exactly POST …/invitations, nothing below it)
  const inviteLimit = limiter(ctx, { failuresOnly: false });
  r.use(routes.createInvitation.path, (req, res, next) =>
    req.method === 'POST' && (req.path === '/' || req.path === '') ? inviteLimit(req, res, next) : next(),
  );

  async function invitationsSince(where: ReturnType<typeof eq>, since: Date): Promise<number> {
    const [row] = await db.select({ n: count() }).from(invitations).where(and(where, gt(invitations.createdAt, since)));
    return row?.n ?? 0;
  }

  mount(r, ctx, routes.createInvitation, async ({ body }, req) => {
    const ws = req.workspace!;
    const now = clock.now();
    const { windowMs, invitationsPerWorkspace, invitationsPerInviter } = ctx.config.accountLimits;
    const since = new Date(now.getTime() - windowMs);
    if (
      (await invitationsSince(eq(invitations.workspaceId, ws.id), since)) >= invitationsPerWorkspace ||
      (await invitationsSince(eq(invitations.invitedBy, req.user!.id), since)) >= invitationsPerInviter
    ) {
      throw new HttpError(429, 'rate_limited', 'Too many invitations sent recently; wait a few minutes and try again');
    }
    const [already] = await db
      .select({ userId: users.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.workspaceId, ws.id), eq(users.email, body.email)))
      .limit(1);
    if (already) throw conflict('This person is already a member', { email: 'Already a member' });

    const token = newToken();
    const row = {
      id: newId(),
      workspaceId: ws.id,
      email: body.email,
      role: body.role,
      tokenHash: hashToken(token),
      invitedBy: req.user!.id,
      createdAt: now,
      expiresAt: new Date(now.getTime() + INVITATION_TTL_MS),
    };
    await db.transaction(async (tx) => {
      // A new invitation replaces a pending one to the same address.
      await tx
        .update(invitations)
        .set({ revokedAt: now })
        .where(and(pending(ws.id, now), eq(invitations.email, body.email)));
      await tx.insert(invitations).values(row);
      await audit(tx, {
        workspaceId: ws.id, actorId: req.user!.id, action: 'invitation.created', targetType: 'invitation',
        targetId: row.id, detail: { email: body.email, role: body.role }, at: now,
      });
    });
    try {
      await ctx.mailer.send(
        invitationMail({
          to: body.email,
          inviterName: req.user!.name,
          workspaceName: ws.name,
          role: body.role,
          link: ctx.config.publicUrl + clientPaths.acceptInvitation(token),
          expiresAt: row.expiresAt,
        }),
      );
    } catch (err) {
      // Without the mail the invitation is useless: take it back and say so.
      await db.update(invitations).set({ revokedAt: clock.now() }).where(and(eq(invitations.workspaceId, ws.id), eq(invitations.id, row.id)));
      if (ctx.config.logErrors) console.error('[slackline] could not send invitation mail:', err);
      throw new HttpError(503, 'service_unavailable', 'The invitation e-mail could not be sent; try again later');
    }
    return { invitation: toInvitation({ ...row, acceptedAt: null, acceptedBy: null, revokedAt: null }, req.user!.name) };
  });

  mount(r, ctx, routes.revokeInvitation, async ({ params }, req) => {
    const ws = req.workspace!;
    const now = clock.now();
    await db.transaction(async (tx) => {
      const [inv] = await tx
        .select()
        .from(invitations)
        .where(and(eq(invitations.id, params.invitationId), pending(ws.id, now)))
        .for('update');
      if (!inv) throw notFound('No such pending invitation');
      await tx
        .update(invitations)
        .set({ revokedAt: now })
        .where(and(eq(invitations.workspaceId, ws.id), eq(invitations.id, inv.id)));
      await audit(tx, {
        workspaceId: ws.id, actorId: req.user!.id, action: 'invitation.revoked', targetType: 'invitation',
        targetId: inv.id, detail: { email: inv.email }, at: now,
      });
    });
  });

  /** A usable invitation for this token, with its workspace, or a 404. */
  async function findUsable(token: string) {
    const now = clock.now();
    const [row] = await db
      .select({ inv: invitations, workspaceName: workspaces.name, inviterName: users.name })
      .from(invitations)
      .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
      .leftJoin(users, eq(users.id, invitations.invitedBy))
      .where(
        and(
          eq(invitations.tokenHash, hashToken(token)),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
          gt(invitations.expiresAt, now),
        ),
      )
      .limit(1);
    if (!row) throw invalidInvitation();
    return row;
  }

  mount(r, ctx, routes.previewInvitation, async ({ body }, req) => {
    const { inv, workspaceName, inviterName } = await findUsable(body.token);
    return {
      invitation: {
        workspaceName,
        role: inv.role,
        email: inv.email,
        invitedByName: inviterName ?? '(deleted account)',
        expiresAt: inv.expiresAt.toISOString(),
        emailMatches: inv.email === req.user!.email.toLowerCase(),
      },
    };
  });

  mount(r, ctx, routes.acceptInvitation, async ({ body }, req) => {
    const user = req.user!;
    const { inv } = await findUsable(body.token);
    if (inv.email !== user.email.toLowerCase()) {
      throw new HttpError(
        403,
        'email_mismatch',
        `This invitation is for ${inv.email}; sign in with that address to accept it`,
      );
    }
    const now = clock.now();
    const result = await db.transaction(async (tx) => {
      const [locked] = await tx
        .select()
        .from(invitations)
        .where(
          and(
            eq(invitations.workspaceId, inv.workspaceId),
            eq(invitations.id, inv.id),
            isNull(invitations.acceptedAt),
            isNull(invitations.revokedAt),
          ),
        )
        .for('update');
      if (!locked) throw invalidInvitation();
      await tx
        .update(invitations)
        .set({ acceptedAt: now, acceptedBy: user.id })
        .where(and(eq(invitations.workspaceId, inv.workspaceId), eq(invitations.id, inv.id)));
      const [existing] = await tx
        .select()
        .from(memberships)
        .where(and(eq(memberships.workspaceId, inv.workspaceId), eq(memberships.userId, user.id)))
        .for('update');
      // Already a member: the invitation is used up and the current role stays as it is.
      if (existing) return existing.role;
      await tx.insert(memberships).values({ workspaceId: inv.workspaceId, userId: user.id, role: inv.role, createdAt: now });
      await audit(tx, {
        workspaceId: inv.workspaceId, actorId: user.id, action: 'member.joined', targetType: 'member',
        targetId: user.id, detail: { role: inv.role, invitationId: inv.id }, at: now,
      });
      return inv.role;
    });
    const [ws] = await db.select().from(workspaces).where(eq(workspaces.id, inv.workspaceId));
    if (!ws) throw notFound('Workspace not found');
    return { workspace: toWorkspace({ ...ws, role: result }) };
  });

  return r;
}

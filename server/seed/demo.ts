/**
 * Idempotent demo data: a demo account, a workspace set in an invented river-sediment survey,
 * and a notebook with one notes cell. Running it again changes nothing.
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { cells, memberships, notebooks, users, workspaces } from '../db/schema';
import { hashPassword } from '../auth/password';
import { newId } from '../lib/ids';

export const DEMO_USER = {
  email: 'demo@slackline.test',
  password: 'slackline-demo',
  name: 'Demo Analyst',
} as const;

/**
 * The demo account's password is published (README, start log), so a production database gets it
 * only when asked for by name: NODE_ENV=production needs SEED_DEMO=true. Elsewhere SEED_DEMO=false
 * skips it.
 */
export function shouldSeedDemo(env: NodeJS.ProcessEnv): boolean {
  if (env.SEED_DEMO === 'true') return true;
  if (env.SEED_DEMO === 'false') return false;
  return env.NODE_ENV !== 'production';
}

export const DEMO_WORKSPACE = 'Alder Creek sediment survey';
export const DEMO_NOTEBOOK = 'Where does the fine sediment come from?';

export const DEMO_NOTES = `# Where does the fine sediment come from?

Alder Creek (an invented catchment) silts up its spawning gravels every spring. Field crews took
fine-sediment samples at the outlet and from three candidate sources: **forest roads**,
**eroding streambanks** and **tilled fields**. Each sample was assayed for tracer concentrations.

The question is the share of each source in the outlet sediment. Shares are proportions, so they
must be non-negative and sum to one: a simplex constraint, which is what this notebook is for.

Next steps: upload the tracer table, write the mixing model with its simplex constraint, fit it,
and check the run's diagnostics before reading the shares.
`;

export interface SeedResult {
  userId: string;
  workspaceId: string;
  notebookId: string;
  created: string[];
}

export async function seedDemo(db: Db, now: Date = new Date()): Promise<SeedResult> {
  const created: string[] = [];
  return db.transaction(async (tx) => {
    let [user] = await tx.select().from(users).where(eq(users.email, DEMO_USER.email));
    if (!user) {
      user = {
        id: newId(),
        email: DEMO_USER.email,
        name: DEMO_USER.name,
        passwordHash: await hashPassword(DEMO_USER.password),
        createdAt: now,
      };
      await tx.insert(users).values(user);
      created.push('user');
    }

    const [existingWs] = await tx
      .select({ id: workspaces.id })
      .from(workspaces)
      .innerJoin(memberships, eq(memberships.workspaceId, workspaces.id))
      .where(and(eq(memberships.userId, user.id), eq(workspaces.name, DEMO_WORKSPACE)));
    let workspaceId = existingWs?.id;
    if (!workspaceId) {
      workspaceId = newId();
      await tx.insert(workspaces).values({ id: workspaceId, name: DEMO_WORKSPACE, createdBy: user.id, createdAt: now, updatedAt: now });
      await tx.insert(memberships).values({ workspaceId, userId: user.id, role: 'owner', createdAt: now });
      created.push('workspace');
    }

    const [existingNb] = await tx
      .select({ id: notebooks.id })
      .from(notebooks)
      .where(and(eq(notebooks.workspaceId, workspaceId), eq(notebooks.title, DEMO_NOTEBOOK)));
    let notebookId = existingNb?.id;
    if (!notebookId) {
      notebookId = newId();
      await tx.insert(notebooks).values({
        id: notebookId, workspaceId, title: DEMO_NOTEBOOK, createdBy: user.id, createdAt: now, updatedAt: now,
      });
      created.push('notebook');
    }

    const [anyCell] = await tx
      .select({ id: cells.id })
      .from(cells)
      .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId)))
      .limit(1);
    if (!anyCell) {
      await tx.insert(cells).values({
        id: newId(), workspaceId, notebookId, kind: 'notes', position: 0, source: DEMO_NOTES, content: null,
        version: 1, createdBy: user.id, updatedBy: user.id, createdAt: now, updatedAt: now,
      });
      created.push('notes cell');
    }
    return { userId: user.id, workspaceId, notebookId, created };
  });
}

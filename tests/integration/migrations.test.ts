/**
 * The migrations create every table of the data model in utf8mb4, apply twice without change, and
 * the schema copy the test helper uses is identical to a database migrated from scratch.
 */
import { randomBytes } from 'node:crypto';
import mysql from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runMigrations } from '../../server/db/migrate';
import { baseDatabaseUrl, createTestDatabase, type TestDatabase } from '../helpers/db';

let admin: mysql.Connection;
let copied: TestDatabase;
const fresh = `mig_check_${randomBytes(4).toString('hex')}`;
let freshUrl: string;

async function schemaOf(db: string): Promise<string[]> {
  const [tables] = await admin.query(
    "SELECT table_name AS t FROM information_schema.tables WHERE table_schema = ? ORDER BY table_name",
    [db],
  );
  const out: string[] = [];
  for (const { t } of tables as { t: string }[]) {
    const [rows] = await admin.query(`SHOW CREATE TABLE \`${db}\`.\`${t}\``);
    out.push((rows as Record<string, string>[])[0]['Create Table'].replace(/ AUTO_INCREMENT=\d+/, ''));
  }
  return out;
}

beforeAll(async () => {
  admin = await mysql.createConnection({ uri: baseDatabaseUrl() });
  await admin.query(`CREATE DATABASE \`${fresh}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  const u = new URL(baseDatabaseUrl());
  u.pathname = `/${fresh}`;
  freshUrl = u.toString();
  await runMigrations(freshUrl);
  copied = await createTestDatabase();
});

afterAll(async () => {
  await admin.query(`DROP DATABASE IF EXISTS \`${fresh}\``);
  await admin.end();
  await copied.drop();
});

describe('migrations', () => {
  it('create every table of the data model, all utf8mb4', async () => {
    const [rows] = await admin.query(
      'SELECT table_name AS t, table_collation AS c FROM information_schema.tables WHERE table_schema = ?',
      [fresh],
    );
    const tables = rows as { t: string; c: string }[];
    expect(tables.map((r) => r.t).sort()).toEqual(
      [
        '__drizzle_migrations', 'audit_log', 'cells', 'comments', 'datasets', 'invitations', 'mail_outbox', 'memberships',
        'notebooks', 'password_resets', 'pending_sign_ups', 'run_chains', 'run_summaries', 'run_units', 'runs', 'sessions', 'share_links', 'users', 'workspaces',
      ].sort(),
    );
    for (const r of tables) expect(r.c, r.t).toMatch(/^utf8mb4_/);
  });

  it('every workspace-owned table carries workspace_id', async () => {
    const [rows] = await admin.query(
      "SELECT table_name AS t FROM information_schema.columns WHERE table_schema = ? AND column_name = 'workspace_id'",
      [fresh],
    );
    expect((rows as { t: string }[]).map((r) => r.t).sort()).toEqual(
      ['audit_log', 'cells', 'comments', 'datasets', 'invitations', 'memberships', 'notebooks', 'run_chains', 'run_summaries', 'run_units', 'runs', 'share_links'].sort(),
    );
  });

  it('apply a second time without change', async () => {
    const before = await schemaOf(fresh);
    await runMigrations(freshUrl);
    expect(await schemaOf(fresh)).toEqual(before);
  });

  it('the test helper copy equals a migrated database', async () => {
    expect(await schemaOf(new URL(copied.url).pathname.slice(1))).toEqual(await schemaOf(fresh));
  });
});

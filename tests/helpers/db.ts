/**
 * Test databases. `npm test` starts a throwaway MariaDB, migrates the database of DATABASE_URL and
 * exports it (its user may create databases). Every test file (and every startTestServer call)
 * gets a database of its own with the same schema, so files and projects can run side by side
 * without seeing each other's rows.
 *
 *   const tdb = await createTestDatabase();   // { url, handle, db, truncate(), drop() }
 *   afterEach(() => tdb.truncate());           // empty every table (keeps the migrations)
 *   afterAll(() => tdb.drop());                // drop the database and close the pool
 */
import { randomBytes } from 'node:crypto';
import mysql from 'mysql2/promise';
import { createDb, type Db, type DbHandle } from '../../server/db/client';
import { runMigrations } from '../../server/db/migrate';

export interface TestDatabase {
  /** mysql://… URL of this database */
  url: string;
  handle: DbHandle;
  db: Db;
  /** Empty every application table. */
  truncate(): Promise<void>;
  /** Drop the database and close the pool. */
  drop(): Promise<void>;
}

export function baseDatabaseUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url) {
    throw new Error('DATABASE_URL is not set: run the tests with `npm test`, which starts a throwaway MariaDB');
  }
  return url;
}

/**
 * Copy the table definitions (with foreign keys) and the migration journal of an already migrated
 * database. Much faster than replaying the migrations, whose foreign-key ALTERs copy tables.
 * Returns false when `from` has never been migrated.
 */
async function cloneSchema(admin: mysql.Connection, from: string, to: string): Promise<boolean> {
  const [tables] = await admin.query(
    "SELECT table_name AS t FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE'",
    [from],
  );
  const names = (tables as { t: string }[]).map((r) => r.t);
  if (!names.includes('__drizzle_migrations')) return false;
  await admin.query(`USE \`${to}\``);
  await admin.query('SET FOREIGN_KEY_CHECKS = 0');
  for (const t of names) {
    const [rows] = await admin.query(`SHOW CREATE TABLE \`${from}\`.\`${t}\``);
    await admin.query((rows as Record<string, string>[])[0]['Create Table']);
  }
  await admin.query(`INSERT INTO \`${to}\`.__drizzle_migrations SELECT * FROM \`${from}\`.__drizzle_migrations`);
  await admin.query('SET FOREIGN_KEY_CHECKS = 1');
  return true;
}

export async function createTestDatabase(): Promise<TestDatabase> {
  const base = new URL(baseDatabaseUrl());
  const baseName = base.pathname.slice(1) || 'slackline';
  const name = `${baseName}_${randomBytes(5).toString('hex')}`;
  const admin = await mysql.createConnection({ uri: base.toString() });
  try {
    await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
    // npm test migrates the base database first; copy its schema when it is there.
    await cloneSchema(admin, baseName, name);
  } finally {
    await admin.end();
  }
  const url = new URL(base.toString());
  url.pathname = `/${name}`;
  // Applies whatever the copy lacks (everything, when the base was never migrated).
  await runMigrations(url.toString());
  const handle = createDb(url.toString(), 5);

  const truncate = async () => {
    const conn = await handle.pool.getConnection();
    try {
      const [rows] = await conn.query(
        "SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE() AND table_name <> '__drizzle_migrations'",
      );
      await conn.query('SET FOREIGN_KEY_CHECKS = 0');
      for (const { t } of rows as { t: string }[]) await conn.query(`TRUNCATE TABLE \`${t}\``);
      await conn.query('SET FOREIGN_KEY_CHECKS = 1');
    } finally {
      conn.release();
    }
  };
  const drop = async () => {
    await handle.close();
    const c = await mysql.createConnection({ uri: base.toString() });
    try {
      await c.query(`DROP DATABASE IF EXISTS \`${name}\``);
    } finally {
      await c.end();
    }
  };
  return { url: url.toString(), handle, db: handle.db, truncate, drop };
}

/** Row count of a table (for "nothing stored half-way" checks). */
export async function countRows(handle: DbHandle, table: string): Promise<number> {
  const [rows] = await handle.pool.query(`SELECT COUNT(*) AS n FROM \`${table}\``);
  return Number((rows as { n: number }[])[0].n);
}

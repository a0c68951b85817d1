/** `tsx scripts/migrate.ts` — apply migrations to DATABASE_URL. */
import { runMigrations } from '../server/db/migrate';
import { DEFAULT_DATABASE_URL } from '../server/db/client';

const url = process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL;
runMigrations(url)
  .then(() => console.log('[slackline] migrations applied'))
  .catch((err: unknown) => {
    console.error('[slackline] migration failed:', err);
    process.exit(1);
  });

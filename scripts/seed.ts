/** `tsx scripts/seed.ts` — add the demo account, workspace and notebook to DATABASE_URL (idempotent). */
import { createDb, DEFAULT_DATABASE_URL } from '../server/db/client';
import { DEMO_USER, seedDemo, shouldSeedDemo } from '../server/seed/demo';
import { seedDemoNotebook } from '../server/seed/notebook';

if (!shouldSeedDemo(process.env)) {
  console.log('[slackline] demo data not created (NODE_ENV=production; set SEED_DEMO=true to create the demo account anyway)');
  process.exit(0);
}
const handle = createDb(process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, 1);
seedDemo(handle.db)
  .then(async (r) => {
    const fits = await seedDemoNotebook(handle.db, r);
    const created = [...r.created, ...fits];
    const what = created.length ? `created ${created.join(', ')}` : 'already present';
    console.log(`[slackline] demo data ${what}; sign in as ${DEMO_USER.email} / ${DEMO_USER.password}`);
  })
  .catch((err: unknown) => {
    console.error('[slackline] seeding failed:', err);
    process.exitCode = 1;
  })
  .finally(() => handle.close());

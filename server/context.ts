/** Dependencies every router receives. */
import type { Db } from './db/client';
import type { AppConfig } from './config';
import type { Clock } from './lib/clock';
import type { Mailer } from './mail/mailer';
import type { AppLucia } from './auth/lucia';

export interface AppDeps {
  db: Db;
  mailer: Mailer;
  clock: Clock;
  config: AppConfig;
  /** Answers whether the database is reachable (for /api/health). */
  pingDb: () => Promise<boolean>;
}

export interface AppContext extends AppDeps {
  lucia: AppLucia;
}

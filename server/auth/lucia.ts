/** Sessions with lucia 3 on the Drizzle MySQL adapter. */
import { Lucia, TimeSpan } from 'lucia';
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle';
import type { Db } from '../db/client';
import { sessions, users } from '../db/schema';

export const SESSION_COOKIE = 'slackline_session';

export function createLucia(db: Db) {
  const adapter = new DrizzleMySQLAdapter(db, sessions, users);
  return new Lucia(adapter, {
    sessionExpiresIn: new TimeSpan(30, 'd'),
    sessionCookie: {
      name: SESSION_COOKIE,
      expires: true,
      // `secure` is decided per request (req.secure) when the cookie is written; see auth/session.ts.
      attributes: { sameSite: 'lax' },
    },
    getUserAttributes: (attributes) => ({
      email: attributes.email,
      name: attributes.name,
      createdAt: attributes.createdAt,
    }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;

declare module 'lucia' {
  interface Register {
    Lucia: AppLucia;
    DatabaseUserAttributes: { email: string; name: string; createdAt: Date };
  }
}

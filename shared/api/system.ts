/** Health and the development-only mail capture. */
import { z } from 'zod';
import { idSchema, isoDateSchema } from './common';

export const healthResponse = z.object({
  status: z.enum(['ok', 'degraded']),
  database: z.enum(['up', 'down']),
});
export type HealthResponse = z.infer<typeof healthResponse>;

export const capturedMailSchema = z.object({
  id: idSchema,
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
  createdAt: isoDateSchema,
});
export type CapturedMail = z.infer<typeof capturedMailSchema>;

export const devMailQuery = z.strictObject({
  /** Only messages to this address (case-insensitive). */
  to: z.string().trim().toLowerCase().max(254).optional(),
  limit: z.coerce.number().int().min(1).max(200).optional(),
  /** The per-start key printed by `npm start`; once given, an HttpOnly cookie carries it. */
  key: z.string().max(128).optional(),
});
export const devMailResponse = z.object({
  messages: z.array(capturedMailSchema),
  /** 'all' with the per-start key; 'own' for a signed-in account without it (its own mail only). */
  scope: z.enum(['all', 'own']).optional(),
});
export type DevMailResponse = z.infer<typeof devMailResponse>;

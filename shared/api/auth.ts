/** Accounts and sessions. The session travels in an httpOnly cookie; no token in the body. */
import { z } from 'zod';
import { emailSchema, idSchema, isoDateSchema, nameSchema, passwordSchema, tokenSchema } from './common';

export const userSchema = z.object({
  id: idSchema,
  email: z.string(),
  name: z.string(),
  createdAt: isoDateSchema,
});
export type User = z.infer<typeof userSchema>;

export const signUpBody = z.strictObject({
  email: emailSchema,
  password: passwordSchema,
  name: nameSchema(80),
});
export type SignUpBody = z.input<typeof signUpBody>;

export const signInBody = z.strictObject({
  email: emailSchema,
  password: z.string({ error: 'Required' }).min(1, 'Required').max(256, 'At most 256 characters'),
});
export type SignInBody = z.input<typeof signInBody>;

export const userResponse = z.object({ user: userSchema });
export type UserResponse = z.infer<typeof userResponse>;

/** Always answers 202 whether or not the address is registered (no account enumeration). */
export const passwordResetRequestBody = z.strictObject({ email: emailSchema });
export type PasswordResetRequestBody = z.input<typeof passwordResetRequestBody>;

/** The token comes from the link in the e-mail: /reset-password?token=… */
export const passwordResetConfirmBody = z.strictObject({
  token: tokenSchema,
  password: passwordSchema,
});
export type PasswordResetConfirmBody = z.input<typeof passwordResetConfirmBody>;

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

/**
 * A page of this site to open once the account exists (e.g. `/invite/<token>`): no scheme, no
 * `//host`, no backslash right after the first slash, no spaces or control characters.
 */
export const nextPathSchema = z
  .string()
  .max(1000, 'At most 1000 characters')
  .regex(/^\/(?![/\\])[^\s\u0000-\u001F\u007F]*$/, 'Must be a path on this site');

export const signUpBody = z.strictObject({
  email: emailSchema,
  password: passwordSchema,
  name: nameSchema(80),
  /** Carried in the confirmation link, so the new account lands where it was heading. */
  next: nextPathSchema.optional(),
});
export type SignUpBody = z.input<typeof signUpBody>;

/** The one answer to every valid sign-up, for new and registered addresses alike (202, no session). */
export const SIGN_UP_ANSWER = 'Check your mail to finish creating your account' as const;
export const signUpResponse = z.object({ ok: z.literal(true), message: z.literal(SIGN_UP_ANSWER) });
export type SignUpResponse = z.infer<typeof signUpResponse>;

/** The token comes from the link in the confirmation e-mail: /confirm-sign-up?token=… */
export const confirmSignUpBody = z.strictObject({ token: tokenSchema });
export type ConfirmSignUpBody = z.input<typeof confirmSignUpBody>;

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

/** Password hashing with argon2id (@node-rs/argon2), OWASP's minimum parameters. */
import { hash, verify } from '@node-rs/argon2';

// Algorithm.Argon2id is a const enum in the package's typings; its value is 2.
const ARGON2ID = 2;
const OPTIONS = { algorithm: ARGON2ID, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | null = null;
/** Spend the same time as a real check when the account does not exist (no timing oracle). */
export async function verifyDummy(password: string): Promise<void> {
  dummyHash ??= hashPassword('slackline-dummy-password');
  await verifyPassword(await dummyHash, password);
}

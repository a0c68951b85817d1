/** Identifiers and secret tokens. */
import { createHash, randomBytes } from 'node:crypto';
import { generateIdFromEntropySize } from 'lucia';

/** 80 random bits as 16 lowercase base32 characters. */
export const newId = (): string => generateIdFromEntropySize(10);

/** 256 random bits, URL-safe; only its hash is stored. */
export const newToken = (): string => randomBytes(32).toString('base64url');

/** SHA-256 hex: what the database keeps of a token. */
export const hashToken = (token: string): string => createHash('sha256').update(token, 'utf8').digest('hex');

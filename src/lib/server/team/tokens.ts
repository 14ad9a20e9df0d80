// Invitation tokens: 32 random bytes as base64url go into the mail; the database keeps only
// their SHA-256, so reading the table (or a backup) gives no working link.
import { createHash, randomBytes } from 'node:crypto';

export const newToken = () => randomBytes(32).toString('base64url');

export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

/** A token as we make them: 43 base64url characters. Anything else is not looked up. */
export const looksLikeToken = (token: string) => /^[A-Za-z0-9_-]{43}$/.test(token);

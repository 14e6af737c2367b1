import { createHash, randomBytes } from 'node:crypto';

/** A one-time token for an e-mailed link: 32 random bytes; only its SHA-256 is stored. */
export function newOneTimeToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, tokenHash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

import crypto from 'node:crypto';

/** 32 random bytes, URL-safe. Only its SHA-256 is stored, so a database leak does not leak live links. */
export function newToken(): { token: string; hash: string } {
  const token = crypto.randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return crypto.createHash('sha256').update(token).digest('hex');
}

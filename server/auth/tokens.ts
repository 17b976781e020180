import { randomBytes } from 'node:crypto';
import { sha256 } from '../integrations/tokens.repository';

/** A random single-use token (256 bits, URL-safe) and the hash that is stored in its place. */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: sha256(token) };
}

export { sha256 };

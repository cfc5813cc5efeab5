/** Sign-in tokens (JWT, HS256) carrying the user id and the user's token version. */
import jwt from 'jsonwebtoken';
import { createHash, randomBytes } from 'node:crypto';
import type { Clock } from '../../clock';
import type { Config } from '../../config';
import type { User } from '../users/user.entity';

interface TokenClaims {
  sub: string;
  tv: number;
}

export function signSessionToken(config: Config, clock: Clock, user: User): string {
  const iat = Math.floor(clock.now().getTime() / 1000);
  return jwt.sign({ tv: user.tokenVersion, iat }, config.jwtSecret, {
    algorithm: 'HS256',
    subject: user.id,
    expiresIn: config.jwtTtlSeconds,
  });
}

/** The claims of a valid token, or null for a bad, tampered or expired one. */
export function verifySessionToken(config: Config, clock: Clock, token: string): TokenClaims | null {
  try {
    const payload = jwt.verify(token, config.jwtSecret, {
      algorithms: ['HS256'],
      clockTimestamp: Math.floor(clock.now().getTime() / 1000),
    });
    // A token without an expiry is never accepted, however it was signed.
    if (typeof payload !== 'object' || typeof payload.sub !== 'string' || typeof payload['tv'] !== 'number' || typeof payload.exp !== 'number') return null;
    return { sub: payload.sub, tv: payload['tv'] as number };
  } catch {
    return null;
  }
}

/** A random single-use link token (for invitations and password resets) and the hash we store. */
export function newLinkToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashLinkToken(token) };
}

export function hashLinkToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

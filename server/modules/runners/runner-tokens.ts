/** Runner tokens: `nwr_` + 43 url-safe base64 characters (32 random bytes); only their SHA-256 hash is stored. */
import { createHash, randomBytes } from 'node:crypto';
import { RUNNER_TOKEN_PATTERN, RUNNER_TOKEN_PREFIX } from '../../../shared/api/runner-jobs';

export function newRunnerToken(): string {
  return `${RUNNER_TOKEN_PREFIX}${randomBytes(32).toString('base64url')}`;
}

export function hashRunnerToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

export function looksLikeRunnerToken(token: string): boolean {
  return RUNNER_TOKEN_PATTERN.test(token);
}

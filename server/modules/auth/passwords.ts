/**
 * Password hashing with bcrypt (bcryptjs); cost from config (10 by default, at least 10 in production,
 * lower only in tests). The work runs in the CPU pool's worker threads, never on the event loop.
 */
import { cpuPool } from '../../workers/cpu-pool';

export function hashPassword(password: string, cost: number): Promise<string> {
  return cpuPool.hash(password, cost);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return cpuPool.compare(password, hash);
}

const dummyHashes = new Map<number, Promise<string>>();

/**
 * Spends the same time as a real check when the e-mail is unknown, so response times do not tell
 * whether an account exists.
 */
export async function verifyAgainstDummy(password: string, cost: number): Promise<false> {
  let dummy = dummyHashes.get(cost);
  if (!dummy) {
    dummy = cpuPool.hash('not-a-real-password', cost);
    dummy.catch(() => dummyHashes.delete(cost));
    dummyHashes.set(cost, dummy);
  }
  await cpuPool.compare(password, await dummy);
  return false;
}

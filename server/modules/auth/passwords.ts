/** Password hashing with bcrypt (bcryptjs); cost from config (10 by default, lower only in tests). */
import bcrypt from 'bcryptjs';

export function hashPassword(password: string, cost: number): Promise<string> {
  return bcrypt.hash(password, cost);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

const dummyHashes = new Map<number, Promise<string>>();

/**
 * Spends the same time as a real check when the e-mail is unknown, so response times do not tell
 * whether an account exists.
 */
export async function verifyAgainstDummy(password: string, cost: number): Promise<false> {
  let dummy = dummyHashes.get(cost);
  if (!dummy) {
    dummy = bcrypt.hash('not-a-real-password', cost);
    dummyHashes.set(cost, dummy);
  }
  await bcrypt.compare(password, await dummy);
  return false;
}

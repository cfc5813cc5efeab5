/**
 * The rules for a new password beyond its length (OWASP ASVS 4.0 level 1, chapter 2.1): not the account's
 * e-mail address (or its part before the @), not on the common-password list, and a zxcvbn score of at
 * least `MIN_PASSWORD_SCORE` (3 of 4: "safely unguessable" in zxcvbn's own scale). Seeding does not pass
 * through here, so the demo password keeps working for the demo people.
 */
import { validationFailed } from '../../http-error';
import { cpuPool } from '../../workers/cpu-pool';

export const MIN_PASSWORD_SCORE = 3;

/** Throws a 422 on `field` when the password may not be used. */
export async function checkNewPassword(password: string, person: { email: string; displayName?: string }, field: string): Promise<void> {
  const email = person.email.trim().toLowerCase();
  const local = email.split('@')[0] ?? '';
  const typed = password.trim().toLowerCase();
  if (typed === email || (local.length >= 3 && typed === local)) {
    throw validationFailed({ [field]: 'Do not use your e-mail address as the password: choose a phrase of several unrelated words.' });
  }
  const inputs = [email, local, ...(person.displayName ? [person.displayName] : []), 'noisewright'];
  const strength = await cpuPool.strength(password, inputs);
  if (strength.common) {
    throw validationFailed({ [field]: 'This password is on the list of the most common passwords: choose a phrase of several unrelated words.' });
  }
  if (strength.score < MIN_PASSWORD_SCORE) {
    const why = strength.warning ? `${strength.warning.replace(/\.?$/, '.')} ` : '';
    throw validationFailed({ [field]: `This password is too easy to guess. ${why}Use a longer phrase of several unrelated words.` });
  }
}

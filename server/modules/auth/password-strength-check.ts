/**
 * zxcvbn (`@zxcvbn-ts/core` with the common and English dictionaries) on one password: its score 0–4 and
 * whether the whole password is on the list of common passwords. Runs in the CPU pool (a check takes
 * 20–60 ms, the first one longer while the dictionaries load).
 */
import type { ZxcvbnFactory } from '@zxcvbn-ts/core';

export interface PasswordStrength {
  score: number;
  common: boolean;
  warning: string | null;
}

let factory: ZxcvbnFactory | null = null;

/** The dictionaries are loaded on the first check (a thread that only hashes never loads them). */
export async function passwordStrength(password: string, userInputs: string[]): Promise<PasswordStrength> {
  if (!factory) {
    const [{ ZxcvbnFactory: Factory }, common, en] = await Promise.all([
      import('@zxcvbn-ts/core'),
      import('@zxcvbn-ts/language-common'),
      import('@zxcvbn-ts/language-en'),
    ]);
    factory = new Factory({
      dictionary: { ...common.dictionary, ...en.dictionary },
      graphs: common.adjacencyGraphs,
      translations: en.translations,
    });
  }
  const result = factory.check(password, userInputs);
  const whole = password.trim().toLowerCase();
  const isCommon = result.sequence.some(
    (m) => m.pattern === 'dictionary' && (m as { dictionaryName?: string }).dictionaryName === 'passwords' && m.token.toLowerCase() === whole,
  );
  return { score: result.score, common: isCommon, warning: result.feedback.warning ?? null };
}

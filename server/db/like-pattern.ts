/**
 * LIKE patterns from user text: `%`, `_` and the escape character itself are escaped, so a search for
 * "50%" or "a_b" finds exactly that text (SQLite: `... like ? escape '\'`; ASCII letters ignore case).
 */
export const LIKE_ESCAPE = '\\';

export function escapeLike(text: string): string {
  return text.replace(/[\\%_]/g, (c) => `${LIKE_ESCAPE}${c}`);
}

/** The pattern that finds `text` anywhere in a value. */
export function likeContains(text: string): string {
  return `%${escapeLike(text)}%`;
}

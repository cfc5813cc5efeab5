/**
 * Case-insensitive substring search over `corpus_words.word` in SQLite. SQLite's own `lower()`, `LIKE` and
 * `NOCASE` fold only ASCII letters, so "ÄR" would miss "ärger". Instead the search text becomes a GLOB
 * pattern in which every letter is a character class of its case forms (`harb` → `*[hH][aA][rR][bB]*`):
 * GLOB compares whole UTF-8 characters, the count and the paging stay in SQL, and every stored spelling stays
 * its own row. Case forms are taken one character at a time (JavaScript's `toLowerCase` / `toUpperCase`);
 * forms that change the length (`ß` → `SS`) are not matched.
 */

/** Characters with a meaning in a GLOB pattern outside a class; wrapped in a one-character class. */
const GLOB_SPECIAL = new Set(['*', '?', '[']);

/** The single-character case forms of one character, itself first. */
function caseForms(ch: string): string[] {
  const forms = [ch, ch.toLowerCase(), ch.toUpperCase(), ch.toUpperCase().toLowerCase(), ch.toLowerCase().toUpperCase()];
  return [...new Set(forms.filter((f) => [...f].length === 1))];
}

/** The GLOB pattern that finds `query` anywhere in a word, ignoring letter case (NFC first, as words are stored). */
export function caseInsensitiveGlob(query: string): string {
  let pattern = '*';
  for (const ch of query.normalize('NFC')) {
    const forms = caseForms(ch);
    if (forms.length > 1) pattern += `[${forms.join('')}]`;
    else pattern += GLOB_SPECIAL.has(ch) ? `[${ch}]` : ch;
  }
  return `${pattern}*`;
}

/**
 * The one rule for text sent to the server, used by every zod schema of shared/api and by the server's
 * request guard: no NUL or other control characters (C0 U+0000–U+001F, DEL, C1 U+0080–U+009F), no
 * bidirectional overrides or isolates (U+202A–U+202E, U+2066–U+2069; they can make text read differently
 * from what it holds). A tab is allowed only where it separates fields (corpus files, parsed elsewhere);
 * line breaks only in multi-line fields (descriptions).
 */
import { z } from 'zod';

export interface TextAllowance {
  /** Accept LF and CR (multi-line fields such as descriptions). */
  lineBreaks?: boolean;
  /** Accept a tab (only where it is a separator). */
  tab?: boolean;
}

const BIDI = /[\u202a-\u202e\u2066-\u2069]/;
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/g;

const BIDI_NAMES: Record<string, string> = {
  '\u202a': 'left-to-right embedding',
  '\u202b': 'right-to-left embedding',
  '\u202c': 'pop directional formatting',
  '\u202d': 'left-to-right override',
  '\u202e': 'right-to-left override',
  '\u2066': 'left-to-right isolate',
  '\u2067': 'right-to-left isolate',
  '\u2068': 'first strong isolate',
  '\u2069': 'pop directional isolate',
};

export function codePointLabel(c: string): string {
  return `U+${(c.codePointAt(0) ?? 0).toString(16).toUpperCase().padStart(4, '0')}`;
}

/** The first character the rule refuses, described for a message; null when the text is fine. */
export function unsafeTextProblem(value: string, allow: TextAllowance = {}): string | null {
  CONTROL.lastIndex = 0;
  for (let m = CONTROL.exec(value); m; m = CONTROL.exec(value)) {
    const c = m[0];
    if (c === '\t' && allow.tab) continue;
    if ((c === '\n' || c === '\r') && allow.lineBreaks) continue;
    if (c === '\u0000') return 'Remove the NUL character (U+0000): text cannot contain it.';
    if (c === '\n' || c === '\r') return `Remove the line break (${codePointLabel(c)}): this field holds one line.`;
    if (c === '\t') return 'Remove the tab (U+0009): this field holds no tabs.';
    return `Remove the control character ${codePointLabel(c)}: text cannot contain control characters.`;
  }
  const bidi = BIDI.exec(value);
  if (bidi) {
    return `Remove the ${BIDI_NAMES[bidi[0]]} (${codePointLabel(bidi[0])}): direction controls can make text read differently from what it holds.`;
  }
  return null;
}

/** A zod string that follows the text rule. `required` is the message when the field is missing. */
export function safeText(required = 'Send this field as text.', allow: TextAllowance = {}) {
  return z
    .string({
      error: (issue) => (issue.input === undefined || issue.input === null ? required : 'Send this field as text.'),
    })
    .superRefine((value, ctx) => {
      const problem = unsafeTextProblem(value, allow);
      if (problem) ctx.addIssue({ code: 'custom', message: problem });
    });
}

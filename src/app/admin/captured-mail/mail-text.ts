/** A piece of a plain-text e-mail: either text or a link. */
export type MailPiece = { kind: 'text'; text: string } | { kind: 'link'; href: string; localPath: string | null };

const URL_PATTERN = /https?:\/\/[^\s<>"')\]]+/g;

/** Client routes an e-mail may point to; such links can also be opened on the server being viewed. */
const APP_PATHS = /^\/(invite|reset-password|sign-in|sign-up|benches)(\/|$|\?)/;

/**
 * Splits e-mail text into text and links. `localPath` is the path of a link into this app whose origin
 * differs from `currentOrigin`, so the page can offer it on the server being viewed even when the mail's
 * base address (PUBLIC_URL) points elsewhere.
 */
export function splitMailText(text: string, currentOrigin = ''): MailPiece[] {
  const pieces: MailPiece[] = [];
  let last = 0;
  for (const match of text.matchAll(URL_PATTERN)) {
    const start = match.index ?? 0;
    const href = match[0].replace(/[.,;:!?]+$/, '');
    if (start > last) pieces.push({ kind: 'text', text: text.slice(last, start) });
    let localPath: string | null = null;
    try {
      const url = new URL(href);
      const path = url.pathname + url.search;
      localPath = APP_PATHS.test(path) && url.origin !== currentOrigin ? path : null;
    } catch {
      localPath = null;
    }
    pieces.push({ kind: 'link', href, localPath });
    last = start + href.length;
  }
  if (last < text.length) pieces.push({ kind: 'text', text: text.slice(last) });
  return pieces;
}

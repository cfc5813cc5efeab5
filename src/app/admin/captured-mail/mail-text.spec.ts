import { splitMailText } from './mail-text';

describe('splitMailText', () => {
  it('turns the links of a plain-text e-mail into link pieces and keeps the text around them', () => {
    const text = 'Ada invites you to Lab.\nOpen http://localhost:4300/invite/abc-123 to accept.\nThanks';
    expect(splitMailText(text)).toEqual([
      { kind: 'text', text: 'Ada invites you to Lab.\nOpen ' },
      { kind: 'link', href: 'http://localhost:4300/invite/abc-123', localPath: '/invite/abc-123' },
      { kind: 'text', text: ' to accept.\nThanks' },
    ]);
  });

  it('leaves sentence punctuation out of the link and gives no local path for links outside the app', () => {
    const pieces = splitMailText('See https://example.org/help. Or reset at https://nw.example/reset-password/t0k.');
    expect(pieces.filter((p) => p.kind === 'link')).toEqual([
      { kind: 'link', href: 'https://example.org/help', localPath: null },
      { kind: 'link', href: 'https://nw.example/reset-password/t0k', localPath: '/reset-password/t0k' },
    ]);
    expect(pieces.map((p) => (p.kind === 'text' ? p.text : p.href)).join('')).toBe(
      'See https://example.org/help. Or reset at https://nw.example/reset-password/t0k.',
    );
  });

  it('gives no local path when the link already points to the server being viewed', () => {
    const [, link] = splitMailText('Open http://127.0.0.1:4300/invite/x now', 'http://127.0.0.1:4300');
    expect(link).toEqual({ kind: 'link', href: 'http://127.0.0.1:4300/invite/x', localPath: null });
  });

  it('returns the text unchanged when there is no link', () => {
    expect(splitMailText('No links here.')).toEqual([{ kind: 'text', text: 'No links here.' }]);
  });
});

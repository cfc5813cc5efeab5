import { appendFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { Mailbox } from './mailbox';
import { invitationMail, passwordResetMail } from './mail-templates';

describe('mail templates', () => {
  it('builds invitation links from PUBLIC_URL and the client route, and escapes names in HTML', () => {
    const mail = invitationMail({
      to: 'a@example.org',
      publicUrl: 'https://bench.example.org',
      token: 'tok_en-1',
      benchName: '<b>Owls & "larks"</b>',
      inviterName: 'Rue <script>',
      role: 'coach',
      expiresAt: new Date('2026-03-08T09:00:00Z'),
    });
    expect(mail.text).toContain('https://bench.example.org/invite/tok_en-1');
    expect(mail.html).toContain('href="https://bench.example.org/invite/tok_en-1"');
    expect(mail.html).not.toContain('<script>');
    expect(mail.html).toContain('&lt;b&gt;Owls &amp; &quot;larks&quot;&lt;/b&gt;');
    expect(mail.text).toContain('as coach');
  });

  it('builds reset links to /reset-password/:token', () => {
    const mail = passwordResetMail({ to: 'a@example.org', publicUrl: 'http://localhost:4300', token: 'abc', displayName: 'Ada' });
    expect(mail.text).toContain('http://localhost:4300/reset-password/abc');
    expect(mail.text).toMatch(/one hour/);
  });
});

describe('Mailbox', () => {
  it('keeps the newest messages first, up to its capacity', () => {
    const box = new Mailbox({ capacity: 3 });
    for (let i = 1; i <= 5; i++) box.add({ from: 'x', to: `p${i}@example.org`, subject: `s${i}`, text: '', html: '' });
    expect(box.list().map((m) => m.subject)).toEqual(['s5', 's4', 's3']);
  });

  it('reloads captured mail from its file after a restart and skips a torn last line', () => {
    const dir = mkdtempSync(join(tmpdir(), 'noisewright-mailbox-'));
    try {
      const file = join(dir, 'mail.jsonl');
      const first = new Mailbox({ file });
      first.add({ from: 'x', to: 'a@example.org', subject: 'one', text: 't', html: '' });
      first.add({ from: 'x', to: 'b@example.org', subject: 'two', text: 't', html: '' });
      appendFileSync(file, '{"id": "torn');
      const second = new Mailbox({ file });
      expect(second.list().map((m) => m.subject)).toEqual(['two', 'one']);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('waitFor resolves when a matching message arrives later, and rejects after its timeout', async () => {
    const box = new Mailbox();
    const waiting = box.waitFor((m) => m.to === 'late@example.org', 2000);
    box.add({ from: 'x', to: 'other@example.org', subject: 'no', text: '', html: '' });
    box.add({ from: 'x', to: 'late@example.org', subject: 'yes', text: '', html: '' });
    expect((await waiting).subject).toBe('yes');
    await expect(box.waitFor(() => false, 20)).rejects.toThrow(/No matching mail/);
  });
});

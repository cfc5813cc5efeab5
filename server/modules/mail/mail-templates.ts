/** The e-mails we send: plain text plus a simple HTML version. Links are PUBLIC_URL + client routes. */
import type { Role } from '../../../shared/api/types';
import type { OutgoingMail } from './mailer';

function escapeHtml(value: string): string {
  return value
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

function htmlPage(paragraphs: string[], link: { href: string; label: string }): string {
  const body = paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join('\n');
  return `<!doctype html>
<html><body style="font-family: sans-serif; color: #1f2a2a; background: #faf7f0; padding: 16px;">
${body}
<p><a href="${escapeHtml(link.href)}" style="color: #0b5e5e; font-weight: bold;">${escapeHtml(link.label)}</a></p>
<p style="color: #666; font-size: 12px;">If the button does not work, copy this address into your browser:<br>${escapeHtml(link.href)}</p>
</body></html>`;
}

export function invitationLink(publicUrl: string, token: string): string {
  return `${publicUrl}/invite/${encodeURIComponent(token)}`;
}

export function resetLink(publicUrl: string, token: string): string {
  return `${publicUrl}/reset-password/${encodeURIComponent(token)}`;
}

export function invitationMail(data: {
  to: string;
  publicUrl: string;
  token: string;
  benchName: string;
  inviterName: string;
  role: Role;
  expiresAt: Date;
}): OutgoingMail {
  const link = invitationLink(data.publicUrl, data.token);
  const lines = [
    `${data.inviterName} invited you to the bench "${data.benchName}" on Noisewright as ${data.role}.`,
    `Open the link below to accept. It works once and until ${data.expiresAt.toUTCString()}.`,
    `If you have no account yet, you can create one with this e-mail address (${data.to}) on the same page.`,
    'If you did not expect this invitation, ignore this e-mail.',
  ];
  return {
    to: data.to,
    subject: `Invitation to the bench "${data.benchName}" on Noisewright`,
    text: `${lines.join('\n\n')}\n\n${link}\n`,
    html: htmlPage(lines, { href: link, label: 'Accept the invitation' }),
  };
}

export function passwordResetMail(data: { to: string; publicUrl: string; token: string; displayName: string }): OutgoingMail {
  const link = resetLink(data.publicUrl, data.token);
  const lines = [
    `Hello ${data.displayName},`,
    'someone (hopefully you) asked to reset the password of your Noisewright account.',
    'Open the link below within one hour to choose a new password. It works once.',
    'If you did not ask for this, ignore this e-mail: your password stays as it is.',
  ];
  return {
    to: data.to,
    subject: 'Reset your Noisewright password',
    text: `${lines.join('\n\n')}\n\n${link}\n`,
    html: htmlPage(lines, { href: link, label: 'Choose a new password' }),
  };
}

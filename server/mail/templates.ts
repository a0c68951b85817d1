/** The product's e-mails (plain text with a simple HTML twin; names are escaped in HTML). */
import type { OutgoingMail } from './mailer';

const esc = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export function invitationMail(p: {
  to: string;
  inviterName: string;
  workspaceName: string;
  role: string;
  link: string;
  expiresAt: Date;
}): OutgoingMail {
  const until = p.expiresAt.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
  return {
    to: p.to,
    subject: `${p.inviterName} invited you to "${p.workspaceName}" on Slackline`,
    text:
      `${p.inviterName} invited you to the Slackline workspace "${p.workspaceName}" as ${p.role}.\n\n` +
      `Accept the invitation (sign in or create an account with this e-mail address first):\n${p.link}\n\n` +
      `The link works until ${until}. If you did not expect this, ignore this message.\n`,
    html:
      `<p>${esc(p.inviterName)} invited you to the Slackline workspace <strong>${esc(p.workspaceName)}</strong> as ${esc(p.role)}.</p>` +
      `<p><a href="${esc(p.link)}">Accept the invitation</a> (sign in or create an account with this e-mail address first).</p>` +
      `<p>The link works until ${esc(until)}. If you did not expect this, ignore this message.</p>`,
  };
}

export function passwordResetMail(p: { to: string; name: string; link: string }): OutgoingMail {
  return {
    to: p.to,
    subject: 'Reset your Slackline password',
    text:
      `Hello ${p.name},\n\nsomeone (hopefully you) asked to reset the password of this Slackline account.\n` +
      `Choose a new password here; the link works once, within one hour:\n${p.link}\n\n` +
      `If you did not ask for this, ignore this message; your password stays as it is.\n`,
    html:
      `<p>Hello ${esc(p.name)},</p><p>someone (hopefully you) asked to reset the password of this Slackline account.</p>` +
      `<p><a href="${esc(p.link)}">Choose a new password</a>; the link works once, within one hour.</p>` +
      `<p>If you did not ask for this, ignore this message; your password stays as it is.</p>`,
  };
}

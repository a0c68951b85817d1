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
    // The subject carries no sender-chosen text: names chosen by whoever invites stay in the body,
    // quoted, where they read as what they are.
    subject: 'You are invited to a workspace on Slackline',
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

/** Sent instead of telling a stranger that an address already has an account. */
export function signUpAttemptMail(p: { to: string; name: string; signInLink: string; resetLink: string }): OutgoingMail {
  return {
    to: p.to,
    subject: 'Someone tried to create a Slackline account with your address',
    text:
      `Hello ${p.name},\n\nsomeone just tried to create a new Slackline account with this e-mail address, which already has one.\n` +
      `If it was you, sign in instead:\n${p.signInLink}\n\nForgot your password? Ask for a new one here:\n${p.resetLink}\n\n` +
      `If it was not you, nothing changed: no second account was made and your password stays as it is.\n`,
    html:
      `<p>Hello ${esc(p.name)},</p><p>someone just tried to create a new Slackline account with this e-mail address, which already has one.</p>` +
      `<p>If it was you, <a href="${esc(p.signInLink)}">sign in</a> instead. Forgot your password? <a href="${esc(p.resetLink)}">Ask for a new one</a>.</p>` +
      `<p>If it was not you, nothing changed: no second account was made and your password stays as it is.</p>`,
  };
}

/** Sent to a new address: the account exists only once this link is used. */
export function signUpConfirmationMail(p: { to: string; name: string; link: string; expiresAt: Date }): OutgoingMail {
  const until = p.expiresAt.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
  return {
    to: p.to,
    subject: 'Confirm your address to finish creating your Slackline account',
    text:
      `Hello ${p.name},\n\nsomeone (hopefully you) asked to create a Slackline account with this e-mail address.\n` +
      `Open this link to confirm the address and create the account; it works once, until ${until}:\n${p.link}\n\n` +
      `If you did not ask for this, ignore this message: no account is created without the link.\n`,
    html:
      `<p>Hello ${esc(p.name)},</p><p>someone (hopefully you) asked to create a Slackline account with this e-mail address.</p>` +
      `<p><a href="${esc(p.link)}">Confirm the address and create the account</a>; the link works once, until ${esc(until)}.</p>` +
      `<p>If you did not ask for this, ignore this message: no account is created without the link.</p>`,
  };
}

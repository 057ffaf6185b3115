import { escapeHtml } from '../../lib/text.ts';
import { ROLE_LABELS, type Role } from '../../lib/auth/permissions.ts';

export interface MailContent {
  to: string;
  subject: string;
  text: string;
  html: string;
}

function layout(title: string, bodyHtml: string): string {
  return `<!doctype html><html><body style="font-family:Inter,Arial,sans-serif;color:#1f262b;background:#fbf7f1;padding:24px">
<div style="max-width:560px;margin:auto;background:#fff;border:1px solid #e8d3b5;border-radius:8px;padding:24px">
<p style="margin:0 0 16px;font-weight:700;color:#7c4728">Tallypost</p>
<h1 style="font-size:18px;margin:0 0 12px">${escapeHtml(title)}</h1>
${bodyHtml}
</div></body></html>`;
}

function button(url: string, label: string): string {
  return `<p><a href="${escapeHtml(url)}" style="display:inline-block;background:#7c4728;color:#fff;padding:10px 16px;border-radius:6px;text-decoration:none">${escapeHtml(label)}</a></p>
<p style="font-size:12px;color:#5e717e">Or open this link: ${escapeHtml(url)}</p>`;
}

export function invitationMail(a: { to: string; company: string; inviter: string; role: Role; url: string }): MailContent {
  const role = ROLE_LABELS[a.role] ?? a.role;
  const subject = `${a.inviter} invited you to ${a.company} on Tallypost`;
  return {
    to: a.to,
    subject,
    text: `${a.inviter} invited you to join ${a.company} on Tallypost as ${role}.\n\nAccept the invitation: ${a.url}\n\nThe link is good for 7 days.`,
    html: layout(subject, `<p>${escapeHtml(a.inviter)} invited you to join <b>${escapeHtml(a.company)}</b> as <b>${escapeHtml(role)}</b>.</p>${button(a.url, 'Accept the invitation')}<p>The link is good for 7 days.</p>`),
  };
}

export function passwordResetMail(a: { to: string; name: string; url: string }): MailContent {
  const subject = 'Reset your Tallypost password';
  return {
    to: a.to,
    subject,
    text: `Hello ${a.name},\n\nSomeone asked to reset the password of this account. If it was you, open: ${a.url}\n\nThe link is good for one hour. If it was not you, ignore this e-mail.`,
    html: layout(subject, `<p>Hello ${escapeHtml(a.name)},</p><p>Someone asked to reset the password of this account. If it was you:</p>${button(a.url, 'Choose a new password')}<p>The link is good for one hour. If it was not you, ignore this e-mail.</p>`),
  };
}

export function verifyEmailMail(a: { to: string; name: string; url: string }): MailContent {
  const subject = 'Confirm your e-mail for Tallypost';
  return {
    to: a.to,
    subject,
    text: `Hello ${a.name},\n\nConfirm that this address is yours to finish setting up your Tallypost account: ${a.url}\n\nThe link is good for 24 hours and signs you in. If you did not sign up, ignore this e-mail.`,
    html: layout(subject, `<p>Hello ${escapeHtml(a.name)},</p><p>Confirm that this address is yours to finish setting up your Tallypost account.</p>${button(a.url, 'Confirm my e-mail')}<p>The link is good for 24 hours and signs you in. If you did not sign up, ignore this e-mail.</p>`),
  };
}

/**
 * To the holder of an address someone tried to sign up with again: nothing changed. An
 * account never confirmed is told how to finish (sign in, which mails a fresh link).
 */
export function signUpAttemptMail(a: { to: string; name: string; confirmed: boolean; signInUrl: string; resetUrl: string }): MailContent {
  const subject = 'Someone tried to sign up with your e-mail';
  const what = a.confirmed
    ? 'Someone tried to create a Tallypost account with this e-mail address, which already has one. Nothing was changed.'
    : 'Someone tried to create a Tallypost account with this e-mail address, which already has one that was never confirmed. Nothing was changed.';
  const next = a.confirmed
    ? 'If it was you, sign in'
    : 'If it was you, sign in with the password you chose and we will send a new confirmation link';
  return {
    to: a.to,
    subject,
    text: `Hello ${a.name},\n\n${what}\n\n${next}: ${a.signInUrl}\nForgot your password? Choose a new one: ${a.resetUrl}\n\nIf it was not you, you can ignore this e-mail.`,
    html: layout(subject, `<p>Hello ${escapeHtml(a.name)},</p><p>${escapeHtml(what)}</p><p>${escapeHtml(next)}:</p>${button(a.signInUrl, 'Sign in')}<p>Forgot your password? <a href="${escapeHtml(a.resetUrl)}">Choose a new one</a>.</p><p>If it was not you, you can ignore this e-mail.</p>`),
  };
}

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

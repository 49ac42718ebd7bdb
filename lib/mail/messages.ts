import { ROLE_LABEL, type Role } from '@/lib/auth/roles';
import type { OutgoingMail } from './transport';
import { formatDay, formatWhen } from './format';

/**
 * Every message Ebbcast sends, in our own words, as a plain-text and an HTML part. Messages carry
 * aggregate figures and links only: never a name or detail of a patient.
 */

export const esc = (s: string) =>
  s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');

export { formatWhen, formatDay };

const FOOTER_TEXT =
  'Ebbcast keeps aggregate counts per site and day only; this message holds no patient details.\n' +
  'If you did not expect it, you can ignore it.';

export function layout(title: string, bodyHtml: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${esc(title)}</title></head>
<body style="margin:0;padding:0;background:#F7F4EC;color:#1D2433;font-family:Verdana,Arial,sans-serif;font-size:16px;line-height:1.5">
<div style="max-width:600px;margin:0 auto;padding:24px">
<p style="margin:0 0 16px;font-weight:bold;color:#1F6F78;letter-spacing:.04em">EBBCAST</p>
<h1 style="font-size:22px;margin:0 0 16px">${esc(title)}</h1>
${bodyHtml}
<p style="margin:32px 0 0;font-size:13px;color:#4a5060">${esc(FOOTER_TEXT).replace(/\n/g, '<br>')}</p>
</div></body></html>`;
}

export const button = (href: string, label: string) =>
  `<p style="margin:24px 0"><a href="${esc(href)}" style="display:inline-block;background:#1F6F78;color:#ffffff;text-decoration:none;font-weight:bold;padding:12px 20px;border-radius:8px">${esc(label)}</a></p>`;

const para = (s: string) => `<p style="margin:0 0 12px">${esc(s)}</p>`;

export interface InvitationMailInput {
  to: string;
  name: string;
  inviterName: string;
  role: Role;
  /** Teams and outbreaks the account will work in, by name. */
  places: string[];
  link: string;
  expiresAt: Date;
}

export function invitationMail(p: InvitationMailInput): OutgoingMail {
  const role = ROLE_LABEL[p.role];
  const where = p.places.length ? ` for ${p.places.join(', ')}` : '';
  const subject = `You are invited to Ebbcast as ${role.toLowerCase()}`;
  const lines = [
    `Hello ${p.name},`,
    `${p.inviterName} has set up an Ebbcast account for you: ${role}${where}.`,
    'Open the link below to choose your password (at least 12 characters). The account becomes active as soon as you do.',
  ];
  const expiry = `The link works once and expires on ${formatWhen(p.expiresAt)}.`;
  const text = [...lines, '', p.link, '', expiry, '', FOOTER_TEXT].join('\n');
  const html = layout(subject, lines.map(para).join('') + button(p.link, 'Choose my password') + para(expiry) +
    `<p style="margin:0 0 12px;font-size:13px;word-break:break-all">${esc(p.link)}</p>`);
  return { to: p.to, subject, text, html };
}

export interface ResetMailInput {
  to: string;
  name: string;
  link: string;
  expiresAt: Date;
}

export function resetMail(p: ResetMailInput): OutgoingMail {
  const subject = 'Your Ebbcast password reset link';
  const lines = [
    `Hello ${p.name},`,
    'Someone — probably you — asked to reset the password of your Ebbcast account.',
    'Open the link below to choose a new password (at least 12 characters). Devices signed in with the old password will be asked to sign in again.',
  ];
  const expiry = `The link works once and expires on ${formatWhen(p.expiresAt)} (one hour after it was asked for). If you did not ask, do nothing: your password stays as it is.`;
  const text = [...lines, '', p.link, '', expiry, '', FOOTER_TEXT].join('\n');
  const html = layout(subject, lines.map(para).join('') + button(p.link, 'Choose a new password') + para(expiry) +
    `<p style="margin:0 0 12px;font-size:13px;word-break:break-all">${esc(p.link)}</p>`);
  return { to: p.to, subject, text, html };
}

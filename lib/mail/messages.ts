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

export interface SitrepMailInput {
  to: string;
  recipientName: string;
  senderName: string;
  outbreakName: string;
  figures: Array<{ label: string; value: string; reading: string }>;
  forecastLine: string | null;
  link: string;
  cutoff: string | null;
}

/** The sitrep summary: the key figures as on the page, and the link to the full report. */
export function sitrepMail(p: SitrepMailInput): OutgoingMail {
  const subject = `Sitrep ${p.outbreakName}${p.cutoff ? ` — data to ${formatDay(p.cutoff)}` : ''}`;
  const intro = `${p.senderName} sent you the situation report of ${p.outbreakName}.`;
  const caution = 'A model run is a scenario, not a prediction. Decisions rest with the local public-health authority and licensed clinical practice.';
  const text = [
    `Hello ${p.recipientName},`, '', intro, '', 'Key figures',
    ...p.figures.map((f) => `- ${f.label}: ${f.value} — ${f.reading}`),
    ...(p.forecastLine ? ['', p.forecastLine] : []),
    '', `The full report, with the epidemic curve, the forecast bands, bed demand, the scenarios and the assumptions (printable on A4):`, p.link,
    '', caution, '', FOOTER_TEXT,
  ].join('\n');
  const rows = p.figures.map((f) =>
    `<tr><td style="padding:6px 8px;border-bottom:1px solid #ddd;font-weight:bold;vertical-align:top">${esc(f.label)}</td><td style="padding:6px 8px;border-bottom:1px solid #ddd"><span style="font-weight:bold">${esc(f.value)}</span><br><span style="font-size:13px">${esc(f.reading)}</span></td></tr>`,
  ).join('');
  const html = layout(subject,
    para(`Hello ${p.recipientName},`) + para(intro) +
    `<table style="border-collapse:collapse;width:100%;background:#fff;margin:8px 0 16px">${rows}</table>` +
    (p.forecastLine ? para(p.forecastLine) : '') + button(p.link, 'Open the full sitrep') +
    `<p style="margin:0 0 12px;padding:8px;border-left:4px solid #C8962E;background:#fbf3e1">${esc(caution)}</p>`);
  return { to: p.to, subject, text, html };
}

export interface CapacityAlertMailInput {
  to: string;
  recipientName: string;
  outbreakName: string;
  forecastName: string;
  forecastVersion: number;
  beds: number;
  /** First day the central bed demand exceeds the beds, and the earliest/latest of the band. */
  day: string;
  earliest: string | null;
  latest: string | null;
  /** Days from today to `day`. */
  inDays: number;
  peakBeds: number;
  peakBedsRange: [number, number] | null;
  link: string;
}

/** The capacity alert: once per official forecast version, naming the day and its range. */
export function capacityAlertMail(p: CapacityAlertMailInput): OutgoingMail {
  const subject = `Capacity alert ${p.outbreakName}: beds exceeded from ${formatDay(p.day)}`;
  const range = `between ${p.earliest ? formatDay(p.earliest) : formatDay(p.day)} and ${p.latest ? formatDay(p.latest) : 'beyond the forecast horizon'}`;
  const lines = [
    `Hello ${p.recipientName},`,
    `The official forecast of ${p.outbreakName} ("${p.forecastName}", version ${p.forecastVersion}) shows bed demand above the ${p.beds} beds available from ${formatDay(p.day)}, in ${p.inDays} day${p.inDays === 1 ? '' : 's'}.`,
    `Across the forecast's band the crossing falls ${range}. Bed demand peaks at about ${Math.round(p.peakBeds)} beds${p.peakBedsRange ? ` (${Math.round(p.peakBedsRange[0])} to ${Math.round(p.peakBedsRange[1])})` : ''}.`,
    'This alert is sent once for this version of the forecast. A newly published forecast is checked again.',
  ];
  const caution = 'A model run is a scenario, not a prediction. Decisions rest with the local public-health authority and licensed clinical practice.';
  const text = [...lines, '', 'The sitrep with the bed-demand chart:', p.link, '', caution, '', FOOTER_TEXT].join('\n');
  const html = layout(subject, lines.map(para).join('') + button(p.link, 'Open the sitrep') +
    `<p style="margin:0 0 12px;padding:8px;border-left:4px solid #C8962E;background:#fbf3e1">${esc(caution)}</p>`);
  return { to: p.to, subject, text, html };
}

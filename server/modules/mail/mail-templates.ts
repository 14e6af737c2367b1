// The product's e-mails: short, plain, from "Roostline". Each has a plain-text and an HTML part.
import { ROLE_LABELS, type Role } from '#shared/roles.ts';

export interface Rendered {
  subject: string;
  text: string;
  html: string;
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

function formatWhen(d: Date) {
  return d.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

function htmlPage(paragraphs: string[], link: { href: string; label: string }) {
  const body = paragraphs.map((p) => `<p style="margin:0 0 14px">${p}</p>`).join('\n');
  return `<!doctype html>
<html><body style="margin:0;padding:24px;background:#f7f4ee;font-family:system-ui,sans-serif;color:#12343b">
<div style="max-width:520px;margin:0 auto;background:#ffffff;border:1px solid #dce9ea;border-radius:12px;padding:24px">
<p style="margin:0 0 18px;font-weight:700;font-size:18px">Roostline</p>
${body}
<p style="margin:20px 0"><a href="${escapeHtml(link.href)}" style="display:inline-block;background:#12343b;color:#f7f4ee;padding:10px 18px;border-radius:8px;text-decoration:none;font-weight:600">${escapeHtml(link.label)}</a></p>
<p style="margin:0;font-size:13px;color:#1d4f57">Or paste this address into your browser:<br>${escapeHtml(link.href)}</p>
</div></body></html>`;
}

export function invitationMail(p: { name: string; roles: Role[]; invitedBy: string; link: string; expiresAt: Date }): Rendered {
  const roles = p.roles.map((r) => ROLE_LABELS[r]).join(', ');
  const text = [
    `Hello ${p.name},`,
    '',
    `${p.invitedBy} has set up a Roostline account for you (${roles}).`,
    'Open this link to choose your password and sign in:',
    '',
    p.link,
    '',
    `The link works once and expires on ${formatWhen(p.expiresAt)}.`,
    'If you did not expect this, ignore this e-mail.',
    '',
    '— Roostline',
  ].join('\n');
  const html = htmlPage(
    [
      `Hello ${escapeHtml(p.name)},`,
      `${escapeHtml(p.invitedBy)} has set up a Roostline account for you (${escapeHtml(roles)}). Choose your password to sign in.`,
      `The link works once and expires on ${formatWhen(p.expiresAt)}. If you did not expect this, ignore this e-mail.`,
    ],
    { href: p.link, label: 'Choose your password' },
  );
  return { subject: 'Your Roostline account is ready', text, html };
}

export function passwordResetMail(p: { name: string; link: string; expiresAt: Date }): Rendered {
  const text = [
    `Hello ${p.name},`,
    '',
    'Someone asked to reset the password of your Roostline account.',
    'Open this link to choose a new one:',
    '',
    p.link,
    '',
    `The link works once and expires on ${formatWhen(p.expiresAt)}.`,
    'If it was not you, ignore this e-mail: your password stays as it is.',
    '',
    '— Roostline',
  ].join('\n');
  const html = htmlPage(
    [
      `Hello ${escapeHtml(p.name)},`,
      'Someone asked to reset the password of your Roostline account.',
      `The link works once and expires on ${formatWhen(p.expiresAt)}. If it was not you, ignore this e-mail: your password stays as it is.`,
    ],
    { href: p.link, label: 'Choose a new password' },
  );
  return { subject: 'Reset your Roostline password', text, html };
}

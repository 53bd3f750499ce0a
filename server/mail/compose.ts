import { M_PER_FT } from '../../shared/cable/propagation';

export type LengthUnit = 'm' | 'ft';

/** Lengths in the reader's own unit, as on screen: two decimals under 100, one above. */
export function lengthText(m: number, unit: LengthUnit): string {
  const v = unit === 'ft' ? m / M_PER_FT : m;
  return `${v.toFixed(Math.abs(v) < 100 ? 2 : 1)} ${unit}`;
}

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

export interface MailBody {
  subject: string;
  text: string;
  html: string;
}

/**
 * A plain message: an opening line, label/value rows, an optional paragraph
 * and a link, rendered both as text and as simple HTML.
 */
export function composeMail(opts: {
  subject: string;
  intro: string;
  rows: Array<[string, string]>;
  paragraph?: string | null;
  link: { label: string; url: string };
  footer?: string;
}): MailBody {
  const width = Math.max(...opts.rows.map(([k]) => k.length));
  const text = [
    opts.intro,
    '',
    ...opts.rows.map(([k, v]) => `${`${k}:`.padEnd(width + 2)}${v}`),
    ...(opts.paragraph ? ['', opts.paragraph] : []),
    '',
    `${opts.link.label}: ${opts.link.url}`,
    ...(opts.footer ? ['', opts.footer] : []),
  ].join('\n');
  const html = [
    `<p>${escapeHtml(opts.intro)}</p>`,
    '<table cellpadding="4" style="border-collapse:collapse">',
    ...opts.rows.map(([k, v]) => `<tr><th align="left" style="color:#3b4a57">${escapeHtml(k)}</th><td>${escapeHtml(v)}</td></tr>`),
    '</table>',
    ...(opts.paragraph ? [`<p>${escapeHtml(opts.paragraph)}</p>`] : []),
    `<p><a href="${escapeHtml(opts.link.url)}" style="color:#1f6f78">${escapeHtml(opts.link.label)}</a></p>`,
    ...(opts.footer ? [`<p style="color:#6b7a86;font-size:13px">${escapeHtml(opts.footer)}</p>`] : []),
  ].join('\n');
  return { subject: opts.subject, text, html };
}

export const SAFETY_LINE =
  'Before any work: de-energise, lock out and verify dead; discharge and ground the cable; locate other utilities before digging. Follow local codes and your employer’s procedures.';

import { formatLength, type LengthUnit } from '../../shared/units/format-length';

export type { LengthUnit };

/** Lengths in the reader's own unit, through the same formatter as the screens (one precision rule). */
export const lengthText = formatLength;

/** Plain-text lines stay within this many characters, so a mail reader never wraps them raggedly. */
export const TEXT_WIDTH = 76;

/** Break `text` into lines of at most `width` characters, at spaces; a number keeps its unit and its "±" ("± 2.31 m") on its line. */
export function wrapText(text: string, width: number): string[] {
  const lines: string[] = [];
  for (const paragraph of text.split('\n')) {
    let line = '';
    const words = paragraph.split(/ +/).reduce<string[]>((acc, w) => {
      const last = acc[acc.length - 1];
      if (acc.length && ((/\d$/.test(last) && /^(m|ft|ns|%|Ω)[.,;:)]?$/.test(w)) || /^[±≈~]$/.test(last))) acc[acc.length - 1] += ` ${w}`;
      else acc.push(w);
      return acc;
    }, []);
    for (const word of words) {
      if (line && line.length + 1 + word.length > width) {
        lines.push(line);
        line = word;
      } else line = line ? `${line} ${word}` : word;
    }
    lines.push(line);
  }
  return lines;
}

/**
 * Label/value rows as two plain-text columns: the values start in one column
 * and a long value continues under itself, not under the labels.
 */
export function textRows(rows: Array<[string, string]>, width = TEXT_WIDTH): string[] {
  const labelWidth = Math.max(...rows.map(([k]) => k.length)) + 2;
  return rows.flatMap(([k, v]) => wrapText(v, Math.max(20, width - labelWidth)).map((line, i) => `${(i === 0 ? `${k}:` : '').padEnd(labelWidth)}${line}`.trimEnd()));
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
  const text = [
    ...wrapText(opts.intro, TEXT_WIDTH),
    '',
    ...textRows(opts.rows),
    ...(opts.paragraph ? ['', ...wrapText(opts.paragraph, TEXT_WIDTH)] : []),
    '',
    `${opts.link.label}: ${opts.link.url}`,
    ...(opts.footer ? ['', ...wrapText(opts.footer, TEXT_WIDTH)] : []),
  ].join('\n');
  // A label may wrap ("Cable-length / window"): kept on one line, it took half a phone's width from the value.
  const html = [
    `<p>${escapeHtml(opts.intro)}</p>`,
    '<table cellpadding="4" style="border-collapse:collapse;max-width:640px">',
    ...opts.rows.map(([k, v]) => `<tr><th align="left" valign="top" style="color:#3b4a57;width:30%">${escapeHtml(k)}</th><td>${escapeHtml(v)}</td></tr>`),
    '</table>',
    ...(opts.paragraph ? [`<p>${escapeHtml(opts.paragraph)}</p>`] : []),
    `<p><a href="${escapeHtml(opts.link.url)}" style="color:#1f6f78">${escapeHtml(opts.link.label)}</a></p>`,
    ...(opts.footer ? [`<p style="color:#5a6874;font-size:13px">${escapeHtml(opts.footer)}</p>`] : []),
  ].join('\n');
  return { subject: opts.subject, text, html };
}

/** The caution under every mail that sends someone to dig or repair: the points of the screens' SafetyCaution, in one paragraph. */
export const SAFETY_LINE =
  'Before any work: de-energise the cable, lock out and verify it is dead; discharge its stored charge and keep it grounded; ' +
  'high-voltage fault-location methods (surge, thumping, burn-down) are for qualified persons only; locate other utilities before digging. ' +
  'Follow local codes, your employer’s procedures and the permit for the work.';

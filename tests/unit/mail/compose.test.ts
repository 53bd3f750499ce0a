import { describe, expect, it } from 'vitest';
import { composeMail, textRows, wrapText } from '../../../server/mail/compose';

describe('plain-text e-mail columns', () => {
  it('starts every value in one column and continues a long one under itself', () => {
    const lines = textRows(
      [
        ['Site', 'Harrowmere North substation'],
        ['Route position', '262.5 ft past manhole MH-2 toward road crossing RC-1; dig on the ground 237.2–287.5 ft past MH-2'],
      ],
      60,
    );
    // Labels padded to the longest ("Route position:" is 15 characters) plus one space: values start at
    // column 16 and get 60 − 16 = 44 characters; a number stays with its unit.
    expect(lines).toEqual([
      'Site:           Harrowmere North substation',
      'Route position: 262.5 ft past manhole MH-2 toward road',
      '                crossing RC-1; dig on the ground',
      '                237.2–287.5 ft past MH-2',
    ]);
    for (const line of lines) expect(line.length).toBeLessThanOrEqual(60);
  });

  it('wraps a paragraph at spaces within the width, never between a number and its sign or unit', () => {
    expect(wrapText('one two three four five', 9)).toEqual(['one two', 'three', 'four five']);
    expect(wrapText('from end A (Cabinet C-1), ± 2.31 m', 28)).toEqual(['from end A (Cabinet C-1),', '± 2.31 m']);
  });

  it('keeps every plain-text line of a message within 76 characters', () => {
    const mail = composeMail({
      subject: 's',
      intro: 'Maren Holt confirmed a fault (Water in the cable) at Harrowmere North substation, on the feeder to Ashby Lane.',
      rows: [
        ['Distance', '1312 ft along the cable from end A (Substation bay 3), ± 4.92 ft'],
        ['Cable-length window', '1296–1328 ft along the cable from end A, slack included'],
      ],
      link: { label: 'Open the finding', url: 'http://127.0.0.1/findings/1' },
      footer: 'Before any work: de-energise, lock out and verify dead; discharge and ground the cable; locate other utilities before digging.',
    });
    const long = mail.text.split('\n').filter((l) => l.length > 76);
    expect(long).toEqual([]);
    expect(mail.text).toContain('Cable-length window: 1296–1328 ft along the cable from end A, slack');
  });
});

describe('the formatted part of an e-mail', () => {
  it('lets a label wrap and keeps it under a third of the table, so a phone shows the value on most of its width', () => {
    const mail = composeMail({
      subject: 's',
      intro: 'i',
      rows: [['Cable-length window', '136.8–149.5 m along the cable from end A, slack included']],
      link: { label: 'Open the finding', url: 'http://127.0.0.1/findings/1' },
    });
    const th = mail.html.match(/<th [^>]*>Cable-length window<\/th>/)?.[0] ?? '';
    expect(th).not.toBe('');
    expect(th).not.toContain('nowrap');
    expect(th).toContain('width:30%');
  });
});

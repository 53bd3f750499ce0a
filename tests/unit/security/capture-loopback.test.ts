import { describe, expect, it } from 'vitest';
import { isLoopback } from '../../../server/mail/capture-server';

// Loopback: 127.0.0.0/8 (RFC 1122 §3.2.1.3) and ::1 (RFC 4291 §2.5.3), also IPv4-mapped (RFC 4291 §2.5.5.2).
describe('isLoopback', () => {
  it('accepts this machine only', () => {
    for (const a of ['127.0.0.1', '127.8.9.10', '::1', '::ffff:127.0.0.1']) expect(isLoopback(a)).toBe(true);
  });

  it('refuses every other address', () => {
    for (const a of ['10.0.0.5', '192.168.1.20', '::ffff:10.0.0.5', '2001:db8::1', '128.0.0.1', '', undefined]) expect(isLoopback(a)).toBe(false);
  });
});

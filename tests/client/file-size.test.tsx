import { describe, expect, it } from 'vitest';
import { formatFileSize } from '../../src/features/traces/components/file-size';

// Binary units (1 kB shown = 1024 bytes, 1 MB = 1024 × 1024 bytes), common practice in file managers.
describe('one way to say a file size, on the upload list and the trace page', () => {
  it('says a 4579 KiB file is 4.5 MB, as the trace page does', () => {
    expect(formatFileSize(4579 * 1024)).toBe('4.5 MB');
    expect(formatFileSize(6 * 1024 * 1024)).toBe('6.0 MB');
  });

  it('says smaller files in kB and bytes, and never "1024 kB"', () => {
    expect(formatFileSize(640 * 1024)).toBe('640 kB');
    expect(formatFileSize(1024 * 1024 - 1)).toBe('1.0 MB');
    expect(formatFileSize(1024)).toBe('1 kB');
    expect(formatFileSize(812)).toBe('812 bytes');
    expect(formatFileSize(1)).toBe('1 byte');
  });
});

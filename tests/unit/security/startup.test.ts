import { describe, expect, it } from 'vitest';
import viteConfig from '../../../vite.config';
import { exposureWarnings } from '../../../server/startup';

describe('exposureWarnings', () => {
  it('says nothing without demo data', () => {
    expect(exposureWarnings({ demoData: false, host: '0.0.0.0' })).toEqual([]);
  });

  it('warns that the demo passwords are published whenever demo data is on', () => {
    const w = exposureWarnings({ demoData: true, host: '127.0.0.1' });
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/^Demo data is on: the demo accounts and their password are published in the README\./);
  });

  it('warns again when demo data is on and the server listens beyond this machine', () => {
    const w = exposureWarnings({ demoData: true, host: '0.0.0.0' });
    expect(w).toHaveLength(2);
    expect(w[1]).toBe('HOST=0.0.0.0 makes the demo accounts reachable from other machines; while demo data is on, leave HOST unset (127.0.0.1).');
    expect(exposureWarnings({ demoData: true, host: '::1' })).toHaveLength(1);
  });
});

describe('the client build', () => {
  it('writes no source maps (the full source would be public)', () => {
    expect(viteConfig.build?.sourcemap).toBe(false);
  });
});

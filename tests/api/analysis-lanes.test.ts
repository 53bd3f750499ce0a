import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AppContext } from '../../server/context';
import { analysisPool } from '../../server/traces/analysis-pool';
import { stepTraceCsv } from '../support/step-trace';

// A server on a two-core machine: one analysis thread for files someone is waiting for.
const closers: Array<() => Promise<void>> = [];
const ctx = {
  config: { analysis: { threads: 1, timeoutMs: 120_000, memoryMb: 256 } },
  log: () => undefined,
  onClose: closers,
} as unknown as AppContext;

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-lanes-'));
const small = path.join(dir, 'small.csv');
const large = path.join(dir, 'large.csv');
const cable = { vf: 0.66, vfTolerance: 0.02, z0Ohm: 50 };
const task = (file: string) => ({ path: file, settings: { mode: 'auto' as const }, cable, maxBytes: 64 * 1024 * 1024 });

beforeAll(() => {
  fs.writeFileSync(small, stepTraceCsv({ faultM: 60, vf: 0.66 }));
  fs.writeFileSync(large, stepTraceCsv({ faultM: 900, vf: 0.66, samples: 200_000 }));
});
afterAll(async () => {
  for (const close of closers) await close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('analysis lanes', () => {
  it('gives background work a pool of its own, with one thread', () => {
    const request = analysisPool(ctx);
    const background = analysisPool(ctx, 'background');
    expect(background).not.toBe(request);
    expect(analysisPool(ctx, 'background')).toBe(background);
    expect(background.budget.threads).toBe(1);
    expect(request.budget.threads).toBe(1);
  });

  it('analyses a file someone is waiting for without queueing it behind background analyses', async () => {
    // Both lanes have a worker running the engine before the order is looked at.
    await Promise.all([analysisPool(ctx).analyse(task(small)), analysisPool(ctx, 'background').analyse(task(small))]);
    const finished: string[] = [];
    const backgroundRuns = [1, 2, 3, 4, 5, 6].map((k) =>
      analysisPool(ctx, 'background')
        .analyse(task(large))
        .then((r) => {
          finished.push(`background ${k}`);
          return r;
        }),
    );
    const inRequest = await analysisPool(ctx).analyse(task(small));
    finished.push('request');
    expect(inRequest.outcome.status).toBe('ok');
    const background = await Promise.all(backgroundRuns);
    expect(background.map((r) => r.outcome.status)).toEqual(Array(6).fill('ok'));
    // One shared thread would have taken them first come, first served, the request's file after the six;
    // in its own lane it is done before the background lane has finished its second.
    expect(finished.indexOf('request')).toBeLessThan(2);
  }, 120_000);
});

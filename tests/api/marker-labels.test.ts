import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';
import { makeRun } from './support/field-fixtures';

// A route position reads "15.0 m past manhole MH-2": two markers whose labels look the same would make
// it name either. Unicode compatibility normalisation (NFKC) maps full-width "ＭＨ－２" (as phone input
// methods for East Asian scripts type it) to "MH-2", and U+0065 U+0301 to "é".

let api: TestApi;
let sup: Client;
let fx: Awaited<ReturnType<typeof makeRun>>;

beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
  fx = await makeRun('Labels');
});
afterAll(() => api.close());

const marker = (label: string, chainageM: number) => ({ label, kind: 'manhole', chainageM, slackM: 0 });

describe('route marker labels on a run', () => {
  it('refuses two labels that differ only in case, width, Unicode form or spaces, and keeps the stored list', async () => {
    const cases: Array<[string, string, string]> = [
      ['MH-2', 'mh-2', 'the label mh-2 is used twice'],
      ['MH-2', 'ＭＨ－２', 'the label ＭＨ－２ is used twice'],
      ['Pont d\u00e9part', 'Pont de\u0301part', 'the label Pont de\u0301part is used twice'],
      ['MH 2', 'MH   2', 'the label MH   2 is used twice'],
    ];
    for (const [first, second, message] of cases) {
      const res = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, { markers: [marker(first, 30), marker(second, 60)] }).expect(422);
      expect(res.body.error.code).toBe('invalid_markers');
      expect(res.body.error.fields).toEqual([{ field: 'markers.1.label', message }]);
    }
    const stored = await sup.get(`/api/cable-runs/${fx.run.id}`).expect(200);
    expect(stored.body.markers.map((m: { label: string }) => m.label)).toEqual(['MH-1', 'MH-2', 'P-7']);
  });

  it('still takes labels that differ', async () => {
    const res = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, { markers: [marker('MH-2', 30), marker('MH-12', 60)] }).expect(200);
    expect(res.body.markers.map((m: { label: string }) => m.label)).toEqual(['MH-2', 'MH-12']);
  });
});

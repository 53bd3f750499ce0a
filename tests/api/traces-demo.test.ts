import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedFieldTraces } from '../../server/db/demo/field';
import { CableRun, CableType, Finding, RouteMarker, Site, SiteSupervisor, Trace, User } from '../../server/db/models';
import { stepTraceCsv } from '../support/step-trace';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let dir: string;

beforeAll(async () => {
  api = await startApi({ demoData: true });
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-demo-traces-'));
});
afterAll(async () => {
  fs.rmSync(dir, { recursive: true, force: true });
  await api.close();
});

describe('demo field data', () => {
  it('seeds sites with supervisors and runs with route markers on the library cable types', async () => {
    const site = await Site.findOne({ where: { name: 'Harrowmere North substation' } });
    expect(site).not.toBeNull();
    const sup = await SiteSupervisor.findAll({ where: { siteId: site!.id } });
    const emails = (await User.findAll({ where: { id: sup.map((s) => s.userId) } })).map((u) => u.email);
    expect(emails).toEqual(['supervisor@example.com']);
    const runs = await CableRun.findAll();
    const kinds = new Set((await CableType.findAll({ where: { id: runs.map((r) => r.cableTypeId) } })).map((t) => t.construction));
    expect(kinds.size).toBeGreaterThanOrEqual(3);
    // Every marker lies on its route: chainage at most the installed length less the slack coiled along it.
    const markers = await RouteMarker.findAll();
    for (const r of runs) {
      const own = markers.filter((m) => m.cableRunId === r.id);
      const route = r.installedLengthM - own.reduce((s, m) => s + m.slackM, 0);
      for (const m of own) expect(m.chainageM, `${r.name} ${m.label}`).toBeLessThanOrEqual(route);
    }
    // HN-C2: 182 m installed, 2 m coiled at each of its two handholes (demo data) → 178 m of route.
    const hnc2 = runs.find((r) => r.name === 'Control pair HN-C2')!;
    expect(markers.filter((m) => m.cableRunId === hnc2.id).map((m) => [m.label, m.chainageM])).toEqual([
      ['HH-1', 90],
      ['HH-2', 170],
    ]);
  });

  it('loads trace files through the upload service and confirms a finding on a faulted one', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Control pair HN-C2' } }))!;
    const cable = (await CableType.findByPk(run.cableTypeId))!;
    fs.writeFileSync(path.join(dir, 'hnc2-open.csv'), stepTraceCsv({ faultM: 150, vf: cable.vf, samples: 4000 }));
    fs.writeFileSync(path.join(dir, 'broken.csv'), 'time_ns,voltage_V\n1,2\n');
    fs.writeFileSync(
      path.join(dir, 'manifest.json'),
      JSON.stringify([
        { file: 'hnc2-open.csv', run: 'Control pair HN-C2', end: 'A' },
        { file: 'broken.csv', run: 'Control pair HN-C2', end: 'B' },
      ]),
    );
    const users = new Map((await User.findAll()).map((u) => [u.email, u]));
    const before = await Trace.count();
    const result = await seedFieldTraces(api.app.ctx, users, await CableRun.findAll(), dir);
    expect(result).toEqual({ traces: 2, findings: 1 });
    expect(await Trace.count()).toBe(before + 2);
    const broken = await Trace.findOne({ where: { originalName: 'broken.csv' } });
    expect(broken?.status).toBe('failed');
    const mine = await Trace.findOne({ where: { originalName: 'hnc2-open.csv' } });
    const f = await Finding.findOne({ where: { traceId: mine!.id } });
    // 150 m of cable from A passes HH-1 (chainage 90 m, 2 m coiled): 148 m of route, 58 m past HH-1, heading for HH-2 at 170 m (hand-worked).
    expect(f?.routePositionText).toMatch(/^5[78]\.\d m past handhole HH-1 toward handhole HH-2;/);
  });
});

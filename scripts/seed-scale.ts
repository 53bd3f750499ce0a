/**
 * npm run seed:scale -- --database sqlite:PATH [--traces 53000] [--findings 100000]
 *
 * Fills a SQLite database with a list-scale field log: 6 sites, 30 cable runs,
 * 53,000 traces and 100,000 findings (defaults), for measuring the lists at
 * scale (npm run bench:api). One trace and one finding go through the real
 * upload and decision routes; the rest are copies of those rows made inside
 * the database with one INSERT … SELECT each (a transaction each), varied in
 * run, end, status, name, note, distance and date. The sign-in for the
 * technician it creates is scale.tech@example.com / SCALE_PASSWORD.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import supertest from 'supertest';
import { createApp } from '../server/app';
import { hashPassword } from '../server/auth/passwords';
import { loadConfig } from '../server/config';
import { CableRun, CableType, Site, SiteSupervisor, User } from '../server/db/models';
import { stepTraceCsv } from '../tests/support/step-trace';

export const SCALE_PASSWORD = 'scale-check-password-7';
export const SCALE_TECH = 'scale.tech@example.com';

const SITES = ['Harrowmere pumping station', 'Lower Fen substation', 'Quarry Lane depot', 'Oxbow water works', 'Stile Hill exchange', 'Millrace yard'];
const NAME_WORDS = ['riverside', 'kerb', 'pole', 'cabinet', 'splice', 'bridge', 'culvert', 'hedge', 'orchard', 'stile', 'weir', 'ford'];
const NOTES = ['dig by the kerb', 'under the hedge by the stile', 'water in the splice', 'crushed at the culvert', 'rodent damage near the pole', 'joint bay flooded', 'no note'];

function sqlList(words: string[]) {
  return words.map((w) => `'${w.replace(/'/g, "''")}'`).join(', ');
}

/** Fills the database; returns the counts written. */
export async function seedScale(databaseUrl: string, opts: { traces: number; findings: number; log?: (s: string) => void }) {
  const log = opts.log ?? (() => {});
  const uploadDir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-scale-uploads-'));
  const { app, close, ctx } = await createApp(
    loadConfig({ NODE_ENV: 'test', DATABASE_URL: databaseUrl, UPLOAD_DIR: uploadDir, DEMO_DATA: 'off', LOG_LEVEL: 'warn', SCRYPT_COST: '16384' }),
  );
  const sequelize = ctx.sequelize;
  try {
    const hash = await hashPassword(SCALE_PASSWORD);
    const tech = await User.create({ email: SCALE_TECH, name: 'Sol Scale', role: 'technician', passwordHash: hash });
    const tech2 = await User.create({ email: 'scale.tech2@example.com', name: 'Rae Scale', role: 'technician', passwordHash: hash });
    const sup = await User.create({ email: 'scale.super@example.com', name: 'Kit Scale', role: 'supervisor', passwordHash: hash });
    const cable = await CableType.create({
      name: 'Scale-check solid PE coax',
      construction: 'coax',
      dielectric: 'solid polyethylene',
      z0Ohm: 50,
      vf: 0.66,
      vfTolerance: 0.02,
      attenuationDbPer100m: null,
      attenuationFreqMhz: null,
      vfSource: 'handbook',
      vfReference: 'solid PE, εr ≈ 2.3 (common practice)',
      notes: null,
    });
    const runs: number[] = [];
    for (const name of SITES) {
      const site = await Site.create({ name, address: null, latitude: null, longitude: null, accessNotes: null });
      await SiteSupervisor.create({ siteId: site.id, userId: sup.id });
      for (let i = 1; i <= 5; i++) {
        const run = await CableRun.create({ siteId: site.id, name: `Feeder ${i}`, cableTypeId: cable.id, endALabel: `Cabinet ${i}`, endBLabel: `Pole ${i}`, installedLengthM: 900, notes: null });
        runs.push(run.id);
      }
    }

    // One real trace and one real finding through the routes: the templates.
    const agent = supertest.agent(app);
    const csrf0 = (await agent.get('/api/auth/csrf')).body.csrfToken as string;
    const login = await agent.post('/api/auth/login').set('x-csrf-token', csrf0).send({ email: SCALE_TECH, password: SCALE_PASSWORD });
    if (login.status !== 200) throw new Error(`sign-in answered ${login.status}`);
    const csrf = (login.body.csrfToken as string) ?? csrf0;
    const up = await agent
      .post('/api/traces')
      .set('x-csrf-token', csrf)
      .field('cableRunId', String(runs[0]))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 412, vf: 0.66, samples: 10_000 })), 'template.csv');
    if (up.status !== 201) throw new Error(`template upload answered ${up.status}: ${JSON.stringify(up.body)}`);
    const templateTrace = up.body.traces[0].id as number;
    const fin = await agent.post('/api/findings').set('x-csrf-token', csrf).send({ traceId: templateTrace, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'template' });
    if (fin.status !== 201) throw new Error(`template finding answered ${fin.status}: ${JSON.stringify(fin.body)}`);
    const templateFinding = fin.body.id as number;

    const columns = async (table: string) => ((await sequelize.query(`PRAGMA table_info(${table})`, { type: 'SELECT' })) as Array<{ name: string }>).map((c) => c.name);
    const stamp = (minutesExpr: string) => `strftime('%Y-%m-%d %H:%M:%f', 'now', '-' || (${minutesExpr}) || ' minutes') || ' +00:00'`;
    const runIds = `json_array(${runs.join(', ')})`;

    // Traces: n = 1..N, newest first; 1 in 10 failed, ends alternate, names carry a place word.
    const traceOverrides: Record<string, string> = {
      cable_run_id: `json_extract(${runIds}, '$[' || (seq.n % ${runs.length}) || ']')`,
      end: `CASE seq.n % 2 WHEN 0 THEN 'A' ELSE 'B' END`,
      uploaded_by_id: `CASE seq.n % 3 WHEN 0 THEN ${tech2.id} ELSE ${tech.id} END`,
      original_name: `json_extract(json_array(${sqlList(NAME_WORDS)}), '$[' || (seq.n % ${NAME_WORDS.length}) || ']') || '-' || printf('%06d', seq.n) || '.csv'`,
      sha256: `printf('%064d', seq.n)`,
      status: `CASE WHEN seq.n % 10 = 0 THEN 'failed' ELSE t.status END`,
      created_at: stamp('seq.n * 7'),
      updated_at: stamp('seq.n * 7'),
      reanalysis_of_id: 'NULL',
      archived_at: 'NULL',
    };
    const tcols = (await columns('traces')).filter((c) => c !== 'id');
    await sequelize.transaction(async (transaction) => {
      await sequelize.query(
        `WITH RECURSIVE seq(n) AS (SELECT 1 UNION ALL SELECT n + 1 FROM seq WHERE n < ${opts.traces - 1})
         INSERT INTO traces (${tcols.map((c) => `"${c}"`).join(', ')})
         SELECT ${tcols.map((c) => traceOverrides[c] ?? `t."${c}"`).join(', ')} FROM seq, traces t WHERE t.id = ${templateTrace}`,
        { transaction },
      );
    });
    log(`traces: ${opts.traces}`);

    // Findings: two events per trace at most (event 0 and 1), the trace's own run and site.
    // The copied traces: ids templateTrace + 1 … templateTrace + perEvent.
    const perEvent = opts.traces - 1;
    const findingOverrides: Record<string, string> = {
      trace_id: 'tr.id',
      event_index: `seq.n / ${perEvent}`,
      cable_run_id: 'tr.cable_run_id',
      site_id: 'cr.site_id',
      status: `CASE WHEN seq.n % 5 = 0 THEN 'dismissed' ELSE 'confirmed' END`,
      note: `json_extract(json_array(${sqlList(NOTES)}), '$[' || (seq.n % ${NOTES.length}) || ']')`,
      distance_m: `((seq.n * 7919) % 90000) / 100.0`,
      distance_from_a_m: `((seq.n * 7919) % 90000) / 100.0`,
      confirmed_by_id: `CASE seq.n % 3 WHEN 0 THEN ${tech2.id} ELSE ${tech.id} END`,
      confirmed_at: stamp('seq.n * 3'),
      created_at: stamp('seq.n * 3'),
      updated_at: stamp('seq.n * 3'),
    };
    const fcols = (await columns('findings')).filter((c) => c !== 'id');
    const minTrace = templateTrace + 1;
    await sequelize.transaction(async (transaction) => {
      await sequelize.query(
        `WITH RECURSIVE seq(n) AS (SELECT 0 UNION ALL SELECT n + 1 FROM seq WHERE n < ${opts.findings - 2})
         INSERT INTO findings (${fcols.map((c) => `"${c}"`).join(', ')})
         SELECT ${fcols.map((c) => findingOverrides[c] ?? `f."${c}"`).join(', ')}
         FROM seq
         JOIN traces tr ON tr.id = ${minTrace} + (seq.n % ${perEvent})
         JOIN cable_runs cr ON cr.id = tr.cable_run_id
         JOIN findings f ON f.id = ${templateFinding}`,
        { transaction },
      );
    });
    await sequelize.query('ANALYZE');
    const [[{ traces }], [{ findings }]] = await Promise.all([
      sequelize.query('SELECT count(*) AS traces FROM traces', { type: 'SELECT' }) as Promise<Array<{ traces: number }>>,
      sequelize.query('SELECT count(*) AS findings FROM findings', { type: 'SELECT' }) as Promise<Array<{ findings: number }>>,
    ]);
    log(`findings: ${findings}`);
    return { traces, findings, runs: runs.length, sites: SITES.length };
  } finally {
    await close();
    fs.rmSync(uploadDir, { recursive: true, force: true });
  }
}

async function main() {
  const { values } = parseArgs({
    options: { database: { type: 'string' }, traces: { type: 'string', default: '53000' }, findings: { type: 'string', default: '100000' } },
  });
  const databaseUrl = values.database ?? process.env.DATABASE_URL;
  if (!databaseUrl || !databaseUrl.startsWith('sqlite:')) {
    process.stderr.write('seed:scale: give --database sqlite:PATH (a new or empty SQLite file)\n');
    return 2;
  }
  const traces = Number(values.traces);
  const findings = Number(values.findings);
  if (!Number.isInteger(traces) || traces < 2 || !Number.isInteger(findings) || findings < 2 || findings > 2 * (traces - 1) + 1) {
    process.stderr.write('seed:scale: --traces must be a whole number ≥ 2 and --findings at most twice the traces\n');
    return 2;
  }
  const started = performance.now();
  const done = await seedScale(databaseUrl, { traces, findings, log: (s) => process.stdout.write(`${s}\n`) });
  process.stdout.write(
    `seeded ${done.sites} sites, ${done.runs} cable runs, ${done.traces} traces and ${done.findings} findings in ${((performance.now() - started) / 1000).toFixed(1)} s (load average ${os.loadavg()[0].toFixed(2)})\n`,
  );
  return 0;
}

if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename)) {
  main().then(
    (code) => process.exit(code),
    (err) => {
      process.stderr.write(`seed:scale: ${err instanceof Error ? err.message : String(err)}\n`);
      process.exit(1);
    },
  );
}

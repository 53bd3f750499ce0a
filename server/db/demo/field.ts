import fs from 'node:fs';
import path from 'node:path';
import type { Transaction } from 'sequelize';
import type { MarkerKind } from '../../../shared/schemas/sites';
import { checkMarkers } from '../../cable-runs/cable-runs.service';
import type { AppContext } from '../../context';
import { recordFinding } from '../../findings/findings.service';
import { storeTraces } from '../../traces/traces.service';
import { CableRun, CableType, RouteMarker, Site, SiteSupervisor, Trace, type User } from '../models';

/**
 * The field part of the invented Harrowmere Valley scenario: three sites,
 * runs of several cable kinds with their route markers, and — when the demo
 * trace files have been generated into server/db/demo/traces/ — traces of
 * those runs, analysed through the same service an upload uses, with a
 * confirmed finding on each trace that shows a fault.
 */
export const DEMO_TRACE_DIR = path.resolve(import.meta.dirname, 'traces');
/** Sample traces offered on the upload page to try, never loaded by the seed (beside the bundle too, as the traces are). */
export const DEMO_SAMPLE_DIR = path.resolve(import.meta.dirname, 'samples');

interface DemoRun {
  name: string;
  cable: string;
  endA: string;
  endB: string;
  lengthM: number;
  markers: Array<[label: string, kind: MarkerKind, chainageM: number, slackM: number]>;
}

// Invented places: addresses only, no map coordinates (any coordinates would point at a real place).
const SITES: Array<{ name: string; address: string; access: string; supervisors: string[]; runs: DemoRun[] }> = [
  {
    name: 'Harrowmere North substation',
    address: '1 Quarry Road, Harrowmere',
    access: 'Key safe at the east gate (code from the control room). Hard hats past the yellow line. Park outside the fence.',
    supervisors: ['supervisor@example.com'],
    runs: [
      {
        name: 'Feeder HN-3 to Ashby Lane',
        cable: 'Shielded XLPE MV cable',
        endA: 'Substation bay 3',
        endB: 'Ashby Lane ring main unit',
        lengthM: 900,
        markers: [
          ['MH-1', 'manhole', 120, 4],
          ['MH-2', 'manhole', 310, 6],
          ['RC-1', 'road-crossing', 455, 0],
          ['SP-1', 'splice', 600, 3],
          ['P-7', 'pedestal', 760, 0],
        ],
      },
      {
        name: 'Control pair HN-C2',
        cable: 'PE-insulated telephone pair',
        endA: 'Relay room frame',
        endB: 'Transformer 2 marshalling box',
        lengthM: 182,
        markers: [
          ['HH-1', 'handhole', 90, 2],
          // 182 m installed less 4 m of coils leaves 178 m of route; HH-2 sits 8 m short of the marshalling box.
          ['HH-2', 'handhole', 170, 2],
        ],
      },
    ],
  },
  {
    name: 'Brookfold pumping station',
    address: 'Mill Lane, Brookfold',
    access: 'Gate padlock 4471. The wet well is a confined space: do not open the hatch without a permit.',
    supervisors: ['supervisor@example.com'],
    runs: [
      {
        name: 'Telemetry pair BF-T1',
        cable: 'Jelly-filled telephone pair',
        endA: 'Pump house cabinet',
        endB: 'Reservoir outstation',
        lengthM: 1450,
        markers: [
          ['Pole 3', 'pole', 210, 5],
          ['Pole 9', 'pole', 640, 5],
          ['SP-4', 'splice', 980, 8],
          ['Pole 15', 'pole', 1200, 0],
        ],
      },
      {
        name: 'Radio mast feeder BF-R1',
        cable: 'Solid PE coax, 50 Ω',
        endA: 'Control kiosk',
        endB: 'Telemetry radio mast',
        lengthM: 120,
        markers: [
          ['HH-A', 'handhole', 48, 1.5],
          ['Mast foot', 'other', 110, 2],
        ],
      },
    ],
  },
  {
    name: 'Oakhollow cabinet row',
    address: 'Oakhollow Road, by the school crossing',
    access: 'Cabinets are on the footway: cones and a lookout during school hours.',
    supervisors: [],
    runs: [
      {
        name: 'Data link OH-D1',
        cable: 'Data-grade twisted pair, 100 Ω',
        endA: 'Cabinet OH-4',
        endB: 'Cabinet OH-7',
        lengthM: 88,
        markers: [['Duct pit', 'handhole', 40, 1]],
      },
    ],
  },
];

interface ManifestEntry {
  file: string;
  run?: string;
  end?: 'A' | 'B';
  /** The simulated cable family ("coax-50", "pair-100", "power-mv"), to pick a run of that construction. */
  cable?: string;
  /** Where the simulator put the fault, so the demo confirms that event and not a splice in front of it. */
  trueFaultDistanceM?: number;
}

const KIND_OF_TYPE = {
  open: 'open-conductor',
  short: 'short-circuit',
  'impedance-drop': 'high-resistance',
  'impedance-rise': 'other',
} as const;

const CONSTRUCTION_OF: Array<[prefix: string, construction: string]> = [
  ['coax', 'coax'],
  ['pair', 'twisted-pair'],
  ['power', 'shielded-power'],
];

/** The trace files to load: those the manifest names (with their run, if it says), else every CSV. */
function demoTraceFiles(dir = DEMO_TRACE_DIR): ManifestEntry[] {
  if (!fs.existsSync(dir)) return [];
  const manifestPath = path.join(dir, 'manifest.json');
  if (fs.existsSync(manifestPath)) {
    try {
      const raw = JSON.parse(fs.readFileSync(manifestPath, 'utf8')) as unknown;
      const list = (Array.isArray(raw) ? raw : ((raw as { traces?: unknown[]; files?: unknown[] }).traces ?? (raw as { files?: unknown[] }).files ?? [])) as Array<
        Record<string, unknown>
      >;
      const entries = list
        .map((e) => ({
          file: String(e.file ?? e.name ?? e.path ?? ''),
          run: typeof (e.cableRun ?? e.run) === 'string' ? String(e.cableRun ?? e.run) : undefined,
          end: e.end === 'A' || e.end === 'B' ? (e.end as 'A' | 'B') : undefined,
          cable: typeof e.cable === 'string' ? e.cable : undefined,
          trueFaultDistanceM: typeof e.trueFaultDistanceM === 'number' ? e.trueFaultDistanceM : undefined,
        }))
        .filter((e) => e.file.endsWith('.csv') && fs.existsSync(path.join(dir, path.basename(e.file))));
      if (entries.length) return entries.map((e) => ({ ...e, file: path.basename(e.file) }));
    } catch {
      // An unreadable manifest falls back to the plain file list.
    }
  }
  return fs
    .readdirSync(dir)
    .filter((f) => f.endsWith('.csv'))
    .sort()
    .map((file) => ({ file }));
}

export async function seedField(users: Map<string, User>, transaction: Transaction) {
  const runs: CableRun[] = [];
  for (const s of SITES) {
    const site = await Site.create({ name: s.name, address: s.address, latitude: null, longitude: null, accessNotes: s.access }, { transaction });
    for (const email of s.supervisors) {
      const u = users.get(email);
      if (u) await SiteSupervisor.create({ siteId: site.id, userId: u.id }, { transaction });
    }
    for (const r of s.runs) {
      const cable = await CableType.findOne({ where: { name: r.cable }, transaction });
      if (!cable) continue;
      const run = await CableRun.create(
        { siteId: site.id, name: r.name, cableTypeId: cable.id, endALabel: r.endA, endBLabel: r.endB, installedLengthM: r.lengthM, notes: null },
        { transaction },
      );
      // The same rule an edit of the run's markers meets: every marker on the route.
      checkMarkers(
        r.lengthM,
        r.markers.map(([label, , chainageM, slackM]) => ({ label, chainageM, slackM })),
      );
      for (const [label, kind, chainageM, slackM] of r.markers) {
        await RouteMarker.create({ cableRunId: run.id, label, kind, chainageM, slackM, notes: null }, { transaction });
      }
      runs.push(run);
    }
  }
  return runs;
}

/** After the sites are committed: load the demo traces through the upload service and confirm a finding on each. */
export async function seedFieldTraces(ctx: AppContext, users: Map<string, User>, runs: CableRun[], dir = DEMO_TRACE_DIR) {
  const tech = users.get('tech@example.com');
  if (!tech || !runs.length) return { traces: 0, findings: 0 };
  let traces = 0;
  let findings = 0;
  const files = demoTraceFiles(dir);
  const types = new Map((await CableType.findAll({ where: { id: runs.map((r) => r.cableTypeId) } })).map((t) => [t.id, t.construction as string]));
  const used = new Set<number>();
  for (const [i, entry] of files.entries()) {
    const construction = CONSTRUCTION_OF.find(([prefix]) => entry.cable?.startsWith(prefix))?.[1];
    const ofKind = construction ? runs.filter((r) => types.get(r.cableTypeId) === construction) : [];
    const run =
      (entry.run && runs.find((r) => r.name === entry.run || r.name.includes(entry.run!))) ||
      ofKind.find((r) => !used.has(r.id)) ||
      ofKind[0] ||
      runs[i % runs.length];
    used.add(run.id);
    const bytes = fs.readFileSync(path.join(dir, entry.file));
    const [id] = await storeTraces(ctx, { cableRunId: run.id, end: entry.end ?? 'A', mode: 'auto', vfOverrideReason: undefined }, [{ originalName: entry.file, bytes }], tech.id);
    traces++;
    const trace = await Trace.findByPk(id);
    // A fault is a primary event short of the run's far end (the end itself is not a fault); the
    // demo confirms the one nearest where the simulator put the fault, as a technician would.
    const candidates = trace?.analysis?.events.filter((e) => e.likelyMultipleOf === null && e.windowEndM < run.installedLengthM) ?? [];
    const truth = entry.trueFaultDistanceM;
    const event =
      truth === undefined
        ? candidates[0]
        : candidates.reduce<(typeof candidates)[number] | undefined>((best, e) => (!best || Math.abs(e.distanceM - truth) < Math.abs(best.distanceM - truth) ? e : best), undefined);
    if (trace && event) {
      await recordFinding(
        ctx,
        { traceId: id, eventIndex: event.index, status: 'confirmed', kind: KIND_OF_TYPE[event.type], note: 'Demo: confirmed on first reading.' },
        tech.id,
      );
      findings++;
    }
  }
  return { traces, findings };
}

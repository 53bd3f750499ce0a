import { Op, type Sequelize, type WhereOptions } from 'sequelize';
import type { z } from 'zod';
import { matchEvents, resampleOnto } from '../../shared/field/compare';
import type { TraceAnalysis } from '../../shared/schemas/trace-analysis';
import type {
  CableEnd,
  TraceComparison,
  TraceDetail,
  TraceListQuerySchema,
  TraceSettings,
  TraceSummary,
  TraceUploadSchema,
} from '../../shared/schemas/traces';
import type { Page } from '../../shared/schemas/users';
import { analyzeTrace, decimateMinMax, ENGINE_VERSION, parseTraceCsv, TraceInputError, type ParsedTrace } from '../../shared/trace';
import type { AppContext } from '../context';
import { CableRun, CableType, Finding, RouteMarker, Site, Trace, User } from '../db/models';
import { markerView } from '../cable-runs/cable-runs.service';
import { AppError } from '../errors';
import { readRaw, removeRaw, sha256, writeRaw } from './trace-store';

export type UploadFields = z.output<typeof TraceUploadSchema>;

export interface IncomingFile {
  originalName: string;
  bytes: Buffer;
}

interface Outcome {
  status: 'ok' | 'failed';
  analysis: TraceAnalysis | null;
  error: { code: string; message: string; line: number | null; field: string | null } | null;
}

function parseOptions(settings: TraceSettings, maxBytes: number) {
  return { maxBytes, ...(settings.sampleIntervalNs !== undefined ? { sampleIntervalNs: settings.sampleIntervalNs } : {}) };
}

/** Run the engine; a file it cannot read becomes a failed outcome with the engine's own words. */
export function analyseBytes(
  bytes: Buffer,
  settings: TraceSettings,
  cable: { vf: number; vfTolerance: number; z0Ohm: number | null },
  maxBytes: number,
  log?: AppContext['log'],
): Outcome {
  try {
    const parsed = parseTraceCsv(bytes.toString('utf8'), parseOptions(settings, maxBytes));
    const analysis = analyzeTrace(parsed, {
      vf: settings.vfOverride ?? cable.vf,
      vfTolerance: cable.vfTolerance,
      ...(cable.z0Ohm ? { z0Ohm: cable.z0Ohm } : {}),
      mode: settings.mode,
      ...(settings.zeroOffsetNs !== undefined ? { zeroOffsetNs: settings.zeroOffsetNs } : {}),
      ...(settings.leadLengthM !== undefined ? { leadLengthM: settings.leadLengthM } : {}),
      ...(settings.pulseWidthNs !== undefined ? { pulseWidthNs: settings.pulseWidthNs } : {}),
    });
    return { status: 'ok', analysis, error: null };
  } catch (err) {
    if (err instanceof TraceInputError) {
      return { status: 'failed', analysis: null, error: { code: err.code, message: err.message, line: err.line ?? null, field: err.field ?? null } };
    }
    log?.('the trace engine failed on an upload', err);
    return {
      status: 'failed',
      analysis: null,
      error: { code: 'ENGINE_ERROR', message: `The trace engine could not analyse this file (${(err as Error).message}).`, line: null, field: null },
    };
  }
}

/** The columns that record one analysis: its outcome and the cable values and engine it was made with. */
function analysisColumns(outcome: Outcome, cable: CableType, settings: TraceSettings) {
  return {
    status: outcome.status,
    errorCode: outcome.error?.code ?? null,
    errorMessage: outcome.error?.message ?? null,
    errorLine: outcome.error?.line ?? null,
    errorField: outcome.error?.field ?? null,
    settings,
    vf: settings.vfOverride ?? cable.vf,
    vfTolerance: cable.vfTolerance,
    z0Ohm: cable.z0Ohm,
    cableTypeRevision: cable.revision,
    engineVersion: ENGINE_VERSION,
    analysis: outcome.analysis,
  };
}

function settingsFrom(fields: UploadFields): TraceSettings {
  const s: TraceSettings = { mode: fields.mode };
  if (fields.pulseWidthNs !== undefined) s.pulseWidthNs = fields.pulseWidthNs;
  if (fields.zeroOffsetNs !== undefined) s.zeroOffsetNs = fields.zeroOffsetNs;
  if (fields.leadLengthM !== undefined) s.leadLengthM = fields.leadLengthM;
  if (fields.sampleIntervalNs !== undefined) s.sampleIntervalNs = fields.sampleIntervalNs;
  if (fields.vfOverride !== undefined) s.vfOverride = fields.vfOverride;
  return s;
}

/**
 * Store each file unchanged, analyse it with the run's cable values and save
 * the result, all in one transaction: either every file of the upload is
 * recorded (readable or marked failed) or none is, and no stray file is left.
 */
export async function storeTraces(ctx: AppContext, fields: UploadFields, files: IncomingFile[], uploadedById: number): Promise<number[]> {
  const run = await CableRun.findByPk(fields.cableRunId);
  if (!run) {
    throw new AppError(422, 'no_such_cable_run', `There is no cable run ${fields.cableRunId}.`, {
      fields: [{ field: 'cableRunId', message: `there is no cable run ${fields.cableRunId}` }],
    });
  }
  const cable = await CableType.findByPk(run.cableTypeId);
  if (!cable) throw new AppError(422, 'no_cable_type', `Cable run ${run.name} has no cable type in the library.`);
  const settings = settingsFrom(fields);
  const written: string[] = [];
  try {
    return await ctx.sequelize.transaction(async (transaction) => {
      const ids: number[] = [];
      for (const file of files) {
        const rawPath = await writeRaw(ctx.config.uploadDir, file.bytes);
        written.push(rawPath);
        const outcome = analyseBytes(file.bytes, settings, cable, ctx.config.maxUploadBytes, ctx.log);
        const trace = await Trace.create(
          {
            cableRunId: run.id,
            end: fields.end,
            uploadedById,
            originalName: file.originalName.slice(0, 255),
            rawPath,
            sha256: sha256(file.bytes),
            sizeBytes: file.bytes.length,
            ...analysisColumns(outcome, cable, settings),
            vfOverrideReason: fields.vfOverrideReason ?? null,
          },
          { transaction },
        );
        ids.push(trace.id);
      }
      return ids;
    });
  } catch (err) {
    for (const rel of written) await removeRaw(ctx.config.uploadDir, rel).catch(() => undefined);
    throw err;
  }
}

/**
 * Analyse a stored trace again with the cable library's current VF, tolerance
 * and Z0 (and the current engine). The earlier trace and its findings stay as
 * they were — they are the record of what was read on the day — and the new
 * analysis is a new trace row over the same stored bytes, pointing back.
 * A VF override of the earlier upload is dropped: the point is the library value.
 */
export async function reanalyseTrace(ctx: AppContext, id: number, userId: number): Promise<number> {
  const earlier = await Trace.findByPk(id);
  if (!earlier) throw AppError.notFound(`Trace ${id}`);
  const run = await CableRun.findByPk(earlier.cableRunId);
  const cable = run ? await CableType.findByPk(run.cableTypeId) : null;
  if (!run || !cable) throw new AppError(422, 'no_cable_type', `The cable run of trace ${id} has no cable type in the library.`);
  const bytes = await readRaw(ctx.config.uploadDir, earlier.rawPath);
  if (sha256(bytes) !== earlier.sha256) {
    throw new AppError(409, 'raw_file_changed', `The stored file of trace ${id} no longer matches its SHA-256; it will not be analysed again.`);
  }
  const { vfOverride: _dropped, ...settings } = earlier.settings;
  const outcome = analyseBytes(bytes, settings, cable, ctx.config.maxUploadBytes, ctx.log);
  const trace = await Trace.create({
    cableRunId: earlier.cableRunId,
    end: earlier.end,
    uploadedById: userId,
    originalName: earlier.originalName,
    rawPath: earlier.rawPath,
    sha256: earlier.sha256,
    sizeBytes: earlier.sizeBytes,
    ...analysisColumns(outcome, cable, settings),
    vfOverrideReason: null,
    reanalysisOfId: earlier.id,
  });
  return trace.id;
}

function endLabel(run: CableRun, end: CableEnd) {
  return end === 'A' ? run.endALabel : run.endBLabel;
}

async function summaries(traces: Trace[]): Promise<TraceSummary[]> {
  if (!traces.length) return [];
  const runs = await CableRun.findAll({ where: { id: [...new Set(traces.map((t) => t.cableRunId))] } });
  const sites = await Site.findAll({ where: { id: [...new Set(runs.map((r) => r.siteId))] } });
  const users = await User.findAll({ where: { id: [...new Set(traces.map((t) => t.uploadedById))] } });
  const findings = await Finding.findAll({ where: { traceId: traces.map((t) => t.id) }, attributes: ['id', 'traceId'] });
  return traces.map((t) => {
    const run = runs.find((r) => r.id === t.cableRunId)!;
    const site = sites.find((s) => s.id === run.siteId)!;
    const user = users.find((u) => u.id === t.uploadedById);
    return {
      id: t.id,
      cableRunId: t.cableRunId,
      cableRunName: run.name,
      siteId: site.id,
      siteName: site.name,
      end: t.end,
      endLabel: endLabel(run, t.end),
      originalName: t.originalName,
      sizeBytes: t.sizeBytes,
      sha256: t.sha256,
      status: t.status,
      errorMessage: t.errorMessage,
      uploadedBy: { id: t.uploadedById, name: user?.name ?? `user ${t.uploadedById}` },
      createdAt: t.createdAt.toISOString(),
      isReference: t.isReference,
      eventCount: t.analysis?.events.length ?? 0,
      findingCount: findings.filter((f) => f.traceId === t.id).length,
    };
  });
}

export async function listTraces(q: z.output<typeof TraceListQuerySchema>): Promise<Page<TraceSummary>> {
  const where: WhereOptions<Trace> = {};
  const and: WhereOptions<Trace>[] = [];
  if (q.cableRunId) and.push({ cableRunId: q.cableRunId });
  if (q.siteId) {
    const runs = await CableRun.findAll({ where: { siteId: q.siteId }, attributes: ['id'] });
    and.push({ cableRunId: runs.map((r) => r.id) });
  }
  if (q.end) and.push({ end: q.end });
  if (q.status) and.push({ status: q.status });
  if (q.uploadedById) and.push({ uploadedById: q.uploadedById });
  if (q.from) and.push({ createdAt: { [Op.gte]: new Date(`${q.from}T00:00:00Z`) } });
  if (q.to) and.push({ createdAt: { [Op.lt]: new Date(new Date(`${q.to}T00:00:00Z`).getTime() + 86_400_000) } });
  if (and.length) Object.assign(where, { [Op.and]: and });
  const { rows, count } = await Trace.findAndCountAll({
    where,
    order: [
      [q.sort, q.dir.toUpperCase()],
      ['id', q.dir.toUpperCase()],
    ],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  return { items: await summaries(rows), total: count, page: q.page, pageSize: q.pageSize };
}

/** A few recently drawn traces kept parsed, so moving between them does not re-read large files. */
const parsedCache = new Map<string, ParsedTrace>();
async function parsedSamples(ctx: AppContext, trace: Trace): Promise<ParsedTrace | null> {
  if (trace.status !== 'ok') return null;
  const key = `${ctx.config.uploadDir}:${trace.id}:${trace.sha256}`;
  const hit = parsedCache.get(key);
  if (hit) return hit;
  const bytes = await readRaw(ctx.config.uploadDir, trace.rawPath);
  const parsed = parseTraceCsv(bytes.toString('utf8'), parseOptions(trace.settings, ctx.config.maxUploadBytes));
  parsedCache.set(key, parsed);
  if (parsedCache.size > 8) parsedCache.delete(parsedCache.keys().next().value!);
  return parsed;
}

/** The time (ns, on the file's axis) that distance zero sits at. */
export function zeroTimeNs(a: TraceAnalysis, settings: TraceSettings): number {
  return settings.zeroOffsetNs ?? a.launch.timeNs;
}

function toPoints(x: Float64Array, y: Float64Array, buckets: number) {
  return decimateMinMax(x, y, buckets).map((p) => ({ t: p.x, y: p.y }));
}

async function comparison(ctx: AppContext, trace: Trace, parsed: ParsedTrace, points: number, compareTo?: number): Promise<TraceComparison | null> {
  let ref: Trace | null = null;
  if (compareTo) {
    ref = await Trace.findByPk(compareTo);
    if (!ref) throw AppError.notFound(`Trace ${compareTo}`);
    if (ref.cableRunId !== trace.cableRunId || ref.end !== trace.end) {
      throw new AppError(422, 'not_comparable', 'A trace can only be compared with another of the same cable run, taken from the same end.', {
        fields: [{ field: 'compareTo', message: 'must be a trace of the same run and end' }],
      });
    }
  } else {
    ref = await Trace.findOne({ where: { cableRunId: trace.cableRunId, end: trace.end, isReference: true, status: 'ok' } });
  }
  if (!ref || ref.id === trace.id || ref.status !== 'ok' || !ref.analysis || !trace.analysis) return null;
  const refParsed = await parsedSamples(ctx, ref);
  if (!refParsed) return null;
  const z = zeroTimeNs(trace.analysis, trace.settings);
  const zr = zeroTimeNs(ref.analysis, ref.settings);
  const xs = Float64Array.from(parsed.timeS, (s) => s * 1e9);
  const refXs = Float64Array.from(refParsed.timeS, (s) => s * 1e9 - zr + z);
  const refOnto = resampleOnto(refXs, refParsed.amplitude, xs);
  const diff = Float64Array.from(parsed.amplitude, (y, i) => y - refOnto[i]);
  const match = matchEvents(trace.analysis.events, ref.analysis.events);
  return {
    referenceTraceId: ref.id,
    referenceName: ref.originalName,
    reference: toPoints(xs, refOnto, points),
    difference: toPoints(xs, diff, points),
    newEventIndexes: match.newEvents.map((e) => e.index),
    missingReferenceEvents: match.missing.map((e) => ({ index: e.index, distanceM: e.distanceM, type: e.type })),
  };
}

export async function getTrace(ctx: AppContext, id: number, opts: { points: number; compareTo?: number } = { points: 2000 }): Promise<TraceDetail> {
  const trace = await Trace.findByPk(id);
  if (!trace) throw AppError.notFound(`Trace ${id}`);
  const [summary] = await summaries([trace]);
  const run = (await CableRun.findByPk(trace.cableRunId))!;
  const cable = await CableType.findByPk(run.cableTypeId);
  const markers = await RouteMarker.findAll({ where: { cableRunId: run.id }, order: [['chainageM', 'ASC']] });
  const findings = await Finding.findAll({ where: { traceId: id }, order: [['eventIndex', 'ASC']] });
  const parsed = await parsedSamples(ctx, trace);
  const libraryRevision = cable?.revision;
  const newer = await Trace.findAll({ where: { reanalysisOfId: id }, attributes: ['id'], order: [['id', 'ASC']] });
  return {
    ...summary,
    settings: trace.settings,
    vf: trace.vf,
    vfTolerance: trace.vfTolerance,
    z0Ohm: trace.z0Ohm,
    vfOverrideReason: trace.vfOverrideReason,
    engineVersion: trace.engineVersion,
    cableTypeRevision: trace.cableTypeRevision,
    reanalysisOfId: trace.reanalysisOfId,
    reanalysedAs: newer.map((t) => t.id),
    libraryChangedSince:
      !!cable &&
      (trace.cableTypeRevision !== null && libraryRevision !== undefined
        ? libraryRevision > trace.cableTypeRevision
        : trace.settings.vfOverride === undefined && (cable.vf !== trace.vf || cable.vfTolerance !== trace.vfTolerance)),
    error: trace.status === 'failed' ? { code: trace.errorCode ?? 'UNKNOWN', message: trace.errorMessage ?? '', line: trace.errorLine, field: trace.errorField } : null,
    analysis: trace.analysis,
    zeroNs: trace.analysis ? zeroTimeNs(trace.analysis, trace.settings) : 0,
    samples: parsed ? toPoints(Float64Array.from(parsed.timeS, (s) => s * 1e9), parsed.amplitude, opts.points) : [],
    sampleCount: parsed?.amplitude.length ?? 0,
    cableRun: {
      id: run.id,
      name: run.name,
      installedLengthM: run.installedLengthM,
      endALabel: run.endALabel,
      endBLabel: run.endBLabel,
      cableTypeName: cable?.name ?? '',
      markers: markers.map(markerView),
    },
    findings: findings.map((f) => ({ id: f.id, eventIndex: f.eventIndex, status: f.status, kind: f.kind })),
    comparison: parsed ? await comparison(ctx, trace, parsed, opts.points, opts.compareTo) : null,
  };
}

export async function rawFile(ctx: AppContext, id: number) {
  const trace = await Trace.findByPk(id);
  if (!trace) throw AppError.notFound(`Trace ${id}`);
  return { bytes: await readRaw(ctx.config.uploadDir, trace.rawPath), name: trace.originalName, sha256: trace.sha256 };
}

/** At most one reference per run and end; setting one clears the previous. */
export async function setReference(sequelize: Sequelize, id: number, isReference: boolean) {
  await sequelize.transaction(async (transaction) => {
    const trace = await Trace.findByPk(id, { transaction });
    if (!trace) throw AppError.notFound(`Trace ${id}`);
    if (isReference && trace.status !== 'ok') {
      throw new AppError(422, 'trace_failed', 'A trace the engine could not read cannot be the reference.');
    }
    if (isReference) {
      await Trace.update({ isReference: false }, { where: { cableRunId: trace.cableRunId, end: trace.end, isReference: true }, transaction });
    }
    await trace.update({ isReference }, { transaction });
  });
}

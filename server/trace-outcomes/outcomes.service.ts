import { roundTripFromDistance } from '../../shared/cable/propagation';
import { can } from '../../shared/auth/permissions';
import type { ReflectionEvent } from '../../shared/schemas/trace-analysis';
import type { TraceCalibrationSchema, HealthyOutcomeSchema, TraceOutcomeView, TraceOutcomesView } from '../../shared/schemas/trace-outcomes';
import type { z } from 'zod';
import type { Transaction } from 'sequelize';
import type { SessionUser } from '../auth/guards';
import type { AppContext } from '../context';
import { CableCalibration, CableRun, Finding, Trace, TraceOutcome, User } from '../db/models';
import { AppError } from '../errors';
import { submitCalibration } from '../calibrations/calibrations.service';
import { archiveView } from './archive.service';
import { pendingConflict } from '../traces/traces.service';

const person = (u: User | undefined, id: number) => ({ id, name: u?.name ?? `user ${id}` });

export function outcomeView(o: TraceOutcome): TraceOutcomeView {
  return {
    id: o.id,
    traceId: o.traceId,
    cableRunId: o.cableRunId,
    kind: o.kind,
    eventIndex: o.eventIndex,
    measuredLengthM: o.measuredLengthM,
    windowStartM: o.windowStartM,
    windowEndM: o.windowEndM,
    installedLengthM: o.installedLengthM,
    vf: o.vf,
    calibrationId: o.calibrationId,
    note: o.note,
    recordedBy: person(o.recordedBy, o.recordedById),
    createdAt: new Date(o.createdAt).toISOString(),
  };
}

export async function traceOutcomes(traceId: number): Promise<TraceOutcomesView> {
  const trace = await Trace.findByPk(traceId, { attributes: ['id'] });
  if (!trace) throw AppError.notFound(`Trace ${traceId}`);
  const rows = await TraceOutcome.findAll({ where: { traceId }, include: [{ association: 'recordedBy', attributes: ['id', 'name'] }], order: [['id', 'ASC']] });
  return { outcomes: rows.map(outcomeView), archive: await archiveView(traceId) };
}

/** A readable trace and one of its events that is not an echo; 404 or 422 saying which is wrong. */
/**
 * The trace read again inside the recording transaction, its row held (FOR UPDATE on PostgreSQL; SQLite
 * writes one at a time): one archived since traceAndEvent read it takes nothing more.
 */
async function stillListed(traceId: number, transaction: Transaction) {
  const now = await Trace.findByPk(traceId, { attributes: ['id', 'archivedAt'], lock: transaction.LOCK.UPDATE, transaction });
  if (!now) throw AppError.notFound(`Trace ${traceId}`);
  if (now.archivedAt) throw archivedError(traceId);
}

const archivedError = (traceId: number) =>
  new AppError(422, 'trace_archived', `Trace ${traceId} is archived: an administrator restores it before anything is recorded from it.`);

async function traceAndEvent(traceId: number, eventIndex: number) {
  const trace = await Trace.findByPk(traceId);
  if (!trace) throw AppError.notFound(`Trace ${traceId}`);
  if (trace.archivedAt) throw archivedError(traceId);
  if (trace.status === 'pending') throw pendingConflict(traceId, 'recorded against');
  if (trace.status !== 'ok' || !trace.analysis) {
    throw new AppError(422, 'trace_failed', `Trace ${traceId} could not be read, so nothing can be taken from it.`);
  }
  const event = trace.analysis.events.find((e) => e.index === eventIndex);
  if (!event) {
    throw new AppError(422, 'no_such_event', `Trace ${traceId} has no event ${eventIndex + 1}.`, {
      fields: [{ field: 'eventIndex', message: `trace ${traceId} has ${trace.analysis.events.length} events` }],
    });
  }
  if (event.likelyMultipleOf !== null) {
    throw new AppError(422, 'event_is_echo', `Event ${eventIndex + 1} is probably an echo of event ${event.likelyMultipleOf + 1}, not the far end itself.`, {
      fields: [{ field: 'eventIndex', message: 'is an echo; choose the first reflection' }],
    });
  }
  const run = (await CableRun.findByPk(trace.cableRunId))!;
  return { trace, event, run };
}

/** The far end is the last reflection that is not an echo (or the one the engine marked as the cable's end). */
function isFarEnd(events: ReflectionEvent[], e: ReflectionEvent) {
  if (e.isCableEnd) return true;
  return !events.some((o) => o.likelyMultipleOf === null && o.distanceM > e.distanceM);
}

/**
 * "Far end, cable healthy": the event is the run's far end and there is no
 * fault. Records the far end's distance as the run's measured length (with its
 * window and the VF it was read with). Whose call it is follows the events'
 * rule: the trace's uploader, or someone who reviews findings.
 */
export async function recordHealthy(traceId: number, input: z.output<typeof HealthyOutcomeSchema>, user: SessionUser): Promise<TraceOutcomeView> {
  const { trace, event, run } = await traceAndEvent(traceId, input.eventIndex);
  if (trace.uploadedById !== user.id && !can(user.role, 'findings:review')) {
    throw new AppError(403, 'not_your_trace', `Someone else uploaded trace ${traceId}: recording what it shows is theirs or a supervisor's.`);
  }
  if (!isFarEnd(trace.analysis!.events, event)) {
    throw new AppError(422, 'not_far_end', `Event ${event.index + 1} is not the far end: there are reflections beyond it. Choose the last one.`, {
      fields: [{ field: 'eventIndex', message: 'is not the last reflection of the trace' }],
    });
  }
  const sequelize = Trace.sequelize!;
  const id = await sequelize.transaction(async (transaction) => {
    await stillListed(traceId, transaction);
    const confirmed = await Finding.findOne({ where: { traceId, status: 'confirmed' }, attributes: ['id', 'eventIndex'], transaction });
    if (confirmed) {
      throw AppError.conflict('fault_confirmed', `Event ${confirmed.eventIndex + 1} of this trace is confirmed as a fault (finding ${confirmed.id}): the cable is not healthy on this trace.`);
    }
    const earlier = await TraceOutcome.findOne({ where: { traceId, kind: 'far-end-healthy' }, attributes: ['id'], transaction });
    if (earlier) throw AppError.conflict('already_recorded', `This trace is already recorded as the far end of a healthy cable.`);
    const created = await TraceOutcome.create(
      {
        traceId,
        cableRunId: run.id,
        kind: 'far-end-healthy',
        eventIndex: event.index,
        measuredLengthM: event.distanceM,
        windowStartM: event.windowStartM,
        windowEndM: event.windowEndM,
        installedLengthM: run.installedLengthM,
        vf: trace.vf,
        calibrationId: null,
        note: input.note ?? null,
        recordedById: user.id,
      },
      { transaction },
    );
    return created.id;
  });
  return outcomeView((await TraceOutcome.findByPk(id, { include: [{ association: 'recordedBy', attributes: ['id', 'name'] }] }))!);
}

/**
 * "Calibrate the VF from this known length": files a field calibration from
 * the event's round-trip time (less the test lead's share) and the length the
 * run is known to be, into the planners' review queue, and notes it on the trace.
 */
export async function fileCalibration(ctx: AppContext, traceId: number, input: z.output<typeof TraceCalibrationSchema>, user: SessionUser) {
  const { trace, event, run } = await traceAndEvent(traceId, input.eventIndex);
  const leadM = trace.analysis!.leadLengthM;
  const leadNs = leadM > 0 ? roundTripFromDistance(leadM, trace.vf) * 1e9 : 0;
  const roundTripNs = event.roundTripNs - leadNs;
  const note =
    input.note ??
    `Far end (event ${event.index + 1}) of trace ${traceId} on ${run.name}, from end ${trace.end}; known length ${Number(input.knownLengthM.toFixed(2))} m` +
      (leadM > 0 ? `; test lead of ${Number(leadM.toFixed(2))} m taken out.` : '.');
  return ctx.sequelize.transaction(async (transaction) => {
    await stillListed(traceId, transaction);
    const pending = await CableCalibration.findOne({ where: { traceId, status: 'pending' }, attributes: ['id'], transaction });
    if (pending) throw AppError.conflict('calibration_pending', `Calibration #${pending.id} from this trace is already waiting for review.`);
    const calibration = await submitCalibration(
      { cableTypeId: run.cableTypeId, knownLengthM: input.knownLengthM, roundTripNs, submittedById: user.id, source: 'trace', traceId, note },
      transaction,
    );
    const outcome = await TraceOutcome.create(
      {
        traceId,
        cableRunId: run.id,
        kind: 'calibration-filed',
        eventIndex: event.index,
        measuredLengthM: event.distanceM,
        windowStartM: event.windowStartM,
        windowEndM: event.windowEndM,
        installedLengthM: run.installedLengthM,
        vf: trace.vf,
        calibrationId: calibration.id,
        note,
        recordedById: user.id,
      },
      { transaction },
    );
    const stored = (await TraceOutcome.findByPk(outcome.id, { include: [{ association: 'recordedBy', attributes: ['id', 'name'] }], transaction }))!;
    return { calibration, outcome: outcomeView(stored) };
  });
}

import type { Transaction, WhereOptions } from 'sequelize';
import type { z } from 'zod';
import { can } from '../../shared/auth/permissions';
import { LocateInputError, window95 } from '../../shared/locate';
import type {
  MeasurementCorrectionSchema,
  MeasurementInputSchema,
  MeasurementListQuerySchema,
  MeasurementReadings,
  MeasurementView,
  MeasurementWithdrawSchema,
} from '../../shared/schemas/measurements';
import type { SessionUser } from '../auth/guards';
import type { AppContext } from '../context';
import { CableRun, Finding, Measurement } from '../db/models';
import { AppError } from '../errors';
import type { WriteReceipt } from '../http/idempotency';
import { measurementEstimate, runInput } from './measurement-estimate';

/** A reading may be dated this far ahead of the server's clock (a phone's clock runs fast). */
const CLOCK_SKEW_MS = 5 * 60 * 1000;

/** Refuses readings that give no location on this run, naming the reading. */
function checkReadings(m: MeasurementReadings, run: CableRun) {
  try {
    return measurementEstimate(m, runInput(run));
  } catch (err) {
    if (err instanceof LocateInputError) {
      throw new AppError(422, 'bad_reading', err.message, { fields: [{ field: err.field, message: err.message }] });
    }
    throw err;
  }
}

function measuredAtOf(text: string | undefined): Date {
  if (text === undefined) return new Date();
  const at = new Date(text);
  if (at.getTime() > Date.now() + CLOCK_SKEW_MS)
    throw new AppError(422, 'measured_in_future', 'The reading is dated in the future.', {
      fields: [{ field: 'measuredAt', message: 'must not be in the future' }],
    });
  return at;
}

function userRef(u: { id: number; name: string } | undefined, id: number) {
  return { id, name: u?.name ?? `user ${id}` };
}

export async function view(m: Measurement): Promise<MeasurementView> {
  const run = await CableRun.findByPk(m.cableRunId);
  let estimate: MeasurementView['estimate'] = null;
  let estimateError: string | null = null;
  if (run) {
    try {
      const e = measurementEstimate(
        { kind: m.kind, readings: m.readings, id: m.id } as MeasurementReadings & { id: number },
        runInput(run),
      );
      estimate = {
        fromEnd: e.fromEnd,
        distanceFromEndM: e.distanceFromEndM,
        distanceFromAM: e.distanceFromAM,
        standardUncertaintyM: e.standardUncertaintyM,
        ...window95(e.distanceFromAM, e.standardUncertaintyM, run.installedLengthM),
      };
    } catch (err) {
      if (!(err instanceof LocateInputError)) throw err;
      estimateError = err.message;
    }
  }
  return {
    id: m.id,
    cableRunId: m.cableRunId,
    findingId: m.findingId,
    kind: m.kind,
    readings: m.readings,
    instrument: m.instrument,
    measuredAt: new Date(m.measuredAt).toISOString(),
    note: m.note,
    status: m.status,
    recordedBy: userRef(m.recordedBy, m.recordedById),
    recordedAt: new Date(m.createdAt).toISOString(),
    supersedesId: m.supersedesId,
    changeReason: m.changeReason,
    withdrawnBy: m.withdrawnById === null ? null : userRef(m.withdrawnBy, m.withdrawnById),
    withdrawnAt: m.withdrawnAt === null ? null : new Date(m.withdrawnAt).toISOString(),
    withdrawReason: m.withdrawReason,
    estimate,
    estimateError,
  };
}

const withUsers = [
  { association: 'recordedBy', attributes: ['id', 'name'] },
  { association: 'withdrawnBy', attributes: ['id', 'name'] },
];

async function load(id: number, transaction?: Transaction) {
  const m = await Measurement.findByPk(id, { include: withUsers, transaction });
  if (!m) throw AppError.notFound(`Measurement ${id}`);
  return m;
}

/** One reading as recording it answers. */
export async function measurementView(id: number): Promise<MeasurementView> {
  return view(await load(id));
}

export async function recordMeasurement(
  ctx: AppContext,
  input: z.output<typeof MeasurementInputSchema>,
  user: SessionUser,
  receipt?: WriteReceipt,
): Promise<MeasurementView> {
  const id = await ctx.sequelize.transaction(async (transaction) => {
    let runId = input.cableRunId;
    if (input.findingId !== undefined) {
      const finding = await Finding.findByPk(input.findingId, { transaction });
      if (!finding)
        throw new AppError(422, 'no_such_finding', `There is no finding ${input.findingId}.`, {
          fields: [{ field: 'findingId', message: `there is no finding ${input.findingId}` }],
        });
      if (runId !== undefined && runId !== finding.cableRunId)
        throw new AppError(422, 'wrong_run', `Finding ${finding.id} is on cable run ${finding.cableRunId}, not ${runId}.`, {
          fields: [{ field: 'cableRunId', message: `must be the finding's cable run (${finding.cableRunId})` }],
        });
      runId = finding.cableRunId;
    }
    const run = await CableRun.findByPk(runId, { transaction });
    if (!run)
      throw new AppError(422, 'no_such_run', `There is no cable run ${runId}.`, {
        fields: [{ field: 'cableRunId', message: `there is no cable run ${runId}` }],
      });
    checkReadings(input, run);
    const m = await Measurement.create(
      {
        cableRunId: run.id,
        findingId: input.findingId ?? null,
        kind: input.kind,
        readings: input.readings,
        instrument: input.instrument,
        measuredAt: measuredAtOf(input.measuredAt),
        note: input.note,
        status: 'active',
        recordedById: user.id,
        supersedesId: null,
        changeReason: null,
        withdrawnById: null,
        withdrawnAt: null,
        withdrawReason: null,
      },
      { transaction },
    );
    await receipt?.(transaction, m.id);
    return m.id;
  });
  return measurementView(id);
}

/** At most this many readings are listed for a run or a finding. */
export const MEASUREMENTS_LISTED = 500;

export async function listMeasurements(q: z.output<typeof MeasurementListQuerySchema>): Promise<MeasurementView[]> {
  if (q.cableRunId === undefined && q.findingId === undefined)
    throw AppError.badRequest('invalid_input', 'Give a cableRunId or a findingId.', {
      fields: [{ field: 'cableRunId', message: 'give a cableRunId or a findingId' }],
    });
  const where: WhereOptions<Measurement> = {
    ...(q.cableRunId !== undefined ? { cableRunId: q.cableRunId } : {}),
    ...(q.findingId !== undefined ? { findingId: q.findingId } : {}),
    ...(q.all === 'true' ? {} : { status: 'active' }),
  };
  // The newest MEASUREMENTS_LISTED readings, shown oldest first: a run read more often than that shows its latest ones.
  const rows = await Measurement.findAll({
    where,
    include: withUsers,
    order: [
      ['measuredAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: MEASUREMENTS_LISTED,
  });
  return Promise.all(rows.reverse().map(view));
}

/** One measurement with every version of it, oldest first (the one asked for included). */
export async function getMeasurement(id: number): Promise<{ measurement: MeasurementView; history: MeasurementView[] }> {
  const m = await load(id);
  const chain: Measurement[] = [m];
  for (let older = m; older.supersedesId !== null;) {
    older = await load(older.supersedesId);
    chain.unshift(older);
  }
  for (let newer = await Measurement.findOne({ where: { supersedesId: m.id } }); newer;) {
    chain.push(await load(newer.id));
    newer = await Measurement.findOne({ where: { supersedesId: newer.id } });
  }
  return { measurement: await view(m), history: await Promise.all(chain.map(view)) };
}

/**
 * The reading to correct or withdraw, its row held until the change is stored: PostgreSQL runs transactions side
 * by side, and without the hold two changes made at once would both find it active and fork its chain of versions
 * (two corrections of one reading, or a correction of a withdrawn one). SQLite writes one at a time.
 */
async function loadForChange(id: number, transaction: Transaction) {
  await Measurement.findByPk(id, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
  return load(id, transaction);
}

function mayChange(m: Measurement, user: SessionUser) {
  if (m.recordedById !== user.id && !can(user.role, 'findings:review'))
    throw AppError.forbidden('Only the person who recorded this reading, or a reviewer, may change it.');
  if (m.status !== 'active')
    throw new AppError(409, 'not_active', `Measurement ${m.id} was already ${m.status}; change its latest version.`, {
      status: m.status,
    });
}

export async function correctMeasurement(
  ctx: AppContext,
  id: number,
  input: z.output<typeof MeasurementCorrectionSchema>,
  user: SessionUser,
): Promise<{ measurement: MeasurementView; history: MeasurementView[] }> {
  const newId = await ctx.sequelize.transaction(async (transaction) => {
    const old = await loadForChange(id, transaction);
    mayChange(old, user);
    if (input.kind !== old.kind)
      throw new AppError(422, 'wrong_kind', `Measurement ${id} is a ${old.kind} reading; a correction keeps its kind.`, {
        fields: [{ field: 'kind', message: `must be ${old.kind}` }],
      });
    const run = (await CableRun.findByPk(old.cableRunId, { transaction }))!;
    checkReadings(input, run);
    const m = await Measurement.create(
      {
        cableRunId: old.cableRunId,
        findingId: old.findingId,
        kind: old.kind,
        readings: input.readings,
        instrument: input.instrument,
        measuredAt: measuredAtOf(input.measuredAt),
        note: input.note,
        status: 'active',
        recordedById: user.id,
        supersedesId: old.id,
        changeReason: input.reason,
        withdrawnById: null,
        withdrawnAt: null,
        withdrawReason: null,
      },
      { transaction },
    );
    await old.update({ status: 'corrected' }, { transaction });
    return m.id;
  });
  return getMeasurement(newId);
}

export async function withdrawMeasurement(
  ctx: AppContext,
  id: number,
  input: z.output<typeof MeasurementWithdrawSchema>,
  user: SessionUser,
): Promise<{ measurement: MeasurementView; history: MeasurementView[] }> {
  await ctx.sequelize.transaction(async (transaction) => {
    const m = await loadForChange(id, transaction);
    mayChange(m, user);
    await m.update(
      { status: 'withdrawn', withdrawnById: user.id, withdrawnAt: new Date(), withdrawReason: input.reason },
      { transaction },
    );
  });
  return getMeasurement(id);
}

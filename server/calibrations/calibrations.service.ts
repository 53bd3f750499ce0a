import type { Transaction, WhereOptions } from 'sequelize';
import { CALIBRATION_VF_MAX, CALIBRATION_VF_MIN, calibrationStats, vfFromKnownLengthNs } from '../../shared/cable/calibration';
import {
  CALIBRATION_SOURCE_LABELS,
  CalibrationSubmitSchema,
  type CalibrationSource,
  type CalibrationStatus,
  type CalibrationView,
} from '../../shared/schemas/cables';
import { updateCable } from '../cables/cables.service';
import { can } from '../../shared/auth/permissions';
import type { SessionUser } from '../auth/guards';
import { CableCalibration, CableType, Ticket, TicketCloseout, Trace, User } from '../db/models';
import { TICKET_STATUS_LABELS } from '../../shared/tickets/status';
import { AppError } from '../errors';
import { formatDate } from '../../shared/units/format-date';
import type { SecurityLog } from '../log';

export interface SubmitCalibrationInput {
  cableTypeId: number;
  /** The known one-way length in metres (as-built records, a measured drum). */
  knownLengthM: number;
  /** Round-trip time of the far-end reflection, in nanoseconds. */
  roundTripNs: number;
  submittedById: number;
  source: CalibrationSource;
  traceId?: number | null;
  note?: string;
}

const INCLUDE = [
  { association: 'cableType', attributes: ['id', 'name', 'vf'] },
  { association: 'submittedBy', attributes: ['id', 'name'] },
  { association: 'reviewedBy', attributes: ['id', 'name'] },
  { association: 'closeout', attributes: ['id', 'ticketId'] },
];

/**
 * Why a close-out's calibration cannot be accepted yet, or null. Its VF comes from where the crew says they found
 * the fault: that is known to be the fault only once a supervisor has signed the repair off. A repair still fixed
 * may yet be reopened as not fixed, and a close-out followed by another one on its ticket (reopened, then closed
 * out again) was not where the fault was; feeding either into the library would move every later analysis of
 * the cable type by a position nobody confirmed.
 */
export async function acceptHolds(rows: CableCalibration[], transaction?: Transaction): Promise<Map<number, string>> {
  const held = new Map<number, string>();
  const fromCloseouts = rows.filter((c) => c.closeout);
  if (!fromCloseouts.length) return held;
  const ticketIds = [...new Set(fromCloseouts.map((c) => c.closeout!.ticketId))];
  const tickets = new Map((await Ticket.findAll({ where: { id: ticketIds }, attributes: ['id', 'status'], transaction })).map((t) => [t.id, t.status]));
  const latest = new Map<number, number>();
  for (const k of await TicketCloseout.findAll({ where: { ticketId: ticketIds }, attributes: ['id', 'ticketId'], transaction })) {
    latest.set(k.ticketId, Math.max(latest.get(k.ticketId) ?? 0, k.id));
  }
  for (const c of fromCloseouts) {
    const { id: closeoutId, ticketId } = c.closeout!;
    const status = tickets.get(ticketId);
    if (latest.get(ticketId) !== closeoutId) {
      held.set(c.id, `ticket ${ticketId} was reopened and closed out again after this close-out, so the fault was not where it was found here; reject it`);
    } else if (status !== 'signed-off') {
      held.set(
        c.id,
        `its repair, ticket ${ticketId}, is ${status ? TICKET_STATUS_LABELS[status].toLowerCase() : 'not there'}: a close-out's found position is taken into the library once a supervisor has signed the repair off`,
      );
    }
  }
  return held;
}

/** The views of `rows`, each saying whether its close-out's repair holds its acceptance (acceptHolds). */
export async function calibrationViews(rows: CableCalibration[], transaction?: Transaction): Promise<CalibrationView[]> {
  const held = await acceptHolds(rows, transaction);
  return rows.map((c) => ({ ...calibrationView(c), acceptHeld: held.get(c.id) ?? null }));
}

function calibrationView(c: CableCalibration): CalibrationView {
  const person = (u?: User | null) => (u ? { id: u.id, name: u.name } : null);
  return {
    id: c.id,
    cableType: { id: c.cableTypeId, name: c.cableType?.name ?? `#${c.cableTypeId}`, currentVf: c.cableType?.vf ?? null },
    knownLengthM: c.knownLengthM,
    roundTripNs: c.roundTripNs,
    vf: c.vf,
    libraryVf: c.libraryVf,
    deviation: (c.vf - c.libraryVf) / c.libraryVf,
    source: c.source,
    traceId: c.traceId,
    ticketId: c.closeout?.ticketId ?? null,
    acceptHeld: null,
    note: c.note,
    status: c.status,
    submittedBy: person(c.submittedBy),
    reviewedBy: person(c.reviewedBy),
    reviewedAt: c.reviewedAt ? new Date(c.reviewedAt).toISOString() : null,
    reviewReason: c.reviewReason,
    createdAt: new Date(c.createdAt).toISOString(),
  };
}

/**
 * The calibration to decide, its row held until the decision is stored: PostgreSQL runs transactions side by side,
 * and without the hold two reviewers deciding it at once would both find it pending (one accepting it into the
 * library while the other marks it rejected). SQLite writes one at a time.
 */
async function loadForDecision(id: number, transaction: Transaction) {
  await CableCalibration.findByPk(id, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
  return loadCalibration(id, transaction);
}

export async function loadCalibration(id: number, transaction?: Transaction) {
  const c = await CableCalibration.findByPk(id, { include: INCLUDE, transaction });
  if (!c) throw AppError.notFound(`Calibration ${id}`);
  return c;
}

/**
 * Records a field calibration and puts it in the planners' review queue.
 * VF = 2L / (c·t) from the known length and the round-trip time of its end
 * reflection. Validates the input (ZodError → 400 with fields), that the cable
 * type and the submitter exist (422), and that the VF is physical
 * (≤ 1) and plausible (≥ 0.2, below which it is almost always a unit slip).
 *
 * Called by the calibrations API and by the tickets feature when a crew closes
 * a repair (source 'repair-closeout'); pass the caller's transaction so the
 * calibration is written with the rest or not at all.
 */
export async function submitCalibration(input: SubmitCalibrationInput, transaction?: Transaction): Promise<CalibrationView> {
  const { submittedById } = input;
  const data = CalibrationSubmitSchema.parse({
    cableTypeId: input.cableTypeId,
    knownLengthM: input.knownLengthM,
    roundTripNs: input.roundTripNs,
    source: input.source,
    traceId: input.traceId ?? null,
    note: input.note,
  });
  const cable = await CableType.findByPk(data.cableTypeId, { transaction });
  if (!cable) {
    throw new AppError(422, 'unknown_cable_type', `There is no cable type ${data.cableTypeId} in the library.`, {
      fields: [{ field: 'cableTypeId', message: 'is not a cable type in the library' }],
    });
  }
  if (data.traceId !== null && data.traceId !== undefined && !(await Trace.findByPk(data.traceId, { attributes: ['id'], transaction }))) {
    throw new AppError(422, 'unknown_trace', `There is no trace ${data.traceId} to base this calibration on.`, {
      fields: [{ field: 'traceId', message: 'is not a stored trace' }],
    });
  }
  if (!(await User.findByPk(submittedById, { attributes: ['id'], transaction }))) {
    throw new AppError(422, 'unknown_user', `There is no user ${submittedById} to submit this calibration.`, {
      fields: [{ field: 'submittedById', message: 'is not a user' }],
    });
  }
  const vf = vfFromKnownLengthNs(data.knownLengthM, data.roundTripNs);
  if (vf > CALIBRATION_VF_MAX) {
    throw new AppError(
      422,
      'vf_not_physical',
      `${data.knownLengthM} m in ${data.roundTripNs} ns round trip gives VF ${vf.toFixed(3)}, faster than light: check the length (metres) and the time (nanoseconds, there and back).`,
      { fields: [{ field: 'roundTripNs', message: `gives VF ${vf.toFixed(3)}, above 1` }], vf },
    );
  }
  if (vf < CALIBRATION_VF_MIN) {
    throw new AppError(
      422,
      'vf_implausible',
      `${data.knownLengthM} m in ${data.roundTripNs} ns round trip gives VF ${vf.toFixed(3)}, slower than any cable: check the units (metres, nanoseconds).`,
      { fields: [{ field: 'roundTripNs', message: `gives VF ${vf.toFixed(3)}, below ${CALIBRATION_VF_MIN}` }], vf },
    );
  }
  const created = await CableCalibration.create(
    {
      cableTypeId: cable.id,
      knownLengthM: data.knownLengthM,
      roundTripNs: data.roundTripNs,
      vf,
      libraryVf: cable.vf,
      source: data.source,
      traceId: data.traceId ?? null,
      note: data.note ? data.note : null,
      status: 'pending',
      submittedById,
      reviewedById: null,
      reviewedAt: null,
      reviewReason: null,
    },
    { transaction },
  );
  return (await calibrationViews([await loadCalibration(created.id, transaction)], transaction))[0];
}

// ---- review ----

export async function listCalibrations(query: {
  status: CalibrationStatus | 'all';
  cableTypeId?: number;
  submittedById?: number;
  page: number;
  pageSize: number;
}) {
  const where: WhereOptions<CableCalibration> = {};
  if (query.status !== 'all') Object.assign(where, { status: query.status });
  if (query.cableTypeId) Object.assign(where, { cableTypeId: query.cableTypeId });
  if (query.submittedById) Object.assign(where, { submittedById: query.submittedById });
  const { rows, count } = await CableCalibration.findAndCountAll({
    where,
    include: INCLUDE,
    // The queue is worked oldest first; decided ones are looked up newest first.
    order: [
      ['createdAt', query.status === 'pending' ? 'ASC' : 'DESC'],
      ['id', query.status === 'pending' ? 'ASC' : 'DESC'],
    ],
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
    distinct: true,
  });
  return { items: await calibrationViews(rows), total: count, page: query.page, pageSize: query.pageSize };
}

function assertPending(c: CableCalibration) {
  if (c.status !== 'pending') {
    throw new AppError(409, 'already_reviewed', `Calibration ${c.id} was already ${c.status}${c.reviewedBy ? ` by ${c.reviewedBy.name}` : ''}.`);
  }
}

/** The library keeps VFs to four decimals: a field calibration is not better than about ±0.001. */
export const roundVf = (vf: number) => Math.round(vf * 1e4) / 1e4;

/**
 * Four eyes: a calibration changes the library VF every later analysis uses,
 * so the person who filed it does not accept it. Someone allowed to override
 * (an administrator) may, with a reason, which goes into the library history.
 * Returns the override reason, or null when the reviewer is someone else.
 */
function ownCalibrationOverride(c: CableCalibration, reviewer: Pick<SessionUser, 'id' | 'role'>, note: string | undefined): string | null {
  if (c.submittedById !== reviewer.id) return null;
  if (!can(reviewer.role, 'calibrations:override')) {
    throw new AppError(403, 'own_calibration', `You filed calibration #${c.id}, so another planner accepts it: a second person checks every change to the library VF.`);
  }
  if (!note || note.trim().length < 10) {
    throw AppError.badRequest('override_reason_required', `You filed calibration #${c.id}: to accept it yourself, say why no one else can (a note of at least 10 characters).`, {
      fields: [{ field: 'note', message: 'give the reason for accepting your own calibration (at least 10 characters)' }],
    });
  }
  return note.trim();
}

export interface AcceptBasedOn {
  vf: number;
  vfTolerance: number;
  acceptedCount: number;
}

/**
 * A reviewer's proposal is the mean of the calibrations accepted when the form was opened, with this one added.
 * Where another planner accepted one of the same cable type since, storing it would set the library VF to a mean
 * that leaves theirs out while both show as accepted: refused (409), naming what was accepted. The cable type's
 * row is held first (FOR UPDATE on PostgreSQL; SQLite writes one at a time), so two reviewers accepting two
 * calibrations of one type at once count one after the other. Accepted calibrations are never undone, so the
 * count says whether the set moved.
 */
async function refuseAcceptedMeanwhile(c: CableCalibration, acceptedCount: number, transaction: Transaction) {
  await CableType.findByPk(c.cableTypeId, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
  const accepted = await CableCalibration.findAll({
    where: { cableTypeId: c.cableTypeId, status: 'accepted' },
    attributes: ['id'],
    order: [['id', 'ASC']],
    transaction,
  });
  if (accepted.length === acceptedCount) return;
  // The newest ones are the ones the form did not know of.
  const since = accepted.slice(Math.min(acceptedCount, accepted.length)).map((a) => `#${a.id}`);
  const which = since.length === 0 ? 'fewer calibrations than the form counted' : `calibration${since.length === 1 ? '' : 's'} ${since.join(', ')}`;
  const now = `${accepted.length} calibration${accepted.length === 1 ? ' is' : 's are'} accepted now, you started from ${acceptedCount}`;
  throw new AppError(
    409,
    'changed_meanwhile',
    `Someone else accepted ${which} of ${c.cableType?.name ?? `cable type ${c.cableTypeId}`} after you opened calibration #${c.id}, so the VF proposed leaves ${since.length === 1 ? 'it' : 'them'} out. Nothing was saved: open the calibration again to see the new proposal, then accept it if it still stands.`,
    { fields: [{ field: 'vf', message: `the proposal leaves out ${which}, accepted after you opened the form: ${now}` }] },
  );
}

/**
 * Accepts a pending calibration into its library entry: the entry's VF becomes
 * the calibration's (source field-calibrated, with a reference to it), with a
 * history row, in one transaction. The next analysis of that cable type uses it.
 * The reviewer must not be the person who filed it, except by an override (above).
 */
export async function acceptCalibration(
  id: number,
  reviewer: Pick<SessionUser, 'id' | 'role'>,
  opts: { vf?: number; vfTolerance?: number; note?: string; basedOn?: AcceptBasedOn } = {},
  security?: SecurityLog,
) {
  const sequelize = CableCalibration.sequelize!;
  const reviewerId = reviewer.id;
  const result = await sequelize.transaction(async (transaction) => {
    const c = await loadForDecision(id, transaction);
    assertPending(c);
    const override = ownCalibrationOverride(c, reviewer, opts.note);
    // Held while its repair is not signed off: the ticket's row is read in this transaction, and a signed-off
    // ticket is never reopened, so a sign-off cannot be undone under the accept.
    const held = (await acceptHolds([c], transaction)).get(c.id);
    if (held) {
      throw new AppError(409, 'repair_not_signed_off', `Calibration #${c.id} cannot be accepted: ${held}. Nothing was changed.`);
    }
    if (opts.basedOn) await refuseAcceptedMeanwhile(c, opts.basedOn.acceptedCount, transaction);
    // In the one date style of the screens and e-mails ("3 Dec 2026"), not ISO beside them.
    const submitted = formatDate(c.createdAt);
    const vf = roundVf(opts.vf ?? c.vf);
    const vfReference =
      (vf !== roundVf(c.vf) ? `Mean of the accepted field calibrations of this cable type, the last #${c.id}: ` : `Field calibration #${c.id}: `) +
      `${Number(c.knownLengthM.toFixed(2))} m known length, ${Number(c.roundTripNs.toFixed(2))} ns round trip` +
      ` (${CALIBRATION_SOURCE_LABELS[c.source].toLowerCase()}${c.traceId ? `, trace ${c.traceId}` : ''})` +
      `, submitted by ${c.submittedBy?.name ?? 'unknown'} on ${submitted}.`;
    const { cable } = await updateCable(
      c.cableTypeId,
      {
        vf,
        vfSource: 'field-calibrated',
        vfReference,
        ...(opts.vfTolerance !== undefined ? { vfTolerance: opts.vfTolerance } : {}),
        // The library values the form showed: a VF or tolerance changed by hand since is refused, not overwritten.
        ...(opts.basedOn ? { basedOn: { vf: opts.basedOn.vf, vfTolerance: opts.basedOn.vfTolerance } } : {}),
        reason: override
          ? `Accepted field calibration #${c.id} by its own submitter, an administrator, without a second reviewer: ${override}`
          : `Accepted field calibration #${c.id}${opts.note ? `: ${opts.note}` : ''}`,
      },
      { userId: reviewerId, kind: 'calibration', calibrationId: c.id },
      transaction,
    );
    await c.update(
      { status: 'accepted', reviewedById: reviewerId, reviewedAt: new Date(), reviewReason: override ? `Own calibration accepted by override: ${override}` : (opts.note ?? null) },
      { transaction },
    );
    return { calibration: (await calibrationViews([await loadCalibration(id, transaction)], transaction))[0], cable, override };
  });
  if (result.override) {
    security?.('calibration-own-accepted', { calibrationId: id, cableTypeId: result.cable.id, actorId: reviewerId, reason: result.override });
  }
  return { calibration: result.calibration, cable: result.cable };
}

export async function rejectCalibration(id: number, reviewerId: number, reason: string) {
  const sequelize = CableCalibration.sequelize!;
  return sequelize.transaction(async (transaction) => {
    const c = await loadForDecision(id, transaction);
    assertPending(c);
    await c.update({ status: 'rejected', reviewedById: reviewerId, reviewedAt: new Date(), reviewReason: reason }, { transaction });
    return (await calibrationViews([await loadCalibration(id, transaction)], transaction))[0];
  });
}

/** Per cable type: statistics over the calibrations not rejected, counts by status, and the list. */
export async function calibrationsForCable(cableTypeId: number) {
  const cable = await CableType.findByPk(cableTypeId);
  if (!cable) throw AppError.notFound(`Cable type ${cableTypeId}`);
  const rows = await CableCalibration.findAll({
    where: { cableTypeId },
    include: INCLUDE,
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 500,
  });
  // The counts and statistics are over every calibration of the type, not only the newest listed: a reviewer's form
  // sends the accepted count back as what it started from (acceptCalibration).
  const all = await CableCalibration.findAll({ where: { cableTypeId }, attributes: ['status', 'vf'], raw: true });
  const counts: Record<CalibrationStatus, number> = { pending: 0, accepted: 0, rejected: 0 };
  for (const r of all) counts[r.status as CalibrationStatus] += 1;
  return {
    libraryVf: cable.vf,
    libraryVfTolerance: cable.vfTolerance,
    stats: calibrationStats(all.filter((r) => r.status !== 'rejected').map((r) => r.vf)),
    acceptedStats: calibrationStats(all.filter((r) => r.status === 'accepted').map((r) => r.vf)),
    counts,
    items: await calibrationViews(rows),
  };
}

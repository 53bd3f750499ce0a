import type { Transaction } from 'sequelize';
import { CALIBRATION_VF_MAX, CALIBRATION_VF_MIN, vfFromKnownLengthNs } from '../../shared/cable/calibration';
import { CalibrationSubmitSchema, type CalibrationSource, type CalibrationView } from '../../shared/schemas/cables';
import { CableCalibration, CableType, User } from '../db/models';
import { AppError } from '../errors';

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
  { association: 'cableType', attributes: ['id', 'name'] },
  { association: 'submittedBy', attributes: ['id', 'name'] },
  { association: 'reviewedBy', attributes: ['id', 'name'] },
];

export function calibrationView(c: CableCalibration): CalibrationView {
  const person = (u?: User | null) => (u ? { id: u.id, name: u.name } : null);
  return {
    id: c.id,
    cableType: { id: c.cableTypeId, name: c.cableType?.name ?? `#${c.cableTypeId}` },
    knownLengthM: c.knownLengthM,
    roundTripNs: c.roundTripNs,
    vf: c.vf,
    libraryVf: c.libraryVf,
    deviation: (c.vf - c.libraryVf) / c.libraryVf,
    source: c.source,
    traceId: c.traceId,
    note: c.note,
    status: c.status,
    submittedBy: person(c.submittedBy),
    reviewedBy: person(c.reviewedBy),
    reviewedAt: c.reviewedAt ? new Date(c.reviewedAt).toISOString() : null,
    reviewReason: c.reviewReason,
    createdAt: new Date(c.createdAt).toISOString(),
  };
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
  return calibrationView(await loadCalibration(created.id, transaction));
}

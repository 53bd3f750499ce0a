import { col, fn, Op, type Transaction, type WhereOptions } from 'sequelize';
import { nameKey } from '../db/name-key';
import { containsText } from '../db/search';
import {
  formatAttenuationList,
  formatPulseVfList,
  headlinePoint,
  LEGACY_POINT_MESSAGE,
  legacyPointClash,
  lossFieldIssues,
  type AttenuationPoint,
  type CableListQuery,
  type CableTypeChangeView,
  type CableTypeInput,
  type CableTypeUpdate,
  type CableTypeView,
  type PulseVf,
} from '../../shared/schemas/cables';
import { CableType, CableTypeChange, type User } from '../db/models';
import type { ChangeKind, FieldChange } from '../db/models/cable-type-change';
import { AppError } from '../errors';

/** The line constants, which the analysis turns into attenuation when no points are given. */
const LINE_CONSTANTS = ['rDcOhmPerM', 'skinOhmPerMRootHz', 'lHPerM', 'cFPerM', 'gSPerM', 'lossTangent'] as const;

/**
 * The fields a trace analysis takes from the library. A change to any of
 * them bumps CableType.revision.
 */
export const ANALYSIS_FIELDS = ['vf', 'vfTolerance', 'z0Ohm', 'attenuation', ...LINE_CONSTANTS, 'pulseVfs'] as const;

/** Every stored field, in the order the CSV lists them (the loss fields came later, so they come last). */
export const CABLE_FIELDS = [
  'name',
  'construction',
  'dielectric',
  'z0Ohm',
  'vf',
  'vfTolerance',
  'attenuationDbPer100m',
  'attenuationFreqMhz',
  'vfSource',
  'vfReference',
  'notes',
  'attenuation',
  'lossSource',
  ...LINE_CONSTANTS,
  'pulseVfs',
] as const;
export type CableField = (typeof CABLE_FIELDS)[number];

/** The history records the list, not the pair that repeats its lowest point. */
const HISTORY_FIELDS = CABLE_FIELDS.filter((f) => f !== 'attenuationDbPer100m' && f !== 'attenuationFreqMhz');

/** The fields kept as lists, written as text in the history and the CSV file. */
export const LIST_FIELDS = ['attenuation', 'pulseVfs'] as const;

export function cableView(c: CableType): CableTypeView {
  return {
    id: c.id,
    name: c.name,
    construction: c.construction,
    dielectric: c.dielectric,
    z0Ohm: c.z0Ohm,
    vf: c.vf,
    vfTolerance: c.vfTolerance,
    attenuationDbPer100m: c.attenuationDbPer100m,
    attenuationFreqMhz: c.attenuationFreqMhz,
    vfSource: c.vfSource,
    vfReference: c.vfReference,
    notes: c.notes,
    attenuation: c.attenuation ?? [],
    lossSource: c.lossSource ?? null,
    rDcOhmPerM: c.rDcOhmPerM ?? null,
    skinOhmPerMRootHz: c.skinOhmPerMRootHz ?? null,
    lHPerM: c.lHPerM ?? null,
    cFPerM: c.cFPerM ?? null,
    gSPerM: c.gSPerM ?? null,
    lossTangent: c.lossTangent ?? null,
    pulseVfs: c.pulseVfs ?? [],
    revision: c.revision,
    createdAt: new Date(c.createdAt).toISOString(),
    updatedAt: new Date(c.updatedAt).toISOString(),
  };
}

export function changeView(h: CableTypeChange): CableTypeChangeView {
  const by = h.changedBy as User | undefined;
  return {
    id: h.id,
    revision: h.revision,
    kind: h.kind,
    reason: h.reason,
    changes: h.changes,
    changedBy: by ? { id: by.id, name: by.name } : null,
    calibrationId: h.calibrationId,
    createdAt: new Date(h.createdAt).toISOString(),
  };
}

const TEXT_SORTS = new Set<CableListQuery['sort']>(['name', 'construction', 'dielectric', 'vfSource']);

export async function listCables(query: CableListQuery) {
  const clauses: WhereOptions<CableType>[] = [];
  if (query.q) {
    const words = query.q.split(/\s+/).filter(Boolean).slice(0, 6);
    for (const w of words) {
      clauses.push({ [Op.or]: (['name', 'dielectric', 'construction', 'vfReference'] as const).map((a) => containsText(CableType, a, w)) });
    }
  }
  if (query.construction) clauses.push({ construction: query.construction });
  const { rows, count } = await CableType.findAndCountAll({
    where: clauses.length ? { [Op.and]: clauses } : {},
    order: [
      // Names and words sort as a reader expects, "Paper…" before "PVC…", on SQLite as on PostgreSQL.
      TEXT_SORTS.has(query.sort)
        ? [fn('lower', col(CableType.getAttributes()[query.sort].field!)), query.dir.toUpperCase()]
        : [query.sort, query.dir.toUpperCase()],
      ['id', 'ASC'],
    ],
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map(cableView), total: count, page: query.page, pageSize: query.pageSize };
}

export async function loadCable(id: number, transaction?: Transaction) {
  const c = await CableType.findByPk(id, { transaction });
  if (!c) throw AppError.notFound(`Cable type ${id}`);
  return c;
}

export async function getCable(id: number) {
  return cableView(await loadCable(id));
}

/** The form of a cable type's name two entries may not share (see nameKey). */
export const cableNameKey = nameKey;

async function assertNameFree(name: string, exceptId: number | null, transaction?: Transaction) {
  const key = cableNameKey(name);
  // PostgreSQL runs transactions side by side: hold off other writers of the library until this one
  // commits, so two names that fold alike cannot both pass the check (SQLite writes one at a time anyway).
  if (transaction && CableType.sequelize!.getDialect() === 'postgres') {
    await CableType.sequelize!.query('LOCK TABLE cable_types IN SHARE ROW EXCLUSIVE MODE', { transaction });
  }
  // One lookup in the unique index of the stored folded names (name_key).
  const other = await CableType.findOne({
    where: { nameKey: key, ...(exceptId !== null ? { id: { [Op.ne]: exceptId } } : {}) },
    attributes: ['id', 'name'],
    transaction,
  });
  if (other) {
    throw new AppError(409, 'name_taken', `The library already has a cable type named "${other.name}".`, {
      fields: [{ field: 'name', message: 'is already in the library' }],
    });
  }
}

/** A stored or given value as the history keeps it: lists as their text form, none as null. */
export function historyValue(field: CableField, v: unknown): string | number | null {
  if (v === undefined || v === null) return null;
  if (field === 'attenuation') return (v as AttenuationPoint[]).length ? formatAttenuationList(v as AttenuationPoint[]) : null;
  if (field === 'pulseVfs') return (v as PulseVf[]).length ? formatPulseVfList(v as PulseVf[]) : null;
  return v as string | number;
}

function valueOf(c: CableType | CableTypeInput | null, field: CableField): string | number | null {
  if (!c) return null;
  return historyValue(field, (c as Record<CableField, unknown>)[field]);
}

/** The fields whose value differs, old → new. */
export function diffCable(before: CableType | null, after: Partial<CableTypeInput>): FieldChange[] {
  const changes: FieldChange[] = [];
  for (const field of HISTORY_FIELDS) {
    if (!(field in after)) continue;
    const from = valueOf(before, field);
    const to = historyValue(field, (after as Record<string, unknown>)[field]);
    if (from !== to) changes.push({ field, from, to });
  }
  return changes;
}

async function record(
  cable: CableType,
  kind: ChangeKind,
  changes: FieldChange[],
  reason: string,
  changedById: number | null,
  transaction?: Transaction,
  calibrationId: number | null = null,
) {
  await CableTypeChange.create(
    { cableTypeId: cable.id, revision: cable.revision, kind, changes, reason, changedById, calibrationId },
    { transaction },
  );
}

export async function createCable(
  input: CableTypeInput,
  by: { userId: number | null; reason?: string; kind?: 'create' | 'import' },
  transaction?: Transaction,
): Promise<CableTypeView> {
  // The name check and the insert are one transaction, so two entries made at once cannot share a name.
  if (!transaction) return CableType.sequelize!.transaction((t) => createCable(input, by, t));
  await assertNameFree(input.name, null, transaction);
  const cable = await CableType.create({ ...input, revision: 1 }, { transaction });
  await record(cable, by.kind ?? 'create', diffCable(null, input), by.reason ?? 'Added to the library', by.userId, transaction);
  return cableView(cable);
}

/**
 * Changes an entry and writes one history row (who, when, why, old → new).
 * A change to a value the analysis uses (ANALYSIS_FIELDS) bumps the revision.
 * Answers 422 if nothing would change, so that no empty history is written.
 */
export async function updateCable(
  id: number,
  input: Omit<CableTypeUpdate, 'reason'> & { reason: string },
  by: { userId: number | null; kind?: ChangeKind; calibrationId?: number | null },
  transaction?: Transaction,
): Promise<{ cable: CableTypeView; changes: FieldChange[] }> {
  // Read, compare and write in one transaction with the row locked (FOR UPDATE on PostgreSQL; SQLite
  // runs write transactions one at a time), so changes made at once apply one after another and each
  // history row says what it really changed from.
  if (!transaction) return CableType.sequelize!.transaction((t) => updateCable(id, input, by, t));
  const { reason, basedOn, ...given } = input;
  const cable = await CableType.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
  if (!cable) throw AppError.notFound(`Cable type ${id}`);
  if (basedOn) await assertNotChangedMeanwhile(cable, basedOn, Object.keys(given), transaction);
  const { patch, changes, revision } = planUpdate(cable, given);
  if (changes.length === 0) {
    throw new AppError(422, 'no_change', 'Nothing would change: every value given is the one already stored.', {
      fields: [{ field: '(body)', message: 'changes nothing' }],
    });
  }
  if (patch.name !== undefined && patch.name !== cable.name) await assertNameFree(patch.name, cable.id, transaction);
  await cable.update({ ...patch, revision }, { transaction });
  await record(cable, by.kind ?? 'update', changes, reason, by.userId, transaction, by.calibrationId ?? null);
  return { cable: cableView(cable), changes };
}

/**
 * What a change would write to an entry: the values (loss figures made consistent), the fields that differ
 * (old → new) and the revision, bumped when a value the analysis uses (ANALYSIS_FIELDS) changes. Writes nothing.
 */
export function planUpdate(cable: CableType, given: Omit<CableTypeUpdate, 'reason' | 'basedOn'>) {
  const patch = lossPatch(cable, given);
  const changes = diffCable(cable, patch);
  const bump = changes.some((c) => (ANALYSIS_FIELDS as readonly string[]).includes(c.field));
  return { patch, changes, revision: bump ? cable.revision + 1 : cable.revision };
}

/**
 * Refuses a change (409) where a field it sets was changed by someone else after the editor read it: the stored
 * value is no longer the one the editor started from. Saving would overwrite their value unseen. Fields the
 * change does not set, or that still hold the starting value, merge as usual.
 */
async function assertNotChangedMeanwhile(cable: CableType, basedOn: Partial<CableTypeInput>, setting: string[], transaction: Transaction) {
  // The attenuation list and its one-point pair (attenuationDbPer100m, attenuationFreqMhz) are one value: a change
  // to either is checked against whichever of them the snapshot holds.
  const LOSS = ['attenuation', 'attenuationDbPer100m', 'attenuationFreqMhz'];
  const checked = new Set(setting.some((f) => LOSS.includes(f)) ? [...setting, ...LOSS] : setting);
  const stale: FieldChange[] = [];
  for (const field of CABLE_FIELDS) {
    if (!(field in basedOn) || !checked.has(field)) continue;
    const now = valueOf(cable, field);
    const then = historyValue(field, (basedOn as Record<string, unknown>)[field]);
    if (now !== then) stale.push({ field, from: now, to: then });
  }
  if (stale.length === 0) return;
  const last = await CableTypeChange.findOne({
    where: { cableTypeId: cable.id },
    order: [['id', 'DESC']],
    include: [{ association: 'changedBy', attributes: ['name'] }],
    transaction,
  });
  const who = (last as unknown as { changedBy?: { name: string } | null })?.changedBy?.name;
  const byWhom = last ? ` (last saved${who ? ` by ${who}` : ''} at ${last.createdAt.toISOString()})` : '';
  const shown = (v: string | number | null) => (v === null ? 'empty' : String(v));
  throw new AppError(
    409,
    'changed_meanwhile',
    `Someone else changed ${stale.map((c) => c.field).join(', ')} after you opened this entry${byWhom}. Nothing was saved: open the entry again to see the current values, then make your change.`,
    { fields: stale.map((c) => ({ field: c.field, message: `is now ${shown(c.from)}; you started from ${shown(c.to)}` })) },
  );
}

function unpaired(missing: 'attenuationDbPer100m' | 'attenuationFreqMhz'): AppError {
  return new AppError(422, 'attenuation_unpaired', 'An attenuation needs the frequency it was measured at, and a frequency needs its attenuation.', {
    fields: [{ field: missing, message: missing === 'attenuationFreqMhz' ? 'is required with an attenuation' : 'is required with a frequency' }],
  });
}

/**
 * A change's loss fields, checked against the stored entry: the one-point pair
 * stands for a one-point list (refused where the entry holds more points, so
 * none is lost unseen), lists are kept sorted, and the merged entry must pass
 * the same loss checks as a new one.
 */
function lossPatch(cable: CableType, given: Omit<CableTypeUpdate, 'reason'>): Omit<CableTypeUpdate, 'reason'> {
  const patch = { ...given };
  const pairGiven = patch.attenuationDbPer100m !== undefined || patch.attenuationFreqMhz !== undefined;
  if (pairGiven) {
    const a = patch.attenuationDbPer100m !== undefined ? patch.attenuationDbPer100m : cable.attenuationDbPer100m;
    const f = patch.attenuationFreqMhz !== undefined ? patch.attenuationFreqMhz : cable.attenuationFreqMhz;
    if ((a === null) !== (f === null)) throw unpaired(a === null ? 'attenuationDbPer100m' : 'attenuationFreqMhz');
    if (patch.attenuation === undefined) {
      if (cable.attenuation.length > 1) {
        throw new AppError(422, 'attenuation_list', `This entry has ${cable.attenuation.length} attenuation points: change them through attenuation.`, {
          fields: [{ field: 'attenuationDbPer100m', message: `replaces one point, and this entry has ${cable.attenuation.length}: give attenuation instead` }],
        });
      }
      patch.attenuation = a === null || f === null ? [] : [{ frequencyMhz: f, dbPer100m: a }];
    } else if (legacyPointClash({ attenuationDbPer100m: a, attenuationFreqMhz: f, attenuation: patch.attenuation })) {
      throw new AppError(422, 'attenuation_clash', 'The one-point attenuation is not one of the points given.', {
        fields: [{ field: 'attenuationDbPer100m', message: LEGACY_POINT_MESSAGE }],
      });
    }
  }
  if (patch.attenuation !== undefined) {
    patch.attenuation = [...patch.attenuation].sort((x, y) => x.frequencyMhz - y.frequencyMhz);
    Object.assign(patch, headlinePoint(patch.attenuation));
  }
  if (patch.pulseVfs !== undefined) patch.pulseVfs = [...patch.pulseVfs].sort((x, y) => x.pulseWidthNs - y.pulseWidthNs);
  const merged = { ...cableView(cable), ...patch };
  const issues = lossFieldIssues(merged);
  if (issues.length) {
    throw new AppError(422, 'loss_incomplete', `The loss figures are not complete: ${issues.map((i) => `${i.field} ${i.message}`).join('; ')}.`, {
      fields: issues,
    });
  }
  return patch;
}

export async function history(id: number, opts: { sinceRevision?: number } = {}) {
  await loadCable(id);
  const rows = await CableTypeChange.findAll({
    where: opts.sinceRevision === undefined ? { cableTypeId: id } : { cableTypeId: id, revision: { [Op.gt]: opts.sinceRevision } },
    include: [{ association: 'changedBy', attributes: ['id', 'name'] }],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
  });
  return rows.map(changeView);
}

// ---- for the trace analysis ----

export interface CableTypeVersion {
  id: number;
  name: string;
  /** Goes up by one whenever a value in ANALYSIS_FIELDS changes. */
  revision: number;
  vf: number;
  vfTolerance: number;
  z0Ohm: number;
  updatedAt: Date;
}

/**
 * What a trace analysis should take from the library and keep beside its
 * result: store `revision` together with the vf, vfTolerance and z0Ohm used.
 *
 * To tell whether the library value has changed since a trace was analysed,
 * compare the stored revision with `cableTypeVersion(id).revision` (or with
 * CableType.revision read directly): higher means the VF, its tolerance, Z0,
 * the loss figures or the pulse-width VFs have been edited, imported over or
 * replaced by an accepted calibration.
 * Do not compare updatedAt — a changed name or note moves it too.
 * `changesSince(id, revision)` gives the history entries to show (when, who,
 * old → new, why) next to the re-analysis offer.
 */
export async function cableTypeVersion(cableTypeId: number, transaction?: Transaction): Promise<CableTypeVersion> {
  const c = await loadCable(cableTypeId, transaction);
  return { id: c.id, name: c.name, revision: c.revision, vf: c.vf, vfTolerance: c.vfTolerance, z0Ohm: c.z0Ohm, updatedAt: c.updatedAt };
}

/** The history entries after `revision` that changed a value the analysis uses, newest first. */
export async function changesSince(cableTypeId: number, revision: number, transaction?: Transaction): Promise<CableTypeChangeView[]> {
  const rows = await CableTypeChange.findAll({
    where: { cableTypeId, revision: { [Op.gt]: revision } },
    include: [{ association: 'changedBy', attributes: ['id', 'name'] }],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    transaction,
  });
  return rows
    .map(changeView)
    .filter((h) => h.changes.some((c) => (ANALYSIS_FIELDS as readonly string[]).includes(c.field)));
}

export { record as recordCableChange };

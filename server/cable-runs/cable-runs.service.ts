import { Op, type Sequelize, type Transaction } from 'sequelize';
import { nameKey } from '../db/name-key';
import { containsText } from '../db/search';
import type { z } from 'zod';
import type {
  CableRunInputSchema,
  CableRunUpdateSchema,
  CableRunView,
  MarkersInputSchema,
  RouteMarkerView,
} from '../../shared/schemas/sites';
import type { Page } from '../../shared/schemas/users';
import { CableRun, CableType, RouteMarker, Site, Trace } from '../db/models';
import { AppError, type FieldIssue } from '../errors';
import { coordinateProblems } from '../../shared/locate/route-geo';
import { mergeOverStored, sameValue } from '../http/based-on';

type RunInput = z.output<typeof CableRunInputSchema>;
type RunUpdate = z.output<typeof CableRunUpdateSchema>;

export function markerView(m: RouteMarker): RouteMarkerView {
  return { id: m.id, label: m.label, kind: m.kind, chainageM: m.chainageM, slackM: m.slackM, notes: m.notes, latitude: m.latitude ?? null, longitude: m.longitude ?? null };
}

async function views(runs: CableRun[]): Promise<CableRunView[]> {
  if (!runs.length) return [];
  const ids = runs.map((r) => r.id);
  const [sites, types, markers, refs] = await Promise.all([
    Site.findAll({ where: { id: [...new Set(runs.map((r) => r.siteId))] } }),
    CableType.findAll({ where: { id: [...new Set(runs.map((r) => r.cableTypeId))] } }),
    RouteMarker.findAll({ where: { cableRunId: ids }, order: [['chainageM', 'ASC'], ['id', 'ASC']] }),
    Trace.findAll({ where: { cableRunId: ids, isReference: true }, attributes: ['id', 'cableRunId', 'end'] }),
  ]);
  return runs.map((r) => {
    const t = types.find((x) => x.id === r.cableTypeId)!;
    return {
      id: r.id,
      siteId: r.siteId,
      siteName: sites.find((s) => s.id === r.siteId)?.name ?? '',
      name: r.name,
      cableTypeId: r.cableTypeId,
      cableType: { id: t.id, name: t.name, vf: t.vf, vfTolerance: t.vfTolerance, z0Ohm: t.z0Ohm },
      endALabel: r.endALabel,
      endBLabel: r.endBLabel,
      installedLengthM: r.installedLengthM,
      notes: r.notes,
      markers: markers.filter((m) => m.cableRunId === r.id).map(markerView),
      referenceTraceIds: {
        A: refs.find((x) => x.cableRunId === r.id && x.end === 'A')?.id ?? null,
        B: refs.find((x) => x.cableRunId === r.id && x.end === 'B')?.id ?? null,
      },
    };
  });
}

export async function listRuns(opts: { siteId?: number; q?: string; page: number; pageSize: number }): Promise<Page<CableRunView>> {
  const where = {
    ...(opts.siteId ? { siteId: opts.siteId } : {}),
    ...(opts.q ? { [Op.and]: [containsText(CableRun, 'name', opts.q)] } : {}),
  };
  const { rows, count } = await CableRun.findAndCountAll({
    where,
    order: [['name', 'ASC']],
    limit: opts.pageSize,
    offset: (opts.page - 1) * opts.pageSize,
  });
  return { items: await views(rows), total: count, page: opts.page, pageSize: opts.pageSize };
}

export async function getRun(id: number): Promise<CableRunView> {
  const run = await CableRun.findByPk(id);
  if (!run) throw AppError.notFound(`Cable run ${id}`);
  return (await views([run]))[0];
}

async function checkRefs(input: { siteId: number; cableTypeId: number; name: string }, exceptId: number | undefined, transaction: Transaction) {
  const fields: FieldIssue[] = [];
  // The site's row is held (FOR UPDATE on PostgreSQL; SQLite writes one at a time) so that two runs whose
  // names fold alike cannot both pass the check below at once.
  if (!(await Site.findByPk(input.siteId, { transaction, lock: transaction.LOCK.UPDATE }))) {
    fields.push({ field: 'siteId', message: `there is no site ${input.siteId}` });
  }
  if (!(await CableType.findByPk(input.cableTypeId, { transaction }))) {
    fields.push({ field: 'cableTypeId', message: `there is no cable type ${input.cableTypeId} in the library` });
  }
  // Names are compared as a reader sees them: "Feeder 1" and "feeder 1", "Écluse" and "ÉCLUSE" are one run
  // (the folded form is stored, name_key, under a unique index with the site).
  const other = await CableRun.findOne({
    where: { siteId: input.siteId, nameKey: nameKey(input.name), ...(exceptId !== undefined ? { id: { [Op.ne]: exceptId } } : {}) },
    attributes: ['id', 'name'],
    transaction,
  });
  if (other) {
    const as = other.name === input.name ? '' : ` (as "${other.name}")`;
    fields.push({ field: 'name', message: `is already used by another run at this site${as}` });
  }
  if (fields.length) {
    throw new AppError(422, 'invalid_cable_run', fields.map((f) => `${f.field}: ${f.message}`).join('; '), { fields });
  }
}

/** Markers must lie on the route (0 … installed length less slack) with distinct labels. */
export function checkMarkers(
  installedLengthM: number,
  markers: Array<{ label: string; chainageM: number; slackM: number; latitude?: number | null; longitude?: number | null }>,
) {
  const fields: FieldIssue[] = [];
  const totalSlack = markers.reduce((s, m) => s + m.slackM, 0);
  const routeLength = installedLengthM - totalSlack;
  if (routeLength <= 0) {
    fields.push({ field: 'markers', message: `the slack (${totalSlack} m in all) is not less than the installed length (${installedLengthM} m)` });
  }
  const seen = new Set<string>();
  markers.forEach((m, i) => {
    if (m.chainageM > routeLength) {
      fields.push({
        field: `markers.${i}.chainageM`,
        message: `marker ${m.label} is at ${m.chainageM} m, past the end of the route (${routeLength.toFixed(1)} m = installed length less slack)`,
      });
    }
    // As a reader sees it: case in every script, full-width forms, Unicode form and runs of spaces folded.
    const key = nameKey(m.label);
    if (seen.has(key)) fields.push({ field: `markers.${i}.label`, message: `the label ${m.label} is used twice` });
    seen.add(key);
  });
  for (const p of coordinateProblems(markers)) fields.push({ field: `markers.${p.index}.${p.field}`, message: p.message });
  if (fields.length) throw new AppError(422, 'invalid_markers', fields.map((f) => f.message).join('; '), { fields });
}

export async function createRun(input: RunInput, sequelize: Sequelize) {
  const id = await sequelize.transaction(async (transaction) => {
    await checkRefs(input, undefined, transaction);
    return (await CableRun.create(input, { transaction })).id;
  });
  return getRun(id);
}

export async function updateRun(id: number, update: RunUpdate, sequelize: Sequelize) {
  await sequelize.transaction(async (transaction) => {
    // The run's row is held (FOR UPDATE on PostgreSQL; SQLite writes one at a time) while its markers are checked
    // against the new length, as replaceMarkers holds it while the new markers are checked against the length.
    const run = await CableRun.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!run) throw AppError.notFound(`Cable run ${id}`);
    // A field someone else saved after the form was opened is kept, or the save refused if this one changed it too.
    const { basedOn, ...given } = update;
    const input = mergeOverStored(`cable run ${id}`, given, basedOn, {
      name: run.name,
      cableTypeId: run.cableTypeId,
      endALabel: run.endALabel,
      endBLabel: run.endBLabel,
      installedLengthM: run.installedLengthM,
      notes: run.notes,
    });
    await checkRefs({ ...input, siteId: run.siteId }, id, transaction);
    const markers = await RouteMarker.findAll({ where: { cableRunId: id }, transaction });
    checkMarkers(input.installedLengthM, markers);
    await run.update(input, { transaction });
  });
  return getRun(id);
}

/** Replace a run's route markers in one go (the editor saves the whole list). */
export async function replaceMarkers(id: number, input: z.output<typeof MarkersInputSchema>, sequelize: Sequelize) {
  await sequelize.transaction(async (transaction) => {
    // Held as updateRun holds it: a change of length at the same moment comes first (and these markers are checked
    // against it) or waits and checks its length against these markers.
    const run = await CableRun.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!run) throw AppError.notFound(`Cable run ${id}`);
    if (input.basedOn) {
      const stored = await RouteMarker.findAll({ where: { cableRunId: id }, transaction });
      // The list is one value: another planner's saved list is never replaced unseen by one edited from the old list.
      if (!sameValue(markerSet(stored), markerSet(input.basedOn.markers)) && !sameValue(markerSet(stored), markerSet(input.markers))) {
        throw new AppError(
          409,
          'changed_meanwhile',
          `Someone else saved the route markers of cable run ${id} after you opened them (they now list ${stored.length}). Nothing was saved: open the run again to see their markers, then make your change.`,
          { fields: [{ field: 'markers', message: 'were changed by someone else after you opened them' }] },
        );
      }
    }
    checkMarkers(run.installedLengthM, input.markers);
    await RouteMarker.destroy({ where: { cableRunId: id }, transaction });
    for (const m of input.markers) await RouteMarker.create({ ...m, cableRunId: id }, { transaction });
  });
  return getRun(id);
}

/** A marker list as a comparable value: what each marker says, in a fixed order (ids and list order aside). */
function markerSet(markers: Array<{ label: string | null; kind: string | null; chainageM: number | null; slackM: number | null; notes?: string | null; latitude?: number | null; longitude?: number | null }>) {
  return markers
    .map((m) => JSON.stringify([m.label, m.kind, m.chainageM, m.slackM, m.notes ?? null, m.latitude ?? null, m.longitude ?? null]))
    .sort();
}

export async function cableTypeChoices() {
  const types = await CableType.findAll({ order: [['name', 'ASC']] });
  return types.map((t) => ({ id: t.id, name: t.name, vf: t.vf, vfTolerance: t.vfTolerance, z0Ohm: t.z0Ohm }));
}

import { Op, type Transaction } from 'sequelize';
import { nameKey } from '../db/name-key';
import { containsText } from '../db/search';
import type { z } from 'zod';
import type { SiteInputSchema, SiteSummary, SiteUpdateSchema } from '../../shared/schemas/sites';
import { mergeOverStored, sameValue } from '../http/based-on';
import type { Page } from '../../shared/schemas/users';
import { CableRun, Finding, Site, SiteSupervisor, User } from '../db/models';
import { AppError } from '../errors';

type SiteInput = z.output<typeof SiteInputSchema>;
type SiteUpdate = z.output<typeof SiteUpdateSchema>;

/** Who may be put on a site: an active supervisor or administrator. */
const supervising = (u: User) => u.active && (u.role === 'supervisor' || u.role === 'admin');

/**
 * The site's new supervisor list. Everyone added must be an active supervisor or administrator; someone already
 * on the site (`kept`) who has since been deactivated or moved to another role stays as they are, so the edit
 * form, which sends back the list it loaded, still saves the site's other changes.
 */
async function checkSupervisors(ids: number[], transaction?: Transaction, kept: number[] = []) {
  const unique = [...new Set(ids)];
  const added = unique.filter((id) => !kept.includes(id));
  if (added.length === 0) return unique;
  const found = await User.findAll({ where: { id: added }, transaction });
  const bad = added.filter((id) => {
    const u = found.find((f) => f.id === id);
    return !u || !supervising(u);
  });
  if (bad.length) {
    throw new AppError(422, 'not_a_supervisor', `User ${bad.join(', ')} is not an active supervisor.`, {
      fields: [{ field: 'supervisorIds', message: `user ${bad.join(', ')} is not an active supervisor` }],
    });
  }
  return unique;
}

async function summaries(sites: Site[]): Promise<SiteSummary[]> {
  const ids = sites.map((s) => s.id);
  const links = ids.length ? await SiteSupervisor.findAll({ where: { siteId: ids } }) : [];
  const users = links.length ? await User.findAll({ where: { id: [...new Set(links.map((l) => l.userId))] } }) : [];
  // Counts in SQL: one grouped row per site, never one row per finding.
  const countBy = async (model: typeof CableRun | typeof Finding, where: Record<string, unknown>) => {
    const rows = ids.length
      ? ((await (model as typeof Finding).count({ where: { siteId: ids, ...where }, group: ['siteId'] })) as unknown as Array<{
          siteId: number;
          count: number | string;
        }>)
      : [];
    return new Map(rows.map((r) => [Number(r.siteId), Number(r.count)]));
  };
  const [runCounts, findingCounts] = await Promise.all([countBy(CableRun, {}), countBy(Finding, { status: 'confirmed' })]);
  return sites.map((s) => ({
    id: s.id,
    name: s.name,
    address: s.address,
    latitude: s.latitude,
    longitude: s.longitude,
    accessNotes: s.accessNotes,
    supervisors: links
      .filter((l) => l.siteId === s.id)
      .map((l) => users.find((u) => u.id === l.userId)!)
      .filter(Boolean)
      .map((u) => ({ id: u.id, name: u.name, email: u.email, active: supervising(u) }))
      .sort((a, b) => a.name.localeCompare(b.name)),
    cableRunCount: runCounts.get(s.id) ?? 0,
    openFindingCount: findingCounts.get(s.id) ?? 0,
  }));
}

export async function listSites(opts: { q?: string; page: number; pageSize: number }): Promise<Page<SiteSummary>> {
  const where = opts.q
    ? { [Op.or]: [containsText(Site, 'name', opts.q), containsText(Site, 'address', opts.q)] }
    : {};
  const { rows, count } = await Site.findAndCountAll({
    where,
    order: [['name', 'ASC']],
    limit: opts.pageSize,
    offset: (opts.page - 1) * opts.pageSize,
  });
  return { items: await summaries(rows), total: count, page: opts.page, pageSize: opts.pageSize };
}

export async function getSite(id: number): Promise<SiteSummary> {
  const site = await Site.findByPk(id);
  if (!site) throw AppError.notFound(`Site ${id}`);
  return (await summaries([site]))[0];
}

/**
 * A site's name is free unless another site has it as a reader sees it: ignoring case in every
 * script, Unicode form and runs of spaces ("North Yard" and "north yard", "Écluse" and "écluse" are
 * one place to a reader). The folded form is stored (name_key) under a unique index.
 */
async function nameFree(name: string, exceptId?: number, transaction?: Transaction) {
  // PostgreSQL runs transactions side by side: hold off other writers of sites until this one
  // commits, so two names that fold alike cannot both pass the check (SQLite writes one at a time anyway).
  if (transaction && Site.sequelize!.getDialect() === 'postgres') {
    await Site.sequelize!.query('LOCK TABLE sites IN SHARE ROW EXCLUSIVE MODE', { transaction });
  }
  // One lookup in the unique index of the stored folded names.
  const other = await Site.findOne({
    where: { nameKey: nameKey(name), ...(exceptId !== undefined ? { id: { [Op.ne]: exceptId } } : {}) },
    attributes: ['id', 'name'],
    transaction,
  });
  if (other) {
    const same = other.name === name ? '' : ` (as "${other.name}")`;
    throw new AppError(409, 'site_name_taken', `There is already a site called "${name}"${same}.`, {
      fields: [{ field: 'name', message: 'is already used by another site' }],
    });
  }
}

export async function createSite(input: SiteInput, sequelize: import('sequelize').Sequelize) {
  const id = await sequelize.transaction(async (transaction) => {
    await nameFree(input.name, undefined, transaction);
    const supervisorIds = await checkSupervisors(input.supervisorIds, transaction);
    const { supervisorIds: _ignored, ...fields } = input;
    const site = await Site.create(fields, { transaction });
    for (const userId of supervisorIds) await SiteSupervisor.create({ siteId: site.id, userId }, { transaction });
    return site.id;
  });
  return getSite(id);
}

export async function updateSite(id: number, update: SiteUpdate, sequelize: import('sequelize').Sequelize) {
  await sequelize.transaction(async (transaction) => {
    // The row is held (FOR UPDATE on PostgreSQL; SQLite writes one at a time), so a save made at the same moment
    // is compared with what this one stores, not with what was there before it.
    const site = await Site.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!site) throw AppError.notFound(`Site ${id}`);
    const linked = (await SiteSupervisor.findAll({ where: { siteId: id }, attributes: ['userId'], transaction })).map((l) => l.userId);
    const { basedOn, ...given } = update;
    const stored = {
      name: site.name,
      address: site.address,
      latitude: site.latitude,
      longitude: site.longitude,
      accessNotes: site.accessNotes,
      supervisorIds: linked,
    };
    const input = mergeOverStored(`site ${id}`, given, basedOn, stored, {
      // The supervisors are a set: the order they are listed in changes nothing.
      same: (field, a, b) =>
        field === 'supervisorIds' && Array.isArray(a) && Array.isArray(b)
          ? sameValue([...new Set(a as number[])].sort((x, y) => x - y), [...new Set(b as number[])].sort((x, y) => x - y))
          : sameValue(a, b),
    });
    await nameFree(input.name, id, transaction);
    const supervisorIds = await checkSupervisors(input.supervisorIds, transaction, linked);
    const { supervisorIds: _ignored, ...fields } = input;
    await site.update(fields, { transaction });
    await SiteSupervisor.destroy({ where: { siteId: id }, transaction });
    for (const userId of supervisorIds) await SiteSupervisor.create({ siteId: id, userId }, { transaction });
  });
  return getSite(id);
}

/** Who is told about a site's confirmed findings. */
export async function siteSupervisors(siteId: number, transaction?: Transaction) {
  const links = await SiteSupervisor.findAll({ where: { siteId }, transaction });
  if (!links.length) return [];
  const users = await User.findAll({ where: { id: links.map((l) => l.userId), active: true }, transaction });
  return users.map((u) => ({ id: u.id, name: u.name, email: u.email, active: true }));
}

export async function supervisorChoices() {
  const users = await User.findAll({ where: { active: true, role: ['supervisor', 'admin'] }, order: [['name', 'ASC']] });
  return users.map((u) => ({ id: u.id, name: u.name, email: u.email, active: true }));
}

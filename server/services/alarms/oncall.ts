/** The on-call rota: who answers alarms for which site, when, with a backup. */
import { Op } from 'sequelize';
import { checkCoverage } from '../../../shared/oncall/coverage';
import { badRequest, notFound } from '../../http-error';
import type { Models } from '../../models';
import type { OncallShift } from '../../models/oncall-shift';
import type { User } from '../../models/user';

export interface ShiftInput {
  siteId: number;
  userId: number;
  backupUserId: number | null;
  startsAt: number;
  endsAt: number;
}

export interface ShiftView {
  id: number;
  siteId: number;
  userId: number;
  userName: string | null;
  backupUserId: number | null;
  backupUserName: string | null;
  startsAt: string;
  endsAt: string;
}

/** Roles that can answer alarms from the rota. */
const ONCALL_ROLES = ['technician', 'planner', 'admin'];

async function checkUser(models: Models, id: number, field: string): Promise<User> {
  const u = await models.User.findByPk(id);
  if (!u || u.disabled) throw badRequest('user does not exist or is disabled', field);
  if (!ONCALL_ROLES.includes(u.role)) throw badRequest('an operator cannot be on call for alarms', field);
  return u;
}

async function check(models: Models, input: ShiftInput): Promise<void> {
  const site = await models.Site.findByPk(input.siteId);
  if (!site || site.retiredAt) throw badRequest('site does not exist or is retired', 'siteId');
  await checkUser(models, input.userId, 'userId');
  if (input.backupUserId !== null) {
    if (input.backupUserId === input.userId) throw badRequest('the backup must be someone else', 'backupUserId');
    await checkUser(models, input.backupUserId, 'backupUserId');
  }
  if (!(input.endsAt > input.startsAt)) throw badRequest('a shift must end after it starts', 'endsAt');
  if (input.endsAt - input.startsAt > 31 * 86400_000) throw badRequest('a shift is at most 31 days', 'endsAt');
}

async function views(models: Models, shifts: OncallShift[]): Promise<ShiftView[]> {
  const ids = [...new Set(shifts.flatMap((s) => [s.userId, s.backupUserId].filter((x): x is number => x !== null)))];
  const users = ids.length ? await models.User.findAll({ where: { id: ids }, attributes: ['id', 'name'] }) : [];
  const name = new Map(users.map((u) => [u.id, u.name]));
  return shifts.map((s) => ({
    id: s.id,
    siteId: s.siteId,
    userId: s.userId,
    userName: name.get(s.userId) ?? null,
    backupUserId: s.backupUserId,
    backupUserName: s.backupUserId === null ? null : (name.get(s.backupUserId) ?? null),
    startsAt: new Date(s.startsAt).toISOString(),
    endsAt: new Date(s.endsAt).toISOString(),
  }));
}

/** `siteIds`: the sites the asker may see (null: every site); a siteId outside them gives an empty list. */
export async function listShifts(models: Models, q: { siteId?: number; siteIds?: number[] | null; from?: number; to?: number }): Promise<ShiftView[]> {
  const where: Record<string | symbol, unknown> = {};
  if (q.siteId !== undefined) where.siteId = q.siteId;
  if (q.siteIds) where.siteId = q.siteIds.filter((id) => q.siteId === undefined || id === q.siteId);
  if (q.to !== undefined) where.startsAt = { [Op.lt]: new Date(q.to) };
  if (q.from !== undefined) where.endsAt = { [Op.gt]: new Date(q.from) };
  const shifts = await models.OncallShift.findAll({
    where,
    order: [
      ['startsAt', 'ASC'],
      ['id', 'ASC'],
    ],
    limit: 1000,
  });
  return views(models, shifts);
}

/** What a saved shift leaves at its site: overlaps with other shifts, and hours nobody covers from a day before it to a day after. */
export interface ShiftCoverage {
  overlaps: { shiftId: number | null; userId: number; samePerson: boolean; from: string; to: string }[];
  uncovered: { from: string; to: string }[];
}

const DAY_MS = 86_400_000;

async function coverageOf(models: Models, s: OncallShift): Promise<ShiftCoverage> {
  const from = new Date(s.startsAt).getTime() - DAY_MS;
  const to = new Date(s.endsAt).getTime() + DAY_MS;
  const near = await models.OncallShift.findAll({ where: { siteId: s.siteId, startsAt: { [Op.lt]: new Date(to) }, endsAt: { [Op.gt]: new Date(from) } } });
  const plain = (x: OncallShift) => ({ id: x.id, userId: x.userId, startsAt: new Date(x.startsAt).getTime(), endsAt: new Date(x.endsAt).getTime() });
  const c = checkCoverage(plain(s), near.map(plain), { from, to });
  const iso = (ms: number) => new Date(ms).toISOString();
  return {
    overlaps: c.overlaps.map((o) => ({ shiftId: o.other.id ?? null, userId: o.other.userId, samePerson: o.samePerson, from: iso(o.from), to: iso(o.to) })),
    uncovered: c.uncovered.map((g) => ({ from: iso(g.from), to: iso(g.to) })),
  };
}

/** The saved shift, with the overlaps and uncovered hours it leaves (a warning: saving is the planner's call). */
export async function createShift(models: Models, input: ShiftInput): Promise<ShiftView & { coverage: ShiftCoverage }> {
  await check(models, input);
  const s = await models.OncallShift.create({ ...input, startsAt: new Date(input.startsAt), endsAt: new Date(input.endsAt) });
  return { ...(await views(models, [s]))[0], coverage: await coverageOf(models, s) };
}

export async function updateShift(models: Models, id: number, patch: Partial<ShiftInput>): Promise<ShiftView & { coverage: ShiftCoverage }> {
  const s = await models.OncallShift.findByPk(id);
  if (!s) throw notFound('on-call shift');
  const merged: ShiftInput = {
    siteId: patch.siteId ?? s.siteId,
    userId: patch.userId ?? s.userId,
    backupUserId: patch.backupUserId !== undefined ? patch.backupUserId : s.backupUserId,
    startsAt: patch.startsAt ?? new Date(s.startsAt).getTime(),
    endsAt: patch.endsAt ?? new Date(s.endsAt).getTime(),
  };
  await check(models, merged);
  await s.update({ ...merged, startsAt: new Date(merged.startsAt), endsAt: new Date(merged.endsAt) });
  return { ...(await views(models, [s]))[0], coverage: await coverageOf(models, s) };
}

export async function deleteShift(models: Models, id: number): Promise<void> {
  const n = await models.OncallShift.destroy({ where: { id } });
  if (!n) throw notFound('on-call shift');
}

/** Who is on call for a site at a moment: the latest-starting shift that covers it. */
export async function onCallFor(models: Models, siteId: number, at: number): Promise<{ primary: User | null; backup: User | null }> {
  const shift = await models.OncallShift.findOne({
    where: { siteId, startsAt: { [Op.lte]: new Date(at) }, endsAt: { [Op.gt]: new Date(at) } },
    order: [
      ['startsAt', 'DESC'],
      ['id', 'DESC'],
    ],
  });
  if (!shift) return { primary: null, backup: null };
  const active = (u: User | null) => (u && !u.disabled ? u : null);
  const primary = active(await models.User.findByPk(shift.userId));
  const backup = shift.backupUserId === null ? null : active(await models.User.findByPk(shift.backupUserId));
  return { primary, backup };
}

export interface PersonView {
  id: number;
  name: string;
  email: string;
  role: string;
}

/** People (enabled accounts) to choose from for the rota, optionally of some roles: no admin rights needed. */
export async function listPeople(models: Models, roles?: string[], userIds?: number[] | null): Promise<PersonView[]> {
  const where: Record<string, unknown> = { disabled: false };
  if (userIds) where.id = userIds;
  if (roles?.length) where.role = { [Op.in]: roles };
  const users = await models.User.findAll({
    where,
    order: [
      ['name', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  return users.map((u) => ({ id: u.id, name: u.name, email: u.email, role: u.role }));
}

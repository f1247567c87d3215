import { passwordProblem } from '../../shared/password-rules';
import type { AccessEvents } from '../auth/access-events';
import { badRequest, conflict, HttpError, notFound } from '../http-error';
import type { Models, User } from '../models';
import type { Role } from '../models/user';
import { hashSecret } from './passwords';
import { setUserSites, sitesByUser } from './site-access';

export interface UserInput {
  email: string;
  name: string;
  password: string;
  role: Role;
}

export const listUsers = (models: Models) => models.User.findAll({ order: [['id', 'ASC']] });

async function ensureEmailFree(models: Models, email: string, exceptId?: number): Promise<void> {
  const other = await models.User.findOne({ where: { email: email.trim().toLowerCase() } });
  if (other && other.id !== exceptId) throw conflict('e-mail is already in use', 'email');
}

export async function createUser(models: Models, input: UserInput, cost?: number): Promise<User> {
  await ensureEmailFree(models, input.email);
  return models.User.create({ email: input.email, name: input.name, role: input.role, passwordHash: await hashSecret(input.password, cost) });
}

/**
 * Disabling a user, or changing their role or password, ends every session signed before: the
 * session version in their tokens no longer matches, and their open sockets are closed.
 */
export async function updateUser(
  models: Models,
  actorId: number,
  id: number,
  patch: Partial<UserInput> & { disabled?: boolean },
  access?: AccessEvents,
): Promise<User> {
  const user = await models.User.findByPk(id);
  if (!user) throw notFound('user');
  if (id === actorId && (patch.disabled === true || (patch.role && patch.role !== 'admin'))) {
    throw new HttpError(409, 'you cannot disable yourself or drop your own admin role', patch.disabled ? 'disabled' : 'role');
  }
  if (patch.email !== undefined) await ensureEmailFree(models, patch.email, id);
  const { password, ...rest } = patch;
  if (password !== undefined) {
    const problem = passwordProblem(password, patch.email ?? user.email);
    if (problem) throw badRequest(`password: ${problem}`, 'password');
  }
  const endsSessions = (patch.disabled === true && !user.disabled) || (patch.role !== undefined && patch.role !== user.role) || password !== undefined;
  user.set(rest);
  if (password !== undefined) user.passwordHash = await hashSecret(password);
  if (endsSessions) user.sessionVersion = user.sessionVersion + 1;
  await user.save();
  if (endsSessions) access?.userChanged(id);
  return user;
}

/** Users are disabled, not deleted: their names stay on the records they signed. */
export const disableUser = (models: Models, actorId: number, id: number, access?: AccessEvents) => updateUser(models, actorId, id, { disabled: true }, access);

/** A user as the admin API shows it: no hash, and the sites the user is limited to (empty: every site). */
export type UserView = ReturnType<User['toJSON']> & { siteIds: number[] };

export async function userViews(models: Models, users: User[]): Promise<UserView[]> {
  const sites = await sitesByUser(
    models,
    users.map((u) => u.id),
  );
  return users.map((u) => ({ ...u.toJSON(), siteIds: sites.get(u.id) ?? [] }));
}

export const userView = async (models: Models, user: User): Promise<UserView> => (await userViews(models, [user]))[0];

/** Limit a user to these sites; an empty list lets the user see every site again (admins always do). */
export async function setSitesOfUser(models: Models, id: number, siteIds: number[], access?: AccessEvents): Promise<UserView> {
  const user = await models.User.findByPk(id);
  if (!user) throw notFound('user');
  const unique = [...new Set(siteIds)];
  const found = unique.length ? await models.Site.count({ where: { id: unique } }) : 0;
  if (found !== unique.length) throw badRequest('siteIds: every id must be an existing site', 'siteIds');
  await setUserSites(models, id, unique);
  // HTTP reads the sites per request; open sockets joined rooms under the old sites and are re-scoped
  access?.sitesChanged(id);
  return userView(models, user);
}

import type { TokenService } from '../auth/tokens';
import { hashGate } from '../auth/hash-gate';
import { HttpError } from '../http-error';
import type { Models } from '../models';
import { checkAgainstDummy, checkSecret } from './passwords';

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: string;
}

/** `clientKey` (the client's address) shares the hashing fairly among addresses under a flood. */
export async function login(
  models: Models,
  tokens: TokenService,
  email: string,
  password: string,
  clientKey = '',
): Promise<{ token: string; user: SessionUser }> {
  const user = await models.User.findOne({ where: { email: email.trim().toLowerCase() } });
  let ok: boolean;
  try {
    ok = await hashGate.run(clientKey, () => (user ? checkSecret(password, user.passwordHash) : checkAgainstDummy(password)), email.trim().toLowerCase());
  } catch {
    throw new HttpError(429, 'too many sign-in attempts waiting; try again later');
  }
  if (!user || !ok || user.disabled) throw new HttpError(401, 'e-mail or password is wrong');
  return { token: tokens.sign({ id: user.id, email: user.email, role: user.role, sv: user.sessionVersion }), user: sessionUser(user) };
}

export async function me(models: Models, id: number): Promise<SessionUser> {
  const user = await models.User.findByPk(id);
  if (!user) throw new HttpError(401, 'account is not active');
  return sessionUser(user);
}

function sessionUser(u: { id: number; email: string; name: string; role: string }): SessionUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role };
}

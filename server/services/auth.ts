import type { TokenService } from '../auth/tokens';
import { HttpError } from '../http-error';
import type { Models } from '../models';
import { checkAgainstDummy, checkSecret } from './passwords';

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: string;
}

export async function login(models: Models, tokens: TokenService, email: string, password: string): Promise<{ token: string; user: SessionUser }> {
  const user = await models.User.findOne({ where: { email: email.trim().toLowerCase() } });
  const ok = user ? await checkSecret(password, user.passwordHash) : await checkAgainstDummy(password);
  if (!user || !ok || user.disabled) throw new HttpError(401, 'e-mail or password is wrong');
  return { token: tokens.sign({ id: user.id, email: user.email, role: user.role }), user: sessionUser(user) };
}

export async function me(models: Models, id: number): Promise<SessionUser> {
  const user = await models.User.findByPk(id);
  if (!user) throw new HttpError(401, 'account is not active');
  return sessionUser(user);
}

function sessionUser(u: { id: number; email: string; name: string; role: string }): SessionUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role };
}

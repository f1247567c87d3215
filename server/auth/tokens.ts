import jwt from 'jsonwebtoken';
import { ROLES } from '../models/user';
import type { AuthUser } from '../telemetry/types';

export interface TokenService {
  /** How long a token (and the browser's session cookie) lasts, in seconds. */
  readonly lifetimeS: number;
  sign(user: AuthUser): string;
  /** The user a token stands for, or null when it is missing, expired, forged or malformed. */
  verify(token: string | undefined | null): AuthUser | null;
}

const ISSUER = 'jacketwatch';

export function createTokenService(secret: string, expiresInSeconds = 12 * 3600): TokenService {
  return {
    lifetimeS: expiresInSeconds,
    sign: (user) =>
      jwt.sign({ email: user.email, role: user.role, sv: user.sv ?? 0 }, secret, {
        subject: String(user.id),
        issuer: ISSUER,
        expiresIn: expiresInSeconds,
        algorithm: 'HS256',
      }),
    verify(token) {
      if (!token) return null;
      try {
        const p = jwt.verify(token, secret, { issuer: ISSUER, algorithms: ['HS256'] }) as jwt.JwtPayload;
        const id = Number(p.sub);
        if (!Number.isInteger(id) || typeof p.email !== 'string' || !(ROLES as readonly string[]).includes(p.role)) return null;
        return { id, email: p.email, role: p.role, sv: typeof p.sv === 'number' ? p.sv : 0 };
      } catch {
        return null;
      }
    },
  };
}

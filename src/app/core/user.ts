/** Roles as the server defines them; the server stays the authority on what each may do. */
export type Role = 'admin' | 'planner' | 'technician' | 'operator';

export interface User {
  id: number;
  email: string;
  name: string;
  role: Role;
}

/** Answer of a cookie sign-in: the session is in an httpOnly cookie, only the user comes back. */
export interface SignInResponse {
  user: User;
}

/**
 * Sent with every call of the app: the server accepts a change made with the session cookie only
 * with this header, which a page of another site cannot add (server/auth/session-cookie.ts).
 */
export const CSRF_HEADERS = { 'X-JW-Request': '1' } as const;

/** Roles as the server defines them; the server stays the authority on what each may do. */
export type Role = 'admin' | 'planner' | 'technician' | 'operator';

export interface User {
  id: number;
  email: string;
  name: string;
  role: Role;
}

export interface LoginResponse {
  token: string;
  user: User;
}

import { inject } from '@angular/core';
import { CanMatchFn, RedirectCommand, Router } from '@angular/router';
import { AuthService } from './auth.service';
import { Role } from './user';

/** Signed in at all; otherwise to sign-in, remembering where the user was going. */
export const signedInGuard: CanMatchFn = (_route, segments) => {
  const auth = inject(AuthService);
  if (auth.signedIn()) return true;
  const returnUrl = '/' + segments.map((s) => s.path).join('/');
  return inject(Router).createUrlTree(['/sign-in'], { queryParams: returnUrl !== '/' ? { returnUrl } : {} });
};

/**
 * Only for the given roles. This only keeps screens tidy: the server checks every call itself.
 * A user without the role sees a page that says so, at the address they asked for (so a reload asks again).
 */
export function roleGuard(...roles: Role[]): CanMatchFn {
  return (route, segments) => {
    const auth = inject(AuthService);
    if (!auth.signedIn()) return signedInGuard(route, segments);
    if (auth.hasRole(...roles)) return true;
    const tree = inject(Router).createUrlTree(['/not-allowed'], { queryParams: { roles: roles.join(',') } });
    return new RedirectCommand(tree, { skipLocationChange: true });
  };
}

/** The sign-in page is for signed-out users. */
export const signedOutGuard: CanMatchFn = () => {
  const auth = inject(AuthService);
  return auth.signedIn() ? inject(Router).createUrlTree(['/fleet']) : true;
};

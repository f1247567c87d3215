import { inject } from '@angular/core';
import { CanMatchFn, Router } from '@angular/router';
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
 * A user without the role goes to the fleet board.
 */
export function roleGuard(...roles: Role[]): CanMatchFn {
  return (route, segments) => {
    const auth = inject(AuthService);
    if (!auth.signedIn()) return signedInGuard(route, segments);
    return auth.hasRole(...roles) ? true : inject(Router).createUrlTree(['/fleet']);
  };
}

/** The sign-in page is for signed-out users. */
export const signedOutGuard: CanMatchFn = () => {
  const auth = inject(AuthService);
  return auth.signedIn() ? inject(Router).createUrlTree(['/fleet']) : true;
};

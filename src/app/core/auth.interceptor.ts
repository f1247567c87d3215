import { HttpErrorResponse, HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { catchError, throwError } from 'rxjs';
import { AuthService } from './auth.service';
import { CSRF_HEADERS } from './user';

/**
 * Our API calls go with the session cookie (the browser sends it) and the header that marks them as
 * the app's own; a 401 from any of them means the session is over.
 */
export const authInterceptor: HttpInterceptorFn = (req, next) => {
  const auth = inject(AuthService);
  const isApi = req.url.startsWith('/api/');
  const marked = isApi ? req.clone({ setHeaders: CSRF_HEADERS }) : req;
  return next(marked).pipe(
    catchError((err: unknown) => {
      if (isApi && err instanceof HttpErrorResponse && err.status === 401 && !req.url.startsWith('/api/auth/login')) {
        auth.expire();
      }
      return throwError(() => err);
    }),
  );
};

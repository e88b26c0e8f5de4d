import { DOCUMENT } from '@angular/common';
import { HttpErrorResponse, HttpInterceptorFn, HttpRequest } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, defer, from, switchMap, throwError } from 'rxjs';
import { ApiError, apiErrorFromResponse } from './api-error';
import { CSRF_HEADER, isAuthRequest, needsCsrfToken } from './request-rules';
import { Session } from './session';

/**
 * Every HTTP call of the app goes through here:
 * - state-changing requests to /api get `X-CSRF-Token` (the session is read first if needed; a 403
 *   `csrf` answer — a token gone stale in an old tab — is retried once with a fresh token);
 * - failed responses become `ApiError` (code, message, field errors) for pages and forms to show;
 * - a 401 from an ordinary API call means the session has ended: back to sign-in, then return.
 */
export const apiInterceptor: HttpInterceptorFn = (req, next) => {
  const session = inject(Session);
  const router = inject(Router);
  const origin = inject(DOCUMENT).location?.origin;

  const withToken = (request: HttpRequest<unknown>, token: string) =>
    request.clone({ setHeaders: { [CSRF_HEADER]: token } });

  const response$ = needsCsrfToken(req.method, req.url, origin)
    ? defer(() => from(session.ensureLoaded())).pipe(
        switchMap((info) => next(withToken(req, info.csrfToken))),
        catchError((error: unknown) => {
          if (!isCsrfRejection(error)) return throwError(() => error);
          return from(session.refresh()).pipe(switchMap((info) => next(withToken(req, info.csrfToken))));
        }),
      )
    : next(req);

  return response$.pipe(
    catchError((error: unknown) => {
      if (error instanceof ApiError) return throwError(() => error);
      if (!(error instanceof HttpErrorResponse)) return throwError(() => error);
      const apiError = apiErrorFromResponse(error.status, error.error);
      if (apiError.status === 401 && !isAuthRequest(req.url, origin)) {
        session.sessionEnded();
        const returnUrl = router.url;
        void router.navigate(['/sign-in'], { queryParams: returnUrl && returnUrl !== '/' ? { returnUrl } : {} });
      }
      return throwError(() => apiError);
    }),
  );
};

function isCsrfRejection(error: unknown): boolean {
  return (
    error instanceof HttpErrorResponse &&
    error.status === 403 &&
    apiErrorFromResponse(error.status, error.error).code === 'csrf'
  );
}

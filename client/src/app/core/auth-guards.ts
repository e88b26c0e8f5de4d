import { inject } from '@angular/core';
import { CanActivateFn, Router } from '@angular/router';
import { Session } from './session';

/** Lets signed-in users through; sends others to sign-in with a way back. */
export const signedInGuard: CanActivateFn = async (_route, state) => {
  const session = inject(Session);
  const router = inject(Router);
  const info = await session.ensureLoaded().catch(() => null);
  if (info?.user) return true;
  const queryParams = state.url && state.url !== '/' ? { returnUrl: state.url } : {};
  return router.createUrlTree(['/sign-in'], { queryParams });
};

/** Sign-in and sign-up pages: a user who is already signed in goes home. */
export const signedOutGuard: CanActivateFn = async () => {
  const session = inject(Session);
  const router = inject(Router);
  const info = await session.ensureLoaded().catch(() => null);
  return info?.user ? router.createUrlTree(['/']) : true;
};

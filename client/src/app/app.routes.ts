import { Routes } from '@angular/router';
import { signedInGuard, signedOutGuard } from './core/auth-guards';

export const routes: Routes = [
  {
    path: '',
    pathMatch: 'full',
    title: 'Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./home/home').then((m) => m.Home),
  },
  {
    path: 'sign-in',
    title: 'Sign in · Spreadproof',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./auth/sign-in/sign-in').then((m) => m.SignIn),
  },
  {
    path: 'sign-up',
    title: 'Create an account · Spreadproof',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./auth/sign-up/sign-up').then((m) => m.SignUp),
  },
  {
    path: 'teams/:teamId',
    title: 'Team · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./teams/team-page/team-page').then((m) => m.TeamPage),
  },
  // Later features (worksheets, history, compare, review, published view) add their routes here.
  {
    path: '**',
    title: 'Not found · Spreadproof',
    loadComponent: () => import('./not-found/not-found').then((m) => m.NotFound),
  },
];

import { Routes } from '@angular/router';
import { signedInGuard, signedOutGuard } from './core/auth-guards';
import { unsavedWorkGuard } from './worksheets/editor/unsaved-work-guard';

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
  {
    path: 'worksheets/:worksheetId',
    title: 'Worksheet · Spreadproof',
    canActivate: [signedInGuard],
    canDeactivate: [unsavedWorkGuard],
    loadComponent: () => import('./worksheets/editor/worksheet-editor').then((m) => m.WorksheetEditor),
  },
  {
    path: 'worksheets/:worksheetId/history',
    title: 'History · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./worksheets/history/revision-history').then((m) => m.RevisionHistory),
  },
  {
    path: 'revisions/:revisionId',
    title: 'Revision · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./worksheets/history/revision-view').then((m) => m.RevisionView),
  },
  {
    path: 'compare',
    title: 'Compare revisions · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./worksheets/compare/revision-compare').then((m) => m.RevisionCompare),
  },
  {
    path: 'reviews',
    title: 'Reviews · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./worksheets/review/review-inbox').then((m) => m.ReviewInbox),
  },
  {
    // The published view: no sign-in, its own lazy chunk.
    path: 'p/:token',
    title: 'Published worksheet · Spreadproof',
    loadComponent: () => import('./published/published-view').then((m) => m.PublishedView),
  },
  {
    // Opened from the link in an invitation message (token in the fragment); signed in or not.
    path: 'invitation',
    title: 'Invitation · Spreadproof',
    loadComponent: () => import('./invitations/invitation-accept/invitation-accept').then((m) => m.InvitationAccept),
  },
  {
    path: 'account/notifications',
    title: 'Notifications · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./account/notification-settings/notification-settings').then((m) => m.NotificationSettings),
  },
  {
    path: 'account/reset-password',
    title: 'Choose a new password · Spreadproof',
    loadComponent: () => import('./account/reset-request/reset-request').then((m) => m.ResetRequest),
  },
  {
    // Opened from the link in a password-reset message (token in the fragment).
    path: 'account/new-password',
    title: 'Choose a new password · Spreadproof',
    loadComponent: () => import('./account/new-password/new-password').then((m) => m.NewPassword),
  },
  {
    path: 'dev/mailbox',
    title: 'Mailbox · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./mailbox/mailbox-page/mailbox-page').then((m) => m.MailboxPage),
  },
  {
    path: 'dev/mailbox/:messageId',
    title: 'Mailbox · Spreadproof',
    canActivate: [signedInGuard],
    loadComponent: () => import('./mailbox/mailbox-page/mailbox-page').then((m) => m.MailboxPage),
  },
  // Later features (worksheets, history, compare, review, published view) add their routes here.
  {
    path: '**',
    title: 'Not found · Spreadproof',
    loadComponent: () => import('./not-found/not-found').then((m) => m.NotFound),
  },
];

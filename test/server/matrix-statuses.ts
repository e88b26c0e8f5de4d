/**
 * The callers of the route × role authorization matrix (test/server/authorization-matrix.test.ts,
 * worksheets-matrix.ts, mail-matrix.ts) and the expected-status builders they share. Non-members
 * get 404 (not 403) and signed-out callers 401, as the access rules say.
 */
export const callers = ['owner', 'editor', 'reviewer', 'viewer', 'non-member', 'signed-out'] as const;
export type Caller = (typeof callers)[number];
export type SignedInCaller = Exclude<Caller, 'signed-out'>;
export type Statuses = Record<Caller, number>;
export type TeamRole = 'owner' | 'editor' | 'reviewer' | 'viewer';

/** The same status for every caller. */
export const everyone = (status: number): Statuses => ({ owner: status, editor: status, reviewer: status, viewer: status, 'non-member': status, 'signed-out': status });

/** `status` for anyone signed in, 401 signed out. */
export const anySignedIn = (status: number): Statuses => ({ ...everyone(status), 'signed-out': 401 });

/** `status` for members with `role` or a higher one, 403 for lower roles, 404 non-members, 401 signed out. */
export const teamAtLeast = (role: TeamRole, status: number): Statuses => {
  const order: TeamRole[] = ['owner', 'editor', 'reviewer', 'viewer'];
  const statuses = { 'non-member': 404, 'signed-out': 401 } as Statuses;
  for (const r of order) statuses[r] = order.indexOf(r) <= order.indexOf(role) ? status : 403;
  return statuses;
};

/**
 * Team roles, as the API names them, from most to least rights (each includes the reading rights of
 * those after it). Pure (unit-tested under mocha).
 */
import type { TeamRole } from '@shared/api/teams';

export type Role = TeamRole;
/** Same order as `teamRoles` in shared/api/teams.ts (a unit test holds them together). */
export const ROLES: readonly Role[] = ['owner', 'editor', 'reviewer', 'viewer'];

export interface RoleInfo {
  readonly role: Role;
  readonly label: string;
  readonly description: string;
}

export const ROLE_INFO: Readonly<Record<Role, RoleInfo>> = {
  owner: { role: 'owner', label: 'Owner', description: 'Manages members, publishing and archiving' },
  editor: { role: 'editor', label: 'Editor', description: 'Creates, saves and forks worksheets' },
  reviewer: { role: 'reviewer', label: 'Reviewer', description: 'Comments, compares and signs off revisions' },
  viewer: { role: 'viewer', label: 'Viewer', description: 'Reads worksheets and results' },
};

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

export function roleLabel(role: string): string {
  return isRole(role) ? ROLE_INFO[role].label : role;
}

/** True when `held` grants at least the rights of `needed`. */
export function roleAtLeast(held: string | null | undefined, needed: Role): boolean {
  if (!isRole(held)) return false;
  return ROLES.indexOf(held) <= ROLES.indexOf(needed);
}

/** Number of owners in a member list (the last one cannot be removed or demoted). */
export function ownerCount(members: readonly { role: string }[]): number {
  return members.filter((m) => m.role === 'owner').length;
}

/** Owners first, then by role, then by name, so the people who manage a team are easy to find. */
export function sortByRole<T extends { role: string; name: string }>(members: readonly T[]): T[] {
  const rank = (role: string) => (isRole(role) ? ROLES.indexOf(role) : ROLES.length);
  return [...members].sort((a, b) => rank(a.role) - rank(b.role) || a.name.localeCompare(b.name));
}

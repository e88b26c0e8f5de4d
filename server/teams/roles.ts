import { teamRoles, type TeamRole } from '@shared/api/teams';

/** owner > editor > reviewer > viewer; a role includes the rights of every role after it. */
const rank: Record<TeamRole, number> = Object.fromEntries(
  teamRoles.map((role, index) => [role, teamRoles.length - index]),
) as Record<TeamRole, number>;

export function roleAtLeast(actual: TeamRole, required: TeamRole): boolean {
  return rank[actual] >= rank[required];
}

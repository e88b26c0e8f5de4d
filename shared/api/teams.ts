/** Request bodies and answers of /api/teams, shared by the server (validation) and the client (types). */
import { z } from 'zod';

/** Most rights first. Each role includes the reading rights of those after it. */
export const teamRoles = ['owner', 'editor', 'reviewer', 'viewer'] as const;
export type TeamRole = (typeof teamRoles)[number];

export const teamRoleSchema = z.enum(teamRoles, { error: 'Choose owner, editor, reviewer or viewer.' });

export const createTeamRequest = z.object({
  name: z
    .string({ error: 'Enter a team name.' })
    .trim()
    .min(1, { error: 'Enter a team name.' })
    .max(120, { error: 'A team name has at most 120 characters.' }),
});
export type CreateTeamRequest = z.infer<typeof createTeamRequest>;

export const addMemberRequest = z.object({
  email: z
    .string({ error: 'Enter an e-mail address.' })
    .trim()
    .toLowerCase()
    .pipe(z.email({ error: 'Enter a valid e-mail address.' })),
  role: teamRoleSchema,
});
export type AddMemberRequest = z.infer<typeof addMemberRequest>;

export const changeRoleRequest = z.object({ role: teamRoleSchema });
export type ChangeRoleRequest = z.infer<typeof changeRoleRequest>;

export interface TeamSummary {
  id: string;
  name: string;
  role: TeamRole;
}

export interface TeamMember {
  userId: string;
  name: string;
  email: string;
  role: TeamRole;
}

export interface TeamDetail {
  team: { id: string; name: string };
  myRole: TeamRole;
  members: TeamMember[];
}

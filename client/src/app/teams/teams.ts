import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import { Role } from '../core/roles';

/** A team as listed for the signed-in user, with that user's role in it. */
export interface TeamSummary {
  readonly id: string;
  readonly name: string;
  readonly role: Role;
}

export interface TeamMember {
  readonly userId: string;
  readonly name: string;
  readonly email: string;
  readonly role: Role;
}

/** `GET /api/teams/:teamId`. */
export interface TeamDetail {
  readonly team: { readonly id: string; readonly name: string };
  readonly myRole: Role;
  readonly members: readonly TeamMember[];
}

/**
 * Writes to the team API. Reads are `httpResource`s in the pages (`teamsUrl`, `teamUrl`) so they
 * follow route inputs and can be reloaded after a write.
 */
@Injectable({ providedIn: 'root' })
export class Teams {
  private readonly http = inject(HttpClient);

  static readonly listUrl = '/api/teams';

  static detailUrl(teamId: string): string {
    return `/api/teams/${encodeURIComponent(teamId)}`;
  }

  async create(name: string): Promise<TeamSummary> {
    const { team } = await firstValueFrom(this.http.post<{ team: TeamSummary }>(Teams.listUrl, { name }));
    return team;
  }

  async addMember(teamId: string, email: string, role: Role): Promise<TeamMember> {
    const { member } = await firstValueFrom(
      this.http.post<{ member: TeamMember }>(`${Teams.detailUrl(teamId)}/members`, { email, role }),
    );
    return member;
  }

  async changeRole(teamId: string, userId: string, role: Role): Promise<TeamMember> {
    const { member } = await firstValueFrom(
      this.http.patch<{ member: TeamMember }>(
        `${Teams.detailUrl(teamId)}/members/${encodeURIComponent(userId)}`,
        { role },
      ),
    );
    return member;
  }

  async removeMember(teamId: string, userId: string): Promise<void> {
    await firstValueFrom(
      this.http.delete(`${Teams.detailUrl(teamId)}/members/${encodeURIComponent(userId)}`),
    );
  }
}

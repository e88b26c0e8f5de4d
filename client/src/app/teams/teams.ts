import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { TeamMember, TeamSummary } from '@shared/api/teams';
import type { Role } from '../core/roles';

export type { TeamDetail, TeamMember, TeamSummary } from '@shared/api/teams';

/**
 * Writes to the team API. Reads are `httpResource`s in the pages (on `Teams.listUrl`, `Teams.detailUrl(id)`) so they
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

import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { AcceptedInvitation, InvitationPreview, TeamInvitation } from '@shared/api/account';
import type { TeamRole } from '@shared/api/teams';
import { Session } from '../core/session';

export type { AcceptedInvitation, InvitationPreview, TeamInvitation } from '@shared/api/account';

/** Invitations: owners send and withdraw them; the holder of a link looks it up and accepts it. */
@Injectable({ providedIn: 'root' })
export class InvitationsApi {
  private readonly http = inject(HttpClient);
  private readonly session = inject(Session);

  static teamUrl(teamId: string): string {
    return `/api/teams/${encodeURIComponent(teamId)}/invitations`;
  }

  async invite(teamId: string, email: string, role: TeamRole): Promise<TeamInvitation> {
    const { invitation } = await firstValueFrom(
      this.http.post<{ invitation: TeamInvitation }>(InvitationsApi.teamUrl(teamId), { email, role }),
    );
    return invitation;
  }

  async withdraw(teamId: string, invitationId: string): Promise<void> {
    await firstValueFrom(this.http.delete(`${InvitationsApi.teamUrl(teamId)}/${encodeURIComponent(invitationId)}`));
  }

  async lookup(token: string): Promise<InvitationPreview> {
    const { invitation } = await firstValueFrom(this.http.post<{ invitation: InvitationPreview }>('/api/invitations/lookup', { token }));
    return invitation;
  }

  accept(token: string): Promise<AcceptedInvitation> {
    return firstValueFrom(this.http.post<AcceptedInvitation>('/api/invitations/accept', { token }));
  }

  /** Creates the account from the link and signs it in (the session, and its CSRF token, change). */
  async signUp(token: string, name: string, password: string): Promise<AcceptedInvitation> {
    const result = await firstValueFrom(this.http.post<AcceptedInvitation>('/api/invitations/signup', { token, name, password }));
    await this.session.refresh();
    return result;
  }
}

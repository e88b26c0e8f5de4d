import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { AccountInfo, NotificationPreferences, NotificationPreferencesPatch } from '@shared/api/account';
import type { User } from '@shared/api/auth';
import { Session } from '../core/session';

export type { AccountInfo, NotificationKind, NotificationPreferences } from '@shared/api/account';

/** Account settings and the password-reset flow. Reads are `httpResource`s on the URLs below. */
@Injectable({ providedIn: 'root' })
export class AccountApi {
  private readonly http = inject(HttpClient);
  private readonly session = inject(Session);

  static readonly accountUrl = '/api/account';

  async updatePreferences(patch: NotificationPreferencesPatch): Promise<NotificationPreferences> {
    const { preferences } = await firstValueFrom(
      this.http.patch<{ preferences: NotificationPreferences }>('/api/account/notifications', patch),
    );
    return preferences;
  }

  /** Always resolves with the same message, whether or not the address has an account. */
  async requestReset(email: string): Promise<string> {
    const { message } = await firstValueFrom(this.http.post<{ message: string }>('/api/password-reset/request', { email }));
    return message;
  }

  checkResetLink(token: string): Promise<{ email: string; expiresAt: string }> {
    return firstValueFrom(this.http.post<{ email: string; expiresAt: string }>('/api/password-reset/check', { token }));
  }

  /** Sets the new password; the server signs this browser in (and every other session out). */
  async completeReset(token: string, password: string): Promise<User> {
    await firstValueFrom(this.http.post<{ user: User }>('/api/password-reset/complete', { token, password }));
    const info = await this.session.refresh();
    if (!info.user) throw new Error('The password was changed, but the session was not kept. Sign in with the new password.');
    return info.user;
  }
}

import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSlideToggle, MatSlideToggleChange } from '@angular/material/slide-toggle';
import { RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { AccountApi, type AccountInfo, type NotificationKind, type NotificationPreferences } from '../account-api';

interface KindText {
  kind: NotificationKind;
  label: string;
  description: string;
}

const kinds: readonly KindText[] = [
  { kind: 'review_requested', label: 'Review requested', description: 'A team member asks you to review a revision.' },
  {
    kind: 'review_verdict',
    label: 'Review verdicts',
    description: 'A reviewer approves, or requests changes to, a revision you wrote or asked them to review.',
  },
  { kind: 'invitation_accepted', label: 'Invitation accepted', description: 'Someone you invited to a team has joined it.' },
];

/** Which notifications the signed-in user gets by e-mail; each kind switches on and off on its own. */
@Component({
  selector: 'sp-notification-settings',
  imports: [MatSlideToggle, MatIcon, MatProgressBar, RouterLink],
  templateUrl: './notification-settings.html',
  styleUrl: './notification-settings.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationSettings {
  private readonly api = inject(AccountApi);

  protected readonly kinds = kinds;
  protected readonly account = httpResource<AccountInfo>(() => AccountApi.accountUrl);
  /** The settings as last confirmed by the server (null until loaded). */
  private readonly saved = signal<NotificationPreferences | null>(null);
  protected readonly preferences = computed(() => this.saved() ?? (this.account.hasValue() ? this.account.value().preferences : null));
  protected readonly loadError = computed(() => {
    const error = this.account.error();
    return error ? toApiError(error).message : null;
  });
  protected readonly busy = signal<NotificationKind | null>(null);
  protected readonly error = signal<string | null>(null);
  protected readonly notice = signal<string | null>(null);

  protected async toggle(item: KindText, change: MatSlideToggleChange): Promise<void> {
    this.busy.set(item.kind);
    this.error.set(null);
    this.notice.set(null);
    try {
      this.saved.set(await this.api.updatePreferences({ [item.kind]: change.checked }));
      this.notice.set(`${item.label}: mail ${change.checked ? 'on' : 'off'}.`);
    } catch (error) {
      change.source.checked = !change.checked;
      this.error.set(`Could not save the setting: ${toApiError(error).message}`);
    } finally {
      this.busy.set(null);
    }
  }
}

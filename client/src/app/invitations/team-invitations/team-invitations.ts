import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal, viewChild } from '@angular/core';
import { FormGroupDirective, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatOption } from '@angular/material/core';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatSelect } from '@angular/material/select';
import { ApiError, toApiError } from '../../core/api-error';
import { validationMessage } from '../../core/field-messages';
import { ROLES, ROLE_INFO, type Role, roleLabel } from '../../core/roles';
import { showServerErrors } from '../../core/server-errors';
import { InvitationsApi, type TeamInvitation } from '../invitations-api';

/**
 * For a team's owners: invite an e-mail address with a role (whether or not it has an account), and
 * the invitations still open, each of which can be withdrawn.
 */
@Component({
  selector: 'sp-team-invitations',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatHint, MatError, MatInput, MatSelect, MatOption, MatButton, MatIconButton, MatIcon],
  templateUrl: './team-invitations.html',
  styleUrl: './team-invitations.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TeamInvitations {
  private readonly api = inject(InvitationsApi);

  readonly teamId = input.required<string>();
  private readonly formDirective = viewChild.required(FormGroupDirective);

  protected readonly list = httpResource<{ items: TeamInvitation[] }>(() => InvitationsApi.teamUrl(this.teamId()));
  protected readonly items = computed(() => (this.list.hasValue() ? this.list.value().items : []));
  protected readonly loadError = computed(() => {
    const error = this.list.error();
    return error ? toApiError(error).message : null;
  });

  protected readonly roles = ROLES;
  protected readonly roleInfo = ROLE_INFO;
  protected readonly roleLabel = roleLabel;
  protected readonly message = validationMessage;

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email, Validators.maxLength(320)]],
    role: ['reviewer' as Role, [Validators.required]],
  });
  protected readonly sending = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly notice = signal<string | null>(null);
  protected readonly busy = signal<string | null>(null);

  protected async invite(): Promise<void> {
    if (this.sending()) return;
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    this.sending.set(true);
    this.formError.set(null);
    this.notice.set(null);
    const { email, role } = this.form.getRawValue();
    try {
      const invitation = await this.api.invite(this.teamId(), email.trim(), role);
      // resetForm also clears the "submitted" state, so the emptied field shows no error.
      this.formDirective().resetForm({ email: '', role });
      this.notice.set(`Invitation sent to ${invitation.email} (${roleLabel(invitation.role).toLowerCase()}).`);
      this.list.reload();
    } catch (error) {
      const apiError = toApiError(error);
      this.formError.set(
        showServerErrors(
          this.form,
          apiError.status === 409 && apiError.fieldErrors.length === 0
            ? new ApiError(409, apiError.code, apiError.message, [{ field: 'email', message: apiError.message }])
            : apiError,
        ),
      );
    } finally {
      this.sending.set(false);
    }
  }

  protected async withdraw(invitation: TeamInvitation): Promise<void> {
    this.busy.set(invitation.id);
    this.formError.set(null);
    this.notice.set(null);
    try {
      await this.api.withdraw(this.teamId(), invitation.id);
      this.notice.set(`The invitation to ${invitation.email} was withdrawn; its link no longer works.`);
      this.list.reload();
    } catch (error) {
      this.formError.set(`Could not withdraw the invitation: ${toApiError(error).message}`);
    } finally {
      this.busy.set(null);
    }
  }

  protected expiry(invitation: TeamInvitation): string {
    const date = new Date(invitation.expiresAt);
    const when = date.toLocaleString(undefined, { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' });
    return invitation.status === 'expired' ? `expired ${when}` : `link works until ${when}`;
  }
}

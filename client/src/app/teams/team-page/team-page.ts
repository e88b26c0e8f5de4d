import { httpResource } from '@angular/common/http';
import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  Injector,
  afterNextRender,
  computed,
  inject,
  input,
  signal,
  viewChild,
} from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatOption } from '@angular/material/core';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSelect } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { ApiError, toApiError } from '../../core/api-error';
import { validationMessage } from '../../core/field-messages';
import { initialsOf } from '../../core/person-name';
import { ROLES, ROLE_INFO, Role, roleAtLeast, roleLabel, sortByRole } from '../../core/roles';
import { showServerErrors } from '../../core/server-errors';
import { Session } from '../../core/session';
import { TeamDetail, TeamMember, Teams } from '../teams';
import { ArchivedWorksheets } from '../archived-worksheets/archived-worksheets';
import { AuditTrail } from '../audit-trail/audit-trail';
import { TeamInvitations } from '../../invitations/team-invitations/team-invitations';

/** One team: its members and their roles; owners add members, change roles and remove members. */
@Component({
  selector: 'sp-team-page',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatFormField,
    MatLabel,
    MatError,
    MatInput,
    MatSelect,
    MatOption,
    MatButton,
    MatIconButton,
    MatIcon,
    MatProgressBar,
    ArchivedWorksheets,
    AuditTrail,
    TeamInvitations,
  ],
  templateUrl: './team-page.html',
  styleUrl: './team-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TeamPage {
  private readonly teamsApi = inject(Teams);
  private readonly router = inject(Router);
  private readonly session = inject(Session);
  private readonly injector = inject(Injector);
  private readonly keepButton = viewChild('keepButton', { read: ElementRef<HTMLButtonElement> });

  /** Route parameter `:teamId`. */
  readonly teamId = input.required<string>();

  protected readonly detail = httpResource<TeamDetail>(() => Teams.detailUrl(this.teamId()));
  protected readonly team = computed(() => (this.detail.hasValue() ? this.detail.value() : null));
  protected readonly loadError = computed(() => {
    const error = this.detail.error();
    return error ? toApiError(error) : null;
  });
  protected readonly isOwner = computed(() => roleAtLeast(this.team()?.myRole, 'owner'));
  protected readonly myUserId = computed(() => this.session.user()?.id ?? null);
  protected readonly members = computed(() => sortByRole(this.team()?.members ?? []));

  protected readonly roles = ROLES;
  protected readonly roleInfo = ROLE_INFO;
  protected readonly roleLabel = roleLabel;
  protected readonly message = validationMessage;
  protected readonly initials = initialsOf;

  /** Message about the member list (a refused role change or removal). */
  protected readonly memberError = signal<string | null>(null);
  protected readonly memberNotice = signal<string | null>(null);
  /** userId of the member whose row is busy (role change or removal in flight). */
  protected readonly busyMember = signal<string | null>(null);
  /** userId of the member whose removal waits for confirmation. */
  protected readonly confirmingRemoval = signal<string | null>(null);

  protected readonly addForm = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
    role: ['editor' as Role, [Validators.required]],
  });
  protected readonly adding = signal(false);
  protected readonly addError = signal<string | null>(null);

  protected async addMember(): Promise<void> {
    if (this.adding()) return;
    this.addForm.markAllAsTouched();
    if (this.addForm.invalid) return;
    this.adding.set(true);
    this.addError.set(null);
    this.memberNotice.set(null);
    const { email, role } = this.addForm.getRawValue();
    try {
      const member = await this.teamsApi.addMember(this.teamId(), email.trim(), role);
      this.addForm.reset({ email: '', role });
      this.memberNotice.set(`${member.name} was added as ${roleLabel(member.role).toLowerCase()}.`);
      this.detail.reload();
    } catch (error) {
      const apiError = toApiError(error);
      if (apiError.status === 404 && apiError.fieldErrors.length === 0) {
        // Only existing accounts can be added; say so on the e-mail field.
        this.addError.set(
          showServerErrors(this.addForm, new ApiError(404, apiError.code, apiError.message, [
            { field: 'email', message: 'No Spreadproof account uses this e-mail. Ask them to sign up first.' },
          ])),
        );
      } else if (apiError.status === 409 && apiError.fieldErrors.length === 0) {
        this.addError.set(showServerErrors(this.addForm, new ApiError(409, apiError.code, apiError.message, [
          { field: 'email', message: apiError.message },
        ])));
      } else {
        this.addError.set(showServerErrors(this.addForm, apiError));
      }
    } finally {
      this.adding.set(false);
    }
  }

  protected async changeRole(member: TeamMember, role: Role, select: MatSelect): Promise<void> {
    if (role === member.role) return;
    this.busyMember.set(member.userId);
    this.memberError.set(null);
    this.memberNotice.set(null);
    try {
      await this.teamsApi.changeRole(this.teamId(), member.userId, role);
      this.memberNotice.set(`${member.name} is now ${roleLabel(role).toLowerCase()}.`);
      this.detail.reload();
    } catch (error) {
      select.value = member.role;
      this.memberError.set(memberErrorText(toApiError(error), 'change the role'));
    } finally {
      this.busyMember.set(null);
    }
  }

  protected askRemoval(member: TeamMember): void {
    this.memberError.set(null);
    this.memberNotice.set(null);
    this.confirmingRemoval.set(member.userId);
    // Move focus into the confirmation so keyboard users land on the safe choice.
    afterNextRender(() => this.keepButton()?.nativeElement.focus(), { injector: this.injector });
  }

  protected async remove(member: TeamMember): Promise<void> {
    this.confirmingRemoval.set(null);
    this.busyMember.set(member.userId);
    this.memberError.set(null);
    try {
      await this.teamsApi.removeMember(this.teamId(), member.userId);
      if (member.userId === this.myUserId()) {
        // Leaving a team ends access to it.
        await this.router.navigate(['/']);
        return;
      }
      this.memberNotice.set(`${member.name} was removed from the team.`);
      this.detail.reload();
    } catch (error) {
      this.memberError.set(memberErrorText(toApiError(error), 'remove the member'));
    } finally {
      this.busyMember.set(null);
    }
  }
}

function memberErrorText(error: ApiError, action: string): string {
  if (error.code === 'last_owner') {
    return `Could not ${action}: a team needs at least one owner. Make another member an owner first.`;
  }
  return `Could not ${action}: ${error.message}`;
}

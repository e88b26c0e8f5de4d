import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { toApiError } from '../core/api-error';
import { validationMessage } from '../core/field-messages';
import { firstNameOf } from '../core/person-name';
import { roleLabel } from '../core/roles';
import { showServerErrors } from '../core/server-errors';
import { Session } from '../core/session';
import { notBlank } from '../core/validators';
import { TeamSummary, Teams } from '../teams/teams';
import { WorksheetList } from '../worksheets/list/worksheet-list';

/** Home: the worksheets of the user's teams, the teams, and creating a team. */
@Component({
  selector: 'sp-home',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatInput, MatButton, MatIcon, MatProgressBar, RouterLink, WorksheetList],
  templateUrl: './home.html',
  styleUrl: './home.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Home {
  private readonly teamsApi = inject(Teams);
  private readonly router = inject(Router);

  protected readonly user = inject(Session).user;
  protected readonly firstName = computed(() => firstNameOf(this.user()?.name ?? ''));
  protected readonly teams = httpResource<{ teams: TeamSummary[] }>(() => Teams.listUrl);
  protected readonly teamList = computed(() => (this.teams.hasValue() ? this.teams.value().teams : []));
  protected readonly loadError = computed(() => {
    const error = this.teams.error();
    return error ? toApiError(error).message : null;
  });

  protected readonly createForm = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, notBlank, Validators.maxLength(120)]],
  });
  protected readonly creating = signal(false);
  protected readonly createError = signal<string | null>(null);
  protected readonly message = validationMessage;
  protected readonly roleLabel = roleLabel;

  protected async createTeam(): Promise<void> {
    if (this.creating()) return;
    this.createForm.markAllAsTouched();
    if (this.createForm.invalid) return;
    this.creating.set(true);
    this.createError.set(null);
    try {
      const team = await this.teamsApi.create(this.createForm.getRawValue().name.trim());
      this.createForm.reset();
      this.teams.reload();
      await this.router.navigate(['/teams', team.id]);
    } catch (error) {
      this.createError.set(showServerErrors(this.createForm, toApiError(error)));
    } finally {
      this.creating.set(false);
    }
  }
}

import { Location } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { PASSWORD_MIN_LENGTH, validationMessage } from '../../core/field-messages';
import { ROLE_INFO } from '../../core/roles';
import { showServerErrors } from '../../core/server-errors';
import { Session } from '../../core/session';
import { notBlank } from '../../core/validators';
import { InvitationsApi, type InvitationPreview } from '../invitations-api';

/**
 * The page an invitation link opens (`/invitation#<token>`; the fragment never reaches a server).
 * A newcomer creates the account right here; someone with an account signs in and joins; someone
 * signed in with another address is told so.
 */
@Component({
  selector: 'sp-invitation-accept',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatHint, MatError, MatSuffix, MatInput, MatButton, MatIconButton, MatIcon, MatProgressBar, RouterLink],
  templateUrl: './invitation-accept.html',
  styleUrls: ['../../auth/auth-page.scss', './invitation-accept.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class InvitationAccept implements OnInit {
  private readonly api = inject(InvitationsApi);
  private readonly session = inject(Session);
  private readonly router = inject(Router);
  private readonly location = inject(Location);
  private readonly token = inject(ActivatedRoute).snapshot.fragment ?? '';
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly minLength = PASSWORD_MIN_LENGTH;
  protected readonly roleInfo = ROLE_INFO;
  protected readonly message = validationMessage;
  protected readonly user = this.session.user;

  protected readonly checking = signal(true);
  protected readonly invitation = signal<InvitationPreview | null>(null);
  protected readonly linkError = signal<string | null>(null);
  protected readonly pending = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly hidePassword = signal(true);

  /** Signed in with the invited address: one button joins. */
  protected readonly signedInAsInvitee = computed(() => {
    const user = this.user();
    const invitation = this.invitation();
    return !!user && !!invitation && user.email.toLowerCase() === invitation.email;
  });

  protected readonly signupForm = this.fb.group({
    name: ['', [Validators.required, notBlank, Validators.maxLength(200)]],
    password: ['', [Validators.required, Validators.minLength(PASSWORD_MIN_LENGTH), Validators.maxLength(1024)]],
  });
  protected readonly signinForm = this.fb.group({
    password: ['', [Validators.required]],
  });

  async ngOnInit(): Promise<void> {
    // Keep the token out of the address bar (and out of anything copied from it).
    this.location.replaceState('/invitation');
    await this.session.ensureLoaded().catch(() => null);
    if (!/^[A-Za-z0-9_-]{43}$/.test(this.token)) {
      this.checking.set(false);
      this.linkError.set('This invitation link is incomplete. Open it again from the e-mail.');
      return;
    }
    try {
      this.invitation.set(await this.api.lookup(this.token));
    } catch (error) {
      this.linkError.set(toApiError(error).message);
    } finally {
      this.checking.set(false);
    }
  }

  protected async join(): Promise<void> {
    await this.run(async () => {
      const { team } = await this.api.accept(this.token);
      await this.router.navigate(['/teams', team.id]);
    });
  }

  protected async signUp(): Promise<void> {
    this.signupForm.markAllAsTouched();
    if (this.signupForm.invalid) return;
    const { name, password } = this.signupForm.getRawValue();
    await this.run(async () => {
      const { team } = await this.api.signUp(this.token, name.trim(), password);
      await this.router.navigate(['/teams', team.id]);
    }, this.signupForm);
  }

  protected async signInAndJoin(invitation: InvitationPreview): Promise<void> {
    this.signinForm.markAllAsTouched();
    if (this.signinForm.invalid) return;
    await this.run(async () => {
      try {
        await this.session.signIn(invitation.email, this.signinForm.getRawValue().password);
      } catch (error) {
        const apiError = toApiError(error);
        if (apiError.code === 'bad_credentials') throw new Error('That password does not match the account. Try again, or choose a new password.');
        throw error;
      }
      const { team } = await this.api.accept(this.token);
      await this.router.navigate(['/teams', team.id]);
    }, this.signinForm);
  }

  protected async signOut(): Promise<void> {
    await this.run(() => this.session.signOut());
  }

  private async run(task: () => Promise<void>, form?: typeof this.signupForm | typeof this.signinForm): Promise<void> {
    if (this.pending()) return;
    this.pending.set(true);
    this.formError.set(null);
    try {
      await task();
    } catch (error) {
      const apiError = toApiError(error);
      if (apiError.status === 410 || apiError.status === 404) this.linkError.set(apiError.message);
      else this.formError.set(form ? showServerErrors(form, apiError) : apiError.message);
    } finally {
      this.pending.set(false);
    }
  }
}

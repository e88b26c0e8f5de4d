import { Location } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { PASSWORD_MIN_LENGTH, validationMessage } from '../../core/field-messages';
import { showServerErrors } from '../../core/server-errors';
import { AccountApi } from '../account-api';

/**
 * The page a password-reset link opens. The token travels in the fragment (`#…`), which browsers
 * never send to a server, and is taken out of the address bar as soon as it has been read.
 */
@Component({
  selector: 'sp-new-password',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatHint, MatError, MatSuffix, MatInput, MatButton, MatIconButton, MatIcon, MatProgressBar, RouterLink],
  templateUrl: './new-password.html',
  styleUrl: '../../auth/auth-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewPassword implements OnInit {
  private readonly api = inject(AccountApi);
  private readonly router = inject(Router);
  private readonly location = inject(Location);
  private readonly token = inject(ActivatedRoute).snapshot.fragment ?? '';

  protected readonly minLength = PASSWORD_MIN_LENGTH;
  protected readonly form = inject(NonNullableFormBuilder).group({
    password: ['', [Validators.required, Validators.minLength(PASSWORD_MIN_LENGTH), Validators.maxLength(1024)]],
  });
  private readonly password = toSignal(this.form.controls.password.valueChanges, { initialValue: '' });
  protected readonly passwordLength = computed(() => this.password().length);
  protected readonly hidePassword = signal(true);
  protected readonly checking = signal(true);
  protected readonly email = signal<string | null>(null);
  protected readonly linkError = signal<string | null>(null);
  protected readonly pending = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly message = validationMessage;

  async ngOnInit(): Promise<void> {
    this.location.replaceState('/account/new-password');
    if (!/^[A-Za-z0-9_-]{43}$/.test(this.token)) {
      this.checking.set(false);
      this.linkError.set('This link is incomplete. Open it again from the e-mail, or ask for a new one.');
      return;
    }
    try {
      this.email.set((await this.api.checkResetLink(this.token)).email);
    } catch (error) {
      this.linkError.set(toApiError(error).message);
    } finally {
      this.checking.set(false);
    }
  }

  protected async submit(): Promise<void> {
    if (this.pending()) return;
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    this.pending.set(true);
    this.formError.set(null);
    try {
      await this.api.completeReset(this.token, this.form.getRawValue().password);
      await this.router.navigateByUrl('/');
    } catch (error) {
      const apiError = toApiError(error);
      if (apiError.status === 410) this.linkError.set(apiError.message);
      else this.formError.set(showServerErrors(this.form, apiError));
    } finally {
      this.pending.set(false);
    }
  }
}

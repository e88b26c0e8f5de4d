import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { ApiError, toApiError } from '../../core/api-error';
import { PASSWORD_MIN_LENGTH, validationMessage } from '../../core/field-messages';
import { showServerErrors } from '../../core/server-errors';
import { Session } from '../../core/session';
import { notBlank } from '../../core/validators';

@Component({
  selector: 'sp-sign-up',
  imports: [
    ReactiveFormsModule,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatSuffix,
    MatInput,
    MatButton,
    MatIconButton,
    MatIcon,
    MatProgressBar,
    RouterLink,
  ],
  templateUrl: './sign-up.html',
  styleUrl: '../auth-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignUp {
  private readonly session = inject(Session);
  private readonly router = inject(Router);

  protected readonly minLength = PASSWORD_MIN_LENGTH;
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, notBlank, Validators.maxLength(200)]],
    email: ['', [Validators.required, Validators.email, Validators.maxLength(320)]],
    password: ['', [Validators.required, Validators.minLength(PASSWORD_MIN_LENGTH), Validators.maxLength(1024)]],
  });
  private readonly password = toSignal(this.form.controls.password.valueChanges, { initialValue: '' });
  protected readonly passwordLength = computed(() => this.password().length);
  protected readonly pending = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly hidePassword = signal(true);
  protected readonly message = validationMessage;

  protected async submit(): Promise<void> {
    if (this.pending()) return;
    this.form.markAllAsTouched();
    if (this.form.invalid) {
      this.formError.set(null);
      return;
    }
    this.pending.set(true);
    this.formError.set(null);
    const { name, email, password } = this.form.getRawValue();
    try {
      await this.session.signUp({ name: name.trim(), email: email.trim(), password });
      await this.router.navigateByUrl('/');
    } catch (error) {
      this.formError.set(showServerErrors(this.form, withEmailConflictOnField(toApiError(error))));
    } finally {
      this.pending.set(false);
    }
  }
}

/** A 409 without field details at sign-up can only be about the e-mail being in use: show it there. */
function withEmailConflictOnField(error: ApiError): ApiError {
  if (error.status !== 409 || error.fieldErrors.length > 0) return error;
  return new ApiError(error.status, error.code, error.message, [{ field: 'email', message: error.message }], error.details);
}

import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatError, MatFormField, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { validationMessage } from '../../core/field-messages';
import { safeReturnUrl } from '../../core/request-rules';
import { showServerErrors } from '../../core/server-errors';
import { Session } from '../../core/session';

@Component({
  selector: 'sp-sign-in',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatInput, MatSuffix, MatButton, MatIconButton, MatIcon, MatProgressBar, RouterLink],
  templateUrl: './sign-in.html',
  styleUrl: '../auth-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignIn {
  private readonly session = inject(Session);
  private readonly router = inject(Router);

  /** Where to go after signing in (query parameter, bound by the router). */
  readonly returnUrl = input<string | undefined>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', [Validators.required]],
  });
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
    const { email, password } = this.form.getRawValue();
    try {
      await this.session.signIn(email.trim(), password);
      await this.router.navigateByUrl(safeReturnUrl(this.returnUrl()));
    } catch (error) {
      const apiError = toApiError(error);
      this.formError.set(
        apiError.code === 'bad_credentials'
          ? 'That e-mail and password do not match an account. Check both and try again.'
          : showServerErrors(this.form, apiError),
      );
    } finally {
      this.pending.set(false);
    }
  }
}

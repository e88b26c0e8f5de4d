import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { validationMessage } from '../../core/field-messages';
import { showServerErrors } from '../../core/server-errors';
import { AccountApi } from '../account-api';

/** "Forgot your password?": asks for a link by e-mail. The answer is the same for every address. */
@Component({
  selector: 'sp-reset-request',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatInput, MatButton, MatIcon, MatProgressBar, RouterLink],
  templateUrl: './reset-request.html',
  styleUrl: '../../auth/auth-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResetRequest {
  private readonly api = inject(AccountApi);

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email, Validators.maxLength(320)]],
  });
  protected readonly pending = signal(false);
  protected readonly sent = signal<string | null>(null);
  protected readonly formError = signal<string | null>(null);
  protected readonly message = validationMessage;

  protected async submit(): Promise<void> {
    if (this.pending()) return;
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    this.pending.set(true);
    this.formError.set(null);
    try {
      this.sent.set(await this.api.requestReset(this.form.getRawValue().email.trim()));
    } catch (error) {
      this.formError.set(showServerErrors(this.form, toApiError(error)));
    } finally {
      this.pending.set(false);
    }
  }
}

import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDivider } from '@angular/material/divider';
import { MatIcon } from '@angular/material/icon';
import { MatMenu, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatToolbar } from '@angular/material/toolbar';
import { Router, RouterLink } from '@angular/router';
import { initialsOf } from '../core/person-name';
import { Session } from '../core/session';

/** The bar across the top: product name (home link) and, when signed in, the user menu. */
@Component({
  selector: 'sp-top-bar',
  imports: [MatToolbar, MatButton, MatIcon, MatMenu, MatMenuItem, MatMenuTrigger, MatDivider, RouterLink],
  templateUrl: './top-bar.html',
  styleUrl: './top-bar.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TopBar {
  private readonly session = inject(Session);
  private readonly router = inject(Router);

  protected readonly user = this.session.user;
  protected readonly initials = computed(() => initialsOf(this.user()?.name ?? ''));
  protected readonly signingOut = signal(false);

  protected async signOut(): Promise<void> {
    this.signingOut.set(true);
    try {
      await this.session.signOut();
    } catch {
      // The local session is cleared either way; the server session ends on its own schedule.
    } finally {
      this.signingOut.set(false);
    }
    await this.router.navigate(['/sign-in']);
  }
}


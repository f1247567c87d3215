import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { AuthService } from '../core/auth.service';
import { Role } from '../core/user';

const ROLE_PLURAL: Record<Role, string> = { admin: 'administrators', planner: 'planners', technician: 'technicians', operator: 'operators' };
const ROLE_TEXT: Record<Role, string> = { admin: 'administrator', planner: 'planner', technician: 'technician', operator: 'operator' };

/** "This page is for administrators" and the way home, for a page the user's role may not see. */
export function forRolesText(roles: readonly string[]): string {
  const names = roles.filter((r): r is Role => r in ROLE_PLURAL).map((r) => ROLE_PLURAL[r]);
  if (!names.length) return 'This page is not open to your role';
  const list = names.length === 1 ? names[0] : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
  return `This page is for ${list}`;
}

@Component({
  selector: 'jw-not-allowed-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, RouterLink],
  template: `
    <section class="page" data-test="not-allowed">
      <mat-icon class="big" aria-hidden="true" fontIcon="lock" />
      <h1>{{ heading() }}</h1>
      <p>You are signed in as {{ roleText() }}. If you need this page for your work, ask an administrator to change your role.</p>
      <p class="actions">
        <a mat-flat-button routerLink="/fleet"><mat-icon fontIcon="grid_view" />To the fleet board</a>
        <button mat-button type="button" (click)="back()"><mat-icon fontIcon="arrow_back" />Back</button>
      </p>
    </section>
  `,
  styleUrl: './error-page.scss',
})
export class NotAllowedPage {
  private readonly auth = inject(AuthService);
  /** Query parameter set by the role guard: the roles the page is for, comma-separated. */
  readonly roles = input<string>('');

  protected readonly heading = computed(() => forRolesText((this.roles() ?? '').split(',').filter(Boolean)));
  protected readonly roleText = computed(() => {
    const role = this.auth.role();
    return role ? `${/^[aeiou]/.test(ROLE_TEXT[role]) ? 'an' : 'a'} ${ROLE_TEXT[role]}` : 'a user without this role';
  });

  protected back(): void {
    history.back();
  }
}

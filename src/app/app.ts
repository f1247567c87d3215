import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { map } from 'rxjs';
import { AlarmFeed } from './alarms/alarm-feed';
import { AppBarStatus } from './core/app-bar-status';
import { AuthService } from './core/auth.service';
import { ConnectionBanner } from './core/connection-banner';
import { PreferencesService } from './core/preferences.service';
import { Role } from './core/user';
import { UserMenu } from './ui/user-menu';
import { UpdatePrompt } from './core/update-prompt';
import { OutboxIndicator } from './work/offline/outbox-indicator';

interface NavItem {
  path: string;
  label: string;
  icon: string;
  roles?: Role[];
}

// Later features add their entries here (alarms, work, coolant, admin).
const NAV: NavItem[] = [
  { path: '/fleet', label: 'Fleet board', icon: 'grid_view' },
  { path: '/alarms', label: 'Alarms', icon: 'notifications' },
  { path: '/alarms/on-call', label: 'On-call rota', icon: 'contact_phone', roles: ['planner', 'admin'] },
  { path: '/alarms/rules', label: 'Alarm rules', icon: 'rule', roles: ['admin'] },
  { path: '/alarms/mail', label: 'Alarm mail', icon: 'mail', roles: ['admin'] },
  { path: '/work', label: 'Work', icon: 'assignment', roles: ['planner', 'admin'] },
  { path: '/work/mine', label: 'My work', icon: 'handyman', roles: ['technician'] },
  { path: '/due', label: 'Service due', icon: 'event_upcoming', roles: ['planner', 'admin', 'technician'] },
  { path: '/calculators', label: 'Coolant calculators', icon: 'calculate' },
  { path: '/settings', label: 'Settings', icon: 'tune' },
  { path: '/admin', label: 'Administration', icon: 'admin_panel_settings', roles: ['admin'] },
];

const ROLE_TEXT: Record<Role, string> = { admin: 'Administrator', planner: 'Planner', technician: 'Technician', operator: 'Operator' };

/** App shell: app bar, navigation and the user's menu around the routed screen; only the screen when signed out. */
@Component({
  selector: 'jw-root',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterOutlet,
    RouterLink,
    RouterLinkActive,
    ConnectionBanner,
    UpdatePrompt,
    OutboxIndicator,
    // The navigation is plain links and the user menu a plain disclosure: Material's list and menu would bring
    // forms and the overlay into the first download.
    MatToolbarModule,
    MatSidenavModule,
    MatIconModule,
    MatButtonModule,
    UserMenu,
  ],
  templateUrl: './app.html',
  styleUrl: './app.scss',
})
export class App {
  protected readonly auth = inject(AuthService);
  protected readonly appBar = inject(AppBarStatus);
  // Keeps the alarm counts (app bar, fleet tiles) live while signed in.
  private readonly alarmFeed = inject(AlarmFeed);
  // Created here so the saved theme applies from the first paint.
  private readonly prefs = inject(PreferencesService);

  /** Below tablet width the navigation slides over the screen instead of sitting beside it. */
  protected readonly narrow = toSignal(
    inject(BreakpointObserver)
      .observe('(max-width: 959.98px)')
      .pipe(map((r) => r.matches)),
    { initialValue: false },
  );

  protected readonly nav = computed(() => NAV.filter((n) => !n.roles || this.auth.hasRole(...n.roles)));
  protected readonly roleText = computed(() => {
    const role = this.auth.role();
    return role ? ROLE_TEXT[role] : '';
  });
  protected readonly dark = this.prefs.dark;

  protected toggleTheme(): void {
    this.prefs.update({ theme: this.dark() ? 'light' : 'dark' });
  }

  protected signOut(): void {
    this.auth.signOut();
  }
}

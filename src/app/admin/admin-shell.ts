import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';

const SECTIONS = [
  { path: 'users', label: 'Users' },
  { path: 'sites', label: 'Sites' },
  { path: 'engines', label: 'Engines' },
  { path: 'devices', label: 'Devices' },
  { path: 'additive', label: 'Additive' },
];

/** Administration: who may sign in, and the set-up of sites, engines and their reporting devices. */
@Component({
  selector: 'jw-admin-shell',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTabsModule, RouterLink, RouterLinkActive, RouterOutlet],
  template: `
    <div class="page">
      <h1>Administration</h1>
      <nav mat-tab-nav-bar mat-stretch-tabs="false" mat-align-tabs="start" [tabPanel]="panel" aria-label="Administration sections">
        @for (s of sections; track s.path) {
          <a mat-tab-link [routerLink]="s.path" routerLinkActive #rla="routerLinkActive" [active]="rla.isActive">{{ s.label }}</a>
        }
      </nav>
      <mat-tab-nav-panel #panel><router-outlet /></mat-tab-nav-panel>
    </div>
  `,
  styles: `
    .page {
      padding: 12px 20px 32px;
      max-width: 1400px;
    }
    h1 {
      margin: 4px 0 8px;
      font-size: 24px;
      font-weight: 500;
    }
  `,
})
export class AdminShell {
  protected readonly sections = SECTIONS;
}

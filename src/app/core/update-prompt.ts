import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { SwUpdate, type VersionEvent } from '@angular/service-worker';

/** How often a running app asks whether a new version was installed on the server. */
const CHECK_EVERY_MS = 30 * 60 * 1000;

/**
 * The service worker never moves a running app to a new version by itself: when one is ready this bar
 * says so and the user reloads when it suits them (nothing typed is lost: drafts are kept on the device).
 * A broken cache (the old version's files are gone) asks for a reload plainly.
 */
@Component({
  selector: 'jw-update-prompt',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule],
  template: `
    @if (state(); as s) {
      <div class="bar" role="status" data-test="update-prompt">
        <mat-icon aria-hidden="true" [fontIcon]="s === 'broken' ? 'sync_problem' : 'system_update_alt'" />
        @if (s === 'ready') {
          <span><strong>Update available.</strong> A new version of Jacketwatch is ready. Reload to use it; what you typed is kept.</span>
        } @else {
          <span><strong>This version can no longer run offline.</strong> Reload to load the current version.</span>
        }
        <button mat-flat-button type="button" (click)="reload()"><mat-icon fontIcon="refresh" />Reload</button>
        @if (s === 'ready') {
          <button mat-button type="button" (click)="state.set(null)">Later</button>
        }
      </div>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    .bar {
      display: flex;
      align-items: center;
      flex-wrap: wrap;
      gap: 8px 12px;
      padding: 8px 16px;
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      font-size: 14px;
    }
    .bar span {
      flex: 1 1 240px;
    }
    mat-icon {
      flex: none;
    }
  `,
})
export class UpdatePrompt {
  private readonly sw = inject(SwUpdate);
  protected readonly state = signal<'ready' | 'broken' | null>(null);

  constructor() {
    if (!this.sw.isEnabled) return;
    const versions = this.sw.versionUpdates.subscribe((e: VersionEvent) => {
      if (e.type === 'VERSION_READY') this.state.set('ready');
    });
    const broken = this.sw.unrecoverable.subscribe(() => this.state.set('broken'));
    const timer = setInterval(() => void this.sw.checkForUpdate().catch(() => false), CHECK_EVERY_MS);
    inject(DestroyRef).onDestroy(() => {
      versions.unsubscribe();
      broken.unsubscribe();
      clearInterval(timer);
    });
  }

  protected reload(): void {
    // activate the new version first, so the reload cannot come from the old one
    void this.sw
      .activateUpdate()
      .catch(() => false)
      .finally(() => document.location.reload());
  }
}

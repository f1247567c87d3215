import { ChangeDetectionStrategy, Component, ElementRef, inject, input, output, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';

let nextId = 0;

/**
 * The signed-in user's menu in the app bar: a plain disclosure (button + panel) rather than a Material
 * menu, so the first screen does not load the overlay machinery for three entries.
 * Closes on Escape (focus back on the button), a click elsewhere, focus leaving it, or choosing an entry.
 */
@Component({
  selector: 'jw-user-menu',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, RouterLink],
  host: {
    '(document:click)': 'onDocumentClick($event)',
    '(keydown.escape)': 'closeAndFocus()',
    '(focusout)': 'onFocusOut($event)',
  },
  template: `
    <button
      #trigger
      mat-button
      type="button"
      class="user-button"
      [attr.aria-label]="name() + ', user menu'"
      [attr.aria-expanded]="open()"
      [attr.aria-controls]="panelId"
      (click)="toggle()"
    >
      <mat-icon fontIcon="account_circle" />
      <span class="user-name">{{ name() }}</span>
    </button>
    @if (open()) {
      <div class="panel" [id]="panelId">
        <p class="user-info">{{ email() }} · {{ roleText() }}</p>
        <hr class="divider" />
        <a class="item" routerLink="/settings" (click)="open.set(false)"><mat-icon fontIcon="tune" />Settings</a>
        <button class="item" type="button" (click)="choose()"><mat-icon fontIcon="logout" />Sign out</button>
      </div>
    }
  `,
  styles: `
    :host {
      position: relative;
      display: inline-flex;
    }
    .user-name {
      max-width: 14em;
      overflow: hidden;
      text-overflow: ellipsis;
      white-space: nowrap;
    }
    .panel {
      position: absolute;
      top: 100%;
      right: 0;
      z-index: 4;
      box-sizing: border-box;
      width: max-content;
      min-width: 112px;
      max-width: 280px;
      padding: 8px 0;
      border-radius: 4px;
      background: var(--mat-sys-surface-container);
      color: var(--mat-sys-on-surface);
      box-shadow: var(--mat-sys-level2);
    }
    .user-info {
      margin: 0;
      padding: 14px 12px;
      font: var(--mat-sys-label-large);
      letter-spacing: var(--mat-sys-label-large-tracking);
      color: var(--jw-muted-text);
      overflow: hidden;
      text-overflow: ellipsis;
      white-space: nowrap;
    }
    .divider {
      margin: 8px 0;
      border: 0;
      border-top: 1px solid var(--mat-sys-outline-variant);
    }
    .item {
      display: flex;
      align-items: center;
      gap: 12px;
      box-sizing: border-box;
      width: 100%;
      height: 48px;
      padding: 0 12px;
      border: 0;
      background: transparent;
      color: inherit;
      text-decoration: none;
      text-align: start;
      cursor: pointer;
      font: var(--mat-sys-label-large);
      letter-spacing: var(--mat-sys-label-large-tracking);
    }
    .item:hover {
      background: color-mix(in srgb, var(--mat-sys-on-surface) 8%, transparent);
    }
    .item:focus-visible {
      outline-offset: -2px;
    }
    .item mat-icon {
      color: var(--mat-sys-on-surface-variant);
    }
    @media (max-width: 600px) {
      .user-name {
        display: none;
      }
    }
  `,
})
export class UserMenu {
  readonly name = input('');
  readonly email = input('');
  readonly roleText = input('');
  readonly signOut = output<void>();

  protected readonly open = signal(false);
  protected readonly panelId = `jw-user-menu-${nextId++}`;
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  // read: ElementRef, else the reference gives the Material button component rather than the element
  private readonly trigger = viewChild.required('trigger', { read: ElementRef<HTMLButtonElement> });

  protected toggle(): void {
    this.open.update((o) => !o);
  }

  protected choose(): void {
    this.open.set(false);
    this.signOut.emit();
  }

  protected closeAndFocus(): void {
    if (!this.open()) return;
    this.open.set(false);
    this.trigger().nativeElement.focus();
  }

  protected onDocumentClick(event: MouseEvent): void {
    if (this.open() && !this.host.nativeElement.contains(event.target as Node)) this.open.set(false);
  }

  protected onFocusOut(event: FocusEvent): void {
    const next = event.relatedTarget as Node | null;
    if (this.open() && next && !this.host.nativeElement.contains(next)) this.open.set(false);
  }
}

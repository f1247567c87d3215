import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { Clipboard } from '@angular/cdk/clipboard';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';

export interface SecretData {
  title: string;
  /** What the secret is for, e.g. "MQTT password of device engine-3-a1b2c3". */
  what: string;
  /** Name to sign in with, shown beside the secret. */
  username: string;
  secret: string;
}

/** Shows a secret the server returns only once, with a copy button. Nothing keeps it after closing. */
@Component({
  selector: 'jw-secret-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatDialogModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p class="once">
        <mat-icon aria-hidden="true" fontIcon="visibility" />Shown only now. Copy it into the gateway's settings before you close this window; it cannot be
        shown again.
      </p>
      <p>{{ data.what }}</p>
      <dl>
        <dt>User name</dt>
        <dd>
          <code>{{ data.username }}</code>
        </dd>
        <dt>Secret</dt>
        <dd>
          <code class="secret" data-testid="secret">{{ data.secret }}</code>
        </dd>
      </dl>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-stroked-button type="button" (click)="copy()">
        <mat-icon [fontIcon]="copied() ? 'check' : 'content_copy'" />{{ copied() ? 'Copied' : 'Copy secret' }}
      </button>
      <button mat-flat-button type="button" mat-dialog-close>I have stored it</button>
    </mat-dialog-actions>
  `,
  styles: `
    .once {
      display: flex;
      gap: 6px;
      align-items: flex-start;
      font-weight: 500;
    }
    dl {
      display: grid;
      grid-template-columns: auto 1fr;
      gap: 6px 12px;
    }
    dd {
      margin: 0;
    }
    code {
      font-size: 14px;
      word-break: break-all;
    }
    .secret {
      padding: 4px 6px;
      border: 1px solid var(--jw-band-normal);
      border-radius: 4px;
      user-select: all;
    }
  `,
})
export class SecretDialog {
  protected readonly data = inject<SecretData>(MAT_DIALOG_DATA);
  private readonly clipboard = inject(Clipboard);
  protected readonly copied = signal(false);

  protected copy(): void {
    this.copied.set(this.clipboard.copy(this.data.secret));
  }
}

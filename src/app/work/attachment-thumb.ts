import { ChangeDetectionStrategy, Component, DestroyRef, effect, inject, input, signal, untracked } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { WorkApi } from './work-api';
import { WorkAttachment } from './work-types';

/** A photo thumbnail or a PDF link; the file is fetched with the token and shown through an object URL. */
@Component({
  selector: 'jw-attachment-thumb',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    @if (src(); as s) {
      <a [href]="s" target="_blank" rel="noopener" [attr.download]="isPdf() ? file().originalName : null" class="thumb">
        @if (isPdf()) {
          <mat-icon fontIcon="picture_as_pdf" aria-hidden="true" />
        } @else {
          <img [src]="s" [alt]="file().originalName" />
        }
        <span class="name">{{ file().originalName }}</span>
      </a>
    } @else {
      <span class="thumb"
        ><mat-icon fontIcon="image" aria-hidden="true" /><span class="name">{{ file().originalName }}</span></span
      >
    }
  `,
  styles: `
    .thumb {
      display: inline-flex;
      flex-direction: column;
      align-items: center;
      gap: 2px;
      width: 120px;
      color: inherit;
      text-decoration: none;
    }
    img {
      width: 120px;
      height: 90px;
      object-fit: cover;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 4px;
    }
    mat-icon {
      font-size: 48px;
      width: 48px;
      height: 48px;
    }
    .name {
      font: var(--mat-sys-body-small);
      max-width: 120px;
      overflow: hidden;
      text-overflow: ellipsis;
      white-space: nowrap;
    }
  `,
})
export class AttachmentThumb {
  private readonly api = inject(WorkApi);
  readonly file = input.required<WorkAttachment>();
  protected readonly src = signal<string | null>(null);
  protected readonly isPdf = () => this.file().contentType === 'application/pdf';

  constructor() {
    effect(() => {
      const f = this.file();
      untracked(() => {
        this.api.attachmentBlob(f.url).subscribe({
          next: (b) => {
            this.revoke();
            this.src.set(URL.createObjectURL(b));
          },
          error: () => this.src.set(null),
        });
      });
    });
    inject(DestroyRef).onDestroy(() => this.revoke());
  }

  private revoke(): void {
    const s = this.src();
    if (s) URL.revokeObjectURL(s);
  }
}

import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatIconModule } from '@angular/material/icon';
import { Observable, switchMap } from 'rxjs';
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
  /** The object URL of the fetched file; revoked when the resource ends its stream (another file, or the thumb is gone). */
  private readonly url = rxResource({
    params: () => this.file().url,
    stream: ({ params: url }) =>
      this.api.attachmentBlob(url).pipe(
        switchMap(
          (blob) =>
            new Observable<string>((sub) => {
              const objectUrl = URL.createObjectURL(blob);
              sub.next(objectUrl);
              return () => URL.revokeObjectURL(objectUrl);
            }),
        ),
      ),
  });
  protected readonly src = computed(() => (this.url.hasValue() ? this.url.value() : null));
  protected readonly isPdf = () => this.file().contentType === 'application/pdf';
}

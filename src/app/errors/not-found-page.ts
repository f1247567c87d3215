import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { Router, RouterLink } from '@angular/router';

/** A mistyped or outdated address: say so, show it, and offer the way home. */
@Component({
  selector: 'jw-not-found-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, RouterLink],
  template: `
    <section class="page" data-test="not-found">
      <mat-icon class="big" aria-hidden="true" fontIcon="wrong_location" />
      <h1>There is no page at this address</h1>
      <p>
        The address <code>{{ address }}</code> does not lead to a page of Jacketwatch. It may be mistyped, or the page has moved.
      </p>
      <p class="actions">
        <a mat-flat-button routerLink="/fleet"><mat-icon fontIcon="grid_view" />To the fleet board</a>
        <button mat-button type="button" (click)="back()"><mat-icon fontIcon="arrow_back" />Back</button>
      </p>
    </section>
  `,
  styleUrl: './error-page.scss',
})
export class NotFoundPage {
  protected readonly address = inject(Router).url;

  protected back(): void {
    history.back();
  }
}

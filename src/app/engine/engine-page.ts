import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { RouterLink } from '@angular/router';

/** Placeholder until the engine page is built; the route and its :id stay as they are. */
@Component({
  selector: 'jw-engine-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink],
  template: `
    <div style="padding: 16px 20px">
      <h1>Engine {{ id() }}</h1>
      <p>The engine page is not built yet. <a routerLink="/fleet">Back to the fleet board</a></p>
    </div>
  `,
})
export class EnginePage {
  /** Route parameter (withComponentInputBinding). */
  readonly id = input<string>();
}

import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** Why the additive rules matter, where they come from, and the usual cautions: shown beside the decision and on the calculators. */
@Component({
  selector: 'jw-coolant-explainer',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    <aside class="explainer" aria-label="Why the coolant rules matter">
      <h2>Why it matters</h2>
      <p>
        <strong>What the additive does.</strong> Glycol only lowers the freeze point. The inhibitors (nitrite, often with molybdate, in conventional heavy-duty
        coolant; organic acids in extended-life coolant) lay a thin protective film on the metal, hold the pH and keep scale from forming.
      </p>
      <p>
        <strong>Too little.</strong> The cylinder-liner wall vibrates as the piston rocks; vapour bubbles form and collapse on the wet side of the liner and,
        without the film, eat pits through it (cavitation). Coolant then leaks into the oil and the engine fails, often with no warning on a standby set.
      </p>
      <p>
        <strong>Too much.</strong> Excess additive drops out of solution as deposits and gel that block the radiator and passages, insulate hot surfaces and
        wear water-pump seals.
      </p>
      <p>
        <strong>Where the rules come from.</strong> Freeze points from published handbook tables; pH from the coolant standards (ASTM D3306 / D6210); nitrite,
        molybdate, reserve-alkalinity and additive-unit limits and doses are common practice of the trade. The engine and coolant maker's figures come first.
      </p>
      <h2>Cautions</h2>
      <ul class="cautions">
        <li>
          <mat-icon aria-hidden="true" fontIcon="warning_amber" />Never open a hot, pressurised cooling system: let it cool and release the pressure at the
          cap's first stop.
        </li>
        <li>
          <mat-icon aria-hidden="true" fontIcon="warning_amber" />Glycol is toxic and tastes sweet: keep coolant, spills and containers away from children and
          animals.
        </li>
        <li><mat-icon aria-hidden="true" fontIcon="warning_amber" />Wear gloves and eye protection when handling coolant and additive concentrate.</li>
        <li>
          <mat-icon aria-hidden="true" fontIcon="warning_amber" />Collect drained coolant and used coolant filters and dispose of them by local rules; never
          into a drain or onto the ground.
        </li>
      </ul>
    </aside>
  `,
  styles: `
    .explainer {
      border: 1px solid var(--jw-band);
      border-radius: 4px;
      padding: 4px 16px;
      margin: 12px 0;
      font-size: 0.9rem;
    }
    /* h2: it follows the page's h1 on the calculators (headings may not skip a level) */
    h2 {
      font-size: 1rem;
      margin: 8px 0 4px;
    }
    p {
      margin: 4px 0;
    }
    .cautions {
      list-style: none;
      padding: 0;
    }
    .cautions li {
      display: flex;
      gap: 6px;
      align-items: flex-start;
      margin: 4px 0;
    }
    mat-icon {
      color: var(--jw-warning);
      flex: none;
    }
  `,
})
export class CoolantExplainer {}

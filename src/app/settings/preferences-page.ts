import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCardModule } from '@angular/material/card';
import { PreferencesService } from '../core/preferences.service';
import { browserZone, formatInZone } from '../ui/time-format';
import { UnitValuePipe } from '../ui/unit-value.pipe';

/** Display units and theme for this browser. */
@Component({
  selector: 'jw-preferences-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonToggleModule, MatCardModule, UnitValuePipe],
  template: `
    <h1>Settings</h1>
    <p class="lead">Kept in this browser. Readings are stored in metric units and converted for display only.</p>

    <mat-card appearance="outlined" class="card">
      <h2 id="units-heading">Units</h2>
      <div class="setting">
        <span class="name" id="system-label">Unit system</span>
        <mat-button-toggle-group aria-labelledby="system-label" [value]="prefs.unitSystem()" (change)="prefs.useSystem($event.value)">
          <mat-button-toggle value="metric">Metric</mat-button-toggle>
          <mat-button-toggle value="us">US customary</mat-button-toggle>
        </mat-button-toggle-group>
        @if (prefs.unitSystem() === null) {
          <span class="hint">Mixed units</span>
        }
      </div>
      <div class="setting">
        <span class="name" id="temp-label">Temperature</span>
        <mat-button-toggle-group aria-labelledby="temp-label" [value]="prefs.temperatureUnit()" (change)="prefs.update({ temperature: $event.value })">
          <mat-button-toggle value="degC">°C</mat-button-toggle>
          <mat-button-toggle value="degF">°F</mat-button-toggle>
        </mat-button-toggle-group>
        <span class="example jw-num">85 °C shows as {{ 85 | unitValue: 'temperature' }}</span>
      </div>
      <div class="setting">
        <span class="name" id="pressure-label">Pressure</span>
        <mat-button-toggle-group aria-labelledby="pressure-label" [value]="prefs.pressureUnit()" (change)="prefs.update({ pressure: $event.value })">
          <mat-button-toggle value="kPa">kPa</mat-button-toggle>
          <mat-button-toggle value="psi">psi</mat-button-toggle>
          <mat-button-toggle value="bar">bar</mat-button-toggle>
        </mat-button-toggle-group>
        <span class="example jw-num">100 kPa shows as {{ 100 | unitValue: 'pressure' }} (gauge)</span>
      </div>
      <div class="setting">
        <span class="name" id="volume-label">Volume</span>
        <mat-button-toggle-group aria-labelledby="volume-label" [value]="prefs.volumeUnit()" (change)="prefs.update({ volume: $event.value })">
          <mat-button-toggle value="L">L</mat-button-toggle>
          <mat-button-toggle value="gal">US gal</mat-button-toggle>
        </mat-button-toggle-group>
        <span class="example jw-num">200 L shows as {{ 200 | unitValue: 'volume' }}</span>
      </div>
    </mat-card>

    <mat-card appearance="outlined" class="card">
      <h2>Times</h2>
      <div class="setting">
        <span class="name" id="zone-label">Time zone</span>
        <mat-button-toggle-group aria-labelledby="zone-label" [value]="prefs.preferences().timeZone" (change)="prefs.update({ timeZone: $event.value })">
          <mat-button-toggle value="site">Each site's zone</mat-button-toggle>
          <mat-button-toggle value="browser">This browser's zone ({{ browserZone }})</mat-button-toggle>
        </mat-button-toggle-group>
      </div>
      <p class="example jw-num">Times are written as {{ sample }}, with the zone's abbreviation.</p>
    </mat-card>

    <mat-card appearance="outlined" class="card">
      <h2>Theme</h2>
      <div class="setting">
        <span class="name" id="theme-label">Appearance</span>
        <mat-button-toggle-group aria-labelledby="theme-label" [value]="prefs.theme()" (change)="prefs.update({ theme: $event.value })">
          <mat-button-toggle value="light">Light</mat-button-toggle>
          <mat-button-toggle value="dark">Dark</mat-button-toggle>
          <mat-button-toggle value="system">As the device</mat-button-toggle>
        </mat-button-toggle-group>
      </div>
    </mat-card>
  `,
  styles: `
    :host {
      display: block;
      padding: 16px 20px 32px;
      max-width: 820px;
    }
    h1 {
      font: var(--mat-sys-headline-small);
      margin: 0;
    }
    .lead {
      color: var(--jw-muted-text);
      margin: 4px 0 16px;
    }
    .card {
      padding: 16px 20px;
      margin-bottom: 16px;
    }
    h2 {
      font: var(--mat-sys-title-medium);
      margin: 0 0 12px;
    }
    .setting {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 16px;
      margin: 10px 0;
    }
    .name {
      width: 8em;
      font-weight: 500;
    }
    .example,
    .hint {
      color: var(--jw-muted-text);
      font: var(--mat-sys-body-small);
    }
  `,
})
export class PreferencesPage {
  protected readonly prefs = inject(PreferencesService);
  protected readonly browserZone = browserZone();
  protected readonly sample = formatInZone(Date.now(), browserZone(), 'datetime');
}

import { TestBed } from '@angular/core/testing';
import { browserZone } from '../ui/time-format';
import { DisplayZone } from './display-zone';
import { PreferencesService } from './preferences.service';

describe('DisplayZone', () => {
  beforeEach(() => localStorage.clear());

  it("uses the site's zone by default and the browser's when the user prefers it (kept in this browser)", () => {
    const zones = TestBed.inject(DisplayZone);
    expect(zones.zoneFor('America/Denver')).toBe('America/Denver');
    expect(zones.zoneFor(null)).toBe(browserZone());
    TestBed.inject(PreferencesService).update({ timeZone: 'browser' });
    expect(zones.zoneFor('America/Denver')).toBe(browserZone());
    TestBed.tick();
    expect(JSON.parse(localStorage.getItem('jw.preferences')!).timeZone).toBe('browser');
  });
});

import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { RuleDef } from './alarms-admin.service';
import { RulesPage } from './rules-page';

const rule = (limit: number, overridden: boolean): RuleDef => ({
  key: 'coolant_temp_high',
  kind: 'limit',
  channel: 'coolant_temp',
  priority: 'medium',
  enabled: true,
  title: 'Coolant temperature high',
  meaning: 'The jacket water is hotter than it should be.',
  firstStep: 'Check the load and the radiator.',
  params: { limit, deadband: 2, onDelayS: 10, offDelayS: 10 },
  overridden,
});

/** Choosing whose rules to edit: the page shows only the rules of the choice, whatever order the answers come in. */
describe('RulesPage', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<RulesPage>;
  let el: HTMLElement;

  beforeEach(async () => {
    TestBed.configureTestingModule({ imports: [RulesPage], providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(RulesPage);
    el = fixture.nativeElement as HTMLElement;
    fixture.detectChanges();
    await fixture.whenStable();
    for (const r of http.match((req) => !req.url.startsWith('/api/rules'))) r.flush([]); // the fleet's sites and engines
  });
  afterEach(() => http.verify());

  /** After an answer: its handler runs in a microtask, so let them all run, then render. */
  const settle = async () => {
    await new Promise((done) => setTimeout(done, 0));
    await fixture.whenStable();
  };
  const limitShown = () => (el.querySelector('mat-accordion input') as HTMLInputElement | null)?.value;
  const choose = (engineId: number) => (fixture.componentInstance as unknown as { chooseEngine(id: number): Promise<void> }).chooseEngine(engineId);

  it('says it is loading until the rules arrive, then shows the profile', async () => {
    expect(el.textContent).toContain('Loading the rules');
    expect(el.querySelector('mat-accordion')).toBeNull();
    http.expectOne('/api/rules').flush({ rules: [rule(98, false)] });
    await settle();
    expect(el.querySelector('mat-accordion')?.getAttribute('data-rules-of')).toBe('profile');
    expect(limitShown()).toBe('98');
  });

  it("a late answer for the profile does not replace the chosen engine's rules", async () => {
    const profile = http.expectOne('/api/rules');
    const chosen = choose(7);
    await fixture.whenStable();
    http.expectOne('/api/rules/engines/7').flush({ rules: [rule(85, true)] });
    await chosen;
    await settle();
    expect(el.querySelector('mat-accordion')?.getAttribute('data-rules-of')).toBe('7');
    expect(limitShown()).toBe('85');

    profile.flush({ rules: [rule(98, false)] }); // the profile's answer, arriving last
    await settle();
    expect(el.querySelector('mat-accordion')?.getAttribute('data-rules-of')).toBe('7');
    expect(limitShown()).toBe('85');
    expect(el.textContent).toContain('own setting');
  });
});

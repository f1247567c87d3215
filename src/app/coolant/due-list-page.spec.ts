import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { DueEntry } from './coolant-types';
import { DueListPage } from './due-list-page';

const entry = (engineId: number): DueEntry =>
  ({
    engineId,
    engineName: `Set ${engineId}`,
    runHours: 100,
    taskKey: 'oil-drain',
    title: 'Oil drain and oil filter',
    state: 'overdue',
    reason: 'overdue: 3 days past the 365-day date',
    dueAt: null,
    dueAtRunHours: null,
    lastDoneAt: null,
    lastDoneRunHours: null,
    everyHours: 250,
    everyDays: 365,
    placeholder: false,
    basis: 'common practice',
    workKind: 'oil-drain',
    openWorkOrderId: null,
  }) as DueEntry;

const site = (siteId: number, name: string, entries: DueEntry[], entryTotal: number) => ({
  siteId,
  siteName: name,
  timeZone: 'UTC',
  overdue: entryTotal,
  dueSoon: 0,
  entries,
  entryTotal,
});

/** The due list page shows one server page, grouped by site, with each site's counts over all pages. */
describe('DueListPage', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<DueListPage>;
  let el: HTMLElement;

  beforeEach(() => {
    TestBed.configureTestingModule({
      imports: [DueListPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(DueListPage);
    fixture.detectChanges();
    el = fixture.nativeElement as HTMLElement;
    http.expectOne('/api/sites').flush([
      { id: 1, name: 'North plant' },
      { id: 2, name: 'South yard' },
    ]);
  });
  afterEach(() => http.verify());

  const page = (offset: number, sites: unknown[], total: number) => {
    const req = http.expectOne((r) => r.url === '/api/due-list');
    expect(req.request.params.get('offset')).toBe(String(offset));
    expect(req.request.params.get('limit')).toBe('50');
    req.flush({ now: '2026-06-01T12:00:00.000Z', windowDays: 14, windowHours: 50, sites, total, limit: 50, offset });
  };

  it('asks for the first page, says how much of a site is on it, and pages on the server', async () => {
    await fixture.whenStable();
    page(
      0,
      [
        site(1, 'North plant', [1, 2, 3].map(entry), 3),
        site(
          2,
          'South yard',
          Array.from({ length: 47 }, (_, i) => entry(10 + i)),
          60,
        ),
      ],
      63,
    );
    await fixture.whenStable();
    expect(el.querySelectorAll('tbody tr').length).toBe(50);
    expect(el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim()).toBe('1 – 50 of 63');
    expect(el.textContent).toContain("47 of this site's 60 tasks on this page");
    expect(el.textContent).toContain('60 overdue');

    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    await fixture.whenStable();
    page(
      50,
      [
        site(
          2,
          'South yard',
          Array.from({ length: 13 }, (_, i) => entry(57 + i)),
          60,
        ),
      ],
      63,
    );
    await fixture.whenStable();
    expect(el.querySelectorAll('tbody tr').length).toBe(13);
    expect(el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim()).toBe('51 – 63 of 63');
  });

  it('a new window starts again at the first page', async () => {
    await fixture.whenStable();
    page(
      0,
      [
        site(
          1,
          'North plant',
          Array.from({ length: 50 }, (_, i) => entry(i + 1)),
          80,
        ),
      ],
      80,
    );
    await fixture.whenStable();
    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    await fixture.whenStable();
    page(
      50,
      [
        site(
          1,
          'North plant',
          Array.from({ length: 30 }, (_, i) => entry(i + 51)),
          80,
        ),
      ],
      80,
    );
    await fixture.whenStable();
    fixture.componentInstance.windowDays.set(30);
    await fixture.whenStable();
    const req = http.expectOne((r) => r.url === '/api/due-list');
    expect(req.request.params.get('offset')).toBe('0');
    expect(req.request.params.get('windowDays')).toBe('30');
    req.flush({ now: '2026-06-01T12:00:00.000Z', windowDays: 30, windowHours: 50, sites: [], total: 0, limit: 50, offset: 0 });
  });
});

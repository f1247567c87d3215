import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { WorkListPage } from './work-list-page';
import { WorkOrderSummary } from './work-types';

const order = (id: number, dueDate: string | null): Partial<WorkOrderSummary> => ({
  id,
  title: `Order ${id}`,
  status: 'planned',
  priority: 'medium',
  dueDate,
  siteName: 'North plant',
  engineName: 'Genset 2',
  assigneeName: null,
  alarmIds: [],
  stepsDone: 0,
  stepsTotal: 3,
  manualChecks: 0,
});

/** The work list asks the server for one page at a time and shows where it is in the whole list. */
describe('WorkListPage', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<WorkListPage>;
  let el: HTMLElement;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [WorkListPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(WorkListPage);
    fixture.detectChanges();
    el = fixture.nativeElement as HTMLElement;
  });
  afterEach(() => http.verify());

  const answer = (offset: number, limit: number, total: number) => {
    const req = http.expectOne((r) => r.url === '/api/work-orders');
    expect(req.request.params.get('offset')).toBe(String(offset));
    expect(req.request.params.get('limit')).toBe(String(limit));
    const n = Math.min(limit, total - offset);
    req.flush({ items: Array.from({ length: n }, (_, i) => order(offset + i + 1, '2026-07-01')), total, limit, offset });
    return req;
  };
  /** The next page: the request goes out when the page's resource runs (the next tick), not in the click itself. */
  const nextPage = () => {
    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    TestBed.tick();
  };
  const openSide = () => {
    http.expectOne('/api/sites').flush([{ id: 1, name: 'North plant' }]);
    http.expectOne('/api/work-orders/assignees').flush([]);
  };

  it('asks for the first page with the open statuses and shows "1 – 50 of 120"', async () => {
    const req = http.expectOne((r) => r.url === '/api/work-orders');
    expect(req.request.params.get('status')).toBe('requested,planned,in-progress,waiting-sign-off');
    expect(req.request.params.get('offset')).toBe('0');
    req.flush({ items: Array.from({ length: 50 }, (_, i) => order(i + 1, '2026-07-01')), total: 120, limit: 50, offset: 0 });
    openSide();
    await fixture.whenStable();
    expect(el.querySelectorAll('tr.mat-mdc-row').length).toBe(50);
    expect(el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim()).toBe('1 – 50 of 120');
  });

  it('the next page asks the server from offset 50; the last page holds the rest', async () => {
    answer(0, 50, 120);
    openSide();
    await fixture.whenStable();
    nextPage();
    answer(50, 50, 120);
    await fixture.whenStable();
    nextPage();
    answer(100, 50, 120);
    await fixture.whenStable();
    expect(el.querySelectorAll('tr.mat-mdc-row').length).toBe(20);
    expect(el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim()).toBe('101 – 120 of 120');
    const nextButton = el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!;
    expect(nextButton.disabled || nextButton.getAttribute('aria-disabled') === 'true').toBe(true);
  });

  it('a newer page asked before the older answers wins: the older request is cancelled, its answer never shown', async () => {
    answer(0, 50, 120);
    openSide();
    await fixture.whenStable();
    nextPage();
    const second = http.expectOne((r) => r.url === '/api/work-orders');
    expect(second.request.params.get('offset')).toBe('50');
    // the first page stays in view while the next loads
    expect(el.querySelectorAll('tr.mat-mdc-row').length).toBe(50);
    nextPage();
    expect(second.cancelled).toBe(true);
    answer(100, 50, 120);
    await fixture.whenStable();
    expect(el.querySelectorAll('tr.mat-mdc-row').length).toBe(20);
    expect(el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim()).toBe('101 – 120 of 120');
  });

  it('a failed load says why in words, and the empty text only shows when nothing matches', async () => {
    http.expectOne((r) => r.url === '/api/work-orders').flush({ error: 'The database is busy' }, { status: 500, statusText: 'Server Error' });
    openSide();
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')?.textContent).toContain('The database is busy');
    expect(el.querySelector('.empty')).toBeNull();
    (fixture.componentInstance as unknown as { reload(offset: number): void }).reload(0);
    TestBed.tick();
    http.expectOne((r) => r.url === '/api/work-orders').flush({ items: [], total: 0, limit: 50, offset: 0 });
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')).toBeNull();
    expect(el.querySelector('.empty')?.textContent).toContain('No work orders match.');
  });
});

import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { WorkNewPage } from './work-new-page';
import { WorkTemplate } from './work-types';

const TEMPLATES: WorkTemplate[] = [
  { kind: 'coolant_test', title: 'Coolant test', steps: [], cautions: [] },
  { kind: 'general', title: 'General repair', steps: [], cautions: [] },
];

/** The new-work form: engine and kind are required before it can be sent; the rest is optional and trimmed. */
describe('WorkNewPage', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<WorkNewPage>;
  let el: HTMLElement;

  async function open(engineId?: string): Promise<void> {
    localStorage.clear();
    TestBed.configureTestingModule({
      imports: [WorkNewPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([{ path: 'work/:id', children: [] }])],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(WorkNewPage);
    if (engineId) fixture.componentRef.setInput('engineId', engineId);
    fixture.detectChanges();
    http.expectOne('/api/work-order-templates').flush(TEMPLATES);
    http.expectOne('/api/engines').flush([{ id: 7, name: 'Genset 2', siteId: 1 }]);
    http.expectOne('/api/sites').flush([{ id: 1, name: 'North plant' }]);
    await fixture.whenStable();
    el = fixture.nativeElement as HTMLElement;
  }
  const submitButton = () => el.querySelector<HTMLButtonElement>('button[type="submit"]')!;

  afterEach(() => http.verify());

  it('cannot be sent until engine and kind are chosen; then sends them with the trimmed title and no empty fields', async () => {
    await open('7');
    const form = fixture.componentInstance.form;
    expect(form.controls.engine.value).toBe(7);
    expect(form.controls.kind.hasError('required')).toBe(true);
    expect(submitButton().disabled).toBe(true);

    form.controls.kind.setValue('general');
    form.controls.title.setValue('  Hose clamp weeps  ');
    await fixture.whenStable();
    expect(submitButton().disabled).toBe(false);

    submitButton().click();
    const req = http.expectOne({ method: 'POST', url: '/api/work-orders' });
    expect(req.request.body).toEqual({ engineId: 7, kind: 'general', title: 'Hose clamp weeps' });
    req.flush({ id: 5 });
    await fixture.whenStable();
  });

  it('a title over 200 characters is invalid', async () => {
    await open();
    const title = fixture.componentInstance.form.controls.title;
    title.setValue('x'.repeat(201));
    expect(title.hasError('maxlength')).toBe(true);
    title.setValue('x'.repeat(200));
    expect(title.valid).toBe(true);
  });
});

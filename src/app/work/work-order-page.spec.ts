import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, TestRequest, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HarnessLoader } from '@angular/cdk/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import { AuthService } from '../core/auth.service';
import { PreferencesService } from '../core/preferences.service';
import { WorkOrderPage } from './work-order-page';
import { WorkOrderDetail, WorkStep } from './work-types';

// The page's own forms (typed reactive forms): what the planner chooses, what the technician types, what is recorded.
const STEP: WorkStep = {
  id: 41,
  position: 1,
  key: 'pressure',
  title: 'Read the system pressure',
  detail: null,
  input: 'value',
  unit: 'kPa',
  optional: false,
  gated: false,
  caution: null,
  after: [],
  resultValue: null,
  resultUnit: null,
  resultText: null,
  lockoutConfirmed: null,
  gateSnapshot: null,
  manualCheck: null,
  doneAt: null,
  doneByName: null,
};

function order(over: Partial<WorkOrderDetail> = {}): WorkOrderDetail {
  return {
    id: 5,
    engineId: 3,
    engineName: 'Genset 2',
    siteId: 1,
    siteName: 'North plant',
    kind: 'inspection',
    kindTitle: 'Inspection',
    title: 'Inspection',
    description: null,
    priority: 'medium',
    dueDate: null,
    status: 'planned',
    assigneeId: 9,
    assigneeName: 'Tech Nine',
    createdBy: 2,
    createdByName: 'Planner Two',
    requestedBy: null,
    requestedByName: null,
    signedOffBy: null,
    signedOffByName: null,
    alarmIds: [],
    stepsDone: 0,
    stepsTotal: 1,
    manualChecks: 0,
    createdAt: '2026-12-02T10:00:00Z',
    updatedAt: '2026-12-02T10:00:00Z',
    startedAt: null,
    completedAt: null,
    signedOffAt: null,
    coolantTestId: null,
    coolantTest: null,
    cautions: [],
    steps: [STEP],
    parts: [],
    attachments: [],
    history: [],
    amendments: [],
    ...over,
  } as WorkOrderDetail;
}

describe('WorkOrderPage forms', () => {
  let fixture: ComponentFixture<WorkOrderPage>;
  let http: HttpTestingController;
  let loader: HarnessLoader;

  async function open(role: 'planner' | 'technician', o: WorkOrderDetail): Promise<void> {
    localStorage.clear();
    TestBed.configureTestingModule({ imports: [WorkOrderPage], providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
    TestBed.inject(PreferencesService).useSystem('metric');
    http = TestBed.inject(HttpTestingController);
    const signedIn = TestBed.inject(AuthService).restore();
    http.expectOne('/api/auth/me').flush({ id: role === 'planner' ? 2 : 9, email: `${role}@example.test`, name: role, role });
    await signedIn;
    fixture = TestBed.createComponent(WorkOrderPage);
    fixture.componentRef.setInput('id', String(o.id));
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    http.expectOne('/api/work-orders/5').flush(o);
    for (const r of http.match((x) => x.url === '/api/work-orders/assignees')) r.flush([{ id: 9, name: 'Tech Nine', email: 'nine@example.test' }]);
    await fixture.whenStable();
  }

  const select = (label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label })).then((f) => f.getControl(MatSelectHarness));
  const input = (label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label })).then((f) => f.getControl(MatInputHarness));
  const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';
  function one(method: string, url: string): TestRequest {
    return http.expectOne((r) => r.method === method && r.url === url);
  }

  it('planner: a priority chosen is sent at once, and the field shows the order as the server answers', async () => {
    await open('planner', order());
    const priority = await select('Priority');
    expect(await priority!.getValueText()).toBe('Medium');
    await priority!.open();
    await priority!.clickOptions({ text: 'High' });
    const req = one('PATCH', '/api/work-orders/5');
    expect(req.request.body).toEqual({ priority: 'high' });
    req.flush(order({ priority: 'high' }));
    await fixture.whenStable();
    expect(await priority!.getValueText()).toBe('High');
    expect(http.match((r) => r.method === 'PATCH').length).toBe(0);
  });

  it('planner: a fluid is counted in litres, a part in pieces; the description is cleared once recorded', async () => {
    await open('planner', order());
    const what = await select('What');
    await what!.open();
    await what!.clickOptions({ text: 'Coolant' });
    expect(await (await select('Unit'))!.getValueText()).toBe('L');
    await (await input('Quantity'))!.setValue('2.5');
    await (await input('Description'))!.setValue('premix 50/50');
    (fixture.nativeElement as HTMLElement).querySelectorAll<HTMLButtonElement>('button').forEach((b) => b.textContent?.includes('Record') && b.click());
    const req = one('POST', '/api/work-orders/5/parts');
    expect(req.request.body).toEqual({ kind: 'coolant', quantity: 2.5, unit: 'L', description: 'premix 50/50' });
    req.flush(order());
    await fixture.whenStable();
    expect(await (await input('Description'))!.getValue()).toBe('');
    await what!.open();
    await what!.clickOptions({ text: 'Charged filter' });
    expect(await (await select('Unit'))!.getValueText()).toBe('pcs');
  });

  it('technician: a value and a remark typed into a step are saved as its draft, with the unit chosen', async () => {
    await open('technician', order({ status: 'in-progress' }));
    expect(await (await select('Unit'))!.getValueText()).toBe('kPa');
    await (await input('Value'))!.setValue('180');
    await (await input('Remark'))!.setValue('gauge on the filler neck');
    // saved after a short pause in typing: wait for the request itself
    const req = await vi.waitFor(() => one('PATCH', '/api/work-orders/5/steps/41'), { timeout: 5000, interval: 50 });
    expect(req.request.body).toEqual({ note: 'gauge on the filler neck', value: 180, unit: 'kPa' });
    req.flush(order({ status: 'in-progress' }));
    await fixture.whenStable();
    expect(text()).toContain('Draft saved');
  });

  it('an amendment refused by the server keeps its text; one stored is cleared', async () => {
    await open('planner', order({ status: 'closed' }));
    const amendment = await input('Amendment');
    await amendment!.setValue('Filter lot number added later');
    const append = () =>
      (fixture.nativeElement as HTMLElement).querySelectorAll<HTMLButtonElement>('button').forEach((b) => b.textContent?.includes('Append') && b.click());
    append();
    one('POST', '/api/work-orders/5/amendments').flush({ error: 'text: at most 4000 characters' }, { status: 400, statusText: 'Bad Request' });
    await fixture.whenStable();
    expect(text()).toContain('text: at most 4000 characters');
    expect(await amendment!.getValue()).toBe('Filter lot number added later');
    append();
    const req = one('POST', '/api/work-orders/5/amendments');
    expect(req.request.body).toEqual({ text: 'Filter lot number added later' });
    req.flush(order({ status: 'closed' }));
    await fixture.whenStable();
    expect(await amendment!.getValue()).toBe('');
  });
});

import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { EngineHome } from './engine-home';

const ENGINE = 4;

function alarm(id: number, state: string, raisedAt: string, title = `Alarm ${id}`) {
  return { id, engineId: ENGINE, siteId: 1, title, priority: 'high', state, active: state !== 'normal', raisedAt };
}

describe('EngineHome', () => {
  let fixture: ComponentFixture<EngineHome>;
  let http: HttpTestingController;
  let el: HTMLElement;

  beforeEach(() => {
    TestBed.configureTestingModule({ imports: [EngineHome], providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(EngineHome);
    el = fixture.nativeElement as HTMLElement;
    fixture.componentRef.setInput('engineId', ENGINE);
    fixture.componentRef.setInput('zone', 'America/Denver');
    fixture.detectChanges();
  });

  const flush = (path: string, body: object | null, status = 200) => {
    for (const req of http.match((r) => r.url === path)) {
      if (status === 200) req.flush(body);
      else req.flush({ error: 'no' }, { status, statusText: 'x' });
    }
  };
  const settle = async () => {
    await new Promise((r) => setTimeout(r, 0)); // the HTTP answers resolve promises first
    // not whenStable: it waits for every section's resource, and a test may leave some unanswered
    TestBed.tick();
  };
  const section = (name: string) => el.querySelector(`[data-test=${name}]`)!.textContent!.replace(/\s+/g, ' ');

  it('lists open alarms first with state, then the newest closed ones, each linking to its page', async () => {
    const req = http.match((r) => r.url === '/api/alarms');
    expect(req[0].request.params.get('engineId')).toBe(String(ENGINE));
    req[0].flush([
      alarm(1, 'normal', '2026-12-01T10:00:00Z', 'Old one'),
      alarm(2, 'unacknowledged', '2026-12-02T18:15:00Z', 'Coolant temperature high'),
      alarm(3, 'normal', '2026-12-01T12:00:00Z', 'Newer old one'),
    ]);
    await settle();
    const links = Array.from(el.querySelectorAll('[data-test=engine-alarms] li a')).map((a) => [a.textContent, a.getAttribute('href')]);
    expect(links).toEqual([
      ['Coolant temperature high', '/alarms/2'],
      ['Newer old one', '/alarms/3'],
      ['Old one', '/alarms/1'],
    ]);
    expect(section('engine-alarms')).toContain('High · Unacknowledged');
    expect(section('engine-alarms')).toContain('2026-12-02 11:15 MST');
  });

  it('shows due tasks and the last coolant test with its decision; work orders hidden from a role that may not see them', async () => {
    const due = http.match((r) => r.url === '/api/due-list');
    expect(due[0].request.params.get('engineId')).toBe(String(ENGINE));
    due[0].flush({
      now: '',
      windowDays: 30,
      windowHours: 0,
      sites: [
        {
          siteId: 1,
          siteName: 'S',
          timeZone: 'America/Denver',
          overdue: 1,
          dueSoon: 0,
          entries: [
            {
              engineId: ENGINE,
              engineName: 'E',
              taskKey: 'coolant-test',
              title: 'Coolant test',
              state: 'overdue',
              reason: 'due 2026-11-01',
              openWorkOrderId: 12,
            },
            { engineId: 99, engineName: 'Other', taskKey: 'x', title: 'Not this engine', state: 'overdue', reason: '', openWorkOrderId: null },
          ],
        },
      ],
    });
    flush('/api/work-orders', null, 403);
    flush(`/api/engines/${ENGINE}/coolant-tests`, [
      { id: 1, engineId: ENGINE, testedAt: '2026-10-01', testedByName: 'A', decision: null },
      {
        id: 2,
        engineId: ENGINE,
        testedAt: '2026-11-20',
        testedByName: 'B',
        decision: { additive: { status: 'low', filter: 'charged', liquidAdditiveL: 1.5 }, freeze: null, notes: [] },
      },
    ]);
    flush('/api/alarms', []);
    await settle();
    expect(section('engine-due')).toMatch(/Coolant test\s*Overdue/);
    expect(section('engine-due')).not.toContain('Not this engine');
    expect(el.querySelector('[data-test=engine-due] a[href="/work/12"]')).not.toBeNull();
    expect(section('engine-work')).toContain('Work orders are for planners');
    expect(section('engine-coolant-test')).toMatch(/2026-11-20\s*· B/);
    expect(section('engine-coolant-test')).toContain('Additive low · fit the charged filter · add 1.50 L liquid additive');
    expect(section('engine-alarms')).toContain('No open alarm');
  });

  it('says when a part failed and loads it again on Retry', async () => {
    flush('/api/alarms', null, 500);
    await settle();
    expect(section('engine-alarms')).toContain('The alarms could not be loaded.');
    (el.querySelector('[data-test=engine-alarms] button') as HTMLButtonElement).click();
    await settle();
    flush('/api/alarms', [alarm(5, 'acknowledged', '2026-12-02T18:00:00Z', 'Back again')]);
    await settle();
    expect(section('engine-alarms')).toContain('Back again');
  });
});

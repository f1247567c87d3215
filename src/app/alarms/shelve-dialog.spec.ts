import { TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { ShelveDialog } from './shelve-dialog';
import { Alarm } from './alarm-types';

describe('ShelveDialog', () => {
  let closed: unknown[];
  let dialog: ShelveDialog;
  let el: HTMLElement;

  beforeEach(() => {
    closed = [];
    TestBed.configureTestingModule({
      imports: [ShelveDialog],
      providers: [
        { provide: MAT_DIALOG_DATA, useValue: { alarm: { id: 3, title: 'Coolant pressure low while running', engineName: 'Genset A', engineId: 1 } as Alarm } },
        { provide: MatDialogRef, useValue: { close: (v: unknown) => closed.push(v) } },
      ],
    });
    const fixture = TestBed.createComponent(ShelveDialog);
    fixture.detectChanges();
    dialog = fixture.componentInstance;
    el = fixture.nativeElement as HTMLElement;
  });

  const submitWith = (minutes: number | null, reason: string) => {
    dialog.form.setValue({ minutes, reason });
    dialog.submit();
  };

  it('requires a reason', () => {
    submitWith(30, '');
    submitWith(30, '   ');
    expect(closed).toEqual([]);
    expect(dialog.form.controls.reason.invalid).toBe(true);
  });

  it('requires whole minutes from 1 to 1440 (the limits of the alarm state machine)', () => {
    for (const m of [null, 0, -5, 1441, 2.5]) submitWith(m, 'sensor swap');
    expect(closed).toEqual([]);
    submitWith(1, 'sensor swap');
    submitWith(1440, 'sensor swap');
    expect(closed).toEqual([
      { minutes: 1, reason: 'sensor swap' },
      { minutes: 1440, reason: 'sensor swap' },
    ]);
  });

  it('trims the reason and shows the alarm it shelves', () => {
    submitWith(45, '  gateway replaced, reading wrong  ');
    expect(closed).toEqual([{ minutes: 45, reason: 'gateway replaced, reading wrong' }]);
    expect(el.textContent).toContain('Coolant pressure low while running');
  });
});

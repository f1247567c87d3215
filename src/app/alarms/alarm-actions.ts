import { Injectable, inject } from '@angular/core';
import { MatDialog } from '@angular/material/dialog';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Observable, firstValueFrom } from 'rxjs';
import { AuthService } from '../core/auth.service';
import { AlarmStore } from './alarm-store';
import { Alarm } from './alarm-types';
import { AlarmsApi, errorText } from './alarms-api';
import { NoteDialog, NoteDialogData } from './note-dialog';
import { ShelveDialog, ShelveResult } from './shelve-dialog';

/** What a user may do to alarms; the server checks each call again. */
export interface AlarmPermissions {
  acknowledge: boolean;
  shelve: boolean;
  note: boolean;
  workOrder: boolean;
}

/**
 * The alarm actions with their dialogs, shared by the list and the detail page.
 * Each resolves to the changed alarm, or null when cancelled or refused (the refusal is shown).
 */
@Injectable({ providedIn: 'root' })
export class AlarmActions {
  private readonly api = inject(AlarmsApi);
  private readonly store = inject(AlarmStore);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  private readonly auth = inject(AuthService);

  permissions(): AlarmPermissions {
    const lead = this.auth.hasRole('planner', 'admin');
    return { acknowledge: this.auth.hasRole('operator', 'technician', 'planner', 'admin'), shelve: lead, note: lead, workOrder: lead };
  }

  async acknowledge(alarm: Alarm): Promise<Alarm | null> {
    const data: NoteDialogData = { alarm, mode: 'acknowledge' };
    const note = await firstValueFrom(this.dialog.open(NoteDialog, { data, autoFocus: 'first-tabbable' }).afterClosed());
    if (note === undefined) return null;
    return this.run(() => this.api.acknowledge(alarm.id, note || undefined), 'Acknowledged', 'Could not acknowledge');
  }

  async shelve(alarm: Alarm): Promise<Alarm | null> {
    const r = await firstValueFrom(this.dialog.open<ShelveDialog, { alarm: Alarm }, ShelveResult>(ShelveDialog, { data: { alarm } }).afterClosed());
    if (!r) return null;
    return this.run(() => this.api.shelve(alarm.id, r.minutes, r.reason), `Shelved for ${r.minutes} min`, 'Could not shelve');
  }

  unshelve(alarm: Alarm): Promise<Alarm | null> {
    return this.run(() => this.api.unshelve(alarm.id), 'Taken off the shelf', 'Could not take it off the shelf');
  }

  async note(alarm: Alarm): Promise<Alarm | null> {
    const data: NoteDialogData = { alarm, mode: 'note' };
    const note = await firstValueFrom(this.dialog.open(NoteDialog, { data }).afterClosed());
    if (!note) return null;
    return this.run(() => this.api.addNote(alarm.id, note), 'Note added', 'Could not add the note');
  }

  private async run(call: () => Observable<Alarm>, done: string, failed: string): Promise<Alarm | null> {
    try {
      // an async sequence (dialog, call, message) that the callers await: the one place for firstValueFrom
      const a = await firstValueFrom(call());
      this.store.apply(a);
      this.snack.open(done, undefined, { duration: 2500 });
      return a;
    } catch (err) {
      this.snack.open(errorText(err, failed), 'Close', { duration: 8000 });
      return null;
    }
  }
}

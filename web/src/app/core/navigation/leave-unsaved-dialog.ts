import { ChangeDetectionStrategy, Component, inject, type Injector } from '@angular/core';
import { MAT_DIALOG_DATA, MatDialog, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';
import { map, type Observable } from 'rxjs';

/** Asks before leaving a page with unsaved edits; closes with `true` only when the person chooses to leave. */
@Component({
  selector: 'sv-leave-unsaved-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>Leave without saving?</h2>
    <mat-dialog-content>
      <p>Your changes to {{ subject }} have not been saved. If you leave now, they are lost.</p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-flat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>Keep editing</button>
      <button mat-button type="button" [mat-dialog-close]="true">Leave without saving</button>
    </mat-dialog-actions>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LeaveUnsavedDialog {
  protected readonly subject = inject<string>(MAT_DIALOG_DATA);
}

/** Opens the question; emits `true` when the person chooses to leave (Escape or a click outside keeps editing). */
export function askToLeave(injector: Injector, subject: string): Observable<boolean> {
  return injector
    .get(MatDialog)
    .open(LeaveUnsavedDialog, { data: subject, width: '28rem', maxWidth: '92vw' })
    .afterClosed()
    .pipe(map((leave) => leave === true));
}

import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MAT_DIALOG_DATA, type MatDialog, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';
import type { Observable } from 'rxjs';

export interface ConfirmQueryData {
  title: string;
  lines: string[];
  confirm: string;
}

/** Asks before a reviewer settles or recodes a query; closes with `true` only when they confirm. */
@Component({
  selector: 'sv-confirm-query-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      @for (line of data.lines; track $index) {
        <p>{{ line }}</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>Go back</button>
      <button mat-flat-button type="button" [mat-dialog-close]="true">{{ data.confirm }}</button>
    </mat-dialog-actions>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmQueryDialog {
  protected readonly data = inject<ConfirmQueryData>(MAT_DIALOG_DATA);
}

/** Asks the reviewer; answers `true` only when they confirm. */
export function confirmQuery(dialog: MatDialog, data: ConfirmQueryData): Observable<boolean | undefined> {
  return dialog
    .open<ConfirmQueryDialog, ConfirmQueryData, boolean>(ConfirmQueryDialog, { data, autoFocus: 'first-tabbable', restoreFocus: true, maxWidth: '560px' })
    .afterClosed();
}

import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MAT_DIALOG_DATA, type MatDialog, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';
import type { Observable } from 'rxjs';

export interface ConfirmPublishData {
  title: string;
  lines: string[];
}

/** Asks before the draft is published as the next edition; closes with `true` only when confirmed. */
@Component({
  selector: 'sv-confirm-publish-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>Publish “{{ data.title }}”?</h2>
    <mat-dialog-content>
      @for (line of data.lines; track $index) {
        <p>{{ line }}</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>Go back</button>
      <button mat-flat-button type="button" [mat-dialog-close]="true">Publish the edition</button>
    </mat-dialog-actions>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmPublishDialog {
  protected readonly data = inject<ConfirmPublishData>(MAT_DIALOG_DATA);
}

export function confirmPublish(dialog: MatDialog, data: ConfirmPublishData): Observable<boolean | undefined> {
  return dialog
    .open<ConfirmPublishDialog, ConfirmPublishData, boolean>(ConfirmPublishDialog, { data, autoFocus: 'first-tabbable', restoreFocus: true, maxWidth: '560px' })
    .afterClosed();
}

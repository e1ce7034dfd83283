import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';

export interface ConfirmDeleteData {
  name: string;
  speciesCount: number;
  shared: boolean;
}

/** Asks before a study set is deleted; closes with `true` only when the coach confirms. */
@Component({
  selector: 'sv-confirm-delete-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>Delete “{{ data.name }}”?</h2>
    <mat-dialog-content>
      <p>The set and its list of {{ data.speciesCount }} species are deleted for good.</p>
      @if (data.shared) {
        <p>Students who have its link will no longer be able to open it.</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>Keep it</button>
      <button mat-flat-button type="button" class="danger" [mat-dialog-close]="true">Delete study set</button>
    </mat-dialog-actions>
  `,
  styles: `
    .danger {
      --mat-button-filled-container-color: var(--mat-sys-error);
      --mat-button-filled-label-text-color: var(--mat-sys-on-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmDeleteDialog {
  protected readonly data = inject<ConfirmDeleteData>(MAT_DIALOG_DATA);
}

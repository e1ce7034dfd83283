import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';

export interface ConfirmData {
  title: string;
  /** what will happen, one paragraph each */
  lines: readonly string[];
  /** the confirming button's words, e.g. "Revoke key" */
  confirm: string;
  /** for what cannot be undone: the person types this text before the button works */
  typeToConfirm?: { label: string; text: string };
}

/**
 * Asks before a destructive action; closes with `true` only when confirmed. Going back is the
 * first focus, so Enter on a dialog opened by mistake does nothing harmful.
 */
@Component({
  selector: 'sv-confirm-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton, MatFormField, MatLabel, MatHint, MatInput],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      @for (line of data.lines; track $index) {
        <p>{{ line }}</p>
      }
      @if (data.typeToConfirm; as typed) {
        <mat-form-field appearance="outline" class="typed">
          <mat-label>{{ typed.label }}</mat-label>
          <input
            matInput
            autocomplete="off"
            spellcheck="false"
            [value]="typedText()"
            (input)="typedText.set($any($event.target).value)"
            (keydown.enter)="confirmIfTyped($event)"
          />
          <mat-hint
            >Type <strong class="exact">{{ typed.text }}</strong></mat-hint
          >
        </mat-form-field>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>Go back</button>
      <button mat-flat-button type="button" class="danger" [disabled]="!confirmed()" (click)="close()">{{ data.confirm }}</button>
    </mat-dialog-actions>
  `,
  styles: `
    .typed {
      width: 100%;
      margin-top: 8px;
    }
    .exact {
      overflow-wrap: anywhere;
      font-family: ui-monospace, monospace;
    }
    .danger:not([disabled]) {
      background: var(--mat-sys-error);
      color: var(--mat-sys-on-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmDialog {
  protected readonly data = inject<ConfirmData>(MAT_DIALOG_DATA);
  readonly #ref = inject<MatDialogRef<ConfirmDialog, boolean>>(MatDialogRef);
  protected readonly typedText = signal('');
  protected readonly confirmed = computed(() => !this.data.typeToConfirm || this.typedText().trim() === this.data.typeToConfirm.text);

  protected confirmIfTyped(event: Event): void {
    event.preventDefault();
    if (this.confirmed()) this.close();
  }

  protected close(): void {
    if (this.confirmed()) this.#ref.close(true);
  }
}

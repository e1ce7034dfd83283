import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatChip, MatChipRemove, MatChipSet } from '@angular/material/chips';
import { MatIcon } from '@angular/material/icon';
import { MatButton } from '@angular/material/button';
import type { CompiledMatrix, Observation } from '@shared/engine';
import { describeObservation } from '../../shared/matrix-words';

@Component({
  selector: 'sv-seen-so-far',
  imports: [MatChipSet, MatChip, MatChipRemove, MatIcon, MatButton],
  template: `
    <div class="head">
      <h2 id="seen-heading">Seen so far</h2>
      @if (items().length > 0) {
        <button mat-button type="button" (click)="clearAll.emit()">
          <mat-icon aria-hidden="true">clear_all</mat-icon>
          Clear all
        </button>
      }
    </div>
    @if (items().length === 0) {
      <p class="empty">Nothing yet. Pick what you can see below — in any order; several chips on one trait mean “one of these”.</p>
    } @else {
      <mat-chip-set aria-labelledby="seen-heading" class="seen sv-wrapping-chips">
        @for (item of items(); track item.trait) {
          <mat-chip (removed)="remove.emit(item.trait)" [attr.data-trait]="item.trait">
            <span class="seen-label">{{ item.label }}:</span> {{ item.value }}
            <button matChipRemove [attr.aria-label]="'Remove ' + item.label + ': ' + item.value">
              <mat-icon aria-hidden="true">cancel</mat-icon>
            </button>
          </mat-chip>
        }
      </mat-chip-set>
    }
  `,
  styles: `
    .head {
      display: flex;
      align-items: center;
      justify-content: space-between;
      gap: 8px;
    }
    h2 {
      margin: 0;
      font: var(--mat-sys-title-large);
    }
    .empty {
      margin: 4px 0 0;
      color: var(--mat-sys-on-surface-variant);
    }
    .seen-label {
      font-weight: 700;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SeenSoFar {
  readonly compiled = input.required<CompiledMatrix>();
  readonly observations = input.required<readonly Observation[]>();
  readonly remove = output<string>();
  readonly clearAll = output();

  protected readonly items = computed(() =>
    this.observations().map((observation) => ({ trait: observation.trait, ...describeObservation(this.compiled(), observation) })),
  );
}

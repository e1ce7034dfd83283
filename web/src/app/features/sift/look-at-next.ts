import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { commonName, type CompiledMatrix, type Suggestion } from '@shared/engine';

@Component({
  selector: 'sv-look-at-next',
  imports: [MatButton, MatIcon],
  template: `
    <h2>Look at next</h2>
    @if (items().length === 0) {
      <p class="empty">Nothing left that would split the shortlist in this season.</p>
    } @else {
      <ol class="suggestions">
        @for (item of items(); track item.trait) {
          <li>
            <button mat-stroked-button type="button" (click)="pick.emit(item.trait)" [attr.data-trait]="item.trait">
              <mat-icon aria-hidden="true">visibility</mat-icon>
              {{ item.label }}
            </button>
            <ul class="previews">
              @for (preview of item.previews; track preview.answer) {
                <li>
                  <span class="answer">{{ preview.label }}</span>
                  <span class="arrow" aria-hidden="true">→</span>
                  <span class="leaves">{{ preview.leaders }}</span>
                  <span class="remaining">({{ preview.remaining }} left)</span>
                </li>
              }
            </ul>
          </li>
        }
      </ol>
    }
  `,
  styles: `
    h2 {
      margin: 0 0 8px;
      font: var(--mat-sys-title-large);
    }
    .empty {
      color: var(--mat-sys-on-surface-variant);
    }
    .suggestions {
      margin: 0;
      padding: 0;
      list-style: none;
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(min(100%, 300px), 1fr));
      gap: 12px 16px;
    }
    .previews {
      margin: 4px 0 0;
      padding-left: 20px;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .answer {
      font-weight: 700;
      color: var(--mat-sys-on-surface);
    }
    .arrow {
      margin: 0 4px;
    }
    .remaining {
      margin-left: 4px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LookAtNext {
  readonly compiled = input.required<CompiledMatrix>();
  readonly suggestions = input.required<readonly Suggestion[]>();
  readonly pick = output<string>();

  protected readonly items = computed(() => {
    const compiled = this.compiled();
    const name = (id: string) => {
      const taxon = compiled.taxa[compiled.taxonIndexById.get(id) ?? -1];
      return taxon ? commonName(taxon) : id;
    };
    return this.suggestions().map((suggestion) => ({
      trait: suggestion.trait,
      label: suggestion.label,
      previews: suggestion.preview
        .filter((preview) => preview.probability > 0.001)
        .slice(0, 3)
        .map((preview) => ({
          answer: preview.answer,
          label: preview.label,
          leaders: preview.leaders.map(name).join(', ') || 'none',
          remaining: preview.remaining,
        })),
    }));
  });
}

import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { RouterLink } from '@angular/router';
import { MatButton } from '@angular/material/button';
import {
  cellInBrief,
  commonName,
  compare,
  type ComparisonVerdict,
  type CompiledMatrix,
  type SeparationStrength,
  traitByCode,
  type TraitComparison,
} from '@shared/engine';

const VERDICT_LABELS: Readonly<Record<ComparisonVerdict, string>> = {
  separates: 'Separates',
  overlaps: 'Differs, with overlap',
  same: 'Same',
  'not-coded': 'Not coded for all',
};

/** a separator whose less common values (or extreme lengths) can still be shared */
const USUALLY_SEPARATES = 'Usually separates';

@Component({
  selector: 'sv-side-by-side',
  imports: [RouterLink, MatButton],
  template: `
    <div class="head">
      <h2 id="side-heading">Side by side</h2>
      @if (ids().length > 0) {
        <button mat-button type="button" (click)="clear.emit()">Clear</button>
      }
    </div>
    @if (ids().length < 2) {
      <p class="empty">Tick “Side by side” on two to four species of the shortlist to see every trait where they differ.</p>
    } @else if (comparison()) {
      <div class="table-scroll" tabindex="0" role="region" aria-labelledby="side-heading">
        <table>
          <caption>
            {{
              rows().length
            }}
            traits differ; traits that separate every pair come first.
          </caption>
          <thead>
            <tr>
              <th scope="col">Trait</th>
              @for (taxon of taxa(); track taxon.id) {
                <th scope="col">
                  <a [routerLink]="['/species', taxon.id]">{{ taxon.name }}</a>
                </th>
              }
            </tr>
          </thead>
          <tbody>
            @for (row of rows(); track row.trait) {
              <tr [attr.data-verdict]="row.verdict" [attr.data-strength]="row.strength ?? null" [attr.data-trait]="row.trait">
                <th scope="row">
                  {{ row.label }}
                  <span class="verdict">{{ verdictLabel(row.verdict, row.strength) }}</span>
                </th>
                @for (cell of row.cells; track $index) {
                  <td>{{ cell }}</td>
                }
              </tr>
            }
          </tbody>
        </table>
      </div>
      @if (sameLabels()) {
        <p class="same">Coded the same for all: {{ sameLabels() }}.</p>
      }
    }
  `,
  styles: `
    .head {
      display: flex;
      align-items: center;
      justify-content: space-between;
    }
    h2 {
      margin: 0;
      font: var(--mat-sys-title-large);
    }
    .empty,
    .same {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-medium);
    }
    .table-scroll {
      overflow-x: auto;
    }
    table {
      border-collapse: collapse;
      width: 100%;
      font: var(--mat-sys-body-medium);
    }
    caption {
      text-align: left;
      padding: 4px 0;
      color: var(--mat-sys-on-surface-variant);
    }
    th,
    td {
      text-align: left;
      vertical-align: top;
      padding: 6px 8px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      min-width: 96px;
    }
    tr[data-verdict='separates'] th[scope='row'] {
      border-left: 4px solid var(--mat-sys-primary);
    }
    .verdict {
      display: block;
      font: var(--mat-sys-label-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SideBySide {
  readonly compiled = input.required<CompiledMatrix>();
  readonly ids = input.required<readonly string[]>();
  readonly clear = output();

  protected readonly comparison = computed(() => {
    const compiled = this.compiled();
    const ids = this.ids().filter((id) => compiled.taxonIndexById.has(id));
    return ids.length >= 2 ? compare(compiled, ids) : null;
  });

  protected readonly taxa = computed(() => {
    const compiled = this.compiled();
    return (this.comparison()?.taxa ?? []).map((id) => {
      const taxon = compiled.taxa[compiled.taxonIndexById.get(id) ?? -1];
      return { id, name: taxon ? commonName(taxon) : id };
    });
  });

  protected readonly rows = computed(() => {
    const result = this.comparison();
    if (!result) return [];
    const compiled = this.compiled();
    const toRow = (comparison: TraitComparison) => {
      // compare() speaks only of the traits of the matrix it was given
      const trait = traitByCode(compiled, comparison.trait)!;
      return {
        trait: comparison.trait,
        label: comparison.label,
        verdict: comparison.verdict,
        strength: comparison.strength,
        cells: result.taxa.map((id) => cellInBrief(trait, comparison.cells[id] ?? 'unknown')),
      };
    };
    return [...result.separating, ...result.overlapping, ...result.notCoded].map(toRow);
  });

  /** Traits coded alike for all; ones that apply to none of them (leaf shape on pines) are left out. */
  protected readonly sameLabels = computed(() =>
    (this.comparison()?.same ?? [])
      .filter((comparison) => Object.values(comparison.cells).some((cell) => cell !== 'inapplicable'))
      .map((comparison) => comparison.label)
      .join(', '),
  );

  protected verdictLabel(verdict: ComparisonVerdict, strength?: SeparationStrength): string {
    return verdict === 'separates' && strength === 'usual' ? USUALLY_SEPARATES : VERDICT_LABELS[verdict];
  }
}

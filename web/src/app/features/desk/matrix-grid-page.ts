import { ChangeDetectionStrategy, Component, type ElementRef, computed, effect, inject, signal, viewChild } from '@angular/core';
import { CdkFixedSizeVirtualScroll, CdkVirtualForOf, CdkVirtualScrollViewport, CdkVirtualScrollableElement } from '@angular/cdk/scrolling';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatProgressBar } from '@angular/material/progress-bar';
import Fuse from 'fuse.js';
import { type Cell, PART_LABELS, type PlantPart } from '@shared/engine';
import { readableError } from '../../core/http/api-problem';
import { type CellEditResult, openCellEditor } from './cell-edit-dialog';
import { DeskService, type DeskTaxon, type WorkingMatrix, unpackCells } from './desk-service';
import { DeskTabs } from './desk-tabs';
import { type CellView, type GridColumn, cellView, columnWindow, filterColumns, movedTo, orderColumns, partSegments } from './grid-model';

/** Sizes the virtual scrolling sums with (the stylesheet draws the same sizes). */
export const GRID_SIZES = Object.freeze({ row: 40, column: 152, species: 232, header: 92 });

type LoadState = { status: 'loading' } | { status: 'ready'; matrix: WorkingMatrix } | { status: 'error'; message: string };

interface GridRow {
  /** position among the rows shown (after filtering) */
  index: number;
  taxon: DeskTaxon;
}

/**
 * The Matrix desk: the working (unpublished) matrix as a grid of species × traits, grouped by plant
 * part. Rows are virtualised by the CDK and columns by a window of our own, so a matrix of thousands
 * of species and hundreds of traits scrolls smoothly. Arrow keys move between cells; Enter opens the
 * cell editor.
 */
@Component({
  selector: 'sv-matrix-grid-page',
  imports: [
    CdkVirtualScrollableElement,
    CdkVirtualScrollViewport,
    CdkFixedSizeVirtualScroll,
    CdkVirtualForOf,
    MatButton,
    MatFormField,
    MatLabel,
    MatInput,
    MatSelect,
    MatOption,
    MatIcon,
    MatProgressBar,
    DeskTabs,
  ],
  templateUrl: './matrix-grid-page.html',
  styleUrl: './matrix-grid-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class MatrixGridPage {
  readonly #desk = inject(DeskService);
  readonly #dialog = inject(MatDialog);

  protected readonly sizes = GRID_SIZES;
  protected readonly partLabels = PART_LABELS;
  protected readonly state = signal<LoadState>({ status: 'loading' });
  /** bumped when a cell changes in place, so the rows redraw */
  readonly #edits = signal(0);
  protected readonly notice = signal('');

  // filters
  protected readonly speciesWords = signal('');
  protected readonly family = signal('');
  protected readonly parts = signal<PlantPart[]>([]);
  protected readonly traitWords = signal('');

  // where the grid is scrolled and how wide it is, for the column window
  readonly #scrollLeft = signal(0);
  readonly #width = signal(1024);
  readonly #height = signal(600);
  protected readonly active = signal({ row: 0, column: 0 });

  protected readonly scroller = viewChild<ElementRef<HTMLElement>>('scroller');
  protected readonly viewport = viewChild(CdkVirtualScrollViewport);

  protected readonly matrix = computed(() => {
    const state = this.state();
    return state.status === 'ready' ? state.matrix : null;
  });
  protected readonly errorMessage = computed(() => {
    const state = this.state();
    return state.status === 'error' ? state.message : '';
  });
  protected readonly allColumns = computed(() => orderColumns(this.matrix()?.traits ?? []));
  protected readonly columns = computed(() => filterColumns(this.allColumns(), this.parts(), this.traitWords()));
  protected readonly families = computed(() => [...new Set((this.matrix()?.taxa ?? []).map((taxon) => taxon.family))].filter((family) => family !== '').sort());
  protected readonly partsPresent = computed(() => [...new Set(this.allColumns().map((column) => column.part))]);
  /** the name search index, built only once someone searches (a large matrix loads faster without it) */
  readonly #fuse = computed(() => {
    const taxa = this.matrix()?.taxa ?? [];
    return new Fuse(taxa, { keys: ['scientificName', 'commonNames', 'id'], threshold: 0.3, ignoreLocation: true });
  });
  protected readonly rows = computed<GridRow[]>(() => {
    const taxa = this.matrix()?.taxa ?? [];
    const words = this.speciesWords().trim();
    const family = this.family();
    const found =
      words === ''
        ? taxa
        : this.#fuse()
            .search(words)
            .map((result) => result.item);
    return found.filter((taxon) => family === '' || taxon.family === family).map((taxon, index) => ({ index, taxon }));
  });
  protected readonly window = computed(() => columnWindow(this.#scrollLeft(), this.#width() - GRID_SIZES.species, GRID_SIZES.column, this.columns().length), {
    equal: (a, b) => a.first === b.first && a.last === b.last,
  });
  protected readonly shownColumns = computed(() => {
    const { first, last } = this.window();
    return this.columns().slice(first, last);
  });
  protected readonly segments = computed(() => partSegments(this.columns(), this.window().first, this.window().last));
  protected readonly rowWidth = computed(() => GRID_SIZES.species + this.columns().length * GRID_SIZES.column);
  protected readonly leftPad = computed(() => this.window().first * GRID_SIZES.column);
  protected readonly activeId = computed(() => {
    const { row, column } = this.active();
    return this.rows().length > 0 && this.columns().length > 0 ? `desk-cell-${row}-${column}` : null;
  });
  protected readonly activeWords = computed(() => {
    const { row, column } = this.active();
    const taxon = this.rows()[row]?.taxon;
    const col = this.columns()[column];
    if (!taxon || !col) return '';
    this.#edits();
    return `${taxon.scientificName} · ${col.trait.label}: ${this.view(taxon, col).words}`;
  });

  /** drawn cells, by taxon, by column key (a cell is drawn many times while scrolling) */
  #views = new WeakMap<DeskTaxon, Array<CellView | undefined>>();
  /** decoded rows, oldest first; only the rows lately drawn are kept decoded */
  readonly #decoded = new Map<DeskTaxon, Cell[]>();

  constructor() {
    this.load();
    // the grid exists once the matrix is loaded: measure it then and whenever it is resized
    effect((onCleanup) => {
      const element = this.scroller()?.nativeElement;
      if (!element) return;
      const observer = new ResizeObserver(() => this.#measure());
      observer.observe(element);
      onCleanup(() => observer.disconnect());
      this.#measure();
    });
  }

  protected load(): void {
    this.state.set({ status: 'loading' });
    this.#desk.workingMatrix().subscribe({
      next: (matrix) => {
        this.#views = new WeakMap();
        this.#decoded.clear();
        this.state.set({ status: 'ready', matrix });
        this.#markFirstRows();
      },
      error: (error: unknown) => this.state.set({ status: 'error', message: readableError(error) }),
    });
  }

  /** Marks `desk:drawn` (User Timing, read by the desk benchmark) once the first rows are in the page. */
  #markFirstRows(frames = 0): void {
    if (document.querySelector('[role="row"][data-taxon]')) performance.mark('desk:drawn');
    else if (frames < 600) requestAnimationFrame(() => this.#markFirstRows(frames + 1));
  }

  /** A row's cells, decoded when first drawn; a few thousand rows stay decoded. */
  #cells(taxon: DeskTaxon): Cell[] {
    let cells = this.#decoded.get(taxon);
    if (cells) return cells;
    cells = unpackCells(taxon, this.matrix()?.traits.length ?? 0);
    this.#decoded.set(taxon, cells);
    if (this.#decoded.size > 2_000) this.#decoded.delete(this.#decoded.keys().next().value as DeskTaxon);
    return cells;
  }

  #measure(): void {
    const element = this.scroller()?.nativeElement;
    if (!element) return;
    this.#width.set(element.clientWidth);
    this.#height.set(element.clientHeight);
    this.#scrollLeft.set(element.scrollLeft);
  }

  #scrollQueued = false;

  /** Follows horizontal scrolling once per frame (a scroll event can come several times a frame). */
  protected scrolled(event: Event): void {
    if (this.#scrollQueued) return;
    this.#scrollQueued = true;
    const element = event.target as HTMLElement;
    requestAnimationFrame(() => {
      this.#scrollQueued = false;
      this.#scrollLeft.set(element.scrollLeft);
    });
  }

  /** The cell as drawn; `edits` is read so an edited cell redraws. */
  protected view(taxon: DeskTaxon, column: GridColumn): CellView {
    let ofTaxon = this.#views.get(taxon);
    if (!ofTaxon) {
      ofTaxon = [];
      this.#views.set(taxon, ofTaxon);
    }
    return (ofTaxon[column.key] ??= cellView(column, this.#cells(taxon)[column.position]));
  }

  protected edits(): number {
    return this.#edits();
  }

  protected setParts(parts: PlantPart[]): void {
    this.parts.set(parts);
    this.#resetActive();
  }

  protected setFamily(family: string): void {
    this.family.set(family);
    this.#resetActive();
  }

  protected setSpeciesWords(words: string): void {
    this.speciesWords.set(words);
    this.#resetActive();
  }

  protected setTraitWords(words: string): void {
    this.traitWords.set(words);
    this.#resetActive();
  }

  #resetActive(): void {
    this.active.set({ row: 0, column: 0 });
    const element = this.scroller()?.nativeElement;
    if (element) {
      element.scrollTop = 0;
      element.scrollLeft = 0;
    }
  }

  /** A click makes the cell under the pointer the active one; a double click opens its editor. */
  protected pointed(event: MouseEvent, edit: boolean): void {
    const cell = (event.target as HTMLElement).closest<HTMLElement>('[role="gridcell"]');
    if (!cell) return;
    const row = Number(cell.dataset['row']);
    const column = Number(cell.dataset['col']);
    if (!Number.isInteger(row) || !Number.isInteger(column)) return;
    this.active.set({ row, column });
    this.scroller()?.nativeElement.focus({ preventScroll: true });
    if (edit) this.openEditor(row, column);
  }

  protected keydown(event: KeyboardEvent): void {
    if (event.key === 'Enter' || event.key === 'F2') {
      event.preventDefault();
      this.openEditor();
      return;
    }
    const pageRows = Math.max(1, Math.floor((this.#height() - GRID_SIZES.header) / GRID_SIZES.row) - 1);
    const next = movedTo(event.key, this.active(), { rows: this.rows().length, columns: this.columns().length, pageRows }, event.ctrlKey || event.metaKey);
    if (!next) return;
    event.preventDefault();
    this.active.set(next);
    this.#scrollIntoView(next.row, next.column);
  }

  /** Scrolls just enough for the cell to be inside the grid, clear of the sticky header and species column. */
  #scrollIntoView(row: number, column: number): void {
    const element = this.scroller()?.nativeElement;
    if (!element) return;
    const top = GRID_SIZES.header + row * GRID_SIZES.row;
    const bottom = top + GRID_SIZES.row;
    if (top - GRID_SIZES.header < element.scrollTop) element.scrollTop = top - GRID_SIZES.header;
    else if (bottom > element.scrollTop + element.clientHeight) element.scrollTop = bottom - element.clientHeight;
    const left = GRID_SIZES.species + column * GRID_SIZES.column;
    const right = left + GRID_SIZES.column;
    if (left - GRID_SIZES.species < element.scrollLeft) element.scrollLeft = left - GRID_SIZES.species;
    else if (right > element.scrollLeft + element.clientWidth) element.scrollLeft = right - element.clientWidth;
    this.#scrollLeft.set(element.scrollLeft);
  }

  protected openEditor(row = this.active().row, column = this.active().column): void {
    const taxon = this.rows()[row]?.taxon;
    const col = this.columns()[column];
    if (!taxon || !col) return;
    this.active.set({ row, column });
    openCellEditor(this.#dialog, {
      taxon: { id: taxon.id, scientificName: taxon.scientificName },
      trait: col.trait,
      value: this.#cells(taxon)[col.position] ?? 'unknown',
      version: taxon.versions[col.position] ?? 0,
      // a refusal shows the cell as it is now: the grid shows that too, so the two never disagree
      seen: (current) => this.#replaceCell(taxon, col, current.value, current.version),
    }).subscribe((result: CellEditResult | undefined) => {
      if (result) {
        this.#replaceCell(taxon, col, result.value, result.version);
        this.notice.set(
          `Saved ${taxon.scientificName} · ${col.trait.label} (version ${result.version}). It is in the draft until the next edition is published.`,
        );
      }
      this.scroller()?.nativeElement.focus({ preventScroll: true });
    });
  }

  #replaceCell(taxon: DeskTaxon, column: GridColumn, value: Cell, version: number): void {
    const cells = this.#cells(taxon);
    cells[column.position] = value;
    taxon.packed = JSON.stringify(cells);
    taxon.versions[column.position] = version;
    const ofTaxon = this.#views.get(taxon);
    if (ofTaxon) ofTaxon[column.key] = undefined;
    this.#edits.update((count) => count + 1);
  }

  protected trackRow(_index: number, row: GridRow): string {
    return row.taxon.id;
  }
}

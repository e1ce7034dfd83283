import { ChangeDetectionStrategy, Component, type AfterViewInit, computed, inject, signal, viewChild } from '@angular/core';
import { DatePipe } from '@angular/common';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatPaginator } from '@angular/material/paginator';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSort, MatSortHeader } from '@angular/material/sort';
import {
  MatCell,
  MatCellDef,
  MatColumnDef,
  MatHeaderCell,
  MatHeaderCellDef,
  MatHeaderRow,
  MatHeaderRowDef,
  MatNoDataRow,
  MatRow,
  MatRowDef,
  MatTable,
  MatTableDataSource,
} from '@angular/material/table';
import { readableError } from '../../core/http/api-problem';
import { type ChangeRow, changeRow, changesCsv } from './change-log';
import { DeskService, type AuditEntry } from './desk-service';
import { DeskTabs } from './desk-tabs';

/** The most entries the page reads at once (pages of 200); older ones come with "Load older changes". */
const READ_AT_ONCE = 1000;
const PAGE = 200;

/**
 * The change log: who changed what, when, from what to what, and why — sortable, filterable and
 * paged, and exported as CSV for a spreadsheet.
 */
@Component({
  selector: 'sv-change-log-page',
  imports: [
    DatePipe,
    MatButton,
    MatFormField,
    MatLabel,
    MatInput,
    MatIcon,
    MatSelect,
    MatOption,
    MatPaginator,
    MatProgressBar,
    MatSort,
    MatSortHeader,
    MatTable,
    MatColumnDef,
    MatHeaderCell,
    MatHeaderCellDef,
    MatCell,
    MatCellDef,
    MatHeaderRow,
    MatHeaderRowDef,
    MatRow,
    MatRowDef,
    MatNoDataRow,
    DeskTabs,
  ],
  templateUrl: './change-log-page.html',
  styleUrl: './desk-pages.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class ChangeLogPage implements AfterViewInit {
  readonly #desk = inject(DeskService);

  protected readonly columns = ['at', 'who', 'entity', 'taxon', 'trait', 'change', 'reason'] as const;
  protected readonly data = new MatTableDataSource<ChangeRow>([]);
  protected readonly status = signal<'loading' | 'ready' | 'error'>('loading');
  protected readonly problem = signal('');
  protected readonly words = signal('');
  protected readonly entity = signal('');
  /** the `before` to read older entries from; null when everything is read */
  protected readonly older = signal<number | null>(null);
  protected readonly count = signal(0);
  protected readonly shown = signal(0);
  protected readonly entities = computed(() => [...new Set(this.#rows().map((row) => row.entity))].sort());
  readonly #rows = signal<ChangeRow[]>([]);

  protected readonly sort = viewChild(MatSort);
  protected readonly paginator = viewChild(MatPaginator);

  constructor() {
    this.data.filterPredicate = (row, filter) => {
      const { words, entity } = JSON.parse(filter) as { words: string; entity: string };
      if (entity && row.entity !== entity) return false;
      if (!words) return true;
      return [row.who, row.taxon, row.trait, row.before, row.after, row.reason, row.entity].some((field) => field.toLowerCase().includes(words));
    };
    this.data.sortingDataAccessor = (row, column) =>
      column === 'at' ? row.id : column === 'change' ? row.after : String(row[column as keyof ChangeRow] ?? '').toLowerCase();
    this.load();
  }

  ngAfterViewInit(): void {
    this.#connect();
  }

  #connect(): void {
    const sort = this.sort();
    const paginator = this.paginator();
    if (sort) this.data.sort = sort;
    if (paginator) this.data.paginator = paginator;
  }

  protected load(): void {
    this.status.set('loading');
    this.#rows.set([]);
    this.#read(undefined, []);
  }

  protected loadOlder(): void {
    const before = this.older();
    if (before === null) return;
    this.status.set('loading');
    this.#read(
      before,
      this.#rows().map((row) => row),
    );
  }

  #read(before: number | undefined, sofar: ChangeRow[], read: AuditEntry[] = []): void {
    this.#desk.audit({ before, limit: PAGE }).subscribe({
      next: (page) => {
        const all = [...read, ...page.entries];
        if (page.next !== null && all.length < READ_AT_ONCE) {
          this.#read(page.next, sofar, all);
          return;
        }
        const rows = [...sofar, ...all.map(changeRow)];
        this.#rows.set(rows);
        this.data.data = rows;
        this.older.set(page.next);
        this.count.set(rows.length);
        this.#refilter();
        this.status.set('ready');
        queueMicrotask(() => this.#connect());
      },
      error: (error: unknown) => {
        this.problem.set(readableError(error));
        this.status.set('error');
      },
    });
  }

  protected setWords(words: string): void {
    this.words.set(words);
    this.#refilter();
  }

  protected setEntity(entity: string): void {
    this.entity.set(entity);
    this.#refilter();
  }

  #refilter(): void {
    this.data.filter = JSON.stringify({ words: this.words().trim().toLowerCase(), entity: this.entity() });
    this.shown.set(this.data.filteredData.length);
    this.data.paginator?.firstPage();
  }

  /** Downloads the rows the filters leave, in the order shown, as CSV. */
  protected exportCsv(): void {
    const sort = this.data.sort;
    const rows = sort ? this.data.sortData([...this.data.filteredData], sort) : this.data.filteredData;
    const blob = new Blob([changesCsv(rows)], { type: 'text/csv;charset=utf-8' });
    const url = URL.createObjectURL(blob);
    const link = document.createElement('a');
    link.href = url;
    link.download = `sylvasift-changes-${new Date().toISOString().slice(0, 10)}.csv`;
    document.body.append(link);
    link.click();
    link.remove();
    setTimeout(() => URL.revokeObjectURL(url), 1_000);
  }
}

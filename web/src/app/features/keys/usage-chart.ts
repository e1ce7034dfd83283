import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { DatePipe, DecimalPipe } from '@angular/common';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import type { DayCount } from './key-service';

const WIDTH = 300;
const HEIGHT = 100;

/** "3 March" for a UTC day "2027-03-03", read as UTC so it never slips a day. */
function dayWords(day: string): string {
  return new Date(`${day}T00:00:00Z`).toLocaleDateString('en-GB', { day: 'numeric', month: 'long', timeZone: 'UTC' });
}

/**
 * Requests per UTC day as bars, one per day, today on the right. The drawing is one image with a
 * sentence that sums it up; the same numbers are a table a button away, for screen readers and
 * for anyone who wants the exact counts.
 */
@Component({
  selector: 'sv-usage-chart',
  imports: [DatePipe, DecimalPipe, MatButton, MatIcon],
  template: `
    <figure>
      <div class="peak" aria-hidden="true">{{ peak() === 0 ? 'No requests' : 'Busiest day: ' + (peak() | number) }}</div>
      <svg class="chart" [attr.viewBox]="viewBox" role="img" [attr.aria-label]="summary()" preserveAspectRatio="none">
        <line class="axis" x1="0" [attr.y1]="height" [attr.x2]="width" [attr.y2]="height" />
        <line class="axis faint" x1="0" y1="0" [attr.x2]="width" y2="0" />
        @for (bar of bars(); track bar.day) {
          <rect [class.today]="bar.today" [attr.x]="bar.x" [attr.y]="bar.y" [attr.width]="bar.w" [attr.height]="bar.h" />
        }
      </svg>
      <div class="ends" aria-hidden="true">
        <span>{{ firstDay() }}</span><span>today (UTC)</span>
      </div>
      <figcaption class="summary" aria-hidden="true">{{ summary() }}</figcaption>
    </figure>
    <button
      mat-button
      type="button"
      class="toggle"
      [attr.aria-expanded]="showTable()"
      [attr.aria-controls]="showTable() ? tableId() : null"
      (click)="showTable.set(!showTable())"
    >
      <mat-icon aria-hidden="true">{{ showTable() ? 'expand_less' : 'table_rows' }}</mat-icon>
      {{ showTable() ? 'Hide the table' : 'Show as a table' }}
    </button>
    @if (showTable()) {
      <div class="table-wrap" [id]="tableId()" tabindex="0" role="region" [attr.aria-label]="'Requests per day, ' + keyName()">
        <table>
          <caption>
            Requests per day (UTC),
            {{
              caption()
            }}
          </caption>
          <thead>
            <tr>
              <th scope="col">Day</th>
              <th scope="col" class="num">Requests</th>
            </tr>
          </thead>
          <tbody>
            @for (day of newestFirst(); track day.day) {
              <tr>
                <th scope="row">{{ day.day | date: 'EEE d MMM' : 'UTC' }}</th>
                <td class="num">{{ day.count | number }}</td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    figure {
      margin: 0;
    }
    .chart {
      display: block;
      width: 100%;
      height: 120px;
    }
    .peak,
    .ends {
      font: var(--mat-sys-label-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .ends {
      display: flex;
      justify-content: space-between;
      margin-top: 2px;
    }
    rect {
      fill: color-mix(in srgb, var(--mat-sys-primary) 55%, transparent);
    }
    rect.today {
      fill: var(--mat-sys-primary);
    }
    .axis {
      stroke: var(--mat-sys-outline);
      stroke-width: 1;
      vector-effect: non-scaling-stroke;
    }
    .axis.faint {
      stroke: var(--mat-sys-outline-variant);
      stroke-dasharray: 2 3;
    }
    .summary {
      margin: 4px 0;
      font: var(--mat-sys-body-medium);
      color: var(--mat-sys-on-surface-variant);
    }
    .table-wrap {
      max-height: 320px;
      overflow: auto;
      &:focus-visible {
        outline: 3px solid var(--mat-sys-primary);
        outline-offset: 2px;
      }
    }
    table {
      border-collapse: collapse;
      width: 100%;
      max-width: 360px;
      font: var(--mat-sys-body-medium);
    }
    caption {
      text-align: left;
      font: var(--mat-sys-title-small);
      padding: 4px 0;
    }
    th,
    td {
      padding: 4px 8px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
      text-align: left;
      font-weight: 400;
    }
    .num {
      text-align: right;
      font-variant-numeric: tabular-nums;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UsageChart {
  /** one entry per day, oldest first */
  readonly days = input.required<readonly DayCount[]>();
  /** the key's name, for the summary and the table's caption */
  readonly keyName = input.required<string>();
  readonly keyId = input.required<number>();

  protected readonly width = WIDTH;
  protected readonly height = HEIGHT;
  protected readonly viewBox = `0 0 ${WIDTH} ${HEIGHT}`;
  protected readonly showTable = signal(false);
  protected readonly tableId = computed(() => `usage-table-${this.keyId()}`);

  protected readonly peak = computed(() => Math.max(0, ...this.days().map((d) => d.count)));
  protected readonly firstDay = computed(() => {
    const first = this.days()[0];
    return first ? dayWords(first.day) : '';
  });
  protected readonly newestFirst = computed(() => [...this.days()].reverse());
  protected readonly caption = computed(() => `${this.keyName()}, last ${this.days().length} days, newest first`);

  protected readonly bars = computed(() => {
    const days = this.days();
    const slot = WIDTH / Math.max(days.length, 1);
    const peak = this.peak();
    const last = days.length - 1;
    return days.map((d, i) => {
      // a day without use keeps a sliver, so the days can still be counted along the axis
      const h = peak === 0 ? 1 : Math.max(1, (HEIGHT * d.count) / peak);
      return { day: d.day, x: i * slot + slot * 0.15, w: slot * 0.7, y: HEIGHT - h, h, today: i === last };
    });
  });

  protected readonly summary = computed(() => {
    const days = this.days();
    const total = days.reduce((sum, d) => sum + d.count, 0);
    const today = days.at(-1)?.count ?? 0;
    const name = this.keyName();
    if (total === 0) return `${name}: no requests in the last ${days.length} days.`;
    const busiest = days.reduce((best, d) => (d.count > best.count ? d : best));
    const plural = (n: number) => `${n.toLocaleString('en')} request${n === 1 ? '' : 's'}`;
    return `${name}: ${plural(total)} in the last ${days.length} days, the most on ${dayWords(busiest.day)} (${plural(busiest.count)}); ${plural(today)} today.`;
  });
}

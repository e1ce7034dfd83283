import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { RouterLink } from '@angular/router';
import { PercentPipe } from '@angular/common';
import { MatExpansionPanel, MatExpansionPanelContent, MatExpansionPanelHeader, MatExpansionPanelTitle } from '@angular/material/expansion';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatButton } from '@angular/material/button';
import { commonName, type Candidate, type CompiledMatrix, type RankResult, type Reason, type ReasonStatus } from '@shared/engine';
import { MAX_LEEWAY } from './sift-query';
import { weightInWords } from './measure-words';

export const MAX_SIDE_BY_SIDE = 4;
const FIRST_FEW = 10;

const REASON_GROUPS: ReadonlyArray<{ status: ReasonStatus; label: string }> = [
  { status: 'matched', label: 'Matched' },
  { status: 'partial', label: 'Partly matched' },
  { status: 'conflict', label: 'Conflicting' },
  { status: 'not-coded', label: 'Not coded' },
  { status: 'not-applicable', label: 'Does not apply' },
];

export interface CandidateView {
  id: string;
  common: string;
  scientific: string;
  probability: number;
  conflicts: number;
  reasonGroups: Array<{ status: ReasonStatus; label: string; reasons: Reason[] }>;
  conflictTexts: string[];
}

function viewOf(compiled: CompiledMatrix, candidate: Candidate): CandidateView {
  const index = compiled.taxonIndexById.get(candidate.taxonId);
  const taxon = index === undefined ? undefined : compiled.taxa[index];
  return {
    id: candidate.taxonId,
    common: taxon ? commonName(taxon) : candidate.taxonId,
    scientific: taxon?.scientificName ?? '',
    probability: candidate.probability,
    conflicts: candidate.conflicts,
    reasonGroups: REASON_GROUPS.map((group) => ({ ...group, reasons: candidate.reasons.filter((reason) => reason.status === group.status) })).filter(
      (group) => group.reasons.length > 0,
    ),
    conflictTexts: candidate.reasons.filter((reason) => reason.status === 'conflict' || reason.status === 'not-applicable').map((reason) => reason.text),
  };
}

@Component({
  selector: 'sv-shortlist',
  imports: [
    RouterLink,
    PercentPipe,
    MatExpansionPanel,
    MatExpansionPanelHeader,
    MatExpansionPanelTitle,
    MatExpansionPanelContent,
    MatCheckbox,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatButton,
  ],
  templateUrl: './shortlist.html',
  styleUrl: './shortlist.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shortlist {
  readonly compiled = input.required<CompiledMatrix>();
  readonly result = input.required<RankResult>();
  readonly leeway = input.required<number>();
  readonly observationCount = input.required<number>();
  readonly chosen = input.required<readonly string[]>();
  readonly leewayChange = output<number>();
  readonly chosenChange = output<string[]>();

  protected readonly weightWords = weightInWords;
  protected readonly leewayChoices = Array.from({ length: MAX_LEEWAY + 1 }, (_, leeway) => leeway);
  /** a phone screen shows the first few; the rest are one tap away */
  protected readonly showAll = signal(false);
  protected readonly firstFew = FIRST_FEW;
  protected readonly visible = computed(() => (this.showAll() ? this.candidates() : this.candidates().slice(0, FIRST_FEW)));
  protected readonly maxChosen = MAX_SIDE_BY_SIDE;
  protected readonly candidates = computed(() => this.result().candidates.map((candidate) => viewOf(this.compiled(), candidate)));
  protected readonly ruledOut = computed(() => this.result().ruledOut.map((candidate) => viewOf(this.compiled(), candidate)));
  protected readonly totalCandidates = computed(() => this.result().totalCandidates ?? this.result().candidates.length);
  protected readonly totalRuledOut = computed(() => this.result().totalRuledOut ?? this.result().ruledOut.length);

  protected isChosen(id: string): boolean {
    return this.chosen().includes(id);
  }

  protected toggleChosen(id: string, checked: boolean): void {
    const without = this.chosen().filter((chosen) => chosen !== id);
    this.chosenChange.emit(checked ? [...without, id].slice(-MAX_SIDE_BY_SIDE) : without);
  }

  protected setLeeway(value: unknown): void {
    if (typeof value === 'number') this.leewayChange.emit(value);
  }
}

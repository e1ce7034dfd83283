import { FormControl, FormGroup, FormRecord, Validators, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import type { Cell, DiscreteCell } from '@shared/engine';
import { isDiscreteCell, isNumericCell } from '@shared/engine';

/** What the cell editor needs to know of a trait: its kind, its values in order, and its unit. */
export interface CellTrait {
  kind: 'state' | 'numeric' | 'count';
  /** the values a state or count cell can hold, in the order shown; empty for numeric traits */
  values: ReadonlyArray<{ code: string | number; label: string }>;
  /** the unit of a numeric range */
  unit?: string;
}

/** How often a taxon shows one value of a state or count trait; '' for not at all. */
export type Frequency = '' | 'usual' | 'occasional' | 'rare';
export type CellMode = 'coded' | 'unknown' | 'inapplicable';
export const FREQUENCIES: ReadonlyArray<{ value: Frequency; label: string }> = [
  { value: '', label: 'Not shown' },
  { value: 'usual', label: 'Usual' },
  { value: 'occasional', label: 'Occasional' },
  { value: 'rare', label: 'Rare' },
];
export const RANGE_FIELDS = ['min', 'low', 'high', 'max'] as const;
export type RangeField = (typeof RANGE_FIELDS)[number];
export const RANGE_LABELS: Readonly<Record<RangeField, string>> = { min: 'Smallest', low: 'Typical from', high: 'Typical to', max: 'Largest' };

export type RangeGroup = FormGroup<Record<RangeField, FormControl<number | null>>>;
export type CellForm = FormGroup<{
  mode: FormControl<CellMode>;
  frequencies: FormRecord<FormControl<Frequency>>;
  range: RangeGroup;
}>;

/**
 * The cell a form describes must be codable: some value of a state or count trait, or a numeric
 * range in order, min ≤ low ≤ high ≤ max, none negative; `unknown` and `inapplicable` always are.
 */
function cellValidator(kind: () => CellTrait['kind'] | null): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const form = control as CellForm;
    if (form.controls.mode.value !== 'coded') return null;
    if (kind() === 'numeric') {
      const values = RANGE_FIELDS.map((field) => form.controls.range.controls[field].value);
      if (values.some((value) => value === null || !Number.isFinite(value))) return { rangeMissing: true };
      if (values.some((value) => (value as number) < 0)) return { rangeNegative: true };
      // RANGE_FIELDS has four entries, each checked to be a finite number above
      const [min, low, high, max] = values as [number, number, number, number];
      return min <= low && low <= high && high <= max ? null : { rangeOrder: true };
    }
    return Object.values(form.controls.frequencies.controls).some((frequency) => frequency.value !== '') ? null : { noValue: true };
  };
}

export function buildCellForm(kind: () => CellTrait['kind'] | null): CellForm {
  const number = () => new FormControl<number | null>(null, { validators: [Validators.min(0)] });
  return new FormGroup(
    {
      mode: new FormControl<CellMode>('coded', { nonNullable: true }),
      frequencies: new FormRecord<FormControl<Frequency>>({}),
      range: new FormGroup({ min: number(), low: number(), high: number(), max: number() }),
    },
    { validators: cellValidator(kind) },
  );
}

/** What is wrong with the cell the form describes, in a sentence; null when it can be written. */
export function cellProblem(form: CellForm, unit = 'cm'): string | null {
  if (form.hasError('noValue')) return 'Choose how often at least one value is seen, or mark the cell unknown or inapplicable.';
  if (form.hasError('rangeMissing')) return `Give all four numbers of the range, in ${unit}.`;
  if (form.hasError('rangeNegative')) return 'Lengths cannot be negative.';
  if (form.hasError('rangeOrder')) return 'The range must read smallest ≤ typical from ≤ typical to ≤ largest.';
  return null;
}

/** Sets the form to show a cell; the frequency controls are made for the trait's values. */
export function fillCellForm(form: CellForm, trait: CellTrait, cell: Cell): void {
  const frequencies = form.controls.frequencies;
  for (const key of Object.keys(frequencies.controls)) frequencies.removeControl(key, { emitEvent: false });
  const frequencyOf = (code: string | number): Frequency => {
    if (!isDiscreteCell(cell)) return '';
    const has = (values: Array<string | number> | undefined) => (values ?? []).some((value) => String(value) === String(code));
    return has(cell.usual) ? 'usual' : has(cell.occasional) ? 'occasional' : has(cell.rare) ? 'rare' : '';
  };
  if (trait.kind !== 'numeric') {
    for (const { code } of trait.values)
      frequencies.addControl(String(code), new FormControl<Frequency>(frequencyOf(code), { nonNullable: true }), { emitEvent: false });
  }
  const range = isNumericCell(cell) ? cell : null;
  form.controls.range.setValue({ min: range?.min ?? null, low: range?.low ?? null, high: range?.high ?? null, max: range?.max ?? null }, { emitEvent: false });
  form.controls.mode.setValue(cell === 'unknown' || cell === 'inapplicable' ? cell : 'coded', { emitEvent: false });
  form.updateValueAndValidity();
}

/** The cell the form describes, in the matrix's own shape (count codes stay numbers). */
export function cellFromForm(form: CellForm, trait: CellTrait): Cell {
  const mode = form.controls.mode.value;
  if (mode !== 'coded') return mode;
  if (trait.kind === 'numeric') {
    const range = form.controls.range.getRawValue();
    return { min: range.min ?? 0, low: range.low ?? 0, high: range.high ?? 0, max: range.max ?? 0 };
  }
  const cell: DiscreteCell = {};
  for (const { code } of trait.values) {
    const frequency = form.controls.frequencies.controls[String(code)]?.value ?? '';
    if (frequency !== '') (cell[frequency] ??= []).push(code);
  }
  return cell;
}

import type { Cell, Frequency, Trait } from '@shared/engine';

const FREQUENCY_WORDS: Record<Frequency, string> = { usual: 'usually', occasional: 'occasionally', rare: 'rarely' };
const FREQUENCIES: readonly Frequency[] = ['usual', 'occasional', 'rare'];

function number(value: number): string {
  return String(Math.round(value * 100) / 100);
}

function joinOr(items: readonly string[]): string {
  return items.length <= 1 ? items.join('') : `${items.slice(0, -1).join(', ')} or ${items[items.length - 1]}`;
}

/** A coded cell as a person reads it: "usually plated or scaly, occasionally furrowed", "typically 12–23 cm, recorded 10–25 cm". */
export function cellInWords(trait: Trait, cell: Cell): string {
  if (cell === 'unknown') return 'not coded';
  if (cell === 'inapplicable') return 'not applicable';
  if ('min' in cell) {
    const unit = trait.unit ?? 'cm';
    const typical = `typically ${number(cell.low)}–${number(cell.high)} ${unit}`;
    return cell.min === cell.low && cell.max === cell.high ? typical : `${typical}, recorded ${number(cell.min)}–${number(cell.max)} ${unit}`;
  }
  const labels = new Map((trait.values ?? []).map((value) => [value.code, value.label]));
  const label = (value: string | number) => labels.get(String(value)) ?? String(value);
  return FREQUENCIES.filter((frequency) => (cell[frequency]?.length ?? 0) > 0)
    .map((frequency) => `${FREQUENCY_WORDS[frequency]} ${joinOr(cell[frequency]!.map(label))}`)
    .join(', ');
}

/**
 * What a typed length or count means against this edition: its usual span, a note when it lies
 * outside every species coded here, and the message for an entry that cannot be a measurement.
 *
 * Invariant: every length here is converted with the engine's unit helpers; spans are read from
 * the matrix through `cellOf`, in centimetres, and only turned into the observer's unit for words.
 */
import { cellOf, convertLength, fromCentimetres, isNumericCell, toCentimetres, type CompiledMatrix, type CompiledTrait, type LengthUnit } from '@shared/engine';

/** The lengths of one numeric trait across the species that code it, in centimetres. */
export interface NumericSpan {
  /** most species' typical ranges start at or above this (the 10th percentile of the typical lows) */
  usualLow: number;
  /** most species' typical ranges end at or below this (the 90th percentile of the typical highs) */
  usualHigh: number;
  /** the smallest extreme any species reaches */
  min: number;
  /** the largest extreme any species reaches */
  max: number;
}

/** The share of species "most species here" speaks for: the middle 80 % (common practice, no source). */
const TAIL = 0.1;

function quantile(sorted: readonly number[], q: number): number {
  const position = (sorted.length - 1) * q;
  const below = Math.floor(position);
  const above = Math.ceil(position);
  return sorted[below] + (sorted[above] - sorted[below]) * (position - below);
}

export function numericSpan(compiled: CompiledMatrix, trait: CompiledTrait): NumericSpan | null {
  if (trait.kind !== 'numeric') return null;
  const lows: number[] = [];
  const highs: number[] = [];
  let min = Infinity;
  let max = -Infinity;
  for (const taxon of compiled.taxa) {
    const cell = cellOf(compiled, taxon.id, trait.code);
    if (!isNumericCell(cell)) continue;
    lows.push(cell.low);
    highs.push(cell.high);
    min = Math.min(min, cell.min);
    max = Math.max(max, cell.max);
  }
  if (lows.length === 0) return null;
  lows.sort((a, b) => a - b);
  highs.sort((a, b) => a - b);
  return { usualLow: quantile(lows, TAIL), usualHigh: quantile(highs, 1 - TAIL), min, max };
}

/** A length for people: one decimal at most, and whole numbers when the length is large. */
export function roundLength(value: number): number {
  return value >= 20 ? Math.round(value) : Math.round(value * 10) / 10;
}

function inUnit(centimetres: number, unit: LengthUnit): string {
  return `${roundLength(fromCentimetres(centimetres, unit))}`;
}

/** "Most species here: 5–20 cm" */
export function spanText(span: NumericSpan, unit: LengthUnit): string {
  return `Most species here: ${inUnit(span.usualLow, unit)}–${inUnit(span.usualHigh, unit)} ${unit}`;
}

/** A gentle note for a length beyond every species here; the observation still counts. */
export function outsideNote(span: NumericSpan, value: number, unit: LengthUnit): string | null {
  const centimetres = toCentimetres(value, unit);
  if (centimetres > span.max) return `Larger than any species here (max ${inUnit(span.max, unit)} ${unit}); it still counts — check the unit.`;
  if (centimetres < span.min) return `Smaller than any species here (min ${inUnit(span.min, unit)} ${unit}); it still counts — check the unit.`;
  return null;
}

/** What was typed, in the new unit: 8 cm becomes 3.1 in. */
export function convertTyped(value: number, from: LengthUnit, to: LengthUnit): number {
  return roundLength(convertLength(value, from, to));
}

/** Why a typed length cannot be used, or null when it can. */
export function lengthProblem(text: string): string | null {
  if (text.trim() === '') return null;
  const value = Number(text);
  if (!Number.isFinite(value)) return 'Type a number, such as 8 or 7.5.';
  if (value <= 0) return 'A length is more than 0: type what you measured.';
  return null;
}

/** Why a typed count cannot be used, or null when it can. */
export function countProblem(text: string, lowest: number, highest: number): string | null {
  if (text.trim() === '') return null;
  const count = Number(text);
  if (!Number.isInteger(count)) return 'Type a whole number.';
  if (count < lowest || count > highest) return `Species here have ${lowest} to ${highest}: count again, or leave it empty.`;
  return null;
}

/**
 * A reason's likelihood P(observation | species) in words, against a sure match (1). Bands:
 * common practice, no source.
 */
export function weightInWords(likelihood: number): string {
  if (likelihood >= 0.85) return 'counts as a sure match';
  if (likelihood >= 0.6) return 'counts for about three quarters as much as a sure match';
  if (likelihood >= 0.35) return 'counts for about half as much as a sure match';
  if (likelihood >= 0.15) return 'counts for about a quarter as much as a sure match';
  if (likelihood >= 0.03) return 'counts for little';
  return 'counts strongly against';
}

/** "1 trait", "4 traits" */
export function plural(count: number, one: string, many = `${one}s`): string {
  return `${count} ${count === 1 ? one : many}`;
}

/**
 * Length units. The conversion factors are exact by definition (NIST SP 811, 2008 edition,
 * Appendix B: 1 inch = 2.54 cm exactly; 1 cm = 10 mm by the SI prefix centi/milli).
 *
 * Invariant: every numeric range inside a compiled matrix is in centimetres; observations are
 * converted once, on the way in, by `toCentimetres`.
 */
import { EngineUsageError, usageMessages } from './errors';
import type { LengthUnit } from './types';

/** Exact: the international inch is defined as 2.54 cm. */
export const CENTIMETRES_PER_INCH = 2.54;
/** Exact: 1 cm = 10 mm. */
export const MILLIMETRES_PER_CENTIMETRE = 10;
/** Units an observation may carry. */
export const LENGTH_UNITS: readonly LengthUnit[] = Object.freeze(['cm', 'mm', 'in'] as const);

export function isLengthUnit(unit: unknown): unit is LengthUnit {
  return unit === 'cm' || unit === 'mm' || unit === 'in';
}

/** A length in `unit` expressed in centimetres. */
export function toCentimetres(value: number, unit: LengthUnit): number {
  switch (unit) {
    case 'cm':
      return value;
    case 'mm':
      return value / MILLIMETRES_PER_CENTIMETRE;
    case 'in':
      return value * CENTIMETRES_PER_INCH;
    default:
      throw new EngineUsageError(usageMessages.unknownLengthUnit(unit));
  }
}

/** A length in centimetres expressed in `unit`. */
export function fromCentimetres(centimetres: number, unit: LengthUnit): number {
  switch (unit) {
    case 'cm':
      return centimetres;
    case 'mm':
      return centimetres * MILLIMETRES_PER_CENTIMETRE;
    case 'in':
      return centimetres / CENTIMETRES_PER_INCH;
    default:
      throw new EngineUsageError(usageMessages.unknownLengthUnit(unit));
  }
}

/** A length converted between any two units (through centimetres). */
export function convertLength(value: number, from: LengthUnit, to: LengthUnit): number {
  if (from === to) return value;
  return fromCentimetres(toCentimetres(value, from), to);
}

import type { Step } from '../migrator';
import { referenceMatrix } from './0001-reference-matrix';

/** Every seeder, in the order they run. */
export const seeders: readonly Step[] = [referenceMatrix];

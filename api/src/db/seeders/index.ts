import type { Step } from '../migrator';

/** Every seeder, in the order they run. */
export const seeders: readonly Step[] = [];

import type { Step } from '../migrator';
import { matrix } from './0001-matrix';

/** Every schema migration, oldest first. Add new ones at the end; never edit a landed one. */
export const migrations: readonly Step[] = [matrix];

import type { Step } from '../step';
import { referenceMatrix } from './0001-reference-matrix';
import { demoScenario } from './0002-demo-scenario';
import { demoStudySet } from './0003-demo-study-set';

/** Every seeder, in the order they run. */
export const seeders: readonly Step[] = [referenceMatrix, demoScenario, demoStudySet];

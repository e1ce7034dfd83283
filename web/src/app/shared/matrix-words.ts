/**
 * Browser-only words: where drawings are served and how an entered observation reads. The domain's
 * own words (cells, labels, names, plant parts) come from the engine.
 */
import { answerLabel, type CompiledMatrix, type Observation } from '@shared/engine';

export const ILLUSTRATION_ROOT = '/illustrations/';

export function illustrationUrl(path: string | undefined): string | null {
  return path ? ILLUSTRATION_ROOT + path.replace(/^\/+/, '') : null;
}

/** An observation in words: "Needles per bundle: 3 per bundle", "Needle length: 6 in". */
export function describeObservation(compiled: CompiledMatrix, observation: Observation): { label: string; value: string } {
  const index = compiled.traitIndexByCode.get(observation.trait);
  const trait = index === undefined ? undefined : compiled.traits[index];
  const label = trait?.label ?? observation.trait;
  if ('value' in observation) return { label, value: `${observation.value} ${observation.unit ?? 'cm'}` };
  const value = observation.values.map((answer) => (trait ? answerLabel(trait, answer) : String(answer))).join(' or ');
  return { label, value };
}

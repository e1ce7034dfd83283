/**
 * A sift as a URL: `?o=needles-per-fascicle:3;needle-length:6in&season=leaf-on&leeway=1`.
 *
 * Invariant: `formatObservations(parseObservations(text, compiled), compiled)` is `text` with only
 * the observations this edition knows, in the order written, so a shared link reads the same.
 */
import { formatNumber, RANK_DEFAULTS, type CompiledMatrix, type CompiledTrait, type LengthUnit, type Observation, type ObservingSeason } from '@shared/engine';

export const DEFAULT_SEASON: ObservingSeason = 'leaf-on';
/** the engine's own default, so a link without `leeway` ranks as the API does */
export const DEFAULT_LEEWAY = RANK_DEFAULTS.leeway;
export const MAX_LEEWAY = 3;

/** What the URL (and the saved last sift) holds. */
export interface SiftQuery {
  o?: string;
  season?: string;
  leeway?: string;
}

const MEASURE = /^(\d+(?:\.\d+)?)(cm|mm|in)?$/;

export function isNumericObservation(observation: Observation): observation is { trait: string; value: number; unit?: LengthUnit } {
  return 'value' in observation;
}

function parseOne(trait: CompiledTrait, tokens: string[]): Observation | null {
  if (trait.kind === 'numeric') {
    const match = MEASURE.exec(tokens[0] ?? '');
    if (!match || tokens.length !== 1) return null;
    const value = Number(match[1]);
    if (!(value > 0)) return null;
    return { trait: trait.code, value, unit: (match[2] as LengthUnit | undefined) ?? 'cm' };
  }
  if (trait.kind === 'count') {
    const highest = trait.countMin + trait.answerCount - 1;
    const counts = tokens.map(Number).filter((count) => Number.isInteger(count) && count >= trait.countMin && count <= highest);
    const unique = [...new Set(counts)];
    return unique.length > 0 ? { trait: trait.code, values: unique } : null;
  }
  const known = new Set(trait.values.map((value) => value.code));
  const values = [...new Set(tokens.filter((token) => known.has(token)))];
  return values.length > 0 ? { trait: trait.code, values } : null;
}

/** Reads `o`; unknown traits and values are dropped, a trait named twice keeps its first entry. */
export function parseObservations(text: string | undefined, compiled: CompiledMatrix): Observation[] {
  if (!text) return [];
  const observations: Observation[] = [];
  const seen = new Set<string>();
  for (const part of text.split(';')) {
    const colon = part.indexOf(':');
    if (colon <= 0) continue;
    const code = part.slice(0, colon).trim();
    const index = compiled.traitIndexByCode.get(code);
    if (index === undefined || seen.has(code)) continue;
    const tokens = part
      .slice(colon + 1)
      .split(',')
      .map((token) => token.trim())
      .filter((token) => token !== '');
    const observation = parseOne(compiled.traits[index], tokens);
    if (observation) {
      observations.push(observation);
      seen.add(code);
    }
  }
  return observations;
}

export function formatObservations(observations: readonly Observation[]): string {
  return observations
    .map((observation) =>
      isNumericObservation(observation)
        ? `${observation.trait}:${formatNumber(observation.value)}${observation.unit ?? 'cm'}`
        : `${observation.trait}:${observation.values.join(',')}`,
    )
    .join(';');
}

export function parseSeason(text: string | undefined): ObservingSeason {
  return text === 'leaf-off' ? 'leaf-off' : DEFAULT_SEASON;
}

export function parseLeeway(text: string | undefined): number {
  const leeway = Number(text);
  return text !== undefined && text !== '' && Number.isInteger(leeway) && leeway >= 0 && leeway <= MAX_LEEWAY ? leeway : DEFAULT_LEEWAY;
}

/** The query parameters of a sift; defaults are left out so links stay short. */
export function siftQueryParams(observations: readonly Observation[], season: ObservingSeason, leeway: number): SiftQuery {
  const query: SiftQuery = {};
  const o = formatObservations(observations);
  if (o !== '') query.o = o;
  query.season = season;
  query.leeway = String(leeway);
  return query;
}

const STORAGE_KEY = 'sylvasift.last-sift';

export function saveLastSift(query: SiftQuery): void {
  try {
    localStorage.setItem(STORAGE_KEY, JSON.stringify(query));
  } catch {
    // storage full or disabled: the URL still carries the sift
  }
}

export function loadLastSift(): SiftQuery | null {
  try {
    const parsed: unknown = JSON.parse(localStorage.getItem(STORAGE_KEY) ?? 'null');
    if (typeof parsed !== 'object' || parsed === null) return null;
    const record = parsed as Record<string, unknown>;
    const text = (key: string) => (typeof record[key] === 'string' ? record[key] : undefined);
    return { o: text('o'), season: text('season'), leeway: text('leeway') };
  } catch {
    return null;
  }
}

/**
 * The trait's observation with one more answer ("one of these"), in the trait's own answer order;
 * null when the answer is not one the trait has. A numeric trait takes no answer this way.
 */
export function addAnswer(compiled: CompiledMatrix, observations: readonly Observation[], code: string, answer: string | number): Observation | null {
  const index = compiled.traitIndexByCode.get(code);
  const trait = index === undefined ? undefined : compiled.traits[index];
  if (!trait || trait.kind === 'numeric' || !trait.answerCodes.some((known) => String(known) === String(answer))) return null;
  const current = observations.find((observation) => observation.trait === code);
  const held = current && !isNumericObservation(current) ? current.values.map(String) : [];
  const values = trait.answerCodes.filter((known) => held.includes(String(known)) || String(known) === String(answer));
  return { trait: code, values };
}

/**
 * Numeric traits cut into bands, so a measurement can be previewed and weighed like a state.
 *
 * Invariant: cuts are strictly increasing; band b covers [cuts[b − 1], cuts[b]) with open ends, so
 * there are cuts.length + 1 bands and every length falls in exactly one.
 */
import { formatNumber } from './words';

export function bandOf(cuts: readonly number[], centimetres: number): number {
  let band = 0;
  while (band < cuts.length && centimetres >= cuts[band]) band++;
  return band;
}

export function bandLabel(cuts: readonly number[], band: number): string {
  if (cuts.length === 0) return 'any length';
  if (band === 0) return `< ${formatNumber(cuts[0])} cm`;
  if (band === cuts.length) return `≥ ${formatNumber(cuts[band - 1])} cm`;
  return `${formatNumber(cuts[band - 1])}–${formatNumber(cuts[band])} cm`;
}

/** A representative length inside a band, for simulated answers and previews. */
export function bandMidpoint(cuts: readonly number[], band: number): number {
  if (cuts.length === 0) return 0;
  if (band === 0) return cuts[0] / 2;
  if (band === cuts.length) return cuts[band - 1] * 1.25;
  return (cuts[band - 1] + cuts[band]) / 2;
}

function overlap(from: number, to: number, bandFrom: number, bandTo: number): number {
  return Math.max(0, Math.min(to, bandTo) - Math.max(from, bandFrom));
}

/**
 * P(the observer's measurement falls in each band | a taxon with this range): a share `typicalShare`
 * spread evenly over low–high, the rest over the extremes, and with probability `errorRate` a band
 * picked at random (a misreading). Writes into `out` (length cuts.length + 1).
 */
export function bandProbabilities(
  min: number,
  low: number,
  high: number,
  max: number,
  cuts: readonly number[],
  typicalShare: number,
  errorRate: number,
  out: Float64Array,
): Float64Array {
  const bands = cuts.length + 1;
  const tailWidth = low - min + (max - high);
  const typicalWidth = high - low;
  const inTypical = tailWidth > 0 ? typicalShare : 1;
  const inTails = 1 - inTypical;
  for (let b = 0; b < bands; b++) {
    const from = b === 0 ? -Infinity : cuts[b - 1];
    const to = b === bands - 1 ? Infinity : cuts[b];
    let mass: number;
    if (typicalWidth > 0) mass = (inTypical * overlap(low, high, from, to)) / typicalWidth;
    else mass = low >= from && low < to ? inTypical : 0;
    if (tailWidth > 0) mass += (inTails * (overlap(min, low, from, to) + overlap(high, max, from, to))) / tailWidth;
    out[b] = (1 - errorRate) * mass + errorRate / bands;
  }
  return out;
}

/** Cut points at the weighted quantiles of typical-range midpoints (for a small shortlist). */
export function weightedCuts(midpoints: readonly number[], weights: readonly number[], bands: number): number[] {
  const order = midpoints.map((_, i) => i).sort((a, b) => midpoints[a] - midpoints[b]);
  let total = 0;
  for (const weight of weights) total += weight;
  if (order.length < 2 || !(total > 0)) return [];
  const cuts: number[] = [];
  let cumulative = 0;
  let next = 1;
  for (let r = 0; r < order.length - 1 && next < bands; r++) {
    cumulative += weights[order[r]];
    const here = midpoints[order[r]];
    const after = midpoints[order[r + 1]];
    if (cumulative >= (next * total) / bands && after > here) {
      const cut = niceBetween(here, after);
      if (cuts.length === 0 || cut > cuts[cuts.length - 1]) cuts.push(cut);
      while (next < bands && cumulative >= (next * total) / bands) next++;
    }
  }
  return cuts;
}

/** The roundest number strictly between a and b (fewest significant digits), for readable band labels. */
export function niceBetween(a: number, b: number): number {
  const middle = (a + b) / 2;
  if (middle <= 0) return middle;
  for (let digits = 1; digits <= 6; digits++) {
    const magnitude = 10 ** (Math.floor(Math.log10(middle)) - digits + 1);
    const rounded = Math.round(middle / magnitude) * magnitude;
    const clean = Number(rounded.toPrecision(digits + 1));
    if (clean > a && clean < b) return clean;
  }
  return middle;
}

/**
 * Hand-made matrices for the engine tests.
 *
 * `arithmeticMatrix` is abstract on purpose: its numbers are chosen so the expected probabilities
 * can be worked out by hand in the test comments. `southernTreesMatrix` uses glossary trait codes
 * and a few well-known trees; its values are from memory after Flora of North America vol. 2
 * (pines) and USDA Agriculture Handbook 654 (oaks, maple), rounded, and only serve as realistic
 * test data, not as the reference matrix.
 */
import type { MatrixDocument, Taxon, Trait } from '@shared/engine';

export function taxon(id: string, cells: Taxon['cells'], extra: Partial<Taxon> = {}): Taxon {
  return { id, scientificName: id.replace(/-/g, ' '), authority: 'Test', family: 'Testaceae', commonNames: [id], cells, ...extra };
}

export const arrangementTrait: Trait = {
  code: 'leaf-arrangement',
  label: 'Leaf and bud arrangement',
  part: 'leaf',
  kind: 'state',
  season: 'any',
  ease: 1,
  errorRate: 0.1,
  values: [
    { code: 'alternate', label: 'Alternate' },
    { code: 'opposite', label: 'Opposite' },
    { code: 'whorled', label: 'Whorled' },
  ],
};

export const needleLengthTrait: Trait = {
  code: 'needle-length',
  label: 'Needle length',
  part: 'needle',
  kind: 'numeric',
  unit: 'cm',
  season: 'any',
  ease: 3,
  errorRate: 0.05,
};

/** Four taxa and two traits; see the worked examples in rank.spec.ts. */
export function arithmeticMatrix(): MatrixDocument {
  return structuredClone<MatrixDocument>({
    format: 'sylvasift-matrix',
    version: 1,
    title: 'Arithmetic',
    traits: [arrangementTrait, needleLengthTrait],
    taxa: [
      taxon('taxon-a', { 'leaf-arrangement': { usual: ['alternate'] }, 'needle-length': { min: 10, low: 12, high: 18, max: 23 } }),
      taxon('taxon-b', { 'leaf-arrangement': { usual: ['opposite'] }, 'needle-length': { min: 18, low: 20, high: 45, max: 46 } }),
      taxon('taxon-c', { 'leaf-arrangement': { usual: ['alternate', 'opposite'] }, 'needle-length': { min: 4, low: 5, high: 8, max: 9 } }),
      taxon('taxon-d', { 'leaf-arrangement': 'unknown' }),
    ],
  });
}

const foliage: Trait = {
  code: 'foliage',
  label: 'Foliage form',
  part: 'leaf',
  kind: 'state',
  season: 'any',
  ease: 1,
  errorRate: 0.02,
  values: [
    { code: 'broad', label: 'Broad leaves' },
    { code: 'needle', label: 'Needles' },
    { code: 'scale', label: 'Scales' },
    { code: 'awl', label: 'Awl-shaped' },
  ],
};

const fascicle: Trait = {
  code: 'needles-per-fascicle',
  label: 'Needles per bundle (fascicle)',
  part: 'needle',
  kind: 'count',
  season: 'any',
  ease: 2,
  errorRate: 0.05,
  countRange: { min: 1, max: 5 },
  appliesWhen: { foliage: ['needle'] },
};

const lobeTips: Trait = {
  code: 'lobe-tips',
  label: 'Lobe or tooth tips',
  part: 'leaf',
  kind: 'state',
  season: 'leaf-on',
  ease: 2,
  errorRate: 0.08,
  appliesWhen: { foliage: ['broad'] },
  values: [
    { code: 'rounded', label: 'Rounded' },
    { code: 'bristle-tipped', label: 'Bristle-tipped' },
    { code: 'pointed', label: 'Pointed, no bristle' },
    { code: 'spiny', label: 'Spiny' },
  ],
};

const terminalBud: Trait = {
  code: 'terminal-bud',
  label: 'Terminal bud',
  part: 'twig',
  kind: 'state',
  season: 'leaf-off',
  ease: 3,
  errorRate: 0.1,
  appliesWhen: { foliage: ['broad'] },
  values: [
    { code: 'present', label: 'True end bud present' },
    { code: 'absent', label: 'No true end bud' },
  ],
};

const barkTexture: Trait = {
  code: 'bark-texture',
  label: 'Bark texture (mature trunk)',
  part: 'bark',
  kind: 'state',
  season: 'any',
  ease: 1,
  errorRate: 0.2,
  values: [
    { code: 'smooth', label: 'Smooth' },
    { code: 'furrowed', label: 'Deeply furrowed' },
    { code: 'plated', label: 'Plated' },
    { code: 'scaly', label: 'Scaly' },
  ],
};

/** Pines, oaks and a maple with glossary codes (values from memory, see the file comment). */
export function southernTreesMatrix(): MatrixDocument {
  const pine = (id: string, bundle: Taxon['cells'][string], length: Taxon['cells'][string], bark: string[]): Taxon =>
    taxon(
      id,
      {
        foliage: { usual: ['needle'] },
        'leaf-arrangement': { usual: ['alternate'] },
        'needles-per-fascicle': bundle,
        'needle-length': length,
        'lobe-tips': 'inapplicable',
        'bark-texture': { usual: bark },
      },
      { family: 'Pinaceae' },
    );
  const broadleaf = (id: string, arrangement: string, tips: string[], bark: string[], prior?: number): Taxon =>
    taxon(
      id,
      {
        foliage: { usual: ['broad'] },
        'leaf-arrangement': { usual: [arrangement] },
        'lobe-tips': { usual: tips },
        'terminal-bud': { usual: ['present'] },
        'bark-texture': { usual: bark },
      },
      { family: arrangement === 'opposite' ? 'Sapindaceae' : 'Fagaceae', ...(prior !== undefined && { prior }) },
    );
  return structuredClone<MatrixDocument>({
    format: 'sylvasift-matrix',
    version: 1,
    title: 'Southern trees (test)',
    traits: [
      foliage,
      { ...arrangementTrait, errorRate: 0.05 },
      fascicle,
      { ...needleLengthTrait, appliesWhen: { foliage: ['needle'] } },
      lobeTips,
      terminalBud,
      barkTexture,
    ],
    taxa: [
      pine('pinus-taeda', { usual: [3] }, { min: 10, low: 12, high: 18, max: 23 }, ['plated', 'scaly']),
      pine('pinus-echinata', { usual: [2], occasional: [3] }, { min: 6, low: 7, high: 11, max: 13 }, ['plated', 'scaly']),
      pine('pinus-palustris', { usual: [3] }, { min: 18, low: 20, high: 38, max: 45 }, ['plated', 'scaly']),
      pine('pinus-strobus', { usual: [5] }, { min: 5, low: 6, high: 10, max: 13 }, ['furrowed']),
      broadleaf('quercus-alba', 'alternate', ['rounded'], ['scaly', 'plated'], 2),
      broadleaf('quercus-rubra', 'alternate', ['bristle-tipped'], ['furrowed']),
      broadleaf('acer-rubrum', 'opposite', ['pointed'], ['smooth', 'furrowed']),
    ],
  });
}

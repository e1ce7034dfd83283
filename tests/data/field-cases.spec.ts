/**
 * Identification sanity: observations a person would enter for one real tree, and the engine must
 * put that species in its top three over the whole reference matrix.
 *
 * Each case names where its traits are described; all were written down from memory of those
 * texts. Winter cases use only what a leafless tree shows (bark, buds, twigs, form). Cases marked
 * `wrong` carry one answer that contradicts the coding, as a hurried observer might give.
 */
import { expect } from 'chai';
import { compileMatrix, rank, type Observation, type ObservingSeason } from '@shared/engine';
import { loadReferenceMatrix } from '../../seeds/load-matrix';

interface FieldCase {
  species: string;
  title: string;
  season: ObservingSeason;
  source: string;
  observations: Observation[];
  /** the trait whose answer is deliberately wrong */
  wrong?: string;
}

const FNA2 = 'Flora of North America vol. 2 (from memory)';
const FNA3 = 'Flora of North America vol. 3 (from memory)';
const DENDRO = 'Harlow, Harrar et al., Textbook of Dendrology (from memory)';
const SILVICS = 'USDA Agriculture Handbook 654, Silvics of North America (from memory)';

const CASES: FieldCase[] = [
  // ---- conifers
  { species: 'pinus-taeda', title: 'loblolly pine in an old field', season: 'leaf-on', source: `${FNA2}; ${DENDRO}`,
    observations: [{ trait: 'needles-per-fascicle', values: [3] }, { trait: 'needle-length', value: 7, unit: 'in' }, { trait: 'cone-length', value: 4, unit: 'in' }, { trait: 'cone-scale-tip', values: ['sharp-prickle'] }] },
  { species: 'pinus-taeda', title: 'loblolly pine, bark colour misread as gray', season: 'leaf-on', source: `${FNA2}; ${DENDRO}`, wrong: 'bark-color',
    observations: [{ trait: 'needles-per-fascicle', values: [3] }, { trait: 'needle-length', value: 6, unit: 'in' }, { trait: 'cone-stalk', values: ['sessile'] }, { trait: 'cone-length', value: 10, unit: 'cm' }, { trait: 'bark-color', values: ['light-gray'] }] },
  { species: 'pinus-echinata', title: 'shortleaf pine on a dry ridge', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [2] }, { trait: 'needle-length', value: 4, unit: 'in' }, { trait: 'cone-length', value: 2, unit: 'in' }, { trait: 'twig-bloom', values: ['present'] }] },
  { species: 'pinus-palustris', title: 'longleaf pine in a sandhill', season: 'leaf-on', source: `${FNA2}; ${DENDRO}`,
    observations: [{ trait: 'needles-per-fascicle', values: [3] }, { trait: 'needle-length', value: 12, unit: 'in' }, { trait: 'cone-length', value: 8, unit: 'in' }] },
  { species: 'pinus-palustris', title: 'longleaf pine, needles miscounted as two', season: 'leaf-on', source: FNA2, wrong: 'needles-per-fascicle',
    observations: [{ trait: 'needles-per-fascicle', values: [2] }, { trait: 'needle-length', value: 14, unit: 'in' }, { trait: 'cone-length', value: 9, unit: 'in' }, { trait: 'bark-texture', values: ['plated'] }] },
  { species: 'pinus-elliottii', title: 'slash pine in flatwoods', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [2] }, { trait: 'needle-length', value: 9, unit: 'in' }, { trait: 'cone-stalk', values: ['stalked'] }, { trait: 'cone-length', value: 5, unit: 'in' }] },
  { species: 'pinus-virginiana', title: 'Virginia pine in a cutover', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [2] }, { trait: 'needle-length', value: 2, unit: 'in' }, { trait: 'needle-form', values: ['twisted'] }, { trait: 'twig-bloom', values: ['present'] }] },
  { species: 'pinus-strobus', title: 'eastern white pine in a cove', season: 'leaf-on', source: `${FNA2}; ${DENDRO}`,
    observations: [{ trait: 'needles-per-fascicle', values: [5] }, { trait: 'needle-length', value: 4, unit: 'in' }, { trait: 'cone-length', value: 6, unit: 'in' }] },
  { species: 'pinus-rigida', title: 'pitch pine on a ridge', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [3] }, { trait: 'needle-length', value: 4, unit: 'in' }, { trait: 'needle-form', values: ['stiff'] }, { trait: 'trunk-sprouts', values: ['present'] }] },
  { species: 'pinus-serotina', title: 'pond pine at a pocosin edge', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [3] }, { trait: 'needle-length', value: 7, unit: 'in' }, { trait: 'cone-length', value: 2.5, unit: 'in' }, { trait: 'trunk-sprouts', values: ['present'] }] },
  { species: 'pinus-glabra', title: 'spruce pine in a bottomland hardwood stand', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [2] }, { trait: 'needle-length', value: 3, unit: 'in' }, { trait: 'bark-color', values: ['gray'] }, { trait: 'needle-form', values: ['soft-flexible'] }] },
  { species: 'pinus-pungens', title: 'Table Mountain pine on a rocky ridge', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [2] }, { trait: 'needle-length', value: 2, unit: 'in' }, { trait: 'cone-length', value: 3, unit: 'in' }, { trait: 'cone-scale-tip', values: ['sharp-prickle'] }, { trait: 'twig-bloom', values: ['absent'] }] },
  { species: 'pinus-resinosa', title: 'red pine in a plantation', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [2] }, { trait: 'needle-length', value: 5.5, unit: 'in' }, { trait: 'cone-scale-tip', values: ['unarmed'] }, { trait: 'bark-color', values: ['reddish-brown'] }] },
  { species: 'tsuga-canadensis', title: 'eastern hemlock along a stream', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'foliage', values: ['needle'] }, { trait: 'needle-form', values: ['flat-two-ranked'] }, { trait: 'needle-attachment', values: ['short-stalk'] }, { trait: 'needle-length', value: 0.5, unit: 'in' }] },
  { species: 'abies-fraseri', title: 'Fraser fir on a high peak', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [1] }, { trait: 'needle-attachment', values: ['suction-cup'] }, { trait: 'needle-length', value: 0.8, unit: 'in' }] },
  { species: 'picea-rubens', title: 'red spruce in a spruce-fir stand', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [1] }, { trait: 'needle-attachment', values: ['peg'] }, { trait: 'needle-form', values: ['stiff'] }] },
  { species: 'juniperus-virginiana', title: 'eastern redcedar in a fence row', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'foliage', values: ['scale'] }, { trait: 'fruit-type', values: ['berry-like-cone'] }, { trait: 'bark-texture', values: ['fibrous'] }] },
  { species: 'taxodium-distichum', title: 'baldcypress in a river swamp', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'foliage', values: ['needle'] }, { trait: 'leaf-persistence', values: ['deciduous'] }, { trait: 'needle-form', values: ['flat-two-ranked'] }, { trait: 'trunk-features', values: ['knees'] }] },
  { species: 'taxodium-ascendens', title: 'pondcypress in a cypress dome', season: 'leaf-on', source: `${FNA2}; Godfrey, Trees, Shrubs and Woody Vines of Northern Florida (from memory)`,
    observations: [{ trait: 'foliage', values: ['scale'] }, { trait: 'leaf-persistence', values: ['deciduous'] }, { trait: 'trunk-features', values: ['buttressed'] }] },
  { species: 'chamaecyparis-thyoides', title: 'Atlantic white-cedar in a bog', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'foliage', values: ['scale'] }, { trait: 'fruit-type', values: ['round-cone'] }, { trait: 'cone-length', value: 0.25, unit: 'in' }] },
  { species: 'thuja-occidentalis', title: 'northern white-cedar on a limestone bluff', season: 'leaf-on', source: FNA2,
    observations: [{ trait: 'foliage', values: ['scale'] }, { trait: 'fruit-type', values: ['woody-cone'] }, { trait: 'cone-length', value: 1.1, unit: 'cm' }] },

  // ---- oaks, beech, chinkapin, in leaf
  { species: 'quercus-alba', title: 'white oak in an upland forest', season: 'leaf-on', source: `${FNA3}; ${DENDRO}`,
    observations: [{ trait: 'leaf-lobing', values: ['pinnately-lobed'] }, { trait: 'lobe-tips', values: ['rounded'] }, { trait: 'leaf-surface', values: ['whitened-below'] }, { trait: 'acorn-cap', values: ['warty'] }, { trait: 'bark-color', values: ['light-gray'] }] },
  { species: 'quercus-alba', title: 'white oak, leaf surface called shiny', season: 'leaf-on', source: `${FNA3}; ${DENDRO}`, wrong: 'leaf-surface',
    observations: [{ trait: 'leaf-lobing', values: ['pinnately-lobed'] }, { trait: 'lobe-tips', values: ['rounded'] }, { trait: 'acorn-cap', values: ['shallow'] }, { trait: 'bark-texture', values: ['scaly'] }, { trait: 'leaf-surface', values: ['glossy'] }] },
  { species: 'quercus-rubra', title: 'northern red oak on a north slope', season: 'leaf-on', source: `${FNA3}; ${SILVICS}`,
    observations: [{ trait: 'leaf-lobing', values: ['pinnately-lobed'] }, { trait: 'lobe-tips', values: ['bristle-tipped'] }, { trait: 'leaf-surface', values: ['dull'] }, { trait: 'acorn-cap', values: ['shallow'] }, { trait: 'fruit-length', value: 1, unit: 'in' }] },
  { species: 'quercus-nigra', title: 'water oak by a street', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-shape', values: ['obovate'] }, { trait: 'lobe-tips', values: ['bristle-tipped'] }, { trait: 'leaf-surface', values: ['dull'] }, { trait: 'leaf-length', value: 3, unit: 'in' }, { trait: 'petiole-form', values: ['very-short'] }] },
  { species: 'quercus-phellos', title: 'willow oak in a bottomland', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-shape', values: ['lanceolate'] }, { trait: 'leaf-lobing', values: ['unlobed'] }, { trait: 'lobe-tips', values: ['bristle-tipped'] }, { trait: 'fruit-type', values: ['acorn'] }] },
  { species: 'quercus-phellos', title: 'willow oak, autumn colour given as red', season: 'leaf-on', source: FNA3, wrong: 'fall-color',
    observations: [{ trait: 'leaf-shape', values: ['linear'] }, { trait: 'leaf-lobing', values: ['unlobed'] }, { trait: 'fruit-length', value: 1, unit: 'cm' }, { trait: 'fall-color', values: ['red'] }] },
  { species: 'quercus-virginiana', title: 'live oak by the coast', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-persistence', values: ['evergreen'] }, { trait: 'fruit-type', values: ['acorn'] }, { trait: 'leaf-lobing', values: ['unlobed'] }, { trait: 'leaf-shape', values: ['elliptic'] }] },
  { species: 'quercus-falcata', title: 'southern red oak in the Piedmont', season: 'leaf-on', source: `${FNA3}; ${DENDRO}`,
    observations: [{ trait: 'leaf-lobing', values: ['pinnately-lobed'] }, { trait: 'lobe-tips', values: ['bristle-tipped'] }, { trait: 'leaf-apex', values: ['acuminate'] }, { trait: 'leaf-surface', values: ['hairy-below'] }, { trait: 'bark-texture', values: ['furrowed'] }] },
  { species: 'quercus-stellata', title: 'post oak on a clay flat', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'lobe-tips', values: ['rounded'] }, { trait: 'leaf-surface', values: ['rough', 'hairy-below'] }, { trait: 'bark-texture', values: ['blocky'] }] },
  { species: 'quercus-macrocarpa', title: 'bur oak in a savanna', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'acorn-cap', values: ['fringed'] }, { trait: 'corky-wings', values: ['present'] }, { trait: 'leaf-length', value: 9, unit: 'in' }] },
  { species: 'quercus-michauxii', title: 'swamp chestnut oak on a floodplain ridge', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-margin', values: ['crenate'] }, { trait: 'fruit-type', values: ['acorn'] }, { trait: 'bark-texture', values: ['scaly'] }, { trait: 'bark-color', values: ['light-gray'] }] },
  { species: 'quercus-montana', title: 'chestnut oak on a dry ridge', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-margin', values: ['crenate'] }, { trait: 'fruit-type', values: ['acorn'] }, { trait: 'bark-texture', values: ['furrowed'] }, { trait: 'bark-color', values: ['dark'] }] },
  { species: 'quercus-muehlenbergii', title: 'chinkapin oak on limestone', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-margin', values: ['dentate'] }, { trait: 'lobe-tips', values: ['pointed'] }, { trait: 'fruit-type', values: ['acorn'] }, { trait: 'leaf-surface', values: ['whitened-below'] }] },
  { species: 'quercus-palustris', title: 'pin oak planted on a lawn', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'crown-form', values: ['excurrent'] }, { trait: 'lobe-tips', values: ['bristle-tipped'] }, { trait: 'leaf-lobing', values: ['pinnately-lobed'] }, { trait: 'fruit-length', value: 0.5, unit: 'in' }] },
  { species: 'quercus-marilandica', title: 'blackjack oak in a sandhill', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-lobing', values: ['irregularly-lobed'] }, { trait: 'leaf-apex', values: ['truncate'] }, { trait: 'bark-texture', values: ['blocky'] }, { trait: 'bark-color', values: ['dark'] }] },
  { species: 'quercus-imbricaria', title: 'shingle oak on a moist slope', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-lobing', values: ['unlobed'] }, { trait: 'leaf-shape', values: ['oblong'] }, { trait: 'fruit-type', values: ['acorn'] }, { trait: 'acorn-cap', values: ['deep'] }] },
  { species: 'quercus-laurifolia', title: 'laurel oak in a hammock', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-shape', values: ['oblanceolate'] }, { trait: 'leaf-surface', values: ['glossy'] }, { trait: 'fruit-type', values: ['acorn'] }, { trait: 'leaf-persistence', values: ['evergreen'] }] },
  { species: 'quercus-coccinea', title: 'scarlet oak in autumn', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'lobe-tips', values: ['bristle-tipped'] }, { trait: 'fall-color', values: ['red'] }, { trait: 'acorn-cap', values: ['deep'] }, { trait: 'leaf-surface', values: ['glossy'] }, { trait: 'bud-color', values: ['reddish'] }] },
  { species: 'castanea-pumila', title: 'Allegheny chinkapin in flower', season: 'leaf-on', source: `${FNA3}; ${DENDRO}`,
    observations: [{ trait: 'flower-display', values: ['white'] }, { trait: 'leaf-margin', values: ['serrate'] }, { trait: 'husk', values: ['spiny-bur'] }] },

  // ---- hickories and walnuts, in leaf
  { species: 'carya-illinoinensis', title: 'pecan in a yard', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaf-type', values: ['pinnately-compound'] }, { trait: 'leaflet-count', values: [13] }, { trait: 'husk', values: ['winged-seams'] }] },
  { species: 'carya-tomentosa', title: 'mockernut hickory in an oak-hickory stand', season: 'leaf-on', source: `${FNA3}; ${DENDRO}`,
    observations: [{ trait: 'leaflet-count', values: [7] }, { trait: 'leaf-surface', values: ['hairy-below'] }, { trait: 'husk', values: ['splits-to-base'] }, { trait: 'bark-texture', values: ['diamond-ridged'] }] },
  { species: 'carya-glabra', title: 'pignut hickory on a ridge', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaflet-count', values: [5] }, { trait: 'husk', values: ['splits-partly'] }, { trait: 'bark-texture', values: ['diamond-ridged'] }] },
  { species: 'carya-ovata', title: 'shagbark hickory, leaf called rough', season: 'leaf-on', source: `${FNA3}; ${SILVICS}`, wrong: 'leaf-surface',
    observations: [{ trait: 'bark-texture', values: ['shaggy'] }, { trait: 'leaflet-count', values: [5] }, { trait: 'husk', values: ['splits-to-base'] }, { trait: 'fruit-length', value: 2, unit: 'in' }, { trait: 'leaf-surface', values: ['rough'] }] },
  { species: 'juglans-nigra', title: 'black walnut in a fence row', season: 'leaf-on', source: FNA3,
    observations: [{ trait: 'leaflet-count', values: [18] }, { trait: 'husk', values: ['not-splitting'] }, { trait: 'bark-color', values: ['dark'] }] },

  // ---- winter: bark, buds, twigs and form only
  { species: 'quercus-velutina', title: 'black oak in winter', season: 'leaf-off', source: `${FNA3}; ${DENDRO}`,
    observations: [{ trait: 'bud-tip-cluster', values: ['clustered'] }, { trait: 'bud-color', values: ['gray'] }, { trait: 'bark-texture', values: ['blocky'] }, { trait: 'bark-color', values: ['dark'] }] },
  { species: 'carya-ovata', title: 'shagbark hickory in winter', season: 'leaf-off', source: `${DENDRO}; ${SILVICS}`,
    observations: [{ trait: 'bark-texture', values: ['shaggy'] }, { trait: 'terminal-bud', values: ['present'] }, { trait: 'bud-color', values: ['brown'] }, { trait: 'pith', values: ['continuous'] }] },
  { species: 'carya-cordiformis', title: 'bitternut hickory in winter', season: 'leaf-off', source: DENDRO,
    observations: [{ trait: 'bud-color', values: ['yellow'] }, { trait: 'bud-scales', values: ['valvate'] }, { trait: 'bark-texture', values: ['diamond-ridged'] }] },
  { species: 'juglans-nigra', title: 'black walnut in winter', season: 'leaf-off', source: DENDRO,
    observations: [{ trait: 'pith', values: ['chambered'] }, { trait: 'leaf-scar', values: ['three-lobed'] }, { trait: 'bark-color', values: ['dark'] }, { trait: 'bud-color', values: ['gray'] }] },
  { species: 'juglans-cinerea', title: 'butternut in winter', season: 'leaf-off', source: DENDRO,
    observations: [{ trait: 'pith', values: ['chambered'] }, { trait: 'bark-color', values: ['light-gray'] }, { trait: 'leaf-scar', values: ['three-lobed'] }] },
  { species: 'fagus-grandifolia', title: 'American beech in winter', season: 'leaf-off', source: `${FNA3}; ${DENDRO}`,
    observations: [{ trait: 'bark-texture', values: ['smooth'] }, { trait: 'bark-color', values: ['light-gray'] }, { trait: 'stipule-scar', values: ['encircling'] }, { trait: 'bud-color', values: ['brown'] }] },
  { species: 'quercus-macrocarpa', title: 'bur oak in winter, leaf scar misread as U-shaped', season: 'leaf-off', source: `${FNA3}; ${DENDRO}`, wrong: 'leaf-scar',
    observations: [{ trait: 'corky-wings', values: ['present'] }, { trait: 'bud-tip-cluster', values: ['clustered'] }, { trait: 'bark-texture', values: ['furrowed'] }, { trait: 'pith', values: ['star-shaped'] }, { trait: 'leaf-scar', values: ['u-shaped'] }] },
  { species: 'pinus-strobus', title: 'eastern white pine in winter', season: 'leaf-off', source: FNA2,
    observations: [{ trait: 'needles-per-fascicle', values: [5] }, { trait: 'bark-texture', values: ['furrowed'] }] },
];

/** Hardwood cases (the species are in the hardwood files). */
const HARDWOOD_CASES: FieldCase[] = [
  { species: 'liquidambar-styraciflua', title: 'sweetgum with star-shaped leaves and gumballs', season: 'leaf-on', source: `${SILVICS}; ${DENDRO}`,
    observations: [{ trait: 'leaf-shape', values: ['star'] }, { trait: 'fruit-type', values: ['spiny-ball'] }, { trait: 'leaf-arrangement', values: ['alternate'] }] },
  { species: 'liriodendron-tulipifera', title: 'tuliptree with square-tipped leaves', season: 'leaf-on', source: `${SILVICS}; ${DENDRO}`,
    observations: [{ trait: 'leaf-apex', values: ['truncate'] }, { trait: 'fruit-type', values: ['samara-cluster'] }, { trait: 'leaf-lobing', values: ['palmately-lobed'] }] },
  { species: 'cornus-florida', title: 'flowering dogwood in bloom', season: 'leaf-on', source: `${SILVICS}; ${DENDRO}`,
    observations: [{ trait: 'leaf-arrangement', values: ['opposite'] }, { trait: 'flower-display', values: ['white'] }, { trait: 'venation', values: ['arcuate'] }] },
  { species: 'platanus-occidentalis', title: 'sycamore with mottled bark in winter', season: 'leaf-off', source: `${SILVICS}; ${DENDRO}`,
    observations: [{ trait: 'bark-texture', values: ['mottled-flaking'] }, { trait: 'leaf-scar', values: ['encircling-bud'] }] },
  { species: 'acer-rubrum', title: 'red maple with paired winged seeds', season: 'leaf-on', source: `${SILVICS}; ${DENDRO}`,
    observations: [{ trait: 'leaf-arrangement', values: ['opposite'] }, { trait: 'fruit-type', values: ['paired-samara'] }, { trait: 'leaf-lobing', values: ['palmately-lobed'] }, { trait: 'fall-color', values: ['red'] }] },
];

const doc = loadReferenceMatrix();
const compiled = compileMatrix(doc);
const traitByCode = new Map(doc.traits.map((trait) => [trait.code, trait]));
const present = new Set(doc.taxa.map((taxon) => taxon.id));

/**
 * The species must be in the top three of the Shortlist a person sees: the engine's default Leeway,
 * so a taxon with more conflicts than that is Ruled out and cannot count.
 */
function checkCase(fieldCase: FieldCase): void {
  const result = rank(compiled, fieldCase.observations, { season: fieldCase.season });
  const top = result.candidates.slice(0, 3).map((candidate) => candidate.taxonId);
  const position = result.candidates.findIndex((candidate) => candidate.taxonId === fieldCase.species);
  expect(top, `${fieldCase.species} ranked ${position < 0 ? 'nowhere' : position + 1}; top: ${top.join(', ')}`).to.include(fieldCase.species);
}

describe('field cases', () => {
  it('has at least 30 cases, with winter cases and cases with one wrong answer', () => {
    expect(CASES.length).to.be.at.least(30);
    expect(CASES.filter((fieldCase) => fieldCase.season === 'leaf-off').length).to.be.at.least(5);
    expect(CASES.filter((fieldCase) => fieldCase.wrong).length).to.be.at.least(5);
  });

  it('uses only existing traits and species, and only winter-visible traits in winter', () => {
    for (const fieldCase of [...CASES, ...HARDWOOD_CASES]) {
      expect(present.has(fieldCase.species), fieldCase.species).to.be.true;
      for (const observation of fieldCase.observations) {
        const trait = traitByCode.get(observation.trait);
        expect(trait, `${fieldCase.title}: ${observation.trait}`).to.exist;
        if (fieldCase.season === 'leaf-off') expect(trait?.season, `${fieldCase.title}: ${observation.trait}`).to.not.equal('leaf-on');
      }
    }
  });

  it('marks as wrong only answers that really contradict the coding', () => {
    for (const fieldCase of CASES.filter((item) => item.wrong)) {
      const observation = fieldCase.observations.find((item) => item.trait === fieldCase.wrong);
      const cell = doc.taxa.find((taxon) => taxon.id === fieldCase.species)?.cells[fieldCase.wrong ?? ''];
      if (!observation || !('values' in observation)) expect.fail(`${fieldCase.title}: no state observation of ${fieldCase.wrong}`);
      if (typeof cell !== 'object' || 'min' in cell) expect.fail(`${fieldCase.title}: ${fieldCase.wrong} is ${JSON.stringify(cell)}, not a value set`);
      const coded = [...(cell.usual ?? []), ...(cell.occasional ?? []), ...(cell.rare ?? [])].map(String);
      for (const value of observation.values) expect(coded, `${fieldCase.title}: ${value}`).to.not.include(String(value));
    }
  });

  for (const fieldCase of CASES) {
    it(`${fieldCase.title}: ${fieldCase.species} in the top 3${fieldCase.wrong ? ` despite a wrong ${fieldCase.wrong}` : ''}`, () => {
      // source: see the case's `source` field
      checkCase(fieldCase);
    });
  }

  for (const fieldCase of HARDWOOD_CASES) {
    it(`${fieldCase.title}: ${fieldCase.species} in the top 3`, () => {
      // source: see the case's `source` field
      expect(present.has(fieldCase.species), `${fieldCase.species} missing from the matrix`).to.be.true;
      checkCase(fieldCase);
    });
  }
});

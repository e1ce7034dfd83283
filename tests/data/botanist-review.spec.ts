/**
 * Cells, names, help texts and vocabulary corrected after a dendrologist read the matrix, each
 * checked against the printed source named beside it. Figures and descriptions were written down
 * from memory of those texts unless a stored copy is named.
 */
import { expect } from 'chai';
import { isDiscreteCell, isNumericCell, type DiscreteCell, type MatrixDocument, type Taxon, type Trait } from '@shared/engine';
import { loadReferenceMatrix } from '../../seeds/load-matrix';
import { separatingTraits, valuesOf } from './matrix-facts';

const doc: MatrixDocument = loadReferenceMatrix();
const taxonById = new Map(doc.taxa.map((item) => [item.id, item]));
const traitByCode = new Map(doc.traits.map((item) => [item.code, item]));

// Sources named in the comments below:
// SILVICS  USDA Agriculture Handbook 654, Silvics of North America (from memory)
// FNA2/3   Flora of North America vols. 2 and 3 (from memory)
// DENDRO   Harlow, Harrar et al., Textbook of Dendrology (from memory)

function taxon(id: string): Taxon {
  const found = taxonById.get(id);
  if (!found) throw new Error(`taxon ${id} missing from the matrix`);
  return found;
}

function trait(code: string): Trait {
  const found = traitByCode.get(code);
  if (!found) throw new Error(`trait ${code} missing from the matrix`);
  return found;
}

function discrete(id: string, code: string): DiscreteCell {
  const cell = taxon(id).cells[code];
  if (!isDiscreteCell(cell)) expect.fail(`${id}.${code} is ${JSON.stringify(cell)}, not a value set`);
  return cell;
}

const usual = (id: string, code: string) => (discrete(id, code).usual ?? []).map(String);
const all = (id: string, code: string) => valuesOf(discrete(id, code)).map(String);

describe('botanist review: corrected cells', () => {
  it('gives tree-of-heaven leaflets pointed, glandular basal teeth', () => {
    // Silvics vol. 2, Ailanthus altissima; Harlow & Harrar: leaflets entire except one to four coarse
    // teeth near the base, each with a gland on its underside (source: SILVICS; DENDRO)
    expect(usual('ailanthus-altissima', 'leaf-margin')).to.deep.equal(['glandular-basal-teeth']);
    expect(all('ailanthus-altissima', 'lobe-tips')).to.deep.equal(['pointed']);
    const value = (trait('leaf-margin').values ?? []).find((item) => item.code === 'glandular-basal-teeth');
    expect(value?.illustration).to.equal('leaf-margin/glandular-basal-teeth.svg');
    // Poison sumac, its look-alike, has wholly entire leaflets (FNA3 is silent: Anacardiaceae; DENDRO)
    expect(usual('toxicodendron-vernix', 'leaf-margin')).to.not.include('glandular-basal-teeth');
  });

  it('codes the red flowers of red buckeye and red maple as red', () => {
    // DENDRO; Silvics vol. 2, Acer rubrum: flowers red, sometimes yellowish (source: SILVICS)
    expect(usual('aesculus-pavia', 'flower-display')).to.deep.equal(['red']);
    expect(usual('acer-rubrum', 'flower-display')).to.deep.equal(['red']);
    expect(all('acer-rubrum', 'flower-display')).to.not.include('pink-purple');
  });

  it('codes red maple mature bark scaly to plated, smooth only on young stems', () => {
    // Silvics vol. 2, Acer rubrum; DENDRO: bark smooth and light gray on young stems, breaking into
    // long scaly plates on old trunks (source: SILVICS; DENDRO)
    expect(usual('acer-rubrum', 'bark-texture')).to.have.members(['scaly', 'plated']);
    expect(usual('acer-rubrum', 'bark-texture')).to.not.include('smooth');
  });

  it('codes loblolly needles stiff and often twisted', () => {
    // FNA2, Pinus taeda: leaves stiff, often twisted (source: FNA2)
    expect(usual('pinus-taeda', 'needle-form')).to.include.members(['stiff', 'twisted']);
  });

  it('keeps the field split between loblolly and shortleaf pine in the typical ranges', () => {
    // DENDRO: loblolly needles 15–23 cm, cones 7.5–15 cm; shortleaf needles 7.5–12.5 cm, cones 4–6 cm
    const range = (id: string, code: string) => {
      const cell = taxon(id).cells[code];
      if (!isNumericCell(cell)) expect.fail(`${id}.${code} is not a range`);
      return cell;
    };
    expect([range('pinus-taeda', 'needle-length').low, range('pinus-taeda', 'needle-length').high]).to.deep.equal([15, 23]);
    expect([range('pinus-taeda', 'cone-length').low, range('pinus-taeda', 'cone-length').high]).to.deep.equal([7.5, 15]);
    expect([range('pinus-echinata', 'needle-length').low, range('pinus-echinata', 'needle-length').high]).to.deep.equal([7.5, 12.5]);
    expect([range('pinus-echinata', 'cone-length').low, range('pinus-echinata', 'cone-length').high]).to.deep.equal([4, 6]);
    // Typical needle lengths of the two do not overlap (touching ranges do).
    expect(range('pinus-echinata', 'needle-length').high).to.be.below(range('pinus-taeda', 'needle-length').low);
  });

  it('counts leaflets on once-compound leaves and pinnae on twice-compound ones', () => {
    // The help says what is counted; common practice, no source
    expect(trait('leaflet-count').help).to.match(/pinnae/);
    // Mimosa: bipinnate, pinnae 3–12 pairs, each with 20–60 leaflets (DENDRO): the coded counts are pinnae
    expect(Math.max(...all('albizia-julibrissin', 'leaflet-count').map(Number))).to.be.at.most(24);
    // Honeylocust: once-pinnate leaves with 15–30 leaflets (even-pinnate), twice-pinnate leaves with
    // 8–14 pinnae (DENDRO); the pinna counts may only be coded below the usual leaflet counts.
    const honeylocust = discrete('gleditsia-triacanthos', 'leaflet-count');
    const usualCounts = (honeylocust.usual ?? []).map(Number);
    expect(Math.min(...usualCounts)).to.be.at.least(15);
    expect(Math.max(...usualCounts)).to.be.at.most(30);
    for (const count of usualCounts) expect(count % 2, `honeylocust usual count ${count} is odd`).to.equal(0);
    for (const count of valuesOf(honeylocust).map(Number)) {
      expect(count >= 8 && count <= 30, `honeylocust count ${count} is neither a leaflet nor a pinna count`).to.be.true;
    }
  });

  it('gives pecan a thin husk splitting to the base along winged sutures', () => {
    // FNA3, Carya illinoinensis: husk thin, 4-winged along the sutures, splitting to the base (source: FNA3)
    expect(usual('carya-illinoinensis', 'husk')).to.include.members(['winged-seams', 'splits-to-base']);
    expect(usual('carya-illinoinensis', 'husk-thickness')).to.deep.equal(['thin']);
    // the splitting values say nothing about thickness any more
    for (const value of trait('husk').values ?? []) expect(`${value.label} ${(value.synonyms ?? []).join(' ')}`, value.code).to.not.match(/\b(thin|thick)\b/i);
  });

  it('gives chinkapin oak a deep cup enclosing a quarter to a half of the nut', () => {
    // FNA3, Quercus muehlenbergii: cup deeply cup-shaped, enclosing 1/4–1/2 of the nut (source: FNA3)
    expect(usual('quercus-muehlenbergii', 'acorn-cap')).to.deep.equal(['deep']);
  });

  it('codes spruce pine twigs and the small end of its cones', () => {
    // Eckenwalder, Conifers of the World (2009), as quoted on a stored species page: twigs purplish
    // brown, hairless, sometimes waxy. Virginia Tech Dendrology fact sheet (stored page): cones 1–2 in.
    expect(taxon('pinus-glabra').cells['twig-bloom']).to.not.equal('unknown');
    expect(all('pinus-glabra', 'twig-bloom')).to.include('present');
    const cone = taxon('pinus-glabra').cells['cone-length'];
    expect(isNumericCell(cone) && cone.min).to.equal(2.5);
  });

  it('gives American elm a very short leaf stalk and blackjack oak a stout one of 1–2 cm', () => {
    // DENDRO, Ulmus americana: petiole about 5–7 mm; FNA3, Quercus marilandica: petiole 6–20 mm, stout
    expect(usual('ulmus-americana', 'petiole-form')).to.include('very-short');
    expect(usual('quercus-marilandica', 'petiole-form')).to.not.include('very-short');
  });

  it('codes butternut leaflets hairy beneath, not sandpapery', () => {
    // FNA3, Juglans cinerea: leaflets with glandular and stellate hairs beneath, sticky to the touch (source: FNA3)
    expect(usual('juglans-cinerea', 'leaf-surface')).to.deep.equal(['hairy-below']);
  });

  it('codes the pith of every conifer rather than leaving it unknown', () => {
    // Conifer twigs have a small, solid, uniform pith (DENDRO, general description of conifer twigs).
    // pith has no appliesWhen in the core glossary, so it cannot be `inapplicable` to conifers.
    for (const item of doc.taxa.filter((t) => !usualOf(t, 'foliage').includes('broad'))) {
      expect(item.cells['pith'], item.id).to.not.equal('unknown');
      expect(usualOf(item, 'pith'), item.id).to.deep.equal(['continuous']);
    }
  });
});

function usualOf(item: Taxon, code: string): string[] {
  const cell = item.cells[code];
  return isDiscreteCell(cell) ? (cell.usual ?? []).map(String) : [];
}

describe('botanist review: common names and range notes', () => {
  it('gives no common name to two taxa', () => {
    // A common name that means two species in the matrix (ironwood, soft maple, laurel oak …) sends a
    // search to the wrong tree; such names are left off both. Spelling variants (white-cedar / white
    // cedar) count as one name. common practice, no source
    const owners = new Map<string, string[]>();
    for (const item of doc.taxa) {
      for (const name of new Set(item.commonNames.map((n) => n.toLowerCase().replace(/[-\s]+/g, ' ').trim()))) {
        owners.set(name, [...(owners.get(name) ?? []), item.id]);
      }
    }
    const shared = [...owners].filter(([, ids]) => ids.length > 1).map(([name, ids]) => `${name}: ${ids.join(', ')}`);
    expect(shared).to.deep.equal([]);
  });

  it('keeps off names that belong to another species or to a group', () => {
    // Shellbark hickory is Carya laciniosa, swamp bay Persea palustris, black birch Betula lenta, and
    // southern yellow pine the timber group of all the southern hard pines (DENDRO; Little, USDA
    // Agriculture Handbook 541, Checklist of United States Trees; from memory).
    expect(taxon('carya-ovata').commonNames).to.not.include('shellbark hickory');
    expect(taxon('magnolia-virginiana').commonNames).to.not.include('swamp bay');
    expect(taxon('betula-nigra').commonNames).to.not.include('black birch');
    expect(taxon('betula-lenta').commonNames).to.include('black birch');
    expect(taxon('pinus-palustris').commonNames).to.not.include('southern yellow pine');
    expect(taxon('quercus-laurifolia').commonNames).to.include('laurel oak');
    expect(taxon('quercus-imbricaria').commonNames).to.not.include('laurel oak');
  });

  const STATES = [
    'Alabama', 'Arkansas', 'Connecticut', 'Delaware', 'Florida', 'Georgia', 'Illinois', 'Indiana', 'Iowa', 'Kansas', 'Kentucky',
    'Louisiana', 'Maine', 'Maryland', 'Massachusetts', 'Michigan', 'Minnesota', 'Mississippi', 'Missouri', 'Montana', 'Nebraska',
    'New Hampshire', 'New Jersey', 'New York', 'North Carolina', 'North Dakota', 'Ohio', 'Oklahoma', 'Pennsylvania', 'Rhode Island',
    'South Carolina', 'South Dakota', 'Tennessee', 'Texas', 'Vermont', 'West Virginia', 'Virginia', 'Wisconsin',
  ];
  const ABBREVIATIONS = ['AL', 'AR', 'CT', 'DE', 'FL', 'GA', 'IL', 'IN', 'IA', 'KS', 'KY', 'LA', 'ME', 'MD', 'MA', 'MI', 'MN', 'MS', 'MO', 'NE', 'NH', 'NJ', 'NY', 'NC', 'ND', 'OH', 'OK', 'PA', 'RI', 'SC', 'SD', 'TN', 'TX', 'VT', 'VA', 'WV', 'WI'];
  const QUALIFIERS = ['north', 'south', 'east', 'west', 'central', 'northern', 'southern', 'eastern', 'western', 'northeastern', 'northwestern', 'southeastern', 'southwestern', 'extreme'];
  const QUALIFIER = `(?:(?:${QUALIFIERS.map((word) => `[${word[0]}${word[0].toUpperCase()}]${word.slice(1)}`).join('|')})\\s+)*`;
  const STATE = `(?:${STATES.join('|')}|\\b(?:${ABBREVIATIONS.join('|')})\\b)`;
  // Regions a range can be told by: physiographic provinces, mountains, valleys, plains (common practice, no source).
  const REGION = /coastal plain|piedmont|appalachian|ozark|ouachita|cumberland|blue ridge|great plains|great lakes|prairies|valley|uplands|mountains|highlands|plateau|floodplains|swamps|gulf|atlantic|maritime|new england|midwest|northeast|southeast|panhandle|red river|eastern (north america|united states)|throughout|china|mexico/i;

  it('describes each range by region, not as a list of states', () => {
    // Three or more states strung together with commas and "and" is a list, not a range description.
    const list = new RegExp(`${QUALIFIER}${STATE}(?:\\s*(?:,|and|, and)\\s+${QUALIFIER}${STATE}){2,}`);
    const offenders: string[] = [];
    for (const item of doc.taxa) {
      const note = item.range ?? '';
      if (list.test(note)) offenders.push(`${item.id}: lists states: ${note.match(list)?.[0]}`);
      if (!REGION.test(note)) offenders.push(`${item.id}: names no region: ${note}`);
    }
    expect(offenders).to.deep.equal([]);
  });
});

describe('botanist review: safety wording', () => {
  // A trait that asks the observer to scratch, crush, break, nick or cut a twig or leaf.
  const HANDLING = /\b(scratch|crush|break|nick|cut|snap|bruise)\b/i;
  // Taxa whose cautions say their sap or foliage irritates or blisters skin.
  const irritants = doc.taxa.filter((item) => (item.cautions ?? []).some((text) => /\bsap\b.*\b(skin|rash)\b|\brash\b.*\bdo not touch\b|\bblistering\b/i.test(text)));

  it('finds the irritant species the warnings must name', () => {
    // Poison sumac: every part causes a blistering rash (DENDRO; Toxicodendron in Weakley, Flora of the
    // Southern and Mid-Atlantic States; from memory). The others are named in their own cautions.
    expect(irritants.map((item) => item.id)).to.include.members(['toxicodendron-vernix', 'ailanthus-altissima', 'maclura-pomifera', 'morus-rubra']);
  });

  it('warns first, in every help that asks to scratch, crush, break or cut, about the irritant species', () => {
    const handling = doc.traits.filter((item) => HANDLING.test(item.help ?? ''));
    expect(handling.map((item) => item.code)).to.include.members(['crushed-scent', 'milky-sap', 'pith']);
    for (const item of handling) {
      const help = item.help ?? '';
      const firstSentence = help.split(/(?<=[.!?])\s+/)[0];
      expect(firstSentence, `${item.code}: the help must open with the poison sumac warning`).to.match(/poison sumac/i);
      for (const irritant of irritants) {
        const named = irritant.commonNames.some((name) => help.toLowerCase().includes(name.toLowerCase()));
        expect(named, `${item.code}: does not name ${irritant.id}`).to.be.true;
      }
      expect(help, item.code).to.match(/gloves/);
    }
  });

  it('writes the cautions without grammar slips', () => {
    // "a" before a vowel sound, a doubled word, a space before punctuation, a missing full stop.
    // common practice, no source
    const slips: string[] = [];
    for (const item of doc.taxa) {
      for (const text of item.cautions ?? []) {
        if (/\b[Aa] (?!one\b|u[bcfkns]|uni|eu|use)[aeiou]/.test(text)) slips.push(`${item.id}: "a" before a vowel: ${text}`);
        if (/\b[Aa]n (?![aeiouh])[a-z]/.test(text)) slips.push(`${item.id}: "an" before a consonant: ${text}`);
        if (/\b(\w+) \1\b/i.test(text)) slips.push(`${item.id}: doubled word: ${text}`);
        if (/ [,.;:]|\s{2}/.test(text)) slips.push(`${item.id}: spacing: ${text}`);
        if (!/^[A-Z]/.test(text) || !/[.!]$/.test(text)) slips.push(`${item.id}: not a sentence: ${text}`);
      }
    }
    for (const item of doc.traits) {
      const help = item.help ?? '';
      if (/\b[Aa] (?!one\b|u[bcfkns]|uni|eu|use)[aeiou]/.test(help) || /\b(\w+) \1\b/i.test(help)) slips.push(`${item.code}: help: ${help}`);
    }
    expect(slips).to.deep.equal([]);
  });

  it('keeps the boxelder seed caution', () => {
    // Boxelder seeds carry hypoglycin A, linked to seasonal pasture myopathy of horses, often fatal
    // (veterinary literature, from memory)
    expect(taxon('acer-negundo').cautions?.join(' ')).to.match(/an often fatal muscle disease/);
  });
});

describe('botanist review: one meaning per word', () => {
  it('lets no synonym stand for values of two traits', () => {
    // A word typed into search must lead to one trait ("three-lobed" is a leaf scar, "white bark" a
    // bark texture, "decurrent" a crown form). common practice, no source
    const owners = new Map<string, Set<string>>();
    for (const item of doc.traits) {
      for (const value of item.values ?? []) {
        for (const synonym of value.synonyms ?? []) {
          const key = synonym.toLowerCase();
          owners.set(key, new Set([...(owners.get(key) ?? []), item.code]));
        }
      }
    }
    const shared = [...owners].filter(([, codes]) => codes.size > 1).map(([word, codes]) => `${word}: ${[...codes].join(', ')}`);
    expect(shared).to.deep.equal([]);
    // nor may a synonym be the name of another trait's value
    const named = new Map<string, Set<string>>();
    for (const item of doc.traits) {
      for (const value of item.values ?? []) {
        for (const word of [value.label, value.code.replace(/-/g, ' ')]) {
          const key = word.toLowerCase();
          named.set(key, new Set([...(named.get(key) ?? []), item.code]));
        }
      }
    }
    const clashes = [...owners]
      .map(([word, codes]) => [word, [...(named.get(word) ?? [])].filter((code) => !codes.has(code))] as const)
      .filter(([, others]) => others.length > 0)
      .map(([word, others]) => `${word}: names a value of ${others.join(', ')}`);
    expect(clashes).to.deep.equal([]);
  });

  it('uses "decurrent" only for the crown', () => {
    // Harlow & Harrar: a decurrent crown divides into several large limbs (DENDRO)
    for (const item of doc.traits.filter((t) => t.code !== 'crown-form')) {
      for (const value of item.values ?? []) {
        expect([value.code, value.label, ...(value.synonyms ?? [])].join(' '), `${item.code}/${value.code}`).to.not.match(/decurrent/i);
      }
    }
  });

  it('keeps the cordate and star outlines consistent with the base and the lobing', () => {
    // A heart-shaped outline has a notched base; a star-shaped outline is a palmately lobed blade (DENDRO glossary)
    for (const item of doc.taxa) {
      const shapes = isDiscreteCell(item.cells['leaf-shape']) ? valuesOf(item.cells['leaf-shape'] as DiscreteCell).map(String) : [];
      if (shapes.includes('cordate')) expect(all(item.id, 'blade-base'), item.id).to.include('cordate');
      if (shapes.includes('star')) expect(all(item.id, 'leaf-lobing'), item.id).to.include('palmately-lobed');
    }
    // sweetgum and sugar maple star-shaped and lobed; redbud and basswood heart-shaped with notched bases
    expect(usual('cercis-canadensis', 'blade-base')).to.deep.equal(['cordate']);
    expect(usual('tilia-americana', 'blade-base')).to.include('cordate');
    expect(usual('quercus-coccinea', 'blade-base')).to.deep.equal(['truncate']);
  });

  it('keeps "stays green" for evergreens and gives trees that drop green leaves their own answer', () => {
    // Mimosa, princess-tree and catalpa drop their leaves green or nearly so (DENDRO); only trees that
    // hold green leaves through winter stay green.
    for (const item of doc.taxa) {
      const fall = item.cells['fall-color'];
      if (!isDiscreteCell(fall) || !valuesOf(fall).includes('none')) continue;
      expect(all(item.id, 'leaf-persistence'), `${item.id} stays green but is not evergreen`).to.include('evergreen');
    }
    for (const id of ['albizia-julibrissin', 'paulownia-tomentosa', 'catalpa-bignonioides']) {
      expect(all(id, 'fall-color'), id).to.include('drops-green');
    }
  });

  it('asks leaf-stalk section and length separately', () => {
    // American elm stalks about 5–7 mm, sugar maple 3–8 cm, quaking-aspen-like flattened stalks of
    // bigtooth aspen (DENDRO)
    expect(trait('petiole-length').appliesWhen).to.deep.equal({ foliage: ['broad'] });
    expect(usual('ulmus-americana', 'petiole-length')).to.deep.equal(['short']);
    expect(usual('acer-saccharum', 'petiole-length')).to.deep.equal(['long']);
    expect(usual('populus-grandidentata', 'petiole-form')).to.deep.equal(['flattened']);
    expect(trait('petiole-form').help).to.not.match(/note its length/);
  });

  it('calls fir and hemlock needles single, not a bundle of one', () => {
    // FNA2, Abies and Tsuga: leaves borne singly (source: FNA2)
    const single = (trait('needles-per-fascicle').values ?? []).find((value) => value.code === '1');
    expect(single?.label).to.match(/single/i);
    expect(`${single?.label} ${single?.definition}`).to.match(/not in bundles/);
    expect((single?.synonyms ?? []).join(' ')).to.not.match(/per bundle/);
  });

  it('says which pith values need a lengthwise cut and which a cross cut', () => {
    // DENDRO: chambered and diaphragmed pith are seen in a lengthwise cut, the star-shaped outline across
    const definition = (code: string) => (trait('pith').values ?? []).find((value) => value.code === code)?.definition ?? '';
    expect(trait('pith').label).to.match(/lengthwise and across/);
    expect(definition('star-shaped')).to.match(/cross cut/);
    for (const code of ['continuous', 'chambered', 'diaphragmed']) expect(definition(code), code).to.match(/lengthwise/);
  });
});

describe('botanist review: look-alikes separated by the traits practitioners use', () => {
  // Two taxa are told apart by a trait when both are coded and their usual values do not meet.
  const separates = (code: string, a: string, b: string) => {
    const ua = usual(a, code);
    const ub = usual(b, code);
    return ua.length > 0 && ub.length > 0 && !ua.some((value) => ub.includes(value));
  };
  const PAIRS: Array<{ a: string; b: string; traits: string[]; source: string }> = [
    // maples: silver maple's deep sinuses, red maple's sharp V sinuses, sugar maple's rounded U ones
    { a: 'acer-rubrum', b: 'acer-saccharinum', traits: ['sinus-depth'], source: 'SILVICS vol. 2; DENDRO' },
    { a: 'acer-rubrum', b: 'acer-saccharum', traits: ['sinus-shape'], source: 'DENDRO' },
    // red oaks: scarlet oak's deep C-shaped sinuses against the U sinuses of black and Shumard oak;
    // cherrybark's hairy twigs against scarlet oak's smooth ones
    { a: 'quercus-coccinea', b: 'quercus-velutina', traits: ['sinus-shape'], source: 'FNA3; DENDRO' },
    { a: 'quercus-coccinea', b: 'quercus-shumardii', traits: ['cup-cover'], source: 'FNA3' },
    { a: 'quercus-coccinea', b: 'quercus-pagoda', traits: ['twig-hairs', 'sinus-shape'], source: 'FNA3' },
    { a: 'quercus-shumardii', b: 'quercus-velutina', traits: ['sinus-depth'], source: 'FNA3' },
    // ashes: white ash stalked leaflets and a wing from the tip of a plump seed; green ash short
    // leaflet stalks and a wing running down the seed; Carolina ash a flat seed winged all round;
    // pumpkin ash velvety twigs
    { a: 'fraxinus-americana', b: 'fraxinus-pennsylvanica', traits: ['leaflet-stalks', 'samara-wing'], source: 'DENDRO; SILVICS vol. 2' },
    { a: 'fraxinus-caroliniana', b: 'fraxinus-pennsylvanica', traits: ['samara-wing', 'leaflet-stalks'], source: 'DENDRO' },
    { a: 'fraxinus-americana', b: 'fraxinus-profunda', traits: ['samara-wing', 'twig-hairs'], source: 'DENDRO' },
    // hickories: pignut's small bud, thin husk and pear-shaped nut against shagbark's; mockernut's
    // large bud and hairy twigs against pignut; walnuts by nut shape
    { a: 'carya-glabra', b: 'carya-ovata', traits: ['terminal-bud-size', 'husk-thickness', 'nut-shape'], source: 'FNA3; DENDRO' },
    { a: 'carya-glabra', b: 'carya-tomentosa', traits: ['terminal-bud-size', 'husk-thickness', 'twig-hairs'], source: 'FNA3; DENDRO' },
    { a: 'carya-cordiformis', b: 'carya-ovata', traits: ['husk-thickness'], source: 'FNA3' },
    { a: 'juglans-cinerea', b: 'juglans-nigra', traits: ['nut-shape'], source: 'FNA3' },
    // white oaks: overcup's cup nearly enclosing the nut; post oak's woolly twigs
    { a: 'quercus-lyrata', b: 'quercus-macrocarpa', traits: ['cup-cover'], source: 'FNA3' },
    { a: 'quercus-lyrata', b: 'quercus-stellata', traits: ['cup-cover'], source: 'FNA3' },
    { a: 'quercus-macrocarpa', b: 'quercus-stellata', traits: ['cup-cover'], source: 'FNA3' },
    { a: 'quercus-montana', b: 'quercus-stellata', traits: ['twig-hairs'], source: 'FNA3; DENDRO' },
  ];
  for (const pair of PAIRS) {
    it(`${pair.a} / ${pair.b}: ${pair.traits.join(', ')} (${pair.source})`, () => {
      for (const code of pair.traits) expect(separates(code, pair.a, pair.b), code).to.be.true;
    });
  }

  it('gives laurel oak a blade widest at the middle and water oak one widest near the tip', () => {
    // FNA3: Quercus laurifolia blades narrowly elliptic to rhombic; Q. nigra obovate to spatulate (source: FNA3)
    expect(usual('quercus-laurifolia', 'leaf-shape')).to.deep.equal(['elliptic']);
    expect(usual('quercus-nigra', 'leaf-shape')).to.not.include('elliptic');
  });

  it('ripens white-group acorns in one season and red-group acorns in two', () => {
    // FNA3, Quercus sect. Quercus and sect. Lobatae (source: FNA3)
    const RED = ['coccinea', 'falcata', 'imbricaria', 'laurifolia', 'marilandica', 'nigra', 'pagoda', 'palustris', 'phellos', 'rubra', 'shumardii', 'velutina'];
    const WHITE = ['alba', 'lyrata', 'macrocarpa', 'michauxii', 'montana', 'muehlenbergii', 'stellata', 'virginiana'];
    for (const name of RED) expect(all(`quercus-${name}`, 'acorn-maturation'), name).to.deep.equal(['two-year']);
    for (const name of WHITE) expect(all(`quercus-${name}`, 'acorn-maturation'), name).to.deep.equal(['one-year']);
  });

  it('codes the overcup cup nearly enclosing the nut and no other oak so', () => {
    // FNA3, Quercus lyrata: cup enclosing 2/3 to all of the nut (source: FNA3)
    expect(usual('quercus-lyrata', 'cup-cover')).to.deep.equal(['nearly-enclosed']);
    for (const item of doc.taxa.filter((t) => t.id.startsWith('quercus-') && t.id !== 'quercus-lyrata')) {
      expect(usual(item.id, 'cup-cover'), item.id).to.not.include('nearly-enclosed');
    }
  });

  it('codes the dead leaves beech keeps in winter', () => {
    // DENDRO; SILVICS vol. 2, Fagus grandifolia: young trees hold dead leaves through winter
    expect(usual('fagus-grandifolia', 'marcescence')).to.deep.equal(['kept']);
    expect(trait('marcescence').appliesWhen).to.deep.equal({ foliage: ['broad'], 'leaf-persistence': ['deciduous'] });
    expect(taxon('ilex-opaca').cells['marcescence']).to.equal('inapplicable');
  });

  it('codes bundle scars as the twig keys give them', () => {
    // Harlow, Fruit Key and Twig Key to Trees and Shrubs (from memory): one in persimmon and holly,
    // three in maples and elms, three clusters in walnuts and buckeyes, many in oaks and hickories
    expect(usual('diospyros-virginiana', 'bundle-scars')).to.deep.equal(['one']);
    expect(usual('ilex-opaca', 'bundle-scars')).to.deep.equal(['one']);
    for (const id of ['acer-rubrum', 'acer-saccharum', 'ulmus-americana']) expect(usual(id, 'bundle-scars'), id).to.deep.equal(['three']);
    for (const id of ['juglans-nigra', 'aesculus-flava']) expect(usual(id, 'bundle-scars'), id).to.deep.equal(['three-groups']);
    for (const item of doc.taxa.filter((t) => /^(quercus|carya)-/.test(t.id))) expect(usual(item.id, 'bundle-scars'), item.id).to.deep.equal(['many']);
  });

  it('separates every look-alike pair by two traits or more, but for the pairs still waiting for one', () => {
    // One trait is one misreading away from a wrong answer, so look-alikes should differ in two.
    // common practice, no source. The pairs below still hang on one trait: the conifer pairs need
    // traits this review did not add (foliage sprays, cone prickles, branchlet habit).
    const WAITING = new Set([
      'chamaecyparis-thyoides|juniperus-virginiana', 'chamaecyparis-thyoides|thuja-occidentalis', 'pinus-elliottii|pinus-taeda',
      'pinus-pungens|pinus-virginiana', 'taxodium-ascendens|taxodium-distichum',
    ]);
    const weak: string[] = [];
    for (const a of doc.taxa) {
      for (const id of a.lookAlikes ?? []) {
        const key = [a.id, id].sort().join('|');
        const count = separatingTraits(a, taxon(id), doc.traits).length;
        if (count < 2 && !WAITING.has(key)) weak.push(`${key}: ${count}`);
        if (count >= 2 && WAITING.has(key)) weak.push(`${key} is separated now: take it off the waiting list`);
      }
    }
    expect([...new Set(weak)]).to.deep.equal([]);
  });
});

describe('botanist review: one figure per measurement', () => {
  it('gives every conifer the same range for fruit length and cone length', () => {
    // The seed cone is the conifer's fruit, so the two traits measure one thing; a correction to
    // one must reach the other. common practice, no source
    for (const item of doc.taxa) {
      const cone = item.cells['cone-length'];
      if (!isNumericCell(cone)) continue;
      expect(item.cells['fruit-length'], item.id).to.deep.equal(cone);
    }
  });
});

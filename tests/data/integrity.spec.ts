/**
 * Integrity of the whole loaded reference matrix: the glossary contract, trait definitions, cell
 * shapes, appliesWhen, look-alikes, pairwise separation and the drawings on disk.
 */
import { expect } from 'chai';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { isDiscreteCell, isNumericCell, validateMatrix, type MatrixDocument, type Taxon, type Trait } from '@shared/engine';
import { ILLUSTRATIONS_DIR, loadReferenceMatrix } from '../../seeds/load-matrix';
import { DATA_TESTS_DIR, TAXA_DIR, loadGlossary, pairKey, separatingTraits, traitApplies, valuesOf } from './matrix-facts';

const KEBAB = /^[a-z0-9]+(-[a-z0-9]+)*$/;

/** Traits whose every value carries a drawing at `<trait>/<value>.svg`. */
const ILLUSTRATED_TRAITS = [
  'foliage', 'leaf-type', 'leaf-arrangement', 'leaf-shape', 'leaf-lobing', 'lobe-tips', 'leaf-margin', 'leaf-apex',
  'leaf-base', 'venation', 'needles-per-fascicle', 'needle-form', 'cone-scale-tip', 'fruit-type', 'bark-texture', 'crown-form',
];

/** Traits both data files rely on, beside the glossary's core ones. */
const PROJECT_TRAITS: Record<string, { part: string; season: string; appliesWhen?: Record<string, string[]>; values: string[] }> = {
  'leaf-surface': { part: 'leaf', season: 'leaf-on', appliesWhen: { foliage: ['broad'] }, values: ['glossy', 'dull', 'hairy-below', 'whitened-below', 'rough'] },
  'petiole-form': { part: 'leaf', season: 'leaf-on', appliesWhen: { foliage: ['broad'] }, values: ['round', 'flattened', 'very-short'] },
  'bud-color': { part: 'twig', season: 'leaf-off', appliesWhen: { foliage: ['broad'] }, values: ['brown', 'reddish', 'gray', 'yellow', 'black', 'green'] },
  'bud-scales': { part: 'twig', season: 'leaf-off', appliesWhen: { foliage: ['broad'] }, values: ['naked', 'valvate', 'imbricate', 'single-cap'] },
  'leaf-scar': { part: 'twig', season: 'leaf-off', appliesWhen: { foliage: ['broad'] }, values: ['crescent', 'u-shaped', 'shield', 'three-lobed', 'encircling-bud'] },
  'acorn-cap': { part: 'fruit', season: 'leaf-on', appliesWhen: { 'fruit-type': ['acorn'] }, values: ['shallow', 'deep', 'fringed', 'warty'] },
  'winter-catkins': { part: 'flower', season: 'leaf-off', appliesWhen: { foliage: ['broad'] }, values: ['present', 'absent'] },
  'milky-sap': { part: 'twig', season: 'any', appliesWhen: { foliage: ['broad'] }, values: ['present', 'absent'] },
  'corky-wings': { part: 'twig', season: 'any', appliesWhen: { foliage: ['broad'] }, values: ['present', 'absent'] },
  'needle-attachment': { part: 'needle', season: 'any', appliesWhen: { foliage: ['needle'] }, values: ['sheathed-bundle', 'peg', 'suction-cup', 'short-stalk', 'spur-cluster', 'direct'] },
  'flower-display': { part: 'flower', season: 'leaf-on', values: ['white', 'red', 'pink-purple', 'yellow', 'greenish', 'inconspicuous'] },
};

/**
 * Values this matrix adds to core glossary traits (the glossary allows additions, never renames or
 * drops). Each needs the same care as a core value: a definition, and a drawing if the trait is drawn.
 */
const CORE_ADDITIONS: Record<string, string[]> = {
  // Tree-of-heaven leaflets: entire but for a few coarse glandular teeth at the base
  // (USDA Agriculture Handbook 654, Silvics of North America vol. 2, Ailanthus altissima; from memory)
  'leaf-margin': ['glandular-basal-teeth'],
  // Deciduous trees that shed their leaves still green (mimosa, princess-tree, catalpa) are not
  // "stays green" evergreens (Harlow, Harrar et al., Textbook of Dendrology; from memory)
  'fall-color': ['drops-green'],
};

/** The taxon files this part of the matrix is responsible for: every trait is coded explicitly there. */
const FULLY_CODED_FILES = ['conifers.json', 'fagaceae.json', 'juglandaceae.json'];

const doc: MatrixDocument = loadReferenceMatrix();
const traitByCode = new Map(doc.traits.map((trait) => [trait.code, trait]));
const taxonById = new Map(doc.taxa.map((taxon) => [taxon.id, taxon]));

function traitOf(code: string): Trait {
  const trait = traitByCode.get(code);
  if (!trait) throw new Error(`trait ${code} missing`);
  return trait;
}

function listSvgFiles(dir: string): string[] {
  const found: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) found.push(...listSvgFiles(path));
    else if (entry.name.endsWith('.svg')) found.push(relative(ILLUSTRATIONS_DIR, path).split(sep).join('/'));
  }
  return found;
}

describe('reference matrix: glossary contract', () => {
  const { glossary, path } = loadGlossary();

  it(`reads the glossary (${path.includes('fixtures') ? 'committed copy' : 'beside the checkout'})`, () => {
    expect(glossary.traits.length).to.be.greaterThan(20);
  });

  it('the committed glossary copy matches the shared glossary when both are present', function () {
    const fixturePath = join(DATA_TESTS_DIR, 'fixtures', 'trait-glossary.json');
    if (path === fixturePath) this.skip();
    const copy = JSON.parse(readFileSync(fixturePath, 'utf8')) as unknown;
    expect(copy, 'tests/data/fixtures/trait-glossary.json is stale; copy the shared glossary again').to.deep.equal(glossary);
  });

  for (const core of glossary.traits) {
    it(`keeps core trait ${core.code} verbatim`, () => {
      const trait = traitByCode.get(core.code);
      if (!trait) expect.fail(`core trait ${core.code} missing`);
      expect(trait.kind).to.equal(core.kind);
      expect(trait.part).to.equal(core.part);
      expect(trait.season).to.equal(core.season);
      expect(trait.unit).to.equal(core.unit);
      expect(trait.appliesWhen).to.deep.equal(core.appliesWhen);
      if (core.values) {
        // The glossary's codes come first, verbatim and in order; after them only the values this
        // matrix adds on purpose (listed in CORE_ADDITIONS), so a renamed or dropped code still fails.
        const coreCodes = core.values.map((value) => value.code);
        const added = (CORE_ADDITIONS[core.code] ?? []).filter((code) => !coreCodes.includes(code));
        expect((trait.values ?? []).map((value) => value.code), 'value codes').to.deep.equal([...coreCodes, ...added]);
      }
    });
  }
});

describe('reference matrix: traits', () => {
  it('has unique kebab-case trait codes and value codes', () => {
    const codes = doc.traits.map((trait) => trait.code);
    expect(new Set(codes).size).to.equal(codes.length);
    for (const trait of doc.traits) {
      expect(trait.code).to.match(KEBAB);
      const valueCodes = (trait.values ?? []).map((value) => value.code);
      expect(new Set(valueCodes).size, `${trait.code} value codes unique`).to.equal(valueCodes.length);
      if (trait.kind === 'state') for (const code of valueCodes) expect(code, trait.code).to.match(KEBAB);
    }
  });

  it('defines the project-own traits with their fixed codes', () => {
    for (const [code, expected] of Object.entries(PROJECT_TRAITS)) {
      const trait = traitOf(code);
      expect(trait.kind, code).to.equal('state');
      expect(trait.part, code).to.equal(expected.part);
      expect(trait.season, code).to.equal(expected.season);
      expect(trait.appliesWhen, code).to.deep.equal(expected.appliesWhen);
      expect((trait.values ?? []).map((value) => value.code), code).to.have.members(expected.values);
    }
  });

  it('gives every trait a label, help, an ease from 1 to 5 and an error rate in [0, 0.5)', () => {
    for (const trait of doc.traits) {
      expect(trait.label, trait.code).to.be.a('string').and.not.empty;
      expect(trait.help, trait.code).to.be.a('string').and.not.empty;
      expect(Number.isInteger(trait.ease) && trait.ease >= 1 && trait.ease <= 5, `${trait.code} ease ${trait.ease}`).to.be.true;
      expect(trait.errorRate >= 0 && trait.errorRate < 0.5, `${trait.code} errorRate ${trait.errorRate}`).to.be.true;
      for (const value of trait.values ?? []) expect(value.label, `${trait.code}/${value.code}`).to.be.a('string').and.not.empty;
    }
  });

  it('weights observer error by how reliable each trait is', () => {
    // Bark is described in many different words from one observer to the next, so bark words are
    // weak evidence, while a count of needles per bundle is hardly ever wrong. common practice, no source
    expect(traitOf('bark-texture').errorRate).to.be.at.least(0.15);
    expect(traitOf('bark-color').errorRate).to.be.at.least(0.15);
    expect(traitOf('needles-per-fascicle').errorRate).to.be.at.most(0.05);
    expect(traitOf('bark-texture').errorRate).to.be.greaterThan(traitOf('needles-per-fascicle').errorRate);
  });

  it('records numeric traits in centimetres and gives count traits their ranges', () => {
    for (const trait of doc.traits) {
      if (trait.kind === 'numeric') expect(trait.unit, trait.code).to.equal('cm');
      else expect(trait.unit, trait.code).to.be.undefined;
      if (trait.kind === 'count') expect(trait.countRange, trait.code).to.exist;
      if (trait.kind === 'state') expect(trait.values ?? [], trait.code).to.not.be.empty;
    }
    const needles = traitOf('needles-per-fascicle');
    expect(needles.countRange).to.deep.equal({ min: 1, max: 5 });
    expect((needles.values ?? []).map((value) => value.code)).to.deep.equal(['1', '2', '3', '4', '5']);
  });

  it('spans each count trait exactly over the counts the taxa show', () => {
    // A count range wider than any coded count offers the observer numbers no tree in the matrix has;
    // a narrower one would refuse a coded count. The span is derived from the cells, not restated.
    const countTraits = doc.traits.filter((trait) => trait.kind === 'count');
    expect(countTraits.map((trait) => trait.code)).to.include.members(['leaflet-count', 'needles-per-fascicle']);
    for (const trait of countTraits) {
      const coded = doc.taxa.flatMap((taxon) => {
        const cell = taxon.cells[trait.code];
        return isDiscreteCell(cell) ? valuesOf(cell).map(Number) : [];
      });
      expect(coded, `${trait.code}: no taxon codes a count`).to.not.be.empty;
      expect(trait.countRange, trait.code).to.deep.equal({ min: Math.min(...coded), max: Math.max(...coded) });
    }
  });

  it('lets every appliesWhen name an existing trait and existing values', () => {
    for (const trait of doc.traits) {
      for (const [condition, allowed] of Object.entries(trait.appliesWhen ?? {})) {
        const other = traitOf(condition);
        const codes = (other.values ?? []).map((value) => value.code);
        for (const value of allowed) expect(codes, `${trait.code} appliesWhen ${condition}`).to.include(value);
      }
    }
  });

  it('offers synonyms for the words people use instead of the glossary terms', () => {
    const synonymsOf = (code: string, value: string) =>
      traitOf(code).values?.find((item) => item.code === value)?.synonyms ?? [];
    expect(synonymsOf('needles-per-fascicle', '3')).to.include('three needles');
    expect(synonymsOf('bark-texture', 'peeling-papery')).to.include.members(['peeling', 'papery', 'white bark']);
    expect(synonymsOf('fruit-type', 'paired-samara')).to.include('helicopter');
    expect(synonymsOf('fruit-type', 'single-samara')).to.include('winged seed');
  });
});

describe('reference matrix: illustrations', () => {
  it('sets `<trait>/<value>.svg` on every value of the illustrated traits and on no other trait', () => {
    for (const trait of doc.traits) {
      for (const value of trait.values ?? []) {
        if (ILLUSTRATED_TRAITS.includes(trait.code)) expect(value.illustration, `${trait.code}/${value.code}`).to.equal(`${trait.code}/${value.code}.svg`);
        else expect(value.illustration, `${trait.code}/${value.code}`).to.be.undefined;
      }
    }
  });

  it('finds the drawing of every illustrated value under seeds/illustrations', () => {
    const missing = doc.traits
      .flatMap((trait) => trait.values ?? [])
      .map((value) => value.illustration)
      .filter((path): path is string => path !== undefined && !existsSync(join(ILLUSTRATIONS_DIR, path)));
    expect(missing, 'drawings not found').to.deep.equal([]);
  });

  it('uses every drawing under seeds/illustrations', () => {
    const referenced = new Set(doc.traits.flatMap((trait) => trait.values ?? []).map((value) => value.illustration));
    const unused = listSvgFiles(ILLUSTRATIONS_DIR).filter((path) => !referenced.has(path));
    expect(unused, 'drawings no value refers to').to.deep.equal([]);
  });
});

describe('reference matrix: taxa and cells', () => {
  it('passes the engine validator without problems', () => {
    expect(validateMatrix(doc)).to.deep.equal([]);
  });

  it('has unique ids made from the scientific name, sorted', () => {
    const ids = doc.taxa.map((taxon) => taxon.id);
    expect(new Set(ids).size, 'ids unique').to.equal(ids.length);
    expect(ids).to.deep.equal([...ids].sort());
    for (const taxon of doc.taxa) {
      expect(taxon.id).to.equal(taxon.scientificName.toLowerCase().replace(/[^a-z]+/g, '-'));
    }
  });

  it('names a source, family, authority, common names and a sensible prior for every taxon', () => {
    for (const taxon of doc.taxa) {
      expect(taxon.source, `${taxon.id} source`).to.be.a('string').and.not.empty;
      expect(taxon.authority, `${taxon.id} authority`).to.be.a('string').and.not.empty;
      expect(taxon.family, `${taxon.id} family`).to.match(/aceae$/);
      expect(taxon.commonNames, `${taxon.id} common names`).to.be.an('array').and.not.empty;
      if (taxon.prior !== undefined) expect(taxon.prior >= 0.2 && taxon.prior <= 3, `${taxon.id} prior ${taxon.prior}`).to.be.true;
    }
  });

  it('keeps one family per genus', () => {
    const familyOfGenus = new Map<string, string>();
    for (const taxon of doc.taxa) {
      const genus = taxon.scientificName.split(' ')[0];
      const family = familyOfGenus.get(genus) ?? taxon.family;
      expect(taxon.family, `${taxon.id}: ${genus} is also in ${family}`).to.equal(family);
      familyOfGenus.set(genus, family);
    }
  });

  it('points look-alikes at other existing taxa', () => {
    for (const taxon of doc.taxa) {
      for (const other of taxon.lookAlikes ?? []) {
        expect(taxonById.has(other), `${taxon.id} look-alike ${other}`).to.be.true;
        expect(other, `${taxon.id} lists itself`).to.not.equal(taxon.id);
      }
    }
  });

  it('codes cells only with existing traits and values, each value at one frequency', () => {
    for (const taxon of doc.taxa) {
      for (const [code, cell] of Object.entries(taxon.cells)) {
        const trait = traitByCode.get(code);
        if (!trait) expect.fail(`${taxon.id}: unknown trait ${code}`);
        if (cell === 'unknown' || cell === 'inapplicable') continue;
        const where = `${taxon.id}.${code}`;
        if (trait.kind === 'numeric') {
          expect(isNumericCell(cell), `${where} should be a range`).to.be.true;
          continue;
        }
        if (!isDiscreteCell(cell)) expect.fail(`${where} should be a value set`);
        const values = valuesOf(cell);
        expect(values.length, `${where} empty`).to.be.greaterThan(0);
        expect(new Set(values.map(String)).size, `${where} lists a value twice`).to.equal(values.length);
        if (trait.kind === 'state') {
          const codes = (trait.values ?? []).map((value) => value.code);
          for (const value of values) expect(codes, where).to.include(value);
        } else {
          const range = trait.countRange ?? { min: 0, max: Infinity };
          for (const value of values) {
            expect(typeof value === 'number' && Number.isInteger(value), `${where}: ${value} is not a whole number`).to.be.true;
            expect(Number(value) >= range.min && Number(value) <= range.max, `${where}: ${value} outside ${range.min}–${range.max}`).to.be.true;
          }
        }
      }
    }
  });

  it('orders every numeric range min ≤ low ≤ high ≤ max, all positive', () => {
    for (const taxon of doc.taxa) {
      for (const [code, cell] of Object.entries(taxon.cells)) {
        if (!isNumericCell(cell)) continue;
        const { min, low, high, max } = cell;
        expect(min > 0 && min <= low && low <= high && high <= max, `${taxon.id}.${code}: ${min} ${low} ${high} ${max}`).to.be.true;
      }
    }
  });

  it('codes no trait on a taxon its appliesWhen excludes', () => {
    const violations: string[] = [];
    for (const taxon of doc.taxa) {
      for (const trait of doc.traits) {
        const cell = taxon.cells[trait.code];
        if (cell === undefined || cell === 'unknown' || cell === 'inapplicable') continue;
        if (!traitApplies(trait, taxon)) violations.push(`${taxon.id}.${trait.code}`);
      }
    }
    expect(violations).to.deep.equal([]);
  });

  for (const file of FULLY_CODED_FILES) {
    it(`${file}: codes every trait explicitly, inapplicable exactly where appliesWhen excludes it`, () => {
      const taxa = (JSON.parse(readFileSync(join(TAXA_DIR, file), 'utf8')) as { taxa: Taxon[] }).taxa;
      expect(taxa.length).to.be.greaterThan(0);
      for (const taxon of taxa) {
        for (const trait of doc.traits) {
          const cell = taxon.cells[trait.code];
          expect(cell, `${taxon.id}.${trait.code} not written`).to.not.be.undefined;
          if (traitApplies(trait, taxon)) expect(cell, `${taxon.id}.${trait.code}`).to.not.equal('inapplicable');
          else expect(cell, `${taxon.id}.${trait.code}`).to.equal('inapplicable');
        }
      }
    });
  }
});

describe('reference matrix: separation', () => {
  const listed = new Map((doc.inseparable ?? []).map((pair) => [pairKey(pair.taxa[0], pair.taxa[1]), pair]));

  it('lists inseparable pairs once, between existing taxa, with a reason', () => {
    expect(listed.size).to.equal((doc.inseparable ?? []).length);
    for (const pair of doc.inseparable ?? []) {
      expect(pair.taxa).to.have.length(2);
      expect(pair.taxa[0]).to.not.equal(pair.taxa[1]);
      for (const id of pair.taxa) expect(taxonById.has(id), `inseparable names ${id}`).to.be.true;
      expect(pair.reason, pair.taxa.join(' / ')).to.be.a('string').with.length.greaterThan(10);
    }
  });

  it('separates every pair of taxa by at least one trait, or lists the pair as inseparable', () => {
    const unexplained: string[] = [];
    for (let i = 0; i < doc.taxa.length; i++) {
      for (let j = i + 1; j < doc.taxa.length; j++) {
        const a = doc.taxa[i];
        const b = doc.taxa[j];
        if (separatingTraits(a, b, doc.traits).length === 0 && !listed.has(pairKey(a.id, b.id))) unexplained.push(`${a.id} / ${b.id}`);
      }
    }
    expect(unexplained, 'pairs no trait separates').to.deep.equal([]);
  });

  it('lists as inseparable only pairs that really are', () => {
    for (const pair of doc.inseparable ?? []) {
      const [a, b] = pair.taxa.map((id) => taxonById.get(id));
      if (!a || !b) expect.fail(`inseparable pair ${pair.taxa.join(' / ')} names a missing taxon`);
      expect(separatingTraits(a, b, doc.traits), `${a.id} / ${b.id} is separable`).to.deep.equal([]);
    }
  });
});

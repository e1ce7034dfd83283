import { expect } from 'chai';
import {
  compileMatrix,
  EngineUsageError,
  IN_HAND_PARTS,
  isDiscreteCell,
  rank,
  seeingChance,
  suggest,
  SUGGEST_DEFAULTS,
  traitInHand,
  type MatrixDocument,
  type Observation,
  type PlantPart,
  type Suggestion,
} from '@shared/engine';
import { loadReferenceMatrix } from '../../seeds/load-matrix';

const doc: MatrixDocument = loadReferenceMatrix();
const reference = compileMatrix(doc);
const partOf = new Map(doc.traits.map((trait) => [trait.code, trait.part]));
const ALL = { limit: doc.traits.length, lookaheadMaxCandidates: 0 };

function parts(suggestions: readonly Suggestion[]): Set<PlantPart | undefined> {
  return new Set(suggestions.map((item) => partOf.get(item.trait)));
}

describe('what is in hand', () => {
  // common practice, no source: what each kind of specimen shows
  it('names the parts each specimen shows', () => {
    expect(IN_HAND_PARTS['standing-tree']).to.have.members(['leaf', 'needle', 'cone', 'fruit', 'flower', 'twig', 'bark', 'form']);
    expect(IN_HAND_PARTS['leafy-twig']).to.have.members(['leaf', 'needle', 'twig']);
    expect(IN_HAND_PARTS['winter-twig']).to.have.members(['twig']);
    expect(IN_HAND_PARTS['bark-only']).to.have.members(['bark', 'form']);
    expect(IN_HAND_PARTS['cone-or-fruit']).to.have.members(['cone', 'fruit']);
    expect(IN_HAND_PARTS['fallen-leaf']).to.have.members(['leaf', 'needle']);
    expect(Object.isFrozen(IN_HAND_PARTS)).to.equal(true);
  });

  it('says why a trait can or cannot be seen on what is in hand', () => {
    const bark = traitInHand({ part: 'bark', label: 'Bark texture' }, 'winter-twig');
    expect(bark.inHand).to.equal(false);
    expect(bark.reason).to.match(/Bark texture cannot be seen on a winter twig/);
    expect(traitInHand({ part: 'twig', label: 'Pith' }, 'winter-twig').inHand).to.equal(true);
  });

  // common practice, no source: a winter twig shows only the twig and its buds
  it('never suggests a leaf, flower or fruit trait on a winter twig', () => {
    for (const season of ['leaf-off', 'leaf-on'] as const) {
      for (const observations of [[], [{ trait: 'pith', values: ['continuous'] }]] as Observation[][]) {
        const found = suggest(reference, observations, { ...ALL, season, inHand: 'winter-twig' });
        expect(found.length, `${season}, ${observations.length} observed`).to.be.greaterThan(0);
        for (const part of ['leaf', 'needle', 'flower', 'fruit', 'cone', 'bark', 'form'] as const) expect(parts(found).has(part), part).to.equal(false);
      }
    }
  });

  // common practice, no source: a trunk seen alone shows its bark and the tree's form
  it('suggests only bark and form traits when only the bark is in hand', () => {
    const found = suggest(reference, [], { ...ALL, inHand: 'bark-only' });
    expect(found.length).to.be.greaterThan(1);
    expect([...parts(found)]).to.have.members(['bark', 'form']);
  });

  it('counts a cone or fruit in hand as seen whatever the month', () => {
    const trait = { code: 'fruit-type', part: 'fruit' as const, season: 'leaf-on' as const };
    expect(seeingChance(trait, 'cone-or-fruit', 3).chance).to.equal(1);
    expect(seeingChance(trait, 'standing-tree', 3).chance).to.be.lessThan(seeingChance(trait, 'standing-tree', 9).chance);
    // a part already observed is in hand
    expect(seeingChance(trait, 'standing-tree', 3, new Set(['fruit'])).chance).to.equal(1);
  });

  it('refuses an unknown specimen or a month outside 1–12', () => {
    expect(() => suggest(reference, [], { inHand: 'whole-forest' as never })).to.throw(EngineUsageError);
    for (const month of [0, 13, 6.5]) expect(() => suggest(reference, [], { month })).to.throw(EngineUsageError);
  });
});

describe('ease of seeing first', () => {
  // common practice, no source: a first look at a standing tree in leaf starts with the foliage,
  // the twig, the bark or the form, which every tree shows, rather than fruit or flowers, which
  // many trees lack in June
  it('opens an empty standing-tree sift in leaf in June with a trait that is always at hand', () => {
    const [first] = suggest(reference, [], { season: 'leaf-on', month: 6 });
    expect(first).to.not.equal(undefined);
    expect(['leaf', 'needle', 'twig', 'bark', 'form']).to.include(partOf.get(first?.trait ?? ''));
    expect(first?.reason).to.match(/always at hand/);
    // the check can fail: by expected gain per ease alone fruit type would lead
    const byGain = suggest(reference, [], ALL).map((item) => ({
      trait: item.trait,
      rate: item.expectedGain / (doc.traits.find((t) => t.code === item.trait)?.ease ?? 1),
    }));
    byGain.sort((a, b) => b.rate - a.rate);
    expect(partOf.get(byGain[0]?.trait ?? '')).to.equal('fruit');
  });

  it('says in the reason that a seasonal part is less likely to be seen', () => {
    const fruit = suggest(reference, [], { ...ALL, month: 6 }).find((item) => item.trait === 'fruit-type');
    expect(fruit?.reason).to.match(/trees show fruit in June/);
    const flowers = suggest(reference, [], { ...ALL, month: 8 }).find((item) => item.trait === 'flower-display');
    expect(flowers?.reason).to.match(/out of its season/);
  });

  // common practice, no source: leaves turn from about September to November in the temperate north
  it('does not suggest autumn colour in July, and does in October', () => {
    expect(suggest(reference, [], { ...ALL, month: 7 }).map((item) => item.trait)).to.not.include('fall-color');
    expect(suggest(reference, [], { ...ALL, month: 10 }).map((item) => item.trait)).to.include('fall-color');
  });
});

/** A plain computation of the preview of one state trait, straight from the document and rank. */
function plainPreview(observations: Observation[], code: string): Array<{ answer: string; leaders: string[]; remaining: number }> {
  const trait = doc.traits.find((item) => item.code === code);
  if (!trait) throw new Error(code);
  const ranked = rank(reference, observations, { leeway: Infinity, limit: Infinity });
  const position = new Map(doc.taxa.map((taxon, i) => [taxon.id, i]));
  const all = [...ranked.candidates, ...ranked.ruledOut]
    .filter((candidate) => candidate.probability >= SUGGEST_DEFAULTS.negligibleProbability)
    .sort((a, b) => b.probability - a.probability || (position.get(a.taxonId) ?? 0) - (position.get(b.taxonId) ?? 0));
  const total = all.reduce((sum, candidate) => sum + candidate.probability, 0);
  const leader = all[0]?.probability ?? 0;
  const core: string[] = [];
  let held = 0;
  for (const candidate of all) {
    if (held >= 0.95 - 1e-12) break;
    core.push(candidate.taxonId);
    held += candidate.probability / total;
  }
  const codedWith = (taxonId: string, value: string): boolean => {
    const cell = doc.taxa[position.get(taxonId) ?? -1]?.cells[code];
    return isDiscreteCell(cell) && [...(cell.usual ?? []), ...(cell.occasional ?? []), ...(cell.rare ?? [])].map(String).includes(value);
  };
  return (trait.values ?? [])
    .map((value) => ({
      answer: value.code,
      leaders: all
        .filter((c) => c.probability >= leader * SUGGEST_DEFAULTS.shortlistShare && codedWith(c.taxonId, value.code))
        .map((c) => c.taxonId)
        .slice(0, 3),
      remaining: core.filter((taxonId) => codedWith(taxonId, value.code)).length,
    }))
    .filter((line) => line.leaders.length > 0);
}

describe('previews that mean something', () => {
  const cases: Array<{ observations: Observation[]; trait: string }> = [
    { observations: [], trait: 'foliage' },
    { observations: [], trait: 'leaf-lobing' },
    {
      observations: [
        { trait: 'foliage', values: ['broad'] },
        { trait: 'leaf-lobing', values: ['pinnately-lobed'] },
      ],
      trait: 'lobe-tips',
    },
    { observations: [{ trait: 'foliage', values: ['needle'] }], trait: 'needle-form' },
  ];
  for (const { observations, trait } of cases) {
    it(`agrees with a plain computation for ${trait} after ${observations.length} observations`, () => {
      const found = suggest(reference, observations, ALL).find((item) => item.trait === trait);
      expect(found, trait).to.not.equal(undefined);
      const preview = found?.preview ?? [];
      const expected = plainPreview(observations, trait);
      expect(preview.map((line) => line.answer)).to.have.members(expected.map((line) => line.answer));
      for (const line of preview) {
        const plain = expected.find((item) => item.answer === line.answer);
        expect(line.leaders, String(line.answer)).to.deep.equal(plain?.leaders);
        expect(line.remaining, String(line.answer)).to.equal(plain?.remaining);
      }
      // likely answers first
      for (let i = 1; i < preview.length; i++) expect(preview[i]?.probability ?? 0).to.be.at.most(preview[i - 1]?.probability ?? 0);
    });
  }

  it('does not say every species is left after one answer early in a sift', () => {
    const foliage = suggest(reference, [], ALL).find((item) => item.trait === 'foliage');
    const needle = foliage?.preview.find((line) => line.answer === 'needle');
    expect(needle?.remaining).to.be.within(1, doc.taxa.length / 2);
    expect(needle?.leaders.length).to.be.greaterThan(0);
  });
});

import { expect } from 'chai';
import type { TaxonMatch } from '../../core/api/study-service';
import { rankMatches } from './species-ranking';

// The maples' names as the reference matrix has them (seeds/matrix/taxa/hardwoods-b.json), in the
// order the server's search gave them for "sugr maple".
const MAPLES: TaxonMatch[] = [
  {
    id: 'acer-saccharinum',
    scientificName: 'Acer saccharinum',
    commonNames: ['silver maple', 'soft maple', 'white maple', 'river maple'],
    family: 'Sapindaceae',
  },
  { id: 'acer-saccharum', scientificName: 'Acer saccharum', commonNames: ['sugar maple', 'hard maple', 'rock maple'], family: 'Sapindaceae' },
  { id: 'acer-rubrum', scientificName: 'Acer rubrum', commonNames: ['red maple', 'swamp maple', 'soft maple', 'scarlet maple'], family: 'Sapindaceae' },
  { id: 'acer-floridanum', scientificName: 'Acer floridanum', commonNames: ['Florida maple', 'southern sugar maple', 'hammock maple'], family: 'Sapindaceae' },
];

const ranked = (words: string) => {
  const result = rankMatches(words, MAPLES);
  return { first: result.matches[0]?.id, clearBest: result.clearBest, count: result.matches.length };
};

describe('species search: ranking the matches and when Enter may add the first', () => {
  it('puts the species a one-letter typo points at first, and calls it clear', () => {
    expect(ranked('sugr maple')).to.deep.equal({ first: 'acer-saccharum', clearBest: true, count: 4 });
    expect(ranked('silvr maple')).to.deep.equal({ first: 'acer-saccharinum', clearBest: true, count: 4 });
  });

  it('is not clear when several names fit about as well', () => {
    expect(ranked('maple').clearBest).to.equal(false);
    // "soft maple" is a name of both silver and red maple (seeds/matrix/taxa/hardwoods-b.json)
    expect(ranked('soft maple').clearBest).to.equal(false);
  });

  it('is clear for a name only one species bears, typed whole', () => {
    expect(ranked('Acer saccharum')).to.deep.equal({ first: 'acer-saccharum', clearBest: true, count: 4 });
    expect(ranked('red maple')).to.deep.equal({ first: 'acer-rubrum', clearBest: true, count: 4 });
  });

  it('keeps every match and has nothing to pick from none', () => {
    expect(rankMatches('oak', [])).to.deep.equal({ matches: [], clearBest: false });
    expect(rankMatches('zzzz', MAPLES).matches).to.have.length(4);
  });
});

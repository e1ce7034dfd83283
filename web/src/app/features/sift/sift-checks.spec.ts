import { expect } from 'chai';
import { cellOf, compileMatrix, isNumericCell } from '@shared/engine';
import { loadReferenceMatrix } from '../../../../../seeds/load-matrix';
import { checkAgain } from './check-again';
import { convertTyped, countProblem, lengthProblem, numericSpan, outsideNote, plural, spanText, weightInWords } from './measure-words';
import { addAnswer } from './sift-query';

describe('sift checks (lengths, counts, weights and Check again)', () => {
  const compiled = compileMatrix(loadReferenceMatrix());
  const trait = (code: string) => {
    const found = compiled.traits[compiled.traitIndexByCode.get(code) ?? -1];
    if (!found) throw new Error(`the demo matrix has no trait ${code}`);
    return found;
  };

  it('converts what was typed when the unit changes, to one decimal', () => {
    // NIST SP 811 (2008), Appendix B: 1 in = 2.54 cm exactly. 8 cm = 3.1496 in; 3.1 in = 7.874 cm.
    expect(convertTyped(8, 'cm', 'in')).to.equal(3.1);
    expect(convertTyped(3.1, 'in', 'cm')).to.equal(7.9);
    expect(convertTyped(6, 'in', 'cm')).to.equal(15.2);
    expect(convertTyped(25, 'mm', 'cm')).to.equal(2.5);
  });

  it('reads the usual span and the extremes of a length trait from the matrix', () => {
    const span = numericSpan(compiled, trait('leaf-length'));
    expect(span).to.not.equal(null);
    if (!span) return;
    const cells = compiled.taxa.map((taxon) => cellOf(compiled, taxon.id, 'leaf-length')).filter(isNumericCell);
    expect(span.max).to.equal(Math.max(...cells.map((cell) => cell.max)));
    expect(span.min).to.equal(Math.min(...cells.map((cell) => cell.min)));
    expect(span.usualLow).to.be.within(span.min, span.usualHigh);
    expect(span.usualHigh).to.be.at.most(span.max);
    expect(spanText(span, 'cm')).to.match(/^Most species here: [\d.]+–[\d.]+ cm$/);
    expect(numericSpan(compiled, trait('leaf-margin'))).to.equal(null);
  });

  it('notes a length beyond every species but refuses only impossible ones', () => {
    const span = numericSpan(compiled, trait('leaf-length'));
    if (!span) throw new Error('leaf-length has no span');
    expect(outsideNote(span, 900, 'cm')).to.match(/^Larger than any species here \(max \d+ cm\)/);
    expect(outsideNote(span, span.max, 'cm')).to.equal(null);
    expect(outsideNote(span, 0.01, 'cm')).to.match(/^Smaller than any species here/);
    expect(lengthProblem('-5')).to.match(/more than 0/);
    expect(lengthProblem('0')).to.match(/more than 0/);
    expect(lengthProblem('8')).to.equal(null);
    expect(lengthProblem('')).to.equal(null);
    expect(countProblem('0', 3, 21)).to.match(/3 to 21/);
    expect(countProblem('2.5', 3, 21)).to.match(/whole number/);
    expect(countProblem('7', 3, 21)).to.equal(null);
  });

  it('says a weight in words and counts in proper plurals', () => {
    expect(weightInWords(0.452)).to.equal('counts for about half as much as a sure match');
    expect(weightInWords(0.95)).to.equal('counts as a sure match');
    expect(weightInWords(0.01)).to.equal('counts strongly against');
    expect(plural(1, 'trait')).to.equal('1 trait');
    expect(plural(4, 'trait')).to.equal('4 traits');
  });

  it('adds a value chosen in the search to the trait, in the trait’s own order', () => {
    expect(addAnswer(compiled, [], 'leaf-arrangement', 'opposite')).to.deep.equal({ trait: 'leaf-arrangement', values: ['opposite'] });
    expect(addAnswer(compiled, [{ trait: 'leaf-arrangement', values: ['whorled'] }], 'leaf-arrangement', 'opposite')).to.deep.equal({
      trait: 'leaf-arrangement',
      values: ['opposite', 'whorled'],
    });
    expect(addAnswer(compiled, [], 'needles-per-fascicle', 3)).to.deep.equal({ trait: 'needles-per-fascicle', values: [3] });
    expect(addAnswer(compiled, [], 'leaf-arrangement', 'spiral')).to.equal(null);
    expect(addAnswer(compiled, [], 'leaf-length', 5)).to.equal(null);
  });

  // Harlow and Harrar, Textbook of Dendrology; USDA Agriculture Handbook 654, Acer rubrum: leaves
  // opposite, simple, palmately lobed, serrate, palmately veined; fruit paired samaras (from memory).
  const redMaple = [
    { trait: 'foliage', values: ['broad'] },
    { trait: 'leaf-type', values: ['simple'] },
    { trait: 'leaf-lobing', values: ['palmately-lobed'] },
    { trait: 'leaf-margin', values: ['serrate'] },
    { trait: 'lobe-tips', values: ['pointed'] },
    { trait: 'venation', values: ['palmate'] },
    { trait: 'fruit-type', values: ['paired-samara'] },
  ];
  const options = { season: 'leaf-on', leeway: 2 } as const;

  it('names the alternate arrangement in a red maple sift, with the ranking without it', () => {
    const found = checkAgain(compiled, [...redMaple, { trait: 'leaf-arrangement', values: ['alternate'] }], options);
    expect(found?.observation).to.deep.equal({ trait: 'leaf-arrangement', values: ['alternate'] });
    expect(found?.disagreeing).to.be.greaterThan(0.5);
    expect(found?.without[0]?.taxonId).to.equal('acer-rubrum');
  });

  it('names nothing when every answer fits a red maple, or when a decisive answer is right', () => {
    expect(checkAgain(compiled, [...redMaple, { trait: 'leaf-arrangement', values: ['opposite'] }], options)).to.equal(null);
    // Sweetgum (Liquidambar styraciflua): palmately lobed, serrate, alternate — a consistent sift.
    expect(
      checkAgain(
        compiled,
        [
          { trait: 'leaf-lobing', values: ['palmately-lobed'] },
          { trait: 'leaf-margin', values: ['serrate'] },
          { trait: 'leaf-arrangement', values: ['alternate'] },
        ],
        options,
      ),
    ).to.equal(null);
    expect(checkAgain(compiled, [{ trait: 'leaf-arrangement', values: ['alternate'] }], options)).to.equal(null);
  });
});

import { expect } from 'chai';
import { compileMatrix } from '@shared/engine';
import { loadReferenceMatrix } from '../../../../../seeds/load-matrix';
import { formatObservations, parseLeeway, parseObservations, parseSeason, siftQueryParams } from './sift-query';

describe('sift links (the query string of /sift)', () => {
  const compiled = compileMatrix(loadReferenceMatrix());

  it('reads observations of every kind and writes them back the same', () => {
    const text = 'needles-per-fascicle:2,3;needle-length:6in;cone-length:7.5cm;bark-texture:scaly,plated';
    const observations = parseObservations(text, compiled);
    expect(observations).to.deep.equal([
      { trait: 'needles-per-fascicle', values: [2, 3] },
      { trait: 'needle-length', value: 6, unit: 'in' },
      { trait: 'cone-length', value: 7.5, unit: 'cm' },
      { trait: 'bark-texture', values: ['scaly', 'plated'] },
    ]);
    expect(formatObservations(observations)).to.equal(text);
  });

  it('drops what this edition does not know and keeps the first entry of a repeated trait', () => {
    const observations = parseObservations(
      'no-such-trait:1;bark-texture:velvet,scaly;needle-length:-2in;needle-length:abc;needles-per-fascicle:5;needles-per-fascicle:2',
      compiled,
    );
    expect(observations).to.deep.equal([
      { trait: 'bark-texture', values: ['scaly'] },
      { trait: 'needles-per-fascicle', values: [5] },
    ]);
  });

  it('drops counts outside what the trait allows, which the engine would refuse', () => {
    // Flora of North America vol. 2: pines of eastern North America carry 1–5 needles per fascicle (from memory).
    expect(parseObservations('needles-per-fascicle:0,3,9', compiled)).to.deep.equal([{ trait: 'needles-per-fascicle', values: [3] }]);
    expect(parseObservations('needles-per-fascicle:9', compiled)).to.deep.equal([]);
  });

  it('treats a bare length as centimetres, the matrix unit', () => {
    expect(parseObservations('needle-length:12', compiled)).to.deep.equal([{ trait: 'needle-length', value: 12, unit: 'cm' }]);
  });

  it('falls back to in leaf and the default leeway on anything else', () => {
    expect(parseSeason('leaf-off')).to.equal('leaf-off');
    expect(parseSeason('winter')).to.equal('leaf-on');
    expect(parseSeason(undefined)).to.equal('leaf-on');
    expect(parseLeeway('0')).to.equal(0);
    expect(parseLeeway('3')).to.equal(3);
    expect(parseLeeway('9')).to.equal(2);
    expect(parseLeeway('1.5')).to.equal(2);
    expect(parseLeeway('')).to.equal(2);
    expect(siftQueryParams([], 'leaf-off', 1)).to.deep.equal({ season: 'leaf-off', leeway: '1' });
  });
});

import { expect } from 'chai';
import { cellOf, compileMatrix, decodeBundle, encodeBundle, EngineUsageError, rank, taxonIndex, traitByCode } from '@shared/engine';
import { southernTreesMatrix } from './fixtures';

describe('bundle and lookups', () => {
  const compiled = compileMatrix(southernTreesMatrix());
  const observations = [
    { trait: 'foliage', values: ['needle'] },
    { trait: 'needles-per-fascicle', values: [2, 3] },
    { trait: 'needle-length', value: 9 },
  ];

  it('decodes to a matrix that ranks identically', () => {
    const decoded = decodeBundle(encodeBundle(compiled));
    expect(rank(decoded, observations, { limit: 100 })).to.deep.equal(rank(compiled, observations, { limit: 100 }));
    expect(decoded.taxa).to.deep.equal(compiled.taxa);
  });

  it('decodes from an unaligned copy of the bytes', () => {
    const bytes = encodeBundle(compiled);
    const shifted = new Uint8Array(bytes.length + 3);
    shifted.set(bytes, 3);
    const decoded = decodeBundle(shifted.subarray(3));
    expect(rank(decoded, observations)).to.deep.equal(rank(compiled, observations));
  });

  it('rejects bytes that are not a bundle', () => {
    expect(() => decodeBundle(new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16]))).to.throw(EngineUsageError, /bundle/);
    const truncated = encodeBundle(compiled).subarray(0, 40);
    expect(() => decodeBundle(truncated)).to.throw(EngineUsageError);
  });

  it('gives coded cells back for display, as coded (not as appliesWhen scores them)', () => {
    const decoded = decodeBundle(encodeBundle(compiled));
    expect(cellOf(decoded, 'pinus-echinata', 'needles-per-fascicle')).to.deep.equal({ usual: [2], occasional: [3] });
    expect(cellOf(decoded, 'pinus-taeda', 'needle-length')).to.deep.equal({ min: 10, low: 12, high: 18, max: 23 });
    expect(cellOf(decoded, 'pinus-taeda', 'lobe-tips')).to.equal('inapplicable');
    expect(cellOf(decoded, 'quercus-alba', 'needles-per-fascicle')).to.equal('unknown');
    expect(cellOf(decoded, 'quercus-alba', 'bark-texture')).to.deep.equal({
      usual: ['scaly', 'plated'].sort((a, b) => ['smooth', 'furrowed', 'plated', 'scaly'].indexOf(a) - ['smooth', 'furrowed', 'plated', 'scaly'].indexOf(b)),
    });
    expect(() => cellOf(decoded, 'no-such-tree', 'foliage')).to.throw(/no-such-tree/);
  });

  it('looks up taxa and traits', () => {
    expect(taxonIndex(compiled, 'quercus-rubra')).to.equal(5);
    expect(taxonIndex(compiled, 'nothing')).to.equal(-1);
    expect(traitByCode(compiled, 'needle-length')?.kind).to.equal('numeric');
    expect(traitByCode(compiled, 'nothing')).to.equal(undefined);
  });
});

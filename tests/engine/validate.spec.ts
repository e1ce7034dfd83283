import { expect } from 'chai';
import { compileMatrix, MatrixValidationError, validateMatrix, validateObservations, type MatrixDocument, type MatrixProblem } from '@shared/engine';
import { arithmeticMatrix, southernTreesMatrix, taxon } from './fixtures';

function errorsOf(problems: MatrixProblem[]): MatrixProblem[] {
  return problems.filter((problem) => problem.severity === 'error');
}

function withDoc(change: (doc: MatrixDocument) => void): MatrixDocument {
  const doc = southernTreesMatrix();
  change(doc);
  return doc;
}

describe('validateMatrix', () => {
  it('accepts the hand-made matrices without errors', () => {
    expect(errorsOf(validateMatrix(arithmeticMatrix()))).to.deep.equal([]);
    expect(errorsOf(validateMatrix(southernTreesMatrix()))).to.deep.equal([]);
  });

  it('never throws on garbage', () => {
    for (const garbage of [null, 3, 'matrix', [], { format: 'sylvasift-matrix' }, { traits: 'x', taxa: {} }]) {
      expect(() => validateMatrix(garbage)).not.to.throw();
      expect(errorsOf(validateMatrix(garbage))).to.not.be.empty;
    }
  });

  it('names the taxon, the trait and the bad value in a cell', () => {
    const doc = withDoc((d) => {
      d.taxa[0].cells['bark-texture'] = { usual: ['glittery'] };
    });
    const [problem] = errorsOf(validateMatrix(doc));
    expect(problem).to.include({ code: 'unknown-value-in-cell', taxon: 'pinus-taeda', trait: 'bark-texture', path: 'taxa[0].cells.bark-texture.usual' });
    expect(problem.message).to.contain('"pinus-taeda"').and.contain('"bark-texture"').and.contain('"glittery"');
  });

  it('reports counts that are not whole numbers or out of range', () => {
    const doc = withDoc((d) => {
      d.taxa[0].cells['needles-per-fascicle'] = { usual: [2.5] };
      d.taxa[1].cells['needles-per-fascicle'] = { usual: [9] };
    });
    const codes = errorsOf(validateMatrix(doc)).map((problem) => `${problem.taxon}:${problem.code}`);
    expect(codes).to.deep.equal(['pinus-taeda:count-not-integer', 'pinus-echinata:count-out-of-range']);
  });

  it('reports non-finite and negative ranges as errors and out-of-order ranges as warnings', () => {
    const doc = withDoc((d) => {
      d.taxa[0].cells['needle-length'] = { min: 10, low: Number.NaN, high: 18, max: 23 };
      d.taxa[1].cells['needle-length'] = { min: -1, low: 7, high: 11, max: 13 };
      d.taxa[2].cells['needle-length'] = { min: 18, low: 38, high: 20, max: 45 };
    });
    const problems = validateMatrix(doc);
    expect(errorsOf(problems).map((problem) => problem.code)).to.deep.equal(['range-not-finite', 'range-negative']);
    const warning = problems.find((problem) => problem.code === 'range-out-of-order');
    expect(warning).to.include({ severity: 'warning', taxon: 'pinus-palustris', trait: 'needle-length' });
  });

  it('reports bad trait definitions', () => {
    const doc = withDoc((d) => {
      d.traits[0].ease = 0;
      d.traits[1].errorRate = 0.5;
      d.traits[2].appliesWhen = { foliage: ['feathers'] };
      d.traits.push({ ...d.traits[6] });
    });
    const codes = errorsOf(validateMatrix(doc)).map((problem) => problem.code);
    expect(codes).to.include.members(['bad-ease', 'bad-error-rate', 'bad-applies-when', 'duplicate-trait']);
  });

  it('finds a cycle of appliesWhen conditions', () => {
    const doc = withDoc((d) => {
      d.traits[0].appliesWhen = { 'needles-per-fascicle': ['3'] };
    });
    const problem = errorsOf(validateMatrix(doc)).find((item) => item.code === 'applies-when-cycle');
    expect(problem?.message).to.contain('"foliage"').and.contain('"needles-per-fascicle"');
  });

  it('warns when a taxon is coded for a trait outside its appliesWhen condition', () => {
    const doc = withDoc((d) => {
      d.taxa[4].cells['needles-per-fascicle'] = { usual: [3] };
    });
    const problems = validateMatrix(doc);
    expect(errorsOf(problems)).to.deep.equal([]);
    expect(problems.find((problem) => problem.code === 'applies-when-violation')).to.include({ taxon: 'quercus-alba', trait: 'needles-per-fascicle' });
  });

  it('reports unknown traits in cells, duplicate taxa and bad priors', () => {
    const doc = withDoc((d) => {
      d.taxa[0].cells['leaf-colour'] = { usual: ['green'] };
      d.taxa.push(taxon('pinus-taeda', {}));
      d.taxa[1].prior = 0;
    });
    const codes = errorsOf(validateMatrix(doc)).map((problem) => problem.code);
    expect(codes).to.have.members(['unknown-trait-in-cell', 'duplicate-taxon', 'bad-prior']);
  });

  it('makes compileMatrix raise a MatrixValidationError carrying the problems', () => {
    const doc = withDoc((d) => {
      d.taxa[0].cells['bark-texture'] = { usual: ['glittery'] };
    });
    try {
      compileMatrix(doc);
      expect.fail('compileMatrix should have thrown');
    } catch (error) {
      expect(error).to.be.instanceOf(MatrixValidationError);
      expect((error as MatrixValidationError).problems[0].code).to.equal('unknown-value-in-cell');
      expect((error as Error).message)
        .to.contain('1 error')
        .and.contain('glittery');
    }
  });
});

describe('validateObservations', () => {
  const compiled = compileMatrix(southernTreesMatrix());

  it('accepts well-formed observations', () => {
    expect(
      validateObservations(compiled, [
        { trait: 'foliage', values: ['needle'] },
        { trait: 'needles-per-fascicle', values: [2, 3] },
        { trait: 'needle-length', value: 6, unit: 'in' },
      ]),
    ).to.deep.equal([]);
  });

  it('points at the offending item and field', () => {
    const problems = validateObservations(compiled, [
      { trait: 'foliage', values: ['feathery'] },
      { trait: 'needle-length', values: [3] },
      { trait: 'needles-per-fascicle', values: [2.5] },
      { trait: 'terminal-bud', values: ['present'], unit: 'cm' },
      { trait: 'no-such-trait', values: ['x'] },
      { trait: 'foliage', values: ['broad'] },
      { trait: 'bark-texture', values: [] },
      { trait: 'leaf-arrangement', values: ['opposite', 'opposite'] },
      { trait: 'lobe-tips', value: 3 },
    ]);
    expect(problems.map(({ index, field, code }) => `${index}:${field}:${code}`)).to.deep.equal([
      '0:values:unknown-value',
      '1:values:wrong-kind',
      '2:values:not-an-integer',
      '3:unit:bad-unit',
      '4:trait:unknown-trait',
      '5:trait:duplicate-trait',
      '6:values:empty-values',
      '7:values:duplicate-value',
      '8:value:wrong-kind',
    ]);
    expect(problems[0].message).to.contain('"feathery"').and.contain('"foliage"');
    expect(problems[5].message).to.contain('observation 0');
  });

  it('rejects non-finite and negative measurements and counts outside the range', () => {
    const problems = validateObservations(compiled, [
      { trait: 'needle-length', value: Number.POSITIVE_INFINITY },
      { trait: 'needles-per-fascicle', values: [9] },
    ]);
    expect(problems.map((problem) => problem.code)).to.deep.equal(['not-finite', 'unknown-value']);
    expect(validateObservations(compiled, [{ trait: 'needle-length', value: -2 }])[0].code).to.equal('negative');
    expect(validateObservations(compiled, [{ trait: 'needle-length', value: 6, unit: 'ft' }])[0]).to.include({ field: 'unit', code: 'bad-unit' });
    expect(validateObservations(compiled, 'foliage')[0].code).to.equal('not-a-list');
    expect(validateObservations(compiled, [null])[0]).to.include({ index: 0, field: 'observation', code: 'not-an-object' });
  });
});

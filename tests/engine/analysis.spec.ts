import { expect } from 'chai';
import fc from 'fast-check';
import { buildKey, compare, compileMatrix, diagnose, generateSyntheticMatrix, health, keyToLines, type KeyNode, type MatrixDocument } from '@shared/engine';
import { loadReferenceMatrix } from '../../seeds/load-matrix';
import { southernTreesMatrix, taxon } from './fixtures';

function leaves(node: KeyNode): string[][] {
  if (node.kind === 'taxa') return [node.taxa];
  return node.leads.flatMap((lead) => leaves(lead.next));
}

function couplets(node: KeyNode): Array<Extract<KeyNode, { kind: 'couplet' }>> {
  if (node.kind === 'taxa') return [];
  return [node, ...node.leads.flatMap((lead) => couplets(lead.next))];
}

describe('compare', () => {
  const compiled = compileMatrix(southernTreesMatrix());

  it('sorts traits into separating, overlapping, same and not coded', () => {
    const result = compare(compiled, ['pinus-taeda', 'pinus-strobus']);
    const verdict = (code: string): string | undefined =>
      [...result.separating, ...result.overlapping, ...result.same, ...result.notCoded].find((item) => item.trait === code)?.verdict;
    // loblolly 3 needles vs white pine 5 (Flora of North America vol. 2, from memory)
    expect(verdict('needles-per-fascicle')).to.equal('separates');
    // typical lengths 12–18 vs 6–10 cm are disjoint, but loblolly's typical range reaches white pine's recorded 13 cm
    expect(verdict('needle-length')).to.equal('separates');
    const entry = (code: string) => result.separating.find((item) => item.trait === code);
    expect(entry('needles-per-fascicle')?.strength).to.equal('reliable');
    expect(entry('needle-length')?.strength).to.equal('usual');
    expect(result.separating.map((item) => item.strength)).to.deep.equal(['reliable', 'reliable', 'usual']);
    expect(verdict('foliage')).to.equal('same');
    expect(verdict('terminal-bud')).to.equal('same');
    expect(result.separating.find((item) => item.trait === 'needles-per-fascicle')?.cells['pinus-strobus']).to.deep.equal({ usual: [5] });
  });

  it('reports a trait not coded for one of the taxa as not coded', () => {
    const doc = southernTreesMatrix();
    doc.taxa[0].cells['bark-texture'] = 'unknown';
    const result = compare(compileMatrix(doc), ['pinus-taeda', 'pinus-strobus']);
    expect(result.notCoded.map((item) => item.trait)).to.include('bark-texture');
  });
});

describe('diagnose', () => {
  const compiled = compileMatrix(southernTreesMatrix());

  it('finds a small set of traits that separates a taxon from the others', () => {
    const result = diagnose(compiled, 'pinus-strobus');
    expect(result.unseparated).to.deep.equal([]);
    const covered = new Set(result.traits.flatMap((item) => item.separates));
    expect([...covered].sort()).to.deep.equal(
      compiled.taxa
        .map((info) => info.id)
        .filter((id) => id !== 'pinus-strobus')
        .sort(),
    );
    // needle bundles of 5 alone separate white pine from every other taxon here
    expect(result.traits.map((item) => item.trait)).to.deep.equal(['needles-per-fascicle']);
  });

  it('separates by usual values what nothing separates reliably', () => {
    const result = diagnose(compiled, 'pinus-taeda', ['pinus-taeda', 'pinus-echinata', 'quercus-rubra']);
    expect(result.unseparated).to.deep.equal([]);
    // foliage: needles against broad leaves, the easiest reliable separator
    expect(result.traits[0]).to.include({ trait: 'foliage', strength: 'reliable' });
    expect(result.traits[0].separations).to.deep.equal([{ taxonId: 'quercus-rubra', strength: 'reliable' }]);
    // shortleaf shows loblolly's 3 needles occasionally, and loblolly's typical length reaches shortleaf's recorded extreme
    expect(result.traits[1].separations).to.deep.equal([{ taxonId: 'pinus-echinata', strength: 'usual' }]);
    expect(result.traits[1].strength).to.equal('usual');
    expect(result.traits[1].text).to.match(/usually sets it apart from pinus-echinata/);
    expect(result.traits).to.have.length(2);
  });

  it('names the taxa nothing separates, not even by usual values', () => {
    const doc = southernTreesMatrix();
    doc.taxa[1].cells['needles-per-fascicle'] = { usual: [2, 3] };
    doc.taxa[1].cells['needle-length'] = { min: 6, low: 7, high: 12, max: 13 };
    const result = diagnose(compileMatrix(doc), 'pinus-taeda', ['pinus-taeda', 'pinus-echinata', 'quercus-rubra']);
    expect(result.unseparated).to.deep.equal(['pinus-echinata']);
    expect(result.traits.map((item) => item.separates)).to.deep.equal([['quercus-rubra']]);
  });
});

describe('health', () => {
  it('finds inseparable and weakly separated pairs, empty cells, useless traits, out-of-order ranges and appliesWhen violations', () => {
    const doc = southernTreesMatrix();
    doc.taxa[0].cells['needle-length'] = { min: 10, low: 18, high: 12, max: 23 };
    // longleaf's typical range now overlaps loblolly's, and nothing else tells them apart
    doc.taxa[2].cells['needle-length'] = { min: 10, low: 15, high: 38, max: 45 };
    doc.taxa[4].cells['needles-per-fascicle'] = { usual: [3] };
    // a twin of northern red oak whose only difference is bark, which is not coded for the red oak
    doc.taxa.push(taxon('quercus-falcata', structuredClone(doc.taxa[5].cells)));
    delete doc.taxa[5].cells['bark-texture'];
    doc.traits.push({
      code: 'crown-form',
      label: 'Crown form',
      part: 'form',
      kind: 'state',
      season: 'any',
      ease: 1,
      errorRate: 0.1,
      values: [{ code: 'vase', label: 'Vase' }],
    });
    // bark colour separates the two white oaks by usual value only: each shows the other's colour occasionally
    doc.traits.push({
      code: 'bark-color',
      label: 'Bark colour',
      part: 'bark',
      kind: 'state',
      season: 'any',
      ease: 1,
      errorRate: 0.2,
      values: [
        { code: 'grey', label: 'Grey' },
        { code: 'brown', label: 'Brown' },
      ],
    });
    for (const entry of doc.taxa) {
      entry.cells['crown-form'] = { usual: ['vase'] };
      entry.cells['bark-color'] = { usual: ['grey'], occasional: ['brown'] };
    }
    doc.taxa[4].cells['bark-color'] = { usual: ['brown'], occasional: ['grey'] };
    doc.inseparable = [{ taxa: ['quercus-falcata', 'quercus-rubra'], reason: 'overlapping codings in this test' }];
    const report = health(compileMatrix(doc));
    expect(report.inseparablePairs).to.deep.equal([
      { taxa: ['pinus-taeda', 'pinus-palustris'], known: false },
      { taxa: ['quercus-rubra', 'quercus-falcata'], known: true, reason: 'overlapping codings in this test' },
    ]);
    // shortleaf shows 3 needles occasionally and its recorded extremes reach the others' typical lengths
    expect(report.weaklySeparated).to.deep.equal([
      { taxa: ['pinus-taeda', 'pinus-echinata'], traits: ['needles-per-fascicle', 'needle-length'] },
      { taxa: ['pinus-echinata', 'pinus-palustris'], traits: ['needles-per-fascicle', 'needle-length'] },
    ]);
    expect(report.emptyCells).to.deep.equal([{ taxon: 'quercus-rubra', traits: ['bark-texture'] }]);
    // bark colour separates only by usual values and still counts; crown form separates nobody
    expect(report.traitsSeparatingNothing).to.deep.equal(['crown-form']);
    expect(report.rangesOutOfOrder).to.deep.equal([{ taxon: 'pinus-taeda', trait: 'needle-length', cell: { min: 10, low: 18, high: 12, max: 23 } }]);
    expect(report.appliesWhenViolations).to.deep.equal([{ taxon: 'quercus-alba', trait: 'needles-per-fascicle', condition: 'foliage is needle' }]);
    expect(report.warnings.map((warning) => warning.code)).to.include.members(['range-out-of-order', 'applies-when-violation']);
  });

  it('lists a trait that separates nothing even by usual values', () => {
    const doc = southernTreesMatrix();
    doc.traits.push({
      code: 'bark-color',
      label: 'Bark colour',
      part: 'bark',
      kind: 'state',
      season: 'any',
      ease: 1,
      errorRate: 0.2,
      values: [
        { code: 'grey', label: 'Grey' },
        { code: 'brown', label: 'Brown' },
      ],
    });
    // every taxon usually grey: the occasional brown of some is no separation at all
    for (const entry of doc.taxa) entry.cells['bark-color'] = { usual: ['grey'] };
    doc.taxa[0].cells['bark-color'] = { usual: ['grey'], occasional: ['brown'] };
    doc.taxa[6].cells['bark-color'] = 'unknown';
    expect(health(compileMatrix(doc)).traitsSeparatingNothing).to.deep.equal(['bark-color']);
  });

  it('sorts every pair of a random matrix the way compare and diagnose do', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 2, max: 10 }), fc.integer({ min: 1, max: 6 }), (seed, taxa, traits) => {
        const compiled = compileMatrix(generateSyntheticMatrix({ seed, taxa, traits, unknownRate: 0.2, multiValueRate: 0.5, conditionalShare: 0.2 }));
        const report = health(compiled);
        const key = (ids: readonly string[]): string => ids.join('/');
        const inseparable = new Set(report.inseparablePairs.map((pair) => key(pair.taxa)));
        const weakly = new Map(report.weaklySeparated.map((pair) => [key(pair.taxa), pair.traits]));
        const useful = new Set<string>();
        for (let a = 0; a < compiled.taxonCount; a++) {
          for (let b = a + 1; b < compiled.taxonCount; b++) {
            const ids = [compiled.taxa[a].id, compiled.taxa[b].id];
            const result = compare(compiled, ids);
            for (const entry of result.separating) useful.add(entry.trait);
            const reliable = result.separating.filter((entry) => entry.strength === 'reliable');
            const usual = result.separating.filter((entry) => entry.strength === 'usual').map((entry) => entry.trait);
            expect(inseparable.has(key(ids)), key(ids)).to.equal(result.separating.length === 0);
            expect(inseparable.has(key(ids))).to.equal(diagnose(compiled, ids[0], [ids[1]]).unseparated.length === 1);
            expect(weakly.get(key(ids)), key(ids)).to.deep.equal(reliable.length === 0 && usual.length > 0 ? usual : undefined);
          }
        }
        expect(report.traitsSeparatingNothing).to.deep.equal(compiled.traits.map((trait) => trait.code).filter((code) => !useful.has(code)));
      }),
      { numRuns: 40 },
    );
  });

  it('finds no inseparable pair in the reference matrix that the matrix does not list', () => {
    const doc = loadReferenceMatrix();
    const listed = new Set((doc.inseparable ?? []).map((pair) => [...pair.taxa].sort().join('/')));
    const compiled = compileMatrix(doc);
    const report = health(compiled);
    const unlisted = report.inseparablePairs.filter((pair) => !listed.has([...pair.taxa].sort().join('/')));
    expect(unlisted, 'inseparable pairs not in inseparable.json').to.deep.equal([]);
    expect(report.inseparablePairs.every((pair) => pair.known)).to.equal(true);
    // every weakly separated pair really has a usual-strength separator and no reliable one
    for (const pair of report.weaklySeparated) {
      const strengths = compare(compiled, pair.taxa).separating.map((entry) => entry.strength);
      expect(strengths, pair.taxa.join(' / ')).to.not.include('reliable');
      expect(pair.traits, pair.taxa.join(' / ')).to.not.be.empty;
    }
  });

  it('copes with an empty matrix', () => {
    const empty: MatrixDocument = { format: 'sylvasift-matrix', version: 1, title: 'Empty', traits: [], taxa: [] };
    const report = health(compileMatrix(empty));
    expect(report.inseparablePairs).to.deep.equal([]);
    expect(report.weaklySeparated).to.deep.equal([]);
    expect(report.emptyShare).to.equal(0);
  });
});

describe('buildKey', () => {
  const compiled = compileMatrix(southernTreesMatrix());

  it('builds a two-way key whose couplets use one trait each and reach every taxon', () => {
    const ids = compiled.taxa.map((info) => info.id);
    const key = buildKey(compiled, ids);
    const reached = new Set(leaves(key.root).flat());
    expect([...reached].sort()).to.deep.equal([...ids].sort());
    for (const couplet of couplets(key.root)) {
      expect(couplet.leads).to.have.length(2);
      expect(couplet.leads[0].trait).to.equal(couplet.trait);
      expect(couplet.leads[1].trait).to.equal(couplet.trait);
    }
    expect(key.couplets).to.equal(couplets(key.root).length);
    // the first couplet splits needles from broad leaves: 4 pines against 3 broadleaves
    expect(key.root.kind === 'couplet' && key.root.trait).to.equal('foliage');
  });

  it('ends in a lead naming several taxa when nothing splits them', () => {
    const sortedEnds = (node: KeyNode) => leaves(node).map((end) => [...end].sort());
    // Contrast: loblolly and shortleaf differ in typical needle length (12–18 against 7–11 cm), so
    // each gets an end of its own.
    const pair = buildKey(compiled, ['pinus-taeda', 'pinus-echinata']);
    expect(sortedEnds(pair.root)).to.have.deep.members([['pinus-echinata'], ['pinus-taeda']]);
    const foliage = compiled.traits[0];
    expect(foliage.code).to.equal('foliage');
    const identical: MatrixDocument = {
      format: 'sylvasift-matrix',
      version: 1,
      title: 'Twins',
      traits: [
        {
          code: foliage.code,
          label: foliage.label,
          part: foliage.part,
          kind: foliage.kind,
          season: foliage.season,
          ease: foliage.ease,
          errorRate: foliage.codedErrorRate,
          values: foliage.values,
        },
      ],
      taxa: [taxon('twin-a', { foliage: { usual: ['needle'] } }), taxon('twin-b', { foliage: { usual: ['needle'] } })],
    };
    const twins = buildKey(compileMatrix(identical), ['twin-a', 'twin-b']);
    expect(twins.root).to.deep.equal({ kind: 'taxa', taxa: ['twin-a', 'twin-b'] });
    expect(twins.couplets).to.equal(0);
    // Below a couplet too: a broadleaf is keyed out and the twins share the other lead.
    const withBroadleaf = { ...identical, taxa: [...identical.taxa, taxon('broadleaf', { foliage: { usual: ['broad'] } })] };
    const three = buildKey(compileMatrix(withBroadleaf), ['twin-a', 'twin-b', 'broadleaf']);
    expect(sortedEnds(three.root)).to.have.deep.members([['twin-a', 'twin-b'], ['broadleaf']]);
    expect(three.couplets).to.equal(1);
  });

  it('prints numbered couplets', () => {
    const lines = keyToLines(
      compiled,
      buildKey(
        compiled,
        compiled.taxa.map((info) => info.id),
      ),
    );
    expect(lines[0]).to.match(/^1a\. Foliage form: .+ → \d+$|^1a\. Foliage form: .+ → .+$/);
    expect(lines[1]).to.match(/^1b\. /);
  });

  it('keys out every taxon of random matrices, with balanced first splits', () => {
    for (let seed = 1; seed <= 5; seed++) {
      const random = compileMatrix(generateSyntheticMatrix({ taxa: 40, traits: 15, seed }));
      const ids = random.taxa.map((info) => info.id);
      const key = buildKey(random, ids);
      const reached = new Set(leaves(key.root).flat());
      expect(reached.size).to.equal(ids.length);
      for (const couplet of couplets(key.root)) {
        const sizes = couplet.leads.map((lead) => new Set(leaves(lead.next).flat()).size);
        const parent = new Set(leaves(couplet).flat()).size;
        expect(Math.max(...sizes)).to.be.lessThan(parent);
      }
    }
  });
});

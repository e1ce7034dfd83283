/**
 * The matrix loader: one document from traits.json, every taxon file and inseparable.json.
 */
import { expect } from 'chai';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { isAbsolute, join } from 'node:path';
import type { Taxon } from '@shared/engine';
import { ILLUSTRATIONS_DIR, loadReferenceMatrix } from '../../seeds/load-matrix';
import { REPO_DIR, TAXA_DIR } from './matrix-facts';

describe('loadReferenceMatrix', () => {
  const doc = loadReferenceMatrix();

  it('returns a version 1 sylvasift matrix with the title and region of traits.json', () => {
    const traitsFile = JSON.parse(readFileSync(join(REPO_DIR, 'seeds', 'matrix', 'traits.json'), 'utf8')) as { title: string; region: string };
    expect(doc.format).to.equal('sylvasift-matrix');
    expect(doc.version).to.equal(1);
    expect(doc.title).to.equal(traitsFile.title);
    expect(doc.region).to.equal('Eastern and southeastern United States');
  });

  it('reads every taxon file, and sorts the taxa by id', () => {
    const files = readdirSync(TAXA_DIR).filter((name) => name.endsWith('.json'));
    expect(files).to.include.members(['conifers.json', 'fagaceae.json', 'juglandaceae.json']);
    const ids = files.flatMap((name) => (JSON.parse(readFileSync(join(TAXA_DIR, name), 'utf8')) as { taxa: Taxon[] }).taxa.map((t) => t.id));
    expect(doc.taxa.map((t) => t.id)).to.deep.equal([...ids].sort());
  });

  it('carries the inseparable pairs', () => {
    const file = JSON.parse(readFileSync(join(REPO_DIR, 'seeds', 'matrix', 'inseparable.json'), 'utf8')) as { inseparable: unknown[] };
    expect(doc.inseparable).to.deep.equal(file.inseparable);
  });

  it('gives the same document on every call', () => {
    expect(loadReferenceMatrix()).to.deep.equal(doc);
  });

  it('exports the absolute path of the drawings folder', () => {
    expect(isAbsolute(ILLUSTRATIONS_DIR)).to.be.true;
    expect(ILLUSTRATIONS_DIR).to.equal(join(REPO_DIR, 'seeds', 'illustrations'));
    expect(existsSync(ILLUSTRATIONS_DIR)).to.be.true;
  });
});

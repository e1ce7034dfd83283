/**
 * The coded matrix against published figures: pine needles and cones, conifer needle attachment,
 * oak sections, hickory and walnut leaflets and pith, which genera are opposite-leaved, and the
 * scientific names with their authorities.
 *
 * Every published figure below was written down from memory of the printed source named beside
 * it; where two sources disagree both are listed and the coding must cover both.
 */
import { expect } from 'chai';
import { isDiscreteCell, isNumericCell, type MatrixDocument, type Taxon } from '@shared/engine';
import { loadReferenceMatrix } from '../../seeds/load-matrix';
import { genusOf, valuesOf } from './matrix-facts';

const doc: MatrixDocument = loadReferenceMatrix();
const taxonById = new Map(doc.taxa.map((taxon) => [taxon.id, taxon]));

function taxon(id: string): Taxon {
  const found = taxonById.get(id);
  if (!found) throw new Error(`taxon ${id} missing from the matrix`);
  return found;
}

/**
 * A published range in cm: the main range, and the parenthesised extremes where the source gives them.
 * `span` marks a figure read as the whole span (extremes only), not as the main range.
 */
interface Published {
  source: string;
  low: number;
  high: number;
  min?: number;
  max?: number;
  span?: true;
}

const FNA2 = 'Flora of North America vol. 2, Pinus (from memory)';
const DENDRO = 'Harlow, Harrar et al., Textbook of Dendrology (from memory)';

/**
 * Needle length and seed-cone length (cm) and needles per bundle of the southern pines and eastern
 * white pine. `usualCounts` are the counts the sources give without qualification; `otherCounts`
 * those they give as "sometimes" or in parentheses.
 */
const PINES: Record<string, { needle: Published[]; cone: Published[]; usualCounts: number[]; otherCounts: number[]; countSource: string }> = {
  'pinus-taeda': {
    // The flora pools measurements over the whole range, so its shorter needles and cones overlap
    // shortleaf pine; the dendrology text gives the figures foresters separate the two by. Its ranges
    // are the typical ones and the flora's are read as the whole span (extremes only).
    needle: [{ source: FNA2, low: 12, high: 18, min: 10, max: 22, span: true }, { source: DENDRO, low: 15, high: 23 }],
    cone: [{ source: FNA2, low: 6, high: 12, span: true }, { source: DENDRO, low: 7.5, high: 15 }],
    // FNA vol. 2 gives "3(–2)" per fascicle; the dendrology text gives 3, rarely 2 (both from memory).
    usualCounts: [3], otherCounts: [2], countSource: `${FNA2}; ${DENDRO}`,
  },
  'pinus-echinata': {
    // As for loblolly: the dendrology text's 7.5–12.5 cm is the typical range, the flora's (7–)11(–13) cm the span.
    needle: [{ source: FNA2, low: 7, high: 11, max: 13, span: true }, { source: DENDRO, low: 7.5, high: 12.5 }],
    cone: [{ source: FNA2, low: 4, high: 6, max: 7 }],
    usualCounts: [2, 3], otherCounts: [], countSource: FNA2,
  },
  'pinus-palustris': {
    needle: [{ source: FNA2, low: 20, high: 45 }, { source: DENDRO, low: 20, high: 45 }],
    cone: [{ source: FNA2, low: 15, high: 25 }],
    usualCounts: [3], otherCounts: [], countSource: FNA2,
  },
  'pinus-elliottii': {
    needle: [{ source: FNA2, low: 18, high: 23 }, { source: DENDRO, low: 18, high: 25 }],
    cone: [{ source: FNA2, low: 9, high: 18 }, { source: DENDRO, low: 7.5, high: 15 }],
    usualCounts: [2, 3], otherCounts: [], countSource: FNA2,
  },
  'pinus-virginiana': {
    needle: [{ source: FNA2, low: 3, high: 8 }, { source: DENDRO, low: 3.8, high: 7.5 }],
    cone: [{ source: FNA2, low: 4, high: 7 }],
    usualCounts: [2], otherCounts: [], countSource: FNA2,
  },
  'pinus-rigida': {
    needle: [{ source: FNA2, low: 7, high: 10, min: 5, max: 14 }, { source: DENDRO, low: 7.5, high: 12.5 }],
    cone: [{ source: FNA2, low: 3, high: 7, max: 9 }, { source: DENDRO, low: 4, high: 7.5 }],
    usualCounts: [3], otherCounts: [], countSource: FNA2,
  },
  'pinus-serotina': {
    needle: [{ source: FNA2, low: 15, high: 20, max: 25 }, { source: DENDRO, low: 15, high: 20 }],
    cone: [{ source: FNA2, low: 5, high: 8 }, { source: DENDRO, low: 5, high: 6.5 }],
    usualCounts: [3], otherCounts: [4], countSource: FNA2,
  },
  'pinus-glabra': {
    needle: [{ source: FNA2, low: 4, high: 10 }, { source: DENDRO, low: 4, high: 7.5 }],
    // The Virginia Tech Dendrology fact sheet (stored page) gives cones 1–2 in (2.5–5 cm), read as the span.
    cone: [{ source: FNA2, low: 3.5, high: 7 }, { source: 'Virginia Tech Dendrology fact sheet, Pinus glabra', low: 2.5, high: 5, span: true }],
    usualCounts: [2], otherCounts: [], countSource: FNA2,
  },
  'pinus-pungens': {
    needle: [{ source: FNA2, low: 3, high: 6, max: 8 }, { source: DENDRO, low: 3.8, high: 6.5 }],
    cone: [{ source: FNA2, low: 6, high: 9, max: 11 }, { source: DENDRO, low: 5, high: 9 }],
    usualCounts: [2], otherCounts: [3], countSource: FNA2,
  },
  'pinus-strobus': {
    // FNA vol. 2 gives (5–)6–10(–13) cm (from memory). The dendrology text's 5–13 cm (from memory) is
    // read as the whole span: it is the flora's extremes, and the two cannot both be the main range.
    needle: [{ source: FNA2, low: 6, high: 10, min: 5, max: 13 }, { source: DENDRO, low: 5, high: 13, span: true }],
    cone: [{ source: FNA2, low: 8, high: 16, max: 20 }, { source: DENDRO, low: 10, high: 20 }],
    usualCounts: [5], otherCounts: [], countSource: FNA2,
  },
};

/**
 * A coded range agrees with its sources when its typical range is the span of the sources' main
 * ranges, and its extremes cover every source's extremes and no more.
 */
function expectRangeAgrees(id: string, trait: string, published: Published[]): void {
  const cell = taxon(id).cells[trait];
  if (!isNumericCell(cell)) expect.fail(`${id}.${trait} is ${JSON.stringify(cell)}, not a range`);
  const outerLow = Math.min(...published.map((p) => p.min ?? p.low));
  const outerHigh = Math.max(...published.map((p) => p.max ?? p.high));
  for (const p of published) {
    const label = `${id}.${trait} against ${p.source}`;
    if (!p.span) {
      expect(cell.low, `${label}: typical low`).to.be.at.most(p.low);
      expect(cell.high, `${label}: typical high`).to.be.at.least(p.high);
    }
    expect(cell.min, `${label}: extreme low`).to.be.at.most(p.min ?? p.low);
    expect(cell.max, `${label}: extreme high`).to.be.at.least(p.max ?? p.high);
  }
  expect(cell.min, `${id}.${trait}: lower than any source`).to.be.at.least(outerLow);
  expect(cell.max, `${id}.${trait}: higher than any source`).to.be.at.most(outerHigh);
  // The typical range is exactly the span of the sources' main ranges: a typical range stretched to an
  // extreme would score a rare length as usual.
  const mains = published.filter((p) => !p.span);
  expect(mains, `${id}.${trait}: no source gives a main range`).to.not.be.empty;
  expect(cell.low, `${id}.${trait}: typical low below every source's main range`).to.equal(Math.min(...mains.map((p) => p.low)));
  expect(cell.high, `${id}.${trait}: typical high above every source's main range`).to.equal(Math.max(...mains.map((p) => p.high)));
}

describe('published values: pines', () => {
  for (const [id, facts] of Object.entries(PINES)) {
    describe(id, () => {
      it(`needle length agrees with ${facts.needle.map((p) => p.source.split(',')[0]).join(' and ')}`, () => {
        expectRangeAgrees(id, 'needle-length', facts.needle);
      });

      it(`seed-cone length agrees with ${facts.cone.map((p) => p.source.split(',')[0]).join(' and ')}`, () => {
        expectRangeAgrees(id, 'cone-length', facts.cone);
      });

      it('needles per bundle agree with the published counts', () => {
        // source: see countSource in the table above
        const cell = taxon(id).cells['needles-per-fascicle'];
        if (!isDiscreteCell(cell)) expect.fail(`${id}.needles-per-fascicle is ${JSON.stringify(cell)}, not a value set`);
        expect(cell.usual ?? [], facts.countSource).to.have.members(facts.usualCounts);
        expect(valuesOf(cell), facts.countSource).to.include.members([...facts.usualCounts, ...facts.otherCounts]);
        for (const count of valuesOf(cell)) {
          expect([...facts.usualCounts, ...facts.otherCounts], `${id}: count ${count} is in no source`).to.include(count);
        }
      });

      it('holds its needles in sheathed bundles', () => {
        // Flora of North America vol. 2, Pinus genus description: leaves in fascicles with a sheath (from memory)
        const cell = taxon(id).cells['needle-attachment'];
        expect(isDiscreteCell(cell) ? cell.usual : cell).to.deep.equal(['sheathed-bundle']);
      });
    });
  }

  it('codes the published contrasts of the southern pines', () => {
    // Flora of North America vol. 2 (from memory): longleaf has the longest needles and cones of the
    // eastern pines; slash pine cones stand on short stalks while loblolly cones are sessile.
    const typicalHigh = (id: string, trait: string) => {
      const cell = taxon(id).cells[trait];
      return isNumericCell(cell) ? cell.high : NaN;
    };
    for (const id of Object.keys(PINES).filter((other) => other !== 'pinus-palustris')) {
      expect(typicalHigh('pinus-palustris', 'needle-length'), id).to.be.greaterThan(typicalHigh(id, 'needle-length'));
      expect(typicalHigh('pinus-palustris', 'cone-length'), id).to.be.greaterThan(typicalHigh(id, 'cone-length'));
    }
    const usual = (id: string, trait: string) => {
      const cell = taxon(id).cells[trait];
      return isDiscreteCell(cell) ? cell.usual : cell;
    };
    expect(usual('pinus-elliottii', 'cone-stalk')).to.deep.equal(['stalked']);
    expect(usual('pinus-taeda', 'cone-stalk')).to.deep.equal(['sessile']);
    // eastern white pine cones are unarmed, loblolly cone scales carry a stout sharp prickle (same source)
    expect(usual('pinus-strobus', 'cone-scale-tip')).to.deep.equal(['unarmed']);
    expect(usual('pinus-taeda', 'cone-scale-tip')).to.deep.equal(['sharp-prickle']);
  });
});

describe('published values: other conifers', () => {
  // Flora of North America vol. 2, genus descriptions (from memory): spruce needles sit on woody
  // pegs, fir needles on round sucker-like bases, hemlock needles on short stalks; bald cypress
  // leaves run straight down the twig. All carry single needles, not bundles.
  const attachment: Record<string, string> = {
    'picea-rubens': 'peg',
    'abies-fraseri': 'suction-cup',
    'tsuga-canadensis': 'short-stalk',
    'taxodium-distichum': 'direct',
    'taxodium-ascendens': 'direct',
  };
  for (const [id, expected] of Object.entries(attachment)) {
    it(`${id}: single needles attached ${expected}`, () => {
      const cells = taxon(id).cells;
      const how = cells['needle-attachment'];
      const count = cells['needles-per-fascicle'];
      expect(isDiscreteCell(how) ? how.usual : how).to.deep.equal([expected]);
      expect(isDiscreteCell(count) ? count.usual : count).to.deep.equal([1]);
    });
  }

  it('codes the berry-like cone of redcedar, the round cones of cypresses and white-cedar', () => {
    // Flora of North America vol. 2, Cupressaceae (from memory)
    const fruit = (id: string) => {
      const cell = taxon(id).cells['fruit-type'];
      return isDiscreteCell(cell) ? cell.usual : cell;
    };
    expect(fruit('juniperus-virginiana')).to.deep.equal(['berry-like-cone']);
    expect(fruit('chamaecyparis-thyoides')).to.deep.equal(['round-cone']);
    expect(fruit('taxodium-distichum')).to.deep.equal(['round-cone']);
    expect(fruit('thuja-occidentalis')).to.deep.equal(['woody-cone']);
  });
});

describe('published values: oaks, hickories and walnuts', () => {
  // Flora of North America vol. 3, Quercus (from memory): the red oaks (section Lobatae) have
  // bristle-tipped lobes, teeth or blade tips; the white oaks (section Quercus) never do.
  const RED_OAKS = ['rubra', 'nigra', 'phellos', 'falcata', 'velutina', 'coccinea', 'shumardii', 'laurifolia', 'marilandica', 'pagoda', 'palustris', 'imbricaria'];
  const WHITE_OAKS = ['alba', 'virginiana', 'stellata', 'montana', 'michauxii', 'lyrata', 'macrocarpa', 'muehlenbergii'];

  it('gives every red oak bristle tips', () => {
    for (const name of RED_OAKS) {
      const cell = taxon(`quercus-${name}`).cells['lobe-tips'];
      expect(isDiscreteCell(cell) ? cell.usual : cell, name).to.include('bristle-tipped');
    }
  });

  it('gives no white oak bristle tips', () => {
    for (const name of WHITE_OAKS) {
      const cell = taxon(`quercus-${name}`).cells['lobe-tips'];
      expect(isDiscreteCell(cell) ? valuesOf(cell) : cell, name).to.not.include('bristle-tipped');
    }
  });

  it('codes the bur oak fringed cup and the overcup oak cup that nearly encloses the nut', () => {
    // Flora of North America vol. 3, Quercus macrocarpa and Q. lyrata (from memory)
    const cap = (id: string) => {
      const cell = taxon(id).cells['acorn-cap'];
      return isDiscreteCell(cell) ? cell.usual : cell;
    };
    expect(cap('quercus-macrocarpa')).to.include('fringed');
    expect(cap('quercus-lyrata')).to.include('deep');
    expect(cap('quercus-alba')).to.not.include('deep');
  });

  // Leaflets per leaf. `usual` is the span of the counts coded usual, `all` the span of every count
  // coded; both must equal the cited figures, so the coding reaches what the sources give and no further.
  const FNA3 = 'Flora of North America vol. 3, Juglandaceae (from memory)';
  // Sargent, Manual of the Trees of North America, 2nd ed. (1922), key to Carya: pecan leaflets 9–17,
  // shagbark "5 or rarely 7" (read from a stored copy of the printed text).
  const SARGENT = 'Sargent, Manual of the Trees of North America, 2nd ed. 1922';
  // Britton & Brown, An Illustrated Flora of the Northern United States vol. 1 (1913), Hicoria pecan:
  // leaflets 11–15 (read from a stored copy of the printed text).
  const BRITTON = 'Britton & Brown, Illustrated Flora of the Northern United States vol. 1, 1913';
  const LEAFLETS: Record<string, { usual: [number, number]; all: [number, number]; source: string }> = {
    // pecan 9–17 (FNA, Sargent); the usual 11–15 after Britton & Brown
    'carya-illinoinensis': { usual: [11, 15], all: [9, 17], source: `${FNA3}; ${SARGENT}; ${BRITTON}` },
    // bitternut 7–11, mostly 7–9
    'carya-cordiformis': { usual: [7, 9], all: [7, 11], source: FNA3 },
    // mockernut 7–9, rarely 5
    'carya-tomentosa': { usual: [7, 9], all: [5, 9], source: FNA3 },
    // shagbark 5 (7)
    'carya-ovata': { usual: [5, 5], all: [5, 7], source: `${FNA3}; ${SARGENT}` },
    // pignut 5 (7)
    'carya-glabra': { usual: [5, 5], all: [5, 7], source: FNA3 },
    // black walnut 15–23 (9–23)
    'juglans-nigra': { usual: [15, 23], all: [9, 23], source: FNA3 },
    // butternut 11–17
    'juglans-cinerea': { usual: [11, 17], all: [11, 17], source: FNA3 },
  };
  for (const [id, expected] of Object.entries(LEAFLETS)) {
    it(`${id}: leaflets ${expected.usual.join('–')} usually, ${expected.all.join('–')} in all`, () => {
      const cell = taxon(id).cells['leaflet-count'];
      if (!isDiscreteCell(cell)) expect.fail(`${id}.leaflet-count is ${JSON.stringify(cell)}, not a value set`);
      const usual = (cell.usual ?? []).map(Number);
      const all = valuesOf(cell).map(Number);
      expect(usual, `${id}: no usual count`).to.not.be.empty;
      expect(Math.min(...usual), `fewest usual (${expected.source})`).to.equal(expected.usual[0]);
      expect(Math.max(...usual), `most usual (${expected.source})`).to.equal(expected.usual[1]);
      expect(Math.min(...all), `fewest (${expected.source})`).to.equal(expected.all[0]);
      expect(Math.max(...all), `most (${expected.source})`).to.equal(expected.all[1]);
    });
  }

  it('gives walnuts a chambered pith and hickories a solid one', () => {
    // Flora of North America vol. 3, Juglandaceae key to genera (from memory)
    const walnuts = doc.taxa.filter((item) => genusOf(item) === 'Juglans');
    const hickories = doc.taxa.filter((item) => genusOf(item) === 'Carya');
    expect(walnuts.map((t) => t.id)).to.have.members(['juglans-cinerea', 'juglans-nigra']);
    expect(hickories.map((t) => t.id)).to.include.members(Object.keys(LEAFLETS).filter((id) => id.startsWith('carya-')));
    for (const t of walnuts) {
      const cell = t.cells['pith'];
      expect(isDiscreteCell(cell) ? cell.usual : cell, t.id).to.deep.equal(['chambered']);
    }
    for (const t of hickories) {
      const cell = t.cells['pith'];
      expect(isDiscreteCell(cell) ? valuesOf(cell) : cell, t.id).to.not.include('chambered');
    }
  });

  it('gives bitternut its sulphur-yellow valvate buds', () => {
    // Harlow, Harrar et al., Textbook of Dendrology, Carya cordiformis (from memory)
    const cells = taxon('carya-cordiformis').cells;
    const color = cells['bud-color'];
    const scales = cells['bud-scales'];
    expect(isDiscreteCell(color) ? color.usual : color).to.deep.equal(['yellow']);
    expect(isDiscreteCell(scales) ? scales.usual : scales).to.deep.equal(['valvate']);
  });
});

describe('published values: opposite-leaved genera', () => {
  // Which common eastern tree genera bear opposite leaves (Catalpa opposite or whorled).
  // common practice, no source
  const OPPOSITE: Record<string, { family: string; allowed: string[] }> = {
    Acer: { family: 'Sapindaceae', allowed: ['opposite'] },
    Aesculus: { family: 'Sapindaceae', allowed: ['opposite'] },
    Fraxinus: { family: 'Oleaceae', allowed: ['opposite'] },
    Cornus: { family: 'Cornaceae', allowed: ['opposite'] },
    Catalpa: { family: 'Bignoniaceae', allowed: ['opposite', 'whorled'] },
    Paulownia: { family: 'Paulowniaceae', allowed: ['opposite'] },
  };
  // Other genera with opposite leaves that a hardwood file might hold. common practice, no source
  const ALSO_OPPOSITE = ['Viburnum', 'Chionanthus', 'Forestiera', 'Osmanthus', 'Cephalanthus', 'Ligustrum', 'Sambucus', 'Euonymus', 'Staphylea', 'Lonicera'];
  // Cornus alternifolia is the one alternate-leaved dogwood. common practice, no source
  const ALTERNATE_EXCEPTIONS = ['cornus-alternifolia'];

  const usualArrangement = (t: Taxon) => {
    const cell = t.cells['leaf-arrangement'];
    return isDiscreteCell(cell) ? (cell.usual ?? []).map(String) : [];
  };

  for (const [genus, { family, allowed }] of Object.entries(OPPOSITE)) {
    it(`${genus} (${family}) is coded ${allowed.join(' or ')}`, () => {
      const members = doc.taxa.filter((t) => genusOf(t) === genus && !ALTERNATE_EXCEPTIONS.includes(t.id));
      expect(members, `no ${genus} in the matrix`).to.not.be.empty;
      for (const t of members) {
        expect(t.family, t.id).to.equal(family);
        const usual = usualArrangement(t);
        expect(usual, t.id).to.not.be.empty;
        for (const value of usual) expect(allowed, t.id).to.include(value);
      }
    });
  }

  it('codes no other broadleaf genus as usually opposite', () => {
    const opposite = [...Object.keys(OPPOSITE), ...ALSO_OPPOSITE];
    for (const t of doc.taxa) {
      const foliage = t.cells['foliage'];
      if (!isDiscreteCell(foliage) || !(foliage.usual ?? []).includes('broad')) continue;
      if (opposite.includes(genusOf(t)) && !ALTERNATE_EXCEPTIONS.includes(t.id)) continue;
      expect(usualArrangement(t), t.id).to.not.include('opposite');
    }
  });
});

describe('published values: names and authorities', () => {
  // Scientific names and authorities as in USDA Agriculture Handbook 541, Checklist of United States
  // Trees (Little 1979), written down from memory. Three names changed after that checklist; for
  // those the current name and authority follow Flora of North America vols. 2–3 (from memory) and
  // the checklist name is noted.
  const CHECKLIST: Record<string, string> = {
    'Pinus taeda': 'L.',
    'Pinus echinata': 'Mill.',
    'Pinus palustris': 'Mill.',
    'Pinus elliottii': 'Engelm.',
    'Pinus virginiana': 'Mill.',
    'Pinus strobus': 'L.',
    'Pinus rigida': 'Mill.',
    'Pinus serotina': 'Michx.',
    'Pinus glabra': 'Walt.',
    'Pinus pungens': 'Lamb.',
    'Pinus resinosa': 'Ait.',
    'Tsuga canadensis': '(L.) Carr.',
    'Abies fraseri': '(Pursh) Poir.',
    'Picea rubens': 'Sarg.',
    'Juniperus virginiana': 'L.',
    'Taxodium distichum': '(L.) Rich.',
    // checklist: Taxodium distichum var. nutans (Ait.) Sweet; name as in Flora of North America vol. 2 synonymy
    'Taxodium ascendens': 'Brongn.',
    'Chamaecyparis thyoides': '(L.) B.S.P.',
    'Thuja occidentalis': 'L.',
    'Quercus alba': 'L.',
    'Quercus rubra': 'L.',
    'Quercus nigra': 'L.',
    'Quercus phellos': 'L.',
    'Quercus virginiana': 'Mill.',
    'Quercus falcata': 'Michx.',
    'Quercus stellata': 'Wangenh.',
    'Quercus velutina': 'Lam.',
    'Quercus coccinea': 'Muenchh.',
    // checklist: Quercus prinus L.; current name per Flora of North America vol. 3
    'Quercus montana': 'Willd.',
    'Quercus michauxii': 'Nutt.',
    'Quercus lyrata': 'Walt.',
    'Quercus shumardii': 'Buckl.',
    'Quercus laurifolia': 'Michx.',
    'Quercus marilandica': 'Muenchh.',
    // checklist: Quercus falcata var. pagodifolia Ell.; current name per Flora of North America vol. 3
    'Quercus pagoda': 'Raf.',
    'Quercus palustris': 'Muenchh.',
    'Quercus macrocarpa': 'Michx.',
    'Quercus muehlenbergii': 'Engelm.',
    'Quercus imbricaria': 'Michx.',
    'Fagus grandifolia': 'Ehrh.',
    'Castanea pumila': '(L.) Mill.',
    'Carya tomentosa': '(Poir.) Nutt.',
    'Carya ovata': '(Mill.) K. Koch',
    'Carya glabra': '(Mill.) Sweet',
    'Carya cordiformis': '(Wangenh.) K. Koch',
    'Carya illinoinensis': '(Wangenh.) K. Koch',
    'Juglans nigra': 'L.',
    'Juglans cinerea': 'L.',
  };
  // The hardwoods (same checklist, from memory).
  const HARDWOOD_CHECKLIST: Record<string, string> = {
    'Liquidambar styraciflua': 'L.',
    'Liriodendron tulipifera': 'L.',
    'Magnolia grandiflora': 'L.',
    'Magnolia virginiana': 'L.',
    'Magnolia acuminata': '(L.) L.',
    'Cornus florida': 'L.',
    'Ilex opaca': 'Ait.',
    'Diospyros virginiana': 'L.',
    'Sassafras albidum': '(Nutt.) Nees',
    'Cercis canadensis': 'L.',
    'Gleditsia triacanthos': 'L.',
    'Robinia pseudoacacia': 'L.',
    'Oxydendrum arboreum': '(L.) DC.',
    'Celtis occidentalis': 'L.',
    'Celtis laevigata': 'Willd.',
    'Betula nigra': 'L.',
    'Betula lenta': 'L.',
    'Ostrya virginiana': '(Mill.) K. Koch',
    'Carpinus caroliniana': 'Walt.',
    'Asimina triloba': '(L.) Dunal',
    'Persea borbonia': '(L.) Spreng.',
    'Catalpa bignonioides': 'Walt.',
    'Albizia julibrissin': 'Durazz.',
    'Toxicodendron vernix': '(L.) Kuntze',
    'Acer rubrum': 'L.',
    'Acer saccharum': 'Marsh.',
    'Acer negundo': 'L.',
    'Fraxinus americana': 'L.',
    'Fraxinus pennsylvanica': 'Marsh.',
    'Nyssa sylvatica': 'Marsh.',
    'Platanus occidentalis': 'L.',
    'Ulmus americana': 'L.',
    'Ulmus alata': 'Michx.',
    'Prunus serotina': 'Ehrh.',
  };
  // The checklist abbreviates some authors more than the current standard forms do (Brummitt &
  // Powell, Authors of Plant Names; from memory); either spelling names the same author.
  const AUTHOR_FORMS: Array<[string, string]> = [
    ['Walt.', 'Walter'],
    ['Ait.', 'Aiton'],
    ['Buckl.', 'Buckley'],
    ['Carr.', 'Carrière'],
    ['B.S.P.', 'Britton, Sterns & Poggenb.'],
    ['Marsh.', 'Marshall'],
  ];
  const normalise = (authority: string) =>
    AUTHOR_FORMS.reduce((text, [short, full]) => text.split(full).join(short), authority).replace(/\s+/g, ' ').trim();

  const byName = new Map(doc.taxa.map((t) => [t.scientificName, t]));

  for (const [name, authority] of Object.entries({ ...CHECKLIST, ...HARDWOOD_CHECKLIST })) {
    it(`${name} ${authority}`, () => {
      const t = byName.get(name);
      expect(t, `${name} missing from the matrix`).to.exist;
      expect(normalise(t?.authority ?? '')).to.equal(authority);
    });
  }

  it('uses the same spelling of an author throughout the matrix', () => {
    // One standard form per author, so a search for an author finds every taxon. common practice, no source
    const authorities = doc.taxa.map((t) => t.authority).join(' ');
    for (const [short, full] of AUTHOR_FORMS) {
      const usesShort = new RegExp(`(^|[ (])${short.replace(/\./g, '\\.')}`).test(authorities);
      const usesFull = authorities.includes(full);
      expect(usesShort && usesFull, `both ${short} and ${full}`).to.be.false;
    }
  });
});

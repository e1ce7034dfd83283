import '@angular/compiler';
import { expect } from 'chai';
import type { Cell } from '@shared/engine';
import { type CellTrait, buildCellForm, cellFromForm, cellProblem, fillCellForm } from './cell-form';

// A numeric cell reads as floras print a measurement, (min–)low–high(–max), the typical range inside the
// extreme one (the way Flora of North America gives needle lengths). The numbers are the seeded loblolly
// pine needle length, 10 (12–23) 23 cm.
const NEEDLE_LENGTH: CellTrait = { kind: 'numeric', values: [], unit: 'cm' };
const NEEDLES_PER_BUNDLE: CellTrait = {
  kind: 'count',
  values: [
    { code: 2, label: '2 per bundle' },
    { code: 3, label: '3 per bundle' },
    { code: 5, label: '5 per bundle' },
  ],
};

function formFor(trait: CellTrait, cell: Cell) {
  const form = buildCellForm(() => trait.kind);
  fillCellForm(form, trait, cell);
  return form;
}

describe('the cell editor form', () => {
  it('gives back the numeric range it was filled with', () => {
    const form = formFor(NEEDLE_LENGTH, { min: 10, low: 12, high: 23, max: 23 });
    expect(form.valid).to.equal(true);
    expect(cellFromForm(form, NEEDLE_LENGTH)).to.deep.equal({ min: 10, low: 12, high: 23, max: 23 });
  });

  it('refuses a range out of order, a missing number and a negative length, saying which', () => {
    const form = formFor(NEEDLE_LENGTH, { min: 10, low: 12, high: 23, max: 23 });
    form.controls.range.controls.low.setValue(30);
    expect(form.valid).to.equal(false);
    expect(cellProblem(form)).to.equal('The range must read smallest ≤ typical from ≤ typical to ≤ largest.');
    form.controls.range.controls.low.setValue(null);
    expect(cellProblem(form, 'in')).to.equal('Give all four numbers of the range, in in.');
    form.controls.range.controls.low.setValue(-1);
    expect(cellProblem(form)).to.equal('Lengths cannot be negative.');
  });

  it('keeps count codes as numbers and each value at its frequency', () => {
    const cell: Cell = { usual: [3], occasional: [2] };
    const form = formFor(NEEDLES_PER_BUNDLE, cell);
    expect(cellFromForm(form, NEEDLES_PER_BUNDLE)).to.deep.equal(cell);
    form.controls.frequencies.controls['5'].setValue('rare');
    expect(cellFromForm(form, NEEDLES_PER_BUNDLE)).to.deep.equal({ usual: [3], occasional: [2], rare: [5] });
  });

  it('needs some value seen unless the cell is unknown or inapplicable, which are different cells', () => {
    const form = formFor(NEEDLES_PER_BUNDLE, {});
    expect(cellProblem(form)).to.match(/at least one value/);
    form.controls.mode.setValue('unknown');
    expect(form.valid).to.equal(true);
    expect(cellFromForm(form, NEEDLES_PER_BUNDLE)).to.equal('unknown');
    expect(cellFromForm(formFor(NEEDLES_PER_BUNDLE, 'inapplicable'), NEEDLES_PER_BUNDLE)).to.equal('inapplicable');
  });
});

import { expect } from 'chai';
import { CENTIMETRES_PER_INCH, convertLength, fromCentimetres, MILLIMETRES_PER_CENTIMETRE, toCentimetres } from '@shared/engine';

describe('length units', () => {
  // NIST SP 811 (2008), Appendix B.8: inch → centimetre, 2.54 exactly (the international inch of 1959).
  it('defines the inch as exactly 2.54 cm', () => {
    expect(CENTIMETRES_PER_INCH).to.equal(2.54);
    expect(toCentimetres(1, 'in')).to.equal(2.54);
    expect(toCentimetres(6, 'in')).to.equal(15.24);
    expect(fromCentimetres(2.54, 'in')).to.equal(1);
  });

  // NIST SP 811 (2008), section 6 / Table 5: the SI prefixes centi (10^-2) and milli (10^-3), so 1 cm = 10 mm.
  it('has 10 millimetres to the centimetre', () => {
    expect(MILLIMETRES_PER_CENTIMETRE).to.equal(10);
    expect(toCentimetres(10, 'mm')).to.equal(1);
    expect(toCentimetres(254, 'mm')).to.equal(25.4);
    expect(fromCentimetres(1, 'mm')).to.equal(10);
  });

  // NIST SP 811: 1 in = 25.4 mm exactly (follows from 2.54 cm and 10 mm/cm).
  it('converts inches to millimetres and back through centimetres', () => {
    expect(convertLength(1, 'in', 'mm')).to.be.closeTo(25.4, 1e-12);
    expect(convertLength(25.4, 'mm', 'in')).to.be.closeTo(1, 1e-12);
    expect(convertLength(7, 'cm', 'cm')).to.equal(7);
  });

  it('rejects a unit it does not know', () => {
    expect(() => toCentimetres(1, 'ft' as 'cm')).to.throw(/Unknown length unit "ft"/);
  });
});

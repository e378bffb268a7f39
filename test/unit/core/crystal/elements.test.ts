import { describe, expect, it } from 'vitest';
import { atomicNumber, elementSymbol } from '../../../../core/crystal';

describe('atomicNumber', () => {
  it('reads symbols in any case: "Au", "AU", "au" -> 79; "O" -> 8; "W" -> 74', () => {
    expect([atomicNumber('Au'), atomicNumber('AU'), atomicNumber('au'), atomicNumber('O'), atomicNumber('W')]).toEqual([79, 79, 79, 8, 74]);
  });

  it('strips CIF charges and label digits: "O2-" -> 8, "Fe3+" -> 26, "Si1" -> 14, "Al2" -> 13', () => {
    expect([atomicNumber('O2-'), atomicNumber('Fe3+'), atomicNumber('Si1'), atomicNumber('Al2')]).toEqual([8, 26, 14, 13]);
  });

  it('falls back to the first letter for labels such as "Oa" and "O1a"; reads D as hydrogen', () => {
    expect([atomicNumber('Oa'), atomicNumber('O1a'), atomicNumber('D')]).toEqual([8, 8, 1]);
  });

  it('reads the ends of the supported range, H (1) and Cf (98)', () => {
    expect([atomicNumber('H'), atomicNumber('Cf')]).toEqual([1, 98]);
  });

  it('throws a RangeError naming the symbol for an unknown element', () => {
    for (const s of ['Xx', '', '12', 'Q']) {
      expect(() => atomicNumber(s)).toThrow(RangeError);
      expect(() => atomicNumber(s)).toThrow(`"${s}"`);
    }
  });

  it('throws a RangeError for elements beyond Cf, which have no tabulated electron scattering factor', () => {
    expect(() => atomicNumber('Es')).toThrow(/"Es".*Z = 99.*beyond Cf/);
    expect(() => atomicNumber('Og')).toThrow(/Z = 118/);
  });
});

describe('elementSymbol', () => {
  it('gives the periodic-table symbol for Z: 1 H, 8 O, 79 Au, 98 Cf, 118 Og', () => {
    expect([1, 8, 79, 98, 118].map(elementSymbol)).toEqual(['H', 'O', 'Au', 'Cf', 'Og']);
  });

  it('is the inverse of atomicNumber for Z = 1..98', () => {
    for (let z = 1; z <= 98; z++) expect(atomicNumber(elementSymbol(z))).toBe(z);
  });

  it('throws a RangeError naming z outside 1..118 or not an integer', () => {
    for (const z of [0, 119, 2.5, Number.NaN]) expect(() => elementSymbol(z)).toThrow(/atomic number z/);
  });
});

/**
 * Cells constrained by their space group (International Tables Vol. A, Table 2.1.2.1)
 * and the metric-invariance test R^T G R = G (International Tables Vol. A, ch. 1.3).
 */
import { describe, expect, it } from 'vitest';
import {
  allSpaceGroupSettings,
  cellRuleFor,
  type CellShorthand,
  cellSymmetryMismatch,
  completeCell,
  findSpaceGroup,
  monoclinicUniqueAxis,
  parseSymmetryOperation,
  type SpaceGroupSetting,
} from '../../../../core/crystal';
import { mulberry32 } from '../../../support/seeded-random';

const ops = (s: SpaceGroupSetting) => s.operations.map(parseSymmetryOperation);
const setting = (symbol: string): SpaceGroupSetting => findSpaceGroup(symbol)!;
const rule = (symbol: string) => cellRuleFor(setting(symbol), ops(setting(symbol)));


describe('monoclinicUniqueAxis', () => {
  it('reads the unique axis b, c or a from the 2-fold axis or the mirror', () => {
    expect(monoclinicUniqueAxis(ops(setting('P 1 21/c 1')))).toBe(1);
    expect(monoclinicUniqueAxis(ops(setting('P 1 1 21/b')))).toBe(2);
    expect(monoclinicUniqueAxis(ops(setting('P 21/b 1 1')))).toBe(0);
    expect(monoclinicUniqueAxis(ops(setting('P 1 m 1')))).toBe(1);
  });

  it('throws when the operations have no axis along a cell edge (triclinic)', () => {
    expect(() => monoclinicUniqueAxis(ops(setting('P -1')))).toThrow(/cannot tell the unique axis/);
  });
});

describe('cellRuleFor', () => {
  it('gives the free parameters of each crystal system', () => {
    expect(rule('Fm-3m').free).toEqual(['a']);
    expect(rule('P42/mnm').free).toEqual(['a', 'c']);
    expect(rule('Pnma').free).toEqual(['a', 'b', 'c']);
    expect(rule('P63/mmc').free).toEqual(['a', 'c']);
    expect(rule('R-3c').free).toEqual(['a', 'c']);
    expect(rule('R-3c:R').free).toEqual(['a', 'alpha']);
    expect(rule('P 1 21/c 1').free).toEqual(['a', 'b', 'c', 'beta']);
    expect(rule('P 1 1 21/b').free).toEqual(['a', 'b', 'c', 'gamma']);
    expect(rule('P-1').free).toEqual(['a', 'b', 'c', 'alpha', 'beta', 'gamma']);
  });
});

describe('completeCell and cellSymmetryMismatch', () => {
  it('completes the cell of every one of 559 settings so that it fits all their operations (seed 20240611)', () => {
    const random = mulberry32(20240611);
    let fits = 0;
    const settings = allSpaceGroupSettings();
    for (const s of settings) {
      const r = cellRuleFor(s, ops(s));
      const given: CellShorthand = {};
      for (const p of r.free) {
        // lengths 3-13 Å; a free monoclinic or rhombohedral angle 60-120 degrees; triclinic
        // angles 80-100 degrees, where any three of them make a valid cell
        given[p] = p.length === 1 ? 3 + 10 * random() : r.free.length === 6 ? 80 + 20 * random() : 60 + 60 * random();
      }
      const cell = completeCell(given, s, r);
      if (cellSymmetryMismatch(cell, ops(s), 1e-12) === undefined) fits++;
    }
    console.log(`completed cells that fit their operations: ${fits} of ${settings.length}`);
    expect(fits).toBe(settings.length);
  });

  it('finds that a cubic group does not fit a tetragonal cell, naming an operation that exchanges a and c', () => {
    const cell = { aA: 4, bA: 4, cA: 4.2, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 };
    expect(cellSymmetryMismatch(cell, ops(setting('Pm-3m')))).toMatch(/does not have the symmetry of operation z,x,y/);
    expect(cellSymmetryMismatch(cell, ops(setting('P4/mmm')))).toBeUndefined();
  });

  it('lets a hexagonal cell with gamma written 120.00 to five figures pass and one 0.5 degrees off fail', () => {
    const hex = (gammaDeg: number) => ({ aA: 3.2094, bA: 3.2094, cA: 5.2105, alphaDeg: 90, betaDeg: 90, gammaDeg });
    expect(cellSymmetryMismatch(hex(120.0), ops(setting('P63/mmc')))).toBeUndefined();
    expect(cellSymmetryMismatch(hex(119.99), ops(setting('P63/mmc')))).toBeUndefined();
    expect(cellSymmetryMismatch(hex(120.5), ops(setting('P63/mmc')))).toMatch(/changes the metric tensor by/);
  });

  it('completeCell names the missing parameter and a contradicting one', () => {
    expect(() => completeCell({ a: 3 }, setting('P63/mmc'), rule('P63/mmc'))).toThrow(/^cell\.c is missing: a hexagonal space group P 63\/m m c needs a, c/);
    expect(() => completeCell({ a: 3, b: 3.1, c: 5 }, setting('P4/mmm'), rule('P4/mmm'))).toThrow(/^cell\.b = 3\.1 contradicts the tetragonal space group/);
    expect(() => completeCell({ a: 3, alpha: 70, beta: 71 }, setting('R-3m:R'), rule('R-3m:R'))).toThrow(/^cell\.beta = 71 contradicts the trigonal \(rhombohedral axes\) space group/);
  });
});

import { describe, expect, it } from 'vitest';
import {
  applyToHkl,
  applyToPoint,
  closeGroup,
  composeOperations,
  findSpaceGroup,
  formatSymmetryOperation,
  IDENTITY_OPERATION,
  operationsEqualModuloLattice,
  parseSymmetryOperation,
} from '../../../../core/crystal';

describe('parseSymmetryOperation', () => {
  it("reads 'x,y,z' as the identity", () => {
    expect(parseSymmetryOperation('x,y,z')).toEqual({ rotation: [1, 0, 0, 0, 1, 0, 0, 0, 1], translation: [0, 0, 0] });
  });

  it("reads '-y+1/4,x+1/4,z+1/4' (a 4-fold screw of F d -3 m, origin 1)", () => {
    expect(parseSymmetryOperation('-y+1/4,x+1/4,z+1/4')).toEqual({
      rotation: [0, -1, 0, 1, 0, 0, 0, 0, 1],
      translation: [0.25, 0.25, 0.25],
    });
  });

  it("reads translation-first '1/2+x,y,-z', hexagonal 'x-y,x,z+1/6', upper case with spaces and decimals", () => {
    expect(parseSymmetryOperation('1/2+x,y,-z')).toEqual({ rotation: [1, 0, 0, 0, 1, 0, 0, 0, -1], translation: [0.5, 0, 0] });
    expect(parseSymmetryOperation('x-y,x,z+1/6')).toEqual({ rotation: [1, -1, 0, 1, 0, 0, 0, 0, 1], translation: [0, 0, 1 / 6] });
    expect(parseSymmetryOperation('X, Y, Z')).toEqual(IDENTITY_OPERATION);
    expect(parseSymmetryOperation('0.5+x,y,z').translation).toEqual([0.5, 0, 0]);
    expect(parseSymmetryOperation(' +x , -Y + 1/2 , 2*z - z ').rotation).toEqual([1, 0, 0, 0, -1, 0, 0, 0, 1]);
  });

  it('wraps translations into [0, 1) and snaps 5-decimal thirds to exact thirds', () => {
    expect(parseSymmetryOperation('-1/4+x,y+1,z-3/2').translation).toEqual([0.75, 0, 0.5]);
    expect(parseSymmetryOperation('x+0.33333,y+0.66667,z+0.16667').translation).toEqual([1 / 3, 2 / 3, 1 / 6]);
  });

  it('throws a RangeError quoting the text and the reason for unreadable operations', () => {
    const cases: Array<[string, RegExp]> = [
      ['x,y', /three comma-separated components, found 2/],
      ['x,y,q', /unexpected "q"/],
      ['x,y,z+0.1', /not a multiple of 1\/24/],
      ['x,x,z', /determinant 0/],
      ['1/2x,y,z', /not an integer/],
      ["'x,y,z'", /unexpected/],
      ['x,,z', /component 2 is empty/],
      ['xy,y,z', /missing \+ or -/],
      ['2x,y,z', /determinant 2/],
    ];
    for (const [text, reason] of cases) {
      expect(() => parseSymmetryOperation(text)).toThrow(RangeError);
      expect(() => parseSymmetryOperation(text)).toThrow(`cannot read symmetry operation "${text}": `);
      expect(() => parseSymmetryOperation(text)).toThrow(reason);
    }
  });
});

describe('formatSymmetryOperation', () => {
  it('writes x, y, z terms in order and the translation last as a reduced fraction', () => {
    expect(formatSymmetryOperation(parseSymmetryOperation('1/2+x,y,-z'))).toBe('x+1/2,y,-z');
    expect(formatSymmetryOperation(parseSymmetryOperation('y-x,-x,z+4/8'))).toBe('-x+y,-x,z+1/2');
    expect(formatSymmetryOperation(parseSymmetryOperation('-Y+0.25, X+0.75, Z'))).toBe('-y+1/4,x+3/4,z');
  });

  it('round-trips every operation of F d -3 m:2, P 63/m m c and R -3 m:H', () => {
    for (const name of ['Fd-3m:2', 'P63/mmc', 'R-3m']) {
      for (const text of findSpaceGroup(name)!.operations) {
        const op = parseSymmetryOperation(text);
        expect(formatSymmetryOperation(op)).toBe(text);
        expect(parseSymmetryOperation(formatSymmetryOperation(op))).toEqual(op);
      }
    }
  });
});

describe('composeOperations', () => {
  it('applies the right operand first: (a.b)(x) = a(b(x))', () => {
    const a = parseSymmetryOperation('-y+1/4,x+1/4,z+1/4');
    const b = parseSymmetryOperation('-x,-y+1/2,z+1/2');
    const p: [number, number, number] = [0.11, 0.23, 0.37];
    const direct = applyToPoint(a, applyToPoint(b, p));
    const composed = applyToPoint(composeOperations(a, b), p);
    composed.forEach((v, i) => expect(Math.abs(((v - direct[i]! + 10.5) % 1) - 0.5)).toBeLessThan(1e-12));
  });

  it('gives the identity modulo the lattice for a 4_1 screw taken four times', () => {
    const s = parseSymmetryOperation('-y,x,z+1/4');
    const four = composeOperations(s, composeOperations(s, composeOperations(s, s)));
    expect(operationsEqualModuloLattice(four, IDENTITY_OPERATION)).toBe(true);
    expect(operationsEqualModuloLattice(composeOperations(s, s), IDENTITY_OPERATION)).toBe(false);
  });
});

describe('closeGroup', () => {
  it('closes the generators of P 4/m m m to its 16 operations, identity first', () => {
    const g = closeGroup(['-y,x,z', 'x,-y,-z', '-x,-y,-z'].map(parseSymmetryOperation));
    expect(g).toHaveLength(16);
    expect(formatSymmetryOperation(g[0]!)).toBe('x,y,z');
    expect(new Set(g.map(formatSymmetryOperation)).size).toBe(16);
  });

  it('adds centring: F-centred translations with the 48 rotations of m-3m give 192', () => {
    const gens = ['-y,x,z', 'x,-y,-z', 'z,x,y', '-x,-y,-z', 'x,y+1/2,z+1/2', 'x+1/2,y,z+1/2'].map(parseSymmetryOperation);
    expect(closeGroup(gens)).toHaveLength(192);
  });

  it('throws a RangeError when more than 192 operations arise (no space group on a conventional cell)', () => {
    const gens = ['x+1/24,y,z', 'x,y+1/24,z'].map(parseSymmetryOperation);
    expect(() => closeGroup(gens)).toThrow(/more than 192/);
    expect(closeGroup(gens, 576)).toHaveLength(576);
  });
});

describe('applyToHkl', () => {
  it('maps h to h R so that (h R).x = h.(R x) for the rotation part', () => {
    const op = parseSymmetryOperation('x-y,x,-z+1/2');
    const h: [number, number, number] = [1, 2, 3];
    const x: [number, number, number] = [0.1, 0.2, 0.3];
    const hr = applyToHkl(op, h);
    const rx = applyToPoint({ rotation: op.rotation, translation: [0, 0, 0] }, x);
    expect(hr[0] * x[0] + hr[1] * x[1] + hr[2] * x[2]).toBeCloseTo(h[0] * rx[0] + h[1] * rx[1] + h[2] * rx[2], 14);
    expect(hr).toEqual([3, -1, -3]);
  });
});

import { describe, expect, it } from 'vitest';
import { findSpaceGroup } from '../../../../core/crystal';

describe('findSpaceGroup', () => {
  it('finds F m -3 m by "Fm-3m", "F m -3 m", "fm-3m", 225 and its Hall symbol', () => {
    for (const q of ['Fm-3m', 'F m -3 m', 'fm-3m', 225, '225', '-F 4 2 3']) {
      const sg = findSpaceGroup(q)!;
      expect(sg.hermannMauguin).toBe('F m -3 m');
      expect(sg.shortSymbol).toBe('Fm-3m');
      expect(sg.number).toBe(225);
      expect(sg.crystalSystem).toBe('cubic');
      expect(sg.laueClass).toBe('m-3m');
      expect(sg.centring).toBe('F');
      expect(sg.operations).toHaveLength(192); // 48 point operations x 4 F-centring translations (ITA Vol. A)
    }
  });

  it('takes origin choice 1 for "Fd-3m" without a suffix, as gemmi does, and origin 2 with ":2"', () => {
    expect(findSpaceGroup('Fd-3m')!.hermannMauguin).toBe('F d -3 m:1');
    expect(findSpaceGroup('F d -3 m:1')!.hermannMauguin).toBe('F d -3 m:1');
    const o2 = findSpaceGroup('Fd-3m:2')!;
    expect(o2.hermannMauguin).toBe('F d -3 m:2');
    expect(o2.hall).toBe('-F 4vw 2vw 3');
    // origin 2 is at a centre of symmetry: -x,-y,-z is an operation; in origin 1 it is not
    expect(o2.operations).toContain('-x,-y,-z');
    expect(findSpaceGroup('Fd-3m')!.operations).not.toContain('-x,-y,-z');
    expect(findSpaceGroup('Fd-3m')!.operations).toContain('-x+1/4,-y+1/4,-z+1/4');
  });

  it('takes hexagonal axes for rhombohedral groups unless ":R" is given', () => {
    const h = findSpaceGroup('R-3m')!;
    expect(h.hermannMauguin).toBe('R -3 m:H');
    expect(h.shortSymbol).toBe('R-3m');
    expect(h.operations).toHaveLength(36); // 12 x 3 R-centring translations
    expect(h.crystalSystem).toBe('trigonal');
    const r = findSpaceGroup('R -3 m:R')!;
    expect(r.hermannMauguin).toBe('R -3 m:R');
    expect(r.operations).toHaveLength(12);
    expect(r.centring).toBe('R');
  });

  it('reads "P 63/m m c", "P63/mmc" and CIF\'s "P6_3/mmc" as number 194', () => {
    for (const q of ['P 63/m m c', 'P63/mmc', 'P6_3/mmc', 'p 63/M M C']) {
      const sg = findSpaceGroup(q)!;
      expect([sg.number, sg.hermannMauguin, sg.crystalSystem, sg.laueClass]).toEqual([194, 'P 63/m m c', 'hexagonal', '6/mmm']);
      expect(sg.operations).toHaveLength(24);
    }
  });

  it('reads monoclinic short symbols as the unique-axis-b setting ("P21/c" is "P 1 21/c 1")', () => {
    expect(findSpaceGroup('P21/c')!.hermannMauguin).toBe('P 1 21/c 1');
    expect(findSpaceGroup('P 1 21/c 1')!.operations.sort()).toEqual(['-x,-y,-z', '-x,y+1/2,-z+1/2', 'x,-y+1/2,z+1/2', 'x,y,z']);
  });

  it("accepts the e-glide symbols: 'Cmce' is 'C m c a' (64)", () => {
    expect(findSpaceGroup('Cmce')!.hermannMauguin).toBe('C m c a');
    expect(findSpaceGroup('Aem2')!.number).toBe(39);
  });

  it('lists the identity first and every operation once', () => {
    for (const q of [1, 2, 14, 62, 139, 166, 194, 227, 230]) {
      const ops = findSpaceGroup(q)!.operations;
      expect(ops[0]).toBe('x,y,z');
      expect(new Set(ops).size).toBe(ops.length);
    }
  });

  it('returns undefined for unknown symbols and numbers outside 1..230', () => {
    for (const q of ['Xyz', '', 'P 7', 0, 231, 1.5, '227:3', 'Fm-3m:2']) expect(findSpaceGroup(q)).toBeUndefined();
  });
});

describe('findSpaceGroup results', () => {
  it('are copies: changing one does not change the next look-up', () => {
    const a = findSpaceGroup('Pm-3m')!;
    a.operations.reverse();
    a.operations.pop();
    const b = findSpaceGroup('Pm-3m')!;
    expect(b.operations).toHaveLength(48);
    expect(b.operations[0]).toBe('x,y,z');
  });
});

/**
 * Displacement parameters: B = 8 pi^2 U (K. N. Trueblood et al., Acta Cryst. A52 (1996)
 * 770) and U_eq = one third of the trace of the orthogonalised U (R. X. Fischer and
 * E. Tillmanns, Acta Cryst. C44 (1988) 775), checked here against that trace computed
 * another way: U_cart = A N U N A^T with A the orthogonalisation matrix (a along x, b in
 * the xy plane; International Tables Vol. B, sec. 1.1.3, from memory) and N = diag(a*, b*, c*).
 */
import { describe, expect, it } from 'vitest';
import {
  type AnisotropicU,
  bIsoFromUIsoA2,
  reciprocalMetricTensor,
  uEquivalentA2,
  uIsoFromBIsoA2,
  type UnitCell,
} from '../../../../core/crystal';

const DEG = Math.PI / 180;

function orthogonalisedTraceOver3(u: AnisotropicU, cell: UnitCell): number {
  const { aA: a, bA: b, cA: c } = cell;
  const [al, be, ga] = [cell.alphaDeg * DEG, cell.betaDeg * DEG, cell.gammaDeg * DEG];
  const v = Math.sqrt(1 - Math.cos(al) ** 2 - Math.cos(be) ** 2 - Math.cos(ga) ** 2 + 2 * Math.cos(al) * Math.cos(be) * Math.cos(ga));
  // Columns are a, b, c in Cartesian coordinates.
  const A = [
    [a, b * Math.cos(ga), c * Math.cos(be)],
    [0, b * Math.sin(ga), (c * (Math.cos(al) - Math.cos(be) * Math.cos(ga))) / Math.sin(ga)],
    [0, 0, (c * v) / Math.sin(ga)],
  ];
  const gs = reciprocalMetricTensor(cell);
  const n = [Math.sqrt(gs[0]), Math.sqrt(gs[4]), Math.sqrt(gs[8])];
  const U = [
    [u.u11, u.u12, u.u13],
    [u.u12, u.u22, u.u23],
    [u.u13, u.u23, u.u33],
  ];
  let trace = 0;
  for (let i = 0; i < 3; i++) {
    for (let k = 0; k < 3; k++) {
      for (let l = 0; l < 3; l++) trace += A[i]![k]! * n[k]! * U[k]![l]! * n[l]! * A[i]![l]!;
    }
  }
  return trace / 3;
}

describe('bIsoFromUIsoA2 and uIsoFromBIsoA2', () => {
  it('convert with B = 8 pi^2 U: U = 0.0076 Å^2 is B = 0.6000 Å^2', () => {
    expect(bIsoFromUIsoA2(0.0076)).toBeCloseTo(0.6, 3);
    expect(uIsoFromBIsoA2(bIsoFromUIsoA2(0.0123))).toBeCloseTo(0.0123, 15);
  });
});

describe('uEquivalentA2', () => {
  const u: AnisotropicU = { u11: 0.011, u22: 0.008, u33: 0.014, u12: 0.002, u13: -0.003, u23: 0.001 };

  it('is the mean of U11, U22, U33 for a cubic or orthorhombic cell, whatever the off-diagonal terms', () => {
    const ortho = { aA: 5, bA: 6, cA: 7, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 };
    expect(uEquivalentA2(u, ortho)).toBeCloseTo((0.011 + 0.008 + 0.014) / 3, 15);
  });

  it('equals one third of the trace of A N U N A^T for monoclinic, hexagonal and triclinic cells', () => {
    const cells: UnitCell[] = [
      { aA: 5.1505, bA: 5.2116, cA: 5.3173, alphaDeg: 90, betaDeg: 99.23, gammaDeg: 90 },
      { aA: 3.25, bA: 3.25, cA: 5.21, alphaDeg: 90, betaDeg: 90, gammaDeg: 120 },
      { aA: 5.2, bA: 6.3, cA: 7.4, alphaDeg: 78, betaDeg: 84, gammaDeg: 101 },
    ];
    for (const cell of cells) expect(uEquivalentA2(u, cell)).toBeCloseTo(orthogonalisedTraceOver3(u, cell), 14);
  });
});

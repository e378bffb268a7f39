/**
 * Space-group symmetry operations (Seitz operators {R | t}) acting on fractional
 * coordinates:
 *
 *   x' = R x + t          (x a column of fractional coordinates)
 *   h' = h R              (h a row of Miller indices; h'.x = h.(R x) so the phase
 *                          of h' at x equals that of h at R x)
 *
 * with R an integer matrix of determinant +-1 and t taken modulo the lattice, in
 * [0, 1). Two operations are the same space-group element when their rotations are
 * equal and their translations differ by a lattice vector (International Tables for
 * Crystallography Vol. A, ch. 1.2 "Symmetry operations", and ch. 1.4 for the
 * 'x,y,z' coordinate-triplet notation used by CIF's _space_group_symop_operation_xyz).
 *
 * Translations of space-group operations in every setting of International Tables
 * (and of gemmi's tables) are multiples of 1/24 (halves, thirds, quarters, sixths,
 * eighths). The parser snaps decimal translations within SNAP_TOLERANCE of such a
 * multiple onto it (so '0.33333+x' reads as x+1/3) and rejects any other value, so
 * that composition and comparison stay exact.
 */

/** A Seitz operator {R | t}. */
export interface SymmetryOperation {
  /** R, 9 integers, row-major, acting on column fractional coordinates. */
  rotation: readonly number[];
  /** t, fractional, each component in [0, 1) and a multiple of 1/24. */
  translation: readonly [number, number, number];
}

/** Translations are held exactly as multiples of 1/TRANSLATION_DENOMINATOR. */
export const TRANSLATION_DENOMINATOR = 24;
/** A decimal translation within this of a multiple of 1/24 is read as that multiple. */
const SNAP_TOLERANCE = 5e-3;
/** The largest order of a crystallographic space group modulo lattice translations (F m -3 m). */
export const MAX_SPACE_GROUP_ORDER = 192;

export const IDENTITY_OPERATION: SymmetryOperation = Object.freeze({
  rotation: Object.freeze([1, 0, 0, 0, 1, 0, 0, 0, 1]),
  translation: Object.freeze([0, 0, 0]) as readonly [number, number, number],
});

/** Integer numerator n of t = n / 24 wrapped into [0, 24); NaN when t is off the grid. */
function translationNumerator(t: number): number {
  const n = Math.round(t * TRANSLATION_DENOMINATOR);
  if (Math.abs(n - t * TRANSLATION_DENOMINATOR) > 1e-6) return Number.NaN;
  return ((n % TRANSLATION_DENOMINATOR) + TRANSLATION_DENOMINATOR) % TRANSLATION_DENOMINATOR;
}

/** Wraps an exact multiple of 1/24 into [0, 1). */
function wrapTranslation(t: number): number {
  return translationNumerator(t) / TRANSLATION_DENOMINATOR;
}

function readError(text: string, reason: string): RangeError {
  return new RangeError(`cannot read symmetry operation "${text}": ${reason}`);
}

/** Parses a number written as '1', '0.5', '1/2', '3/4' or '.25'. */
function parseNumber(s: string): number {
  const slash = s.indexOf('/');
  if (slash >= 0) {
    const num = Number(s.slice(0, slash));
    const den = Number(s.slice(slash + 1));
    return den === 0 ? Number.NaN : num / den;
  }
  return Number(s);
}

const TERM = /([+-]?)(\d+(?:\.\d*)?(?:\/\d+(?:\.\d*)?)?|\.\d+)?(\*)?([xyz])?/y;

/** Parses one component ("-x+y+1/4") into three integer coefficients and a translation. */
function parseComponent(text: string, component: string, which: number): [number, number, number, number] {
  const s = component.replace(/\s+/g, '').toLowerCase();
  if (s === '') throw readError(text, `component ${which + 1} is empty`);
  const coeff = [0, 0, 0];
  let shift = 0;
  let pos = 0;
  while (pos < s.length) {
    TERM.lastIndex = pos;
    const m = TERM.exec(s);
    if (!m || m[0] === '' || (m[0] === '+' || m[0] === '-')) {
      throw readError(text, `unexpected "${s.slice(pos)}" in component ${which + 1} ("${component.trim()}")`);
    }
    if (pos > 0 && m[1] === '') {
      throw readError(text, `missing + or - before "${m[0]}" in component ${which + 1}`);
    }
    const sign = m[1] === '-' ? -1 : 1;
    const value = m[2] === undefined ? 1 : parseNumber(m[2]);
    if (!Number.isFinite(value)) throw readError(text, `cannot read the number "${m[2]}"`);
    if (m[4] !== undefined) {
      if (!Number.isInteger(value)) {
        throw readError(text, `coefficient ${m[2]} of ${m[4]} is not an integer`);
      }
      coeff['xyz'.indexOf(m[4])]! += sign * value;
    } else {
      if (m[2] === undefined || m[3] !== undefined) {
        throw readError(text, `unexpected "${m[0]}" in component ${which + 1}`);
      }
      shift += sign * value;
    }
    pos = TERM.lastIndex;
  }
  return [coeff[0]!, coeff[1]!, coeff[2]!, shift];
}

/**
 * Reads an operation in coordinate-triplet notation: 'x,y,z', '-y+1/4,x+1/4,z+1/4',
 * '1/2+x,y,-z', 'x-y,x,z+1/6', 'X, Y, Z', '0.5+x,y,z'. Case and spaces are free;
 * integer coefficients ('2x', '2*x') are allowed; translations may be fractions or
 * decimals and are wrapped into [0, 1). CIF quotes must be removed by the caller.
 *
 * @throws RangeError `cannot read symmetry operation "<text>": <reason>` when the text is
 *   not three components, a term cannot be read, a coefficient is not an integer, the
 *   matrix is singular or not of determinant +-1, or a translation is not a multiple of 1/24.
 */
export function parseSymmetryOperation(text: string): SymmetryOperation {
  if (typeof text !== 'string') throw new TypeError(`symmetry operation must be a string; got ${typeof text}`);
  const parts = text.split(',');
  if (parts.length !== 3) {
    throw readError(text, `expected three comma-separated components, found ${parts.length}`);
  }
  const rotation: number[] = [];
  const translation: number[] = [];
  parts.forEach((part, i) => {
    const [a, b, c, t] = parseComponent(text, part, i);
    rotation.push(a, b, c);
    const n = Math.round(t * TRANSLATION_DENOMINATOR);
    if (Math.abs(t * TRANSLATION_DENOMINATOR - n) > SNAP_TOLERANCE * TRANSLATION_DENOMINATOR) {
      throw readError(
        text,
        `translation ${t} in component ${i + 1} is not a multiple of 1/24 (space-group translations are halves, thirds, quarters, sixths or eighths)`,
      );
    }
    translation.push(wrapTranslation(n / TRANSLATION_DENOMINATOR));
  });
  const d = determinant(rotation);
  if (d !== 1 && d !== -1) {
    throw readError(text, `the rotation part has determinant ${d}; a symmetry operation needs +1 or -1`);
  }
  return { rotation, translation: [translation[0]!, translation[1]!, translation[2]!] };
}

/** Determinant of a row-major 3x3 matrix. */
export function determinant(r: readonly number[]): number {
  return (
    r[0]! * (r[4]! * r[8]! - r[5]! * r[7]!) -
    r[1]! * (r[3]! * r[8]! - r[5]! * r[6]!) +
    r[2]! * (r[3]! * r[7]! - r[4]! * r[6]!)
  );
}

function gcd(a: number, b: number): number {
  return b === 0 ? a : gcd(b, a % b);
}

/** A translation component as '', '+1/2', '+1/3', ... (for the canonical triplet). */
function formatShift(t: number): string {
  const n = translationNumerator(t);
  if (Number.isNaN(n)) throw new RangeError(`translation ${t} is not a multiple of 1/24 and cannot be written as a fraction`);
  if (n === 0) return '';
  const g = gcd(n, TRANSLATION_DENOMINATOR);
  return `+${n / g}/${TRANSLATION_DENOMINATOR / g}`;
}

/**
 * Canonical triplet: in each component the x, y, z terms in that order, then the
 * translation as a reduced fraction in [0, 1): 'x,y,z', '-y+1/4,x+1/4,z+1/4',
 * 'x-y,x,z+1/6', 'x+1/2,y,-z'. This is the form gemmi's Op.triplet() writes, and
 * parseSymmetryOperation(formatSymmetryOperation(op)) equals op.
 */
export function formatSymmetryOperation(op: SymmetryOperation): string {
  const out: string[] = [];
  for (let i = 0; i < 3; i++) {
    let s = '';
    for (let j = 0; j < 3; j++) {
      const c = op.rotation[3 * i + j]!;
      if (c === 0) continue;
      const sign = c < 0 ? '-' : s === '' ? '' : '+';
      const mag = Math.abs(c) === 1 ? '' : String(Math.abs(c));
      s += sign + mag + 'xyz'[j];
    }
    const shift = formatShift(op.translation[i]!);
    if (s === '') s = shift === '' ? '0' : shift.slice(1);
    else s += shift;
    out.push(s);
  }
  return out.join(',');
}

/**
 * Product a.b, the operation "first b, then a":
 *   {Ra | ta}{Rb | tb} = {Ra Rb | Ra tb + ta}, translation wrapped into [0, 1).
 */
export function composeOperations(a: SymmetryOperation, b: SymmetryOperation): SymmetryOperation {
  const ra = a.rotation;
  const rb = b.rotation;
  const rotation = new Array<number>(9);
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      rotation[3 * i + j] = ra[3 * i]! * rb[j]! + ra[3 * i + 1]! * rb[3 + j]! + ra[3 * i + 2]! * rb[6 + j]!;
    }
  }
  const tb = b.translation;
  const ta = a.translation;
  const t0 = ra[0]! * tb[0] + ra[1]! * tb[1] + ra[2]! * tb[2] + ta[0];
  const t1 = ra[3]! * tb[0] + ra[4]! * tb[1] + ra[5]! * tb[2] + ta[1];
  const t2 = ra[6]! * tb[0] + ra[7]! * tb[1] + ra[8]! * tb[2] + ta[2];
  return { rotation, translation: [wrapTranslation(t0), wrapTranslation(t1), wrapTranslation(t2)] };
}

/** A string key equal for two operations exactly when they are equal modulo lattice translations. */
export function operationKey(op: SymmetryOperation): string {
  const t = op.translation;
  return `${op.rotation.join(' ')}|${translationNumerator(t[0])} ${translationNumerator(t[1])} ${translationNumerator(t[2])}`;
}

/** True when a and b have the same rotation and translations that differ by a lattice vector. */
export function operationsEqualModuloLattice(a: SymmetryOperation, b: SymmetryOperation): boolean {
  return operationKey(a) === operationKey(b);
}

/**
 * Up to `limit` elements of the group generated by `generators` (identity first, then
 * in order of discovery, breadth first), as distinct operations modulo lattice
 * translations. Stops as soon as `limit` elements are found; never throws.
 */
export function generatedOperations(generators: readonly SymmetryOperation[], limit: number): SymmetryOperation[] {
  const seen = new Map<string, SymmetryOperation>([[operationKey(IDENTITY_OPERATION), IDENTITY_OPERATION]]);
  let frontier: SymmetryOperation[] = [IDENTITY_OPERATION];
  while (frontier.length > 0 && seen.size < limit) {
    const next: SymmetryOperation[] = [];
    for (const a of frontier) {
      for (const g of generators) {
        const c = composeOperations(g, a);
        const key = operationKey(c);
        if (!seen.has(key)) {
          seen.set(key, c);
          next.push(c);
          if (seen.size >= limit) return [...seen.values()];
        }
      }
    }
    frontier = next;
  }
  return [...seen.values()];
}

/**
 * The group generated by `generators` (the identity always included), as distinct
 * operations modulo lattice translations, identity first, then in order of discovery.
 *
 * @param maxOrder the most operations accepted; defaults to 192, the order of
 *   F m -3 m on its conventional cell, the largest of any space group.
 * @throws RangeError when the closure exceeds `maxOrder` (the generators are not those
 *   of a space group on a conventional cell, or a translation is wrong).
 */
export function closeGroup(
  generators: readonly SymmetryOperation[],
  maxOrder: number = MAX_SPACE_GROUP_ORDER,
): SymmetryOperation[] {
  const group = generatedOperations(generators, maxOrder + 1);
  if (group.length > maxOrder) {
    throw new RangeError(
      `symmetry operations generate more than ${maxOrder} distinct operations modulo lattice translations; a space group on its conventional cell has at most ${MAX_SPACE_GROUP_ORDER}: check the operations`,
    );
  }
  return group;
}

/** R x + t for a fractional point (not wrapped). */
export function applyToPoint(op: SymmetryOperation, xyz: readonly [number, number, number]): [number, number, number] {
  const r = op.rotation;
  const t = op.translation;
  return [
    r[0]! * xyz[0] + r[1]! * xyz[1] + r[2]! * xyz[2] + t[0],
    r[3]! * xyz[0] + r[4]! * xyz[1] + r[5]! * xyz[2] + t[1],
    r[6]! * xyz[0] + r[7]! * xyz[1] + r[8]! * xyz[2] + t[2],
  ];
}

/** h' = h R for Miller indices (row vector times R), the reciprocal-space image used for equivalent reflections. */
export function applyToHkl(op: SymmetryOperation, hkl: readonly [number, number, number]): [number, number, number] {
  const r = op.rotation;
  const [h, k, l] = hkl;
  return [
    h * r[0]! + k * r[3]! + l * r[6]!,
    h * r[1]! + k * r[4]! + l * r[7]!,
    h * r[2]! + k * r[5]! + l * r[8]!,
  ];
}

/** Phase shift 2 pi h.t (radians) that the operation adds to the reflection h. */
export function phaseShiftRad(op: SymmetryOperation, hkl: readonly [number, number, number]): number {
  const t = op.translation;
  return 2 * Math.PI * (hkl[0] * t[0] + hkl[1] * t[1] + hkl[2] * t[2]);
}

/**
 * Direct least-squares ellipse fit: the numerically stable formulation of
 * R. Halir and J. Flusser, "Numerically stable direct least squares fitting of
 * ellipses", Proc. WSCG 1998, 125-132, of the method of A. Fitzgibbon, M. Pilu and
 * R. B. Fisher, "Direct least square fitting of ellipses", IEEE TPAMI 21 (1999)
 * 476-480.
 *
 * It minimises the algebraic distance sum (a x^2 + b xy + c y^2 + d x + e y + f)^2
 * under the constraint 4ac - b^2 = 1, which admits only ellipses. Halir and
 * Flusser split the design matrix into its quadratic part D1 = [x^2, xy, y^2] and
 * linear part D2 = [x, y, 1], form S1 = D1'D1, S2 = D1'D2, S3 = D2'D2, eliminate
 * the linear coefficients, (d e f)' = T (a b c)' with T = -S3^-1 S2', and solve
 * the 3 x 3 eigenproblem C1^-1 (S1 + S2 T) p = lambda p with
 * C1 = [[0, 0, 2], [0, -1, 0], [2, 0, 0]]; the answer is the eigenvector with
 * 4ac - b^2 > 0 (their eqs. 24-29).
 *
 * Before forming the scatter matrices the points are centred on their mean and
 * scaled to unit RMS distance (common practice for algebraic fits; it does not
 * change the minimiser up to the constraint's scaling, which only rescales the
 * conic), and the conic is mapped back afterwards. The eigenvalues of
 * C1^-1 M are real (M is positive definite, so C1^-1 M is similar to the symmetric
 * M^1/2 C1^-1 M^1/2); they are the roots of the characteristic cubic, found by the
 * trigonometric method and polished by Newton steps; each eigenvector is the
 * largest cross product of two rows of (C1^-1 M - lambda I).
 */
import { ellipseFromConic, type Conic, type EllipseGeometry } from './conic-ellipse';

export type DirectEllipseFit =
  | { ok: true; conic: Conic; ellipse: EllipseGeometry; pointCount: number }
  | { ok: false; reason: string; pointCount: number };

/**
 * @param xPx, yPx point coordinates, pixels, same length
 * @returns the conic and its ellipse, or ok false with a reason (fewer than 6
 *   points, points on a line or a conic that is not an ellipse)
 * @throws RangeError when the arrays differ in length or hold non-finite values
 */
export function fitEllipseDirect(xPx: ArrayLike<number>, yPx: ArrayLike<number>): DirectEllipseFit {
  const n = xPx.length;
  if (yPx.length !== n) throw new RangeError(`xPx and yPx must have the same length; got ${n} and ${yPx.length}`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(xPx[i]!) || !Number.isFinite(yPx[i]!)) throw new RangeError(`point ${i} is not finite: (${xPx[i]}, ${yPx[i]})`);
  }
  if (n < 6) return { ok: false, reason: `an ellipse fit needs at least 6 points; got ${n}`, pointCount: n };
  let mx = 0, my = 0;
  for (let i = 0; i < n; i++) { mx += xPx[i]!; my += yPx[i]!; }
  mx /= n; my /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (xPx[i]! - mx) ** 2 + (yPx[i]! - my) ** 2;
  const s = Math.sqrt(ss / n);
  if (!(s > 0)) return { ok: false, reason: 'all points coincide', pointCount: n };

  const S1 = new Float64Array(9), S2 = new Float64Array(9), S3 = new Float64Array(9);
  const d1 = new Float64Array(3), d2 = new Float64Array(3);
  for (let i = 0; i < n; i++) {
    const x = (xPx[i]! - mx) / s;
    const y = (yPx[i]! - my) / s;
    d1[0] = x * x; d1[1] = x * y; d1[2] = y * y;
    d2[0] = x; d2[1] = y; d2[2] = 1;
    for (let r = 0; r < 3; r++) {
      for (let c = 0; c < 3; c++) {
        S1[r * 3 + c] += d1[r]! * d1[c]!;
        S2[r * 3 + c] += d1[r]! * d2[c]!;
        S3[r * 3 + c] += d2[r]! * d2[c]!;
      }
    }
  }
  const S3inv = invert3(S3);
  if (!S3inv) return { ok: false, reason: 'the points are degenerate (collinear)', pointCount: n };
  // T = -S3^-1 S2'
  const T = new Float64Array(9);
  for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) {
    let v = 0;
    for (let k = 0; k < 3; k++) v += S3inv[r * 3 + k]! * S2[c * 3 + k]!;
    T[r * 3 + c] = -v;
  }
  // M = S1 + S2 T, then C1^-1 M = [M row 2 / 2; -M row 1; M row 0 / 2].
  const M = new Float64Array(9);
  for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) {
    let v = S1[r * 3 + c]!;
    for (let k = 0; k < 3; k++) v += S2[r * 3 + k]! * T[k * 3 + c]!;
    M[r * 3 + c] = v;
  }
  const R = new Float64Array(9);
  for (let c = 0; c < 3; c++) {
    R[c] = M[6 + c]! / 2;
    R[3 + c] = -M[3 + c]!;
    R[6 + c] = M[c]! / 2;
  }
  let best: Float64Array | null = null;
  let bestCond = 0;
  for (const lambda of realEigenvalues3(R)) {
    const v = nullVector3(R, lambda);
    if (!v) continue;
    const cond = 4 * v[0]! * v[2]! - v[1]! * v[1]!;
    if (cond > bestCond) { bestCond = cond; best = v; }
  }
  if (!best) return { ok: false, reason: 'no eigenvector satisfies 4ac - b^2 > 0: the points do not lie near an ellipse', pointCount: n };
  const A = best[0]!, B = best[1]!, C = best[2]!;
  const D = T[0]! * A + T[1]! * B + T[2]! * C;
  const E = T[3]! * A + T[4]! * B + T[5]! * C;
  const F = T[6]! * A + T[7]! * B + T[8]! * C;
  // Undo x_n = (x - mx)/s, y_n = (y - my)/s.
  const s2 = s * s;
  const conic: Conic = {
    a: A / s2,
    b: B / s2,
    c: C / s2,
    d: (-2 * A * mx - B * my) / s2 + D / s,
    e: (-2 * C * my - B * mx) / s2 + E / s,
    f: (A * mx * mx + B * mx * my + C * my * my) / s2 - (D * mx + E * my) / s + F,
  };
  const ellipse = ellipseFromConic(conic);
  if (!ellipse) return { ok: false, reason: 'the fitted conic is not a real ellipse', pointCount: n };
  return { ok: true, conic, ellipse, pointCount: n };
}

function invert3(m: Float64Array): Float64Array | null {
  const [a, b, c, d, e, f, g, h, i] = m as unknown as number[];
  const A = e! * i! - f! * h!, B = -(d! * i! - f! * g!), C = d! * h! - e! * g!;
  const det = a! * A + b! * B + c! * C;
  const scale = Math.max(...Array.from(m, Math.abs)) ** 3;
  if (!(Math.abs(det) > 1e-14 * scale)) return null;
  const out = Float64Array.from([
    A, -(b! * i! - c! * h!), b! * f! - c! * e!,
    B, a! * i! - c! * g!, -(a! * f! - c! * d!),
    C, -(a! * h! - b! * g!), a! * e! - b! * d!,
  ]);
  for (let k = 0; k < 9; k++) out[k] = out[k]! / det;
  return out;
}

/** Real roots of det(R - lambda I) = 0 for a 3 x 3 matrix with real eigenvalues. */
function realEigenvalues3(r: Float64Array): number[] {
  const [a, b, c, d, e, f, g, h, i] = r as unknown as number[];
  // lambda^3 - p2 lambda^2 + p1 lambda - p0 = 0
  const p2 = a! + e! + i!;
  const p1 = a! * e! - b! * d! + a! * i! - c! * g! + e! * i! - f! * h!;
  const p0 = a! * (e! * i! - f! * h!) - b! * (d! * i! - f! * g!) + c! * (d! * h! - e! * g!);
  // Depressed cubic t^3 + P t + Q = 0 with lambda = t + p2/3.
  const sh = p2 / 3;
  const P = p1 - (p2 * p2) / 3;
  const Q = (-2 * p2 * p2 * p2) / 27 + (p2 * p1) / 3 - p0;
  let roots: number[];
  if (P < 0) {
    const m = 2 * Math.sqrt(-P / 3);
    const arg = Math.max(-1, Math.min(1, ((3 * Q) / (P * m))));
    const th = Math.acos(arg) / 3;
    roots = [0, 1, 2].map((k) => m * Math.cos(th - (2 * Math.PI * k) / 3) + sh);
  } else {
    roots = [Math.cbrt(-Q) + sh];
  }
  const poly = (x: number) => ((x - p2) * x + p1) * x - p0;
  const dpoly = (x: number) => (3 * x - 2 * p2) * x + p1;
  return roots.map((x) => {
    for (let k = 0; k < 4; k++) {
      const dp = dpoly(x);
      if (dp === 0) break;
      const nx = x - poly(x) / dp;
      if (!Number.isFinite(nx)) break;
      x = nx;
    }
    return x;
  });
}

/** Unit null vector of (R - lambda I): the longest cross product of two of its rows. */
function nullVector3(r: Float64Array, lambda: number): Float64Array | null {
  const rows = [0, 1, 2].map((k) => [r[k * 3]! - (k === 0 ? lambda : 0), r[k * 3 + 1]! - (k === 1 ? lambda : 0), r[k * 3 + 2]! - (k === 2 ? lambda : 0)]);
  let best: number[] | null = null;
  let bestNorm = 0;
  for (const [p, q] of [[0, 1], [0, 2], [1, 2]] as const) {
    const u = rows[p]!, v = rows[q]!;
    const c = [u[1]! * v[2]! - u[2]! * v[1]!, u[2]! * v[0]! - u[0]! * v[2]!, u[0]! * v[1]! - u[1]! * v[0]!];
    const nrm = Math.hypot(c[0]!, c[1]!, c[2]!);
    if (nrm > bestNorm) { bestNorm = nrm; best = c; }
  }
  if (!best || !(bestNorm > 0)) return null;
  return Float64Array.from(best, (x) => x / bestNorm);
}
